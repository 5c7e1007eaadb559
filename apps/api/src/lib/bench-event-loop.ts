/**
 * The event-loop delay of this process, for `npm run bench` only: started when the server runs with
 * `COILPATH_BENCH_ELD=1` as a child process with an IPC channel (the bench starts it so). Nothing is served
 * over HTTP; the bench asks over the IPC channel:
 *   { type: 'eld:reset' }  starts a new measuring window
 *   { type: 'eld:read' }   answers { type: 'eld', stats } for the window so far (milliseconds)
 */
import { monitorEventLoopDelay } from 'node:perf_hooks';

export interface EventLoopDelayStats {
  mean: number;
  p50: number;
  p99: number;
  max: number;
}

export function answerEventLoopDelay(): void {
  if (!process.send) return;
  const h = monitorEventLoopDelay({ resolution: 10 });
  h.enable();
  const ms = (ns: number) => ns / 1e6;
  process.on('message', (m: { type?: string }) => {
    if (m?.type === 'eld:reset') h.reset();
    if (m?.type === 'eld:read') {
      const stats: EventLoopDelayStats = { mean: ms(h.mean), p50: ms(h.percentile(50)), p99: ms(h.percentile(99)), max: ms(h.max) };
      process.send!({ type: 'eld', stats });
    }
  });
}
