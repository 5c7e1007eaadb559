/**
 * Several API processes on one PostgreSQL: the scheduled jobs run under an advisory lock and the daily digest
 * goes out once per branch and day, however many processes tick. Needs a real server (the PostgreSQL pass of
 * `.ci/run`); skipped on PGlite, where one process owns the database.
 */
import type {} from '../../apps/api/src/lib/http-types'; // the Request augmentation (req.user, req.ctx)
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { openDatabase, type Database } from '../../apps/api/src/db/client';
import { seedDemo } from '../../apps/api/src/db/seed';
import { branches } from '../../apps/api/src/db/schema';
import { withJobLock } from '../../apps/api/src/jobs/scheduler';
import { openTestDatabase } from '../../apps/api/src/testing/harness';

const root = join(import.meta.dirname, '../..');

/** Waits for `check` to hold, looking every 200 ms, at most `ms`. */
async function until<T>(what: string, ms: number, check: () => Promise<T | undefined | false> | T | undefined | false): Promise<T> {
  const deadline = Date.now() + ms;
  for (;;) {
    const v = await check();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`Gave up waiting for ${what} after ${ms / 1000} s`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

interface Proc {
  child: ChildProcess;
  out: string[];
  dir: string;
}

function startApi(databaseUrl: string): Proc {
  const dir = mkdtempSync(join(tmpdir(), 'coilpath-mp-'));
  const child = spawn(process.execPath, ['--import', 'tsx', 'apps/api/src/server.ts'], {
    cwd: root,
    env: {
      ...process.env,
      DATABASE_URL: databaseUrl,
      PORT: '0',
      HOST: '127.0.0.1',
      COILPATH_DATA_DIR: dir,
      COILPATH_SECRET: 'multi-process-test-secret-0123456789abcdef',
      COILPATH_SEED: 'never',
      COILPATH_JOBS: 'on',
      COILPATH_JOBS_INTERVAL_SECONDS: '5',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const out: string[] = [];
  child.stdout!.on('data', (d: Buffer) => out.push(d.toString()));
  child.stderr!.on('data', (d: Buffer) => out.push(d.toString()));
  return { child, out, dir };
}

async function stop(p: Proc) {
  if (p.child.exitCode === null) {
    const gone = new Promise((r) => p.child.once('exit', r));
    p.child.kill('SIGTERM');
    await Promise.race([gone, new Promise((r) => setTimeout(r, 10_000))]);
    if (p.child.exitCode === null) p.child.kill('SIGKILL');
  }
  rmSync(p.dir, { recursive: true, force: true });
}

describe.runIf(process.env.DATABASE_URL)('several API processes on one PostgreSQL', () => {
  let database: Database;
  let url: string;
  const procs: Proc[] = [];

  beforeAll(async () => {
    database = await openTestDatabase();
    url = (database.pool as unknown as { options: { connectionString: string } }).options.connectionString;
    await seedDemo(database.db);
    // Every branch's digest is due now: its hour (local) has come whatever the time of day.
    await database.db.update(branches).set({ digestHour: 0 });
  });

  afterAll(async () => {
    await Promise.all(procs.map(stop));
    await database?.close();
  });

  it('lets one holder of a job lock run at a time', async () => {
    const other = await openDatabase({ databaseUrl: url, migrate: false });
    try {
      let release!: () => void;
      const held = new Promise<void>((r) => (release = r));
      let entered!: () => void;
      const inside = new Promise<void>((r) => (entered = r));
      const first = withJobLock(database, 'test-job', async () => {
        entered();
        await held;
      });
      await inside;
      expect(await withJobLock(other, 'test-job', async () => undefined)).toBe(false);
      expect(await withJobLock(other, 'another-job', async () => undefined)).toBe(true);
      release();
      expect(await first).toBe(true);
      expect(await withJobLock(other, 'test-job', async () => undefined)).toBe(true);
    } finally {
      await other.close();
    }
  });

  it('sends the daily digest once when two processes run the scheduler', async () => {
    procs.push(startApi(url), startApi(url));
    const branchCount = (await database.db.select({ id: branches.id }).from(branches)).length;
    expect(branchCount).toBeGreaterThan(0);
    // Both processes have looked at the digest at least once (run it, found it done, or found it locked).
    await until('both processes to tick the digest', 150_000, () =>
      procs.every((p) => {
        if (p.child.exitCode !== null) throw new Error(`An API process stopped:\n${p.out.join('')}`);
        return /job watchlist-digest: (sent|already_ran|nothing_to_report|no_recipients)/.test(p.out.join(''));
      }),
    );
    const runs = await until('every branch digest to finish', 30_000, async () => {
      const r = (await database.db.execute(
        sql`SELECT run_key, result FROM job_runs WHERE job = 'watchlist-digest' AND finished_at IS NOT NULL`,
      )) as unknown as { rows: { run_key: string; result: { status: string; recipients: number } }[] };
      return r.rows.length === branchCount && r.rows;
    });
    const expected = runs.reduce((n, r) => n + (r.result.status === 'sent' ? r.result.recipients : 0), 0);
    expect(expected).toBeGreaterThan(0);
    const mail = await until('the digests to reach the mail sinks', 30_000, async () => {
      const r = (await database.db.execute(
        sql`SELECT "to", subject, count(*)::int AS n FROM mail_outbox WHERE subject LIKE 'Coilpath Watchlist%' GROUP BY "to", subject`,
      )) as unknown as { rows: { to: string; subject: string; n: number }[] };
      const total = r.rows.reduce((n, x) => n + x.n, 0);
      return total >= expected && r.rows;
    });
    expect(mail.reduce((n, x) => n + x.n, 0)).toBe(expected);
    expect(mail.every((m) => m.n === 1)).toBe(true);
    // One run per branch and local day, though two schedulers ticked.
    expect(new Set(runs.map((r) => r.run_key)).size).toBe(branchCount);
  }, 240_000);
});
