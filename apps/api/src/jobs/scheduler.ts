import type { AppContext } from '../context';
import type { Database } from '../db/client';

/** A scheduled job: runs when due; must be idempotent per period (see `job_runs`). */
export interface ScheduledJob {
  name: string;
  run(ctx: AppContext): Promise<void>;
}

/** Jobs registered by modules (the Watchlist's daily digest, plan regeneration…). */
export const scheduledJobs: ScheduledJob[] = [];

/**
 * Runs `fn` while holding the PostgreSQL advisory lock of `name`, so that of several API processes on one
 * database only one runs a job at a time; the others skip it (answer false) and look again at their next
 * tick. The lock is a session lock on a connection kept aside for the run, released at the end (or by the
 * server if the process dies). On PGlite (one process owns the database) it simply runs `fn`.
 */
export async function withJobLock(database: Database, name: string, fn: () => Promise<void>): Promise<boolean> {
  if (!database.pool) {
    await fn();
    return true;
  }
  const key = `coilpath-job:${name}`;
  const client = await database.pool.connect();
  try {
    const { rows } = await client.query<{ locked: boolean }>('SELECT pg_try_advisory_lock(hashtext($1)) AS locked', [key]);
    if (!rows[0]?.locked) return false;
    try {
      await fn();
    } finally {
      await client.query('SELECT pg_advisory_unlock(hashtext($1))', [key]);
    }
    return true;
  } finally {
    client.release();
  }
}

/** Checks every `intervalSeconds` whether each job is due; errors are logged, never fatal. */
export function startScheduler(ctx: AppContext, intervalSeconds: number): { stop(): void } {
  let running = false;
  const tick = async () => {
    if (running) return;
    running = true;
    try {
      for (const job of scheduledJobs) {
        const ran = await withJobLock(ctx.database, job.name, () => job.run(ctx)).catch((err: unknown) => {
          ctx.logger?.error({ err, job: job.name }, `job ${job.name} failed`);
          return true;
        });
        if (!ran) ctx.logger?.info({ job: job.name }, `job ${job.name}: another process is running it`);
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
