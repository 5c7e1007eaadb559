/**
 * Crash safety: the real server on a PGlite data directory is killed with SIGKILL in the middle of a
 * burst of writes through the API, restarted on the same directory, and must still hold every write
 * it acknowledged (answered 2xx), in a consistent database.
 *
 * The write is a pluggable `WriteTarget`: `POST /api/customers` when the app has it (one new row per
 * write), else sign-in, which records `users.last_sign_in_at` per user.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { amcheck } from '@electric-sql/pglite/contrib/amcheck';
import { afterAll, describe, expect, it } from 'vitest';
import { openDatabase, type Database } from '../../apps/api/src/db/client';
import { makeBranch, makeUser, TEST_PASSWORD } from '../../apps/api/src/testing/fixtures';
import { startServer, type ServerProcess } from '../support/server-process';

/** One kind of write the burst repeats; `i` makes each write distinguishable afterwards. */
interface WriteTarget {
  name: string;
  /** Rows the writes need, inserted before the server starts (the database is the server's own). */
  prepare(database: Database, count: number): Promise<void>;
  /** One write through the API; returns a key of what was written when it was acknowledged (2xx). */
  write(base: string, i: number): Promise<string | null>;
  /** Keys of the writes the database holds after the restart. */
  present(pglite: PGlite): Promise<Set<string>>;
}

/** Sign-in of user `i` (a distinct user per write) records `users.last_sign_in_at`. */
function signInTarget(): WriteTarget {
  const emails: string[] = [];
  return {
    name: 'POST /api/auth/sign-in (users.last_sign_in_at)',
    async prepare(database, count) {
      const branch = await makeBranch(database.db, { name: 'Crash branch' });
      for (let i = 0; i < count; i++) {
        const u = await makeUser(database.db, 'technician', branch.id, { email: `crash.${i}@test.example` });
        emails.push(u.email);
      }
    },
    async write(base, i) {
      const res = await fetch(`${base}/api/auth/sign-in`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ email: emails[i], password: TEST_PASSWORD }),
      });
      return res.ok ? emails[i]! : null;
    },
    async present(pglite) {
      const r = await pglite.query<{ email: string }>(`SELECT email FROM users WHERE last_sign_in_at IS NOT NULL`);
      return new Set(r.rows.map((row) => row.email));
    },
  };
}

/**
 * `POST /api/customers` as a branch manager (the Sites module): each acknowledged write answers 201
 * with the new customer's id, which must be in the table after the restart, under the name sent.
 */
function customersTarget(): WriteTarget {
  let cookie = '';
  let email = '';
  return {
    name: 'POST /api/customers',
    async prepare(database) {
      const branch = await makeBranch(database.db, { name: 'Crash customers' });
      email = (await makeUser(database.db, 'branch_manager', branch.id, { email: 'crash.manager@test.example' })).email;
    },
    async write(base, i) {
      if (!cookie) {
        const res = await fetch(`${base}/api/auth/sign-in`, {
          method: 'POST',
          headers: { 'content-type': 'application/json' },
          body: JSON.stringify({ email, password: TEST_PASSWORD }),
        });
        if (!res.ok) throw new Error(`sign-in failed: ${res.status}`);
        cookie = (res.headers.get('set-cookie') ?? '').split(';')[0]!;
      }
      const res = await fetch(`${base}/api/customers`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', cookie },
        body: JSON.stringify({ name: `Crash customer ${i}` }),
      });
      if (res.status !== 201) return null;
      const body = (await res.json()) as { id?: string; customer?: { id: string } };
      return `${body.id ?? body.customer?.id}|Crash customer ${i}`;
    },
    async present(pglite) {
      const r = await pglite.query<{ k: string }>(`SELECT id || '|' || name AS k FROM customers WHERE name LIKE 'Crash customer %'`);
      return new Set(r.rows.map((row) => row.k));
    },
  };
}

