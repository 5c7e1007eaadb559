import type { Logger } from '../lib/logger';

/**
 * Work done after the answer has gone out (a password-reset e-mail): the request that asked for it answers at
 * once, the same way and in the same time whatever the work finds. Jobs run in this process one at a time, in
 * the order queued; a failure is logged, never seen by the request. A job in flight when the process dies is
 * lost, so queue only work whose loss the person can repair by asking again.
 */
export interface JobQueue {
  /** Runs `fn` after the current request's answer, once the jobs queued before it have finished. */
  enqueue(name: string, fn: () => Promise<void>): void;
  /** Resolves when every job queued so far has finished (tests; shutdown). */
  idle(): Promise<void>;
}

/** `logger`: where a failed job is reported (the server's logger; absent in tests, where failures go to stderr). */
export function createJobQueue(logger?: Pick<Logger, 'error'>): JobQueue {
  let tail: Promise<void> = Promise.resolve();
  return {
    enqueue(name, fn) {
      tail = tail
        // setImmediate: after the I/O that sends the answer, not in the same turn.
        .then(() => new Promise<void>((resolve) => setImmediate(resolve)))
        .then(fn)
        .catch((err: unknown) =>
          logger ? logger.error({ err, job: name }, 'job failed') : console.error(`[coilpath] job ${name} failed`, err),
        );
    },
    idle: () => tail,
  };
}
