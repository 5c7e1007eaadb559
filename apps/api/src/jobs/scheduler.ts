import type { AppContext } from '../context';

/** A scheduled job: runs when due; must be idempotent per period (see `job_runs`). */
export interface ScheduledJob {
  name: string;
  run(ctx: AppContext): Promise<void>;
}

/** Jobs registered by modules (the Watchlist's daily digest, plan regeneration…). */
export const scheduledJobs: ScheduledJob[] = [];

/** Checks every `intervalSeconds` whether each job is due; errors are logged, never fatal. */
export function startScheduler(ctx: AppContext, intervalSeconds: number): { stop(): void } {
  let running = false;
  const tick = async () => {
    if (running) return;
    running = true;
    try {
      for (const job of scheduledJobs) {
        await job.run(ctx).catch((err: unknown) => console.error(`[coilpath] job ${job.name} failed`, err));
      }
    } finally {
      running = false;
    }
  };
  const timer = setInterval(() => void tick(), intervalSeconds * 1000);
  timer.unref();
  void tick();
  return { stop: () => clearInterval(timer) };
}