/** The busiest write route the app has: customers once the Sites module is there, else sign-in. */
async function pickTarget(base: string, targets: { customers: WriteTarget; signIn: WriteTarget }): Promise<WriteTarget> {
  const probe = await fetch(`${base}/api/customers`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' });
  return probe.status === 401 ? targets.customers : targets.signIn;
}

const WRITES = 120;
/** Kill once this many writes were acknowledged, with more still in flight. */
const KILL_AFTER_ACKS = 20;
const CONCURRENCY = 6;

const tmp = mkdtempSync(join(tmpdir(), 'coilpath-crash-'));
const running: ServerProcess[] = [];
afterAll(async () => {
  for (const s of running) await s.stop(2000);
  rmSync(tmp, { recursive: true, force: true });
});

// On the PostgreSQL pass the server's durability is PostgreSQL's own; this checks the embedded database.
describe.runIf(!process.env.DATABASE_URL)('crash safety on the embedded database', () => {
  it('keeps every acknowledged write across a SIGKILL in the middle of a burst', { timeout: 240_000 }, async () => {
    const targets = { customers: customersTarget(), signIn: signInTarget() };
    const dataDir = join(tmp, 'data');
    const pgDir = join(dataDir, 'pg'); // where server.ts keeps PGlite inside COILPATH_DATA_DIR

    const seed = await openDatabase({ dataDir: pgDir });
    await targets.signIn.prepare(seed, WRITES);
    await targets.customers.prepare(seed, WRITES);
    await seed.close();

    const env = { COILPATH_SEED: 'never', COILPATH_JOBS: 'off' };
    const first = await startServer({ dataDir, env });
    running.push(first);
    const target = await pickTarget(first.base, targets);
    console.info(`crash safety: burst of ${target.name}`);

    // The burst: CONCURRENCY workers take the next index until the server is gone.
    const acked: string[] = [];
    let nextIndex = 0;
    let inFlightAtKill = 0;
    let inFlight = 0;
    let killed = false;
    const worker = async () => {
      while (!killed && nextIndex < WRITES) {
        const i = nextIndex++;
        inFlight++;
        try {
          const key = await target.write(first.base, i);
          // An answer that arrived, even just as the kill went out, was acknowledged: it must be kept.
          if (key !== null) acked.push(key);
        } catch {
          // No answer (connection reset by the kill): the outcome is unknown, so nothing is claimed.
        } finally {
          inFlight--;
        }
        if (!killed && acked.length >= KILL_AFTER_ACKS) {
          killed = true;
          inFlightAtKill = inFlight;
          first.child.kill('SIGKILL');
        }
      }
    };
    await Promise.all(Array.from({ length: CONCURRENCY }, worker));
    const exit = await first.exited;

    expect(killed, `the burst ended before ${KILL_AFTER_ACKS} writes were acknowledged:\n${first.output()}`).toBe(true);
    expect(exit.signal).toBe('SIGKILL');
    expect(inFlightAtKill, 'the kill should land while writes are in flight').toBeGreaterThan(0);
    expect(acked.length).toBeGreaterThanOrEqual(KILL_AFTER_ACKS);
    expect(new Set(acked).size).toBe(acked.length);

    // Restart on the same directory: it must open, migrate (a no-op) and serve again.
    const second = await startServer({ dataDir, env });
    running.push(second);
    const after = await target.write(second.base, WRITES - 1);
    expect(after, 'a write after the restart is acknowledged').not.toBeNull();
    await second.stop();
    expect((await second.exited).code).toBe(0);

    // Inspect the directory the server left, with amcheck for the indexes.
    const pglite = new PGlite(pgDir, { extensions: { amcheck } });
    try {
      const present = await target.present(pglite);
      const lost = acked.filter((k) => !present.has(k));
      expect(lost, `acknowledged writes missing after the crash (${target.name})`).toEqual([]);
      expect(present.has(after!), 'the write after the restart is there too').toBe(true);
      await expectConsistent(pglite);
    } finally {
      await pglite.close();
    }
  });
});

/** Every table reads in full, primary keys are unique, and every B-tree index matches its table. */
async function expectConsistent(pglite: PGlite) {
  const tables = await pglite.query<{ name: string }>(
    `SELECT quote_ident(table_schema) || '.' || quote_ident(table_name) AS name FROM information_schema.tables
     WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY 1`,
  );
  expect(tables.rows.length).toBeGreaterThan(10);
  for (const { name } of tables.rows) {
    const pk = await pglite.query<{ cols: string | null }>(
      `SELECT string_agg(quote_ident(a.attname), ', ') AS cols FROM pg_index i
       JOIN pg_attribute a ON a.attrelid = i.indrelid AND a.attnum = ANY(i.indkey)
       WHERE i.indrelid = $1::regclass AND i.indisprimary`,
      [name],
    );
    const cols = pk.rows[0]?.cols;
    // A sequential scan (no index) of the whole table, and the distinct primary keys in it.
    await pglite.exec('SET enable_indexscan = off; SET enable_bitmapscan = off; SET enable_indexonlyscan = off');
    const counts = await pglite.query<{ total: number; distinct_keys: number }>(
      `SELECT count(*)::int AS total, ${cols ? `count(DISTINCT (${cols}))::int` : 'count(*)::int'} AS distinct_keys FROM ${name}`,
    );
    await pglite.exec('RESET enable_indexscan; RESET enable_bitmapscan; RESET enable_indexonlyscan');
    const row = counts.rows[0]!;
    expect(row.distinct_keys, `duplicate primary keys in ${name}`).toBe(row.total);
  }
  await pglite.exec('CREATE EXTENSION IF NOT EXISTS amcheck');
  const indexes = await pglite.query<{ oid: number; name: string }>(
    `SELECT c.oid::int AS oid, c.relname AS name FROM pg_index i JOIN pg_class c ON c.oid = i.indexrelid
     JOIN pg_am am ON am.oid = c.relam JOIN pg_namespace n ON n.oid = c.relnamespace
     WHERE am.amname = 'btree' AND n.nspname = 'public'`,
  );
  expect(indexes.rows.length).toBeGreaterThan(10);
  for (const ix of indexes.rows) {
    // heapallindexed: every heap tuple has its index entry.
    await pglite.query('SELECT bt_index_check($1::regclass, true)', [ix.oid]);
  }
}
