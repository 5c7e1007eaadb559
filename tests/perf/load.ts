/**
 * Loads the large benchmark scenario in bulk. On PGlite each table's rows go in as one CSV blob
 * (`COPY … FROM '/dev/blob'`, about twice as fast as batched INSERTs in the WebAssembly build); on PostgreSQL as
 * batched inserts carrying a few thousand rows as one JSON parameter (`INSERT … SELECT … FROM
 * json_populate_recordset`), so column types come from the table itself. Secondary indexes are dropped
 * during the load and built again afterwards, and foreign-key triggers are skipped where the role may
 * (`session_replication_role = replica`): the generator's rows are consistent by construction.
 */
import { resolve } from 'node:path';
import { rmSync } from 'node:fs';
import { sql } from 'drizzle-orm';
import { hashPassword } from '../../apps/api/src/auth/password';
import { openDatabase, type Database } from '../../apps/api/src/db/client';
import { BENCH_END, BRANCH_COUNT, BENCH_PASSWORD, branchRows, globalRows, type DbRow } from './scenario';

export const BENCH_META_KEY = 'bench_scenario';
/** Where the PGlite copy lives; `COILPATH_BENCH_DIR` moves it. Never the demo data directory. */
export const benchDataDir = () => resolve(process.env.COILPATH_BENCH_DIR ?? 'data/bench');

/** Rows the scenario holds, about (for the progress line before the last branch is built). */
const ESTIMATED_ROWS = 2_150_000;
const CHUNK = 4_000;
/**
 * Tables whose triggers keep service_call_facts (rebuilt in one statement after the load) or raise
 * roster_revisions and briefing_revisions (nothing to keep: the new database has no cached reads). Visits'
 * `unit_id` (filled by a trigger otherwise, migration 0021) comes with the generator's rows.
 */
const TRIGGER_TABLES = [
  'work_orders',
  'visits',
  'findings',
  'bookings',
  'sites',
  'units',
  'leak_cases',
  'users',
  'branches',
  'circuits',
  'readings',
  'refrigerant_events',
  'alarms',
  'attachments',
];
/**
 * Tables whose triggers keep fix_quality_sums (migration 0005): off until service_call_facts is rebuilt, so
 * its rows are not summed one by one; the sums are rebuilt in one statement after the facts.
 */
const SUMS_TRIGGER_TABLES = ['service_call_facts'];

export interface BenchMeta {
  end: string;
  rows: Record<string, number>;
  seconds: number;
}

async function query(database: Database, text: string, params: unknown[] = []): Promise<{ rows: Record<string, unknown>[] }> {
  if (database.pool) return database.pool.query(text, params);
  return database.pglite!.query(text, params) as Promise<{ rows: Record<string, unknown>[] }>;
}

export async function benchMeta(database: Database): Promise<BenchMeta | null> {
  const res = await database.db.execute(sql`SELECT value FROM app_meta WHERE key = ${BENCH_META_KEY}`);
  const row = (res as unknown as { rows: { value: BenchMeta }[] }).rows[0];
  return row ? row.value : null;
}

/** A progress line on stderr: bar, percentage, rows, elapsed time. */
export function progress(label: string, total: number) {
  const t0 = Date.now();
  let last = 0;
  let lastDecile = -1;
  const draw = (done: number, final = false) => {
    const now = Date.now();
    if (!final && now - last < 200) return;
    last = now;
    const f = Math.min(1, done / total);
    const bar = '#'.repeat(Math.round(f * 30)).padEnd(30, '.');
    const line = `${label} [${bar}] ${(f * 100).toFixed(0).padStart(3)}% ${done.toLocaleString('en-US')} rows ${((now - t0) / 1000).toFixed(0)} s`;
    if (process.stderr.isTTY) process.stderr.write(`\r${line}`);
    else if (final || Math.floor(f * 10) !== lastDecile) process.stderr.write(`${line}\n`);
    lastDecile = Math.floor(f * 10);
    if (final && process.stderr.isTTY) process.stderr.write('\n');
  };
  return { draw, setTotal: (n: number) => (total = n) };
}

/** One CSV field: empty for NULL, strings and JSON quoted. */
function csvField(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number' || typeof v === 'boolean') return String(v);
  const s = typeof v === 'string' ? v : JSON.stringify(v);
  return `"${s.replace(/"/g, '""')}"`;
}

async function insertRows(database: Database, table: string, list: DbRow[], onRows: (n: number) => void) {
  if (list.length === 0) return;
  const cols = Object.keys(list[0]!);
  const colList = cols.map((c) => `"${c}"`).join(', ');
  if (database.pglite) {
    const copyChunk = 100_000;
    for (let i = 0; i < list.length; i += copyChunk) {
      const part = list.slice(i, i + copyChunk);
      const csv = part.map((r) => cols.map((c) => csvField(r[c])).join(',')).join('\n');
      await database.pglite.query(`COPY "${table}" (${colList}) FROM '/dev/blob' WITH (FORMAT csv)`, [], { blob: new Blob([csv]) });
      onRows(part.length);
    }
    return;
  }
  const text = `INSERT INTO "${table}" (${colList}) SELECT ${colList} FROM json_populate_recordset(NULL::"${table}", $1::json)`;
  for (let i = 0; i < list.length; i += CHUNK) {
    const part = list.slice(i, i + CHUNK);
    await query(database, text, [JSON.stringify(part)]);
    onRows(part.length);
  }
}

/** Loads the scenario unless it is there already. Returns its summary. */
export async function loadBenchScenario(database: Database, label = 'bench:data'): Promise<BenchMeta> {
  const existing = await benchMeta(database);
  if (existing) return existing;
  const branchCount = await query(database, 'SELECT count(*)::int AS n FROM branches');
  if (Number(branchCount.rows[0]!.n) > 0) throw new Error('The database holds other data; the benchmark scenario needs an empty one.');
  const t0 = Date.now();
  const passwordHash = await hashPassword(BENCH_PASSWORD);
  const counts: Record<string, number> = {};
  let done = 0;
  const bar = progress(label, ESTIMATED_ROWS);
  const add = (n: number) => {
    done += n;
    bar.draw(done);
  };
  const load = async (tables: Map<string, DbRow[]>) => {
    for (const [table, list] of tables) {
      counts[table] = (counts[table] ?? 0) + list.length;
      await insertRows(database, table, list, add);
    }
  };
  // Bulk-load mode: no foreign-key triggers (superuser only; skipped quietly otherwise), secondary indexes later.
  const replica = await query(database, 'SET session_replication_role = replica').then(
    () => true,
    () => false,
  );
  const indexes = (
    await query(
      database,
      `SELECT i.indexname, i.indexdef FROM pg_indexes i
     WHERE i.schemaname = 'public' AND NOT EXISTS (SELECT 1 FROM pg_constraint c WHERE c.conname = i.indexname)
       AND i.indexdef NOT LIKE 'CREATE UNIQUE%'`,
    )
  ).rows as { indexname: string; indexdef: string }[];
  for (const ix of indexes) await query(database, `DROP INDEX "${ix.indexname}"`);
  // The Fix Quality facts and sums are rebuilt in one statement each at the end instead of row by row
  // (migrations 0002 and 0005).
  for (const t of [...TRIGGER_TABLES, ...SUMS_TRIGGER_TABLES]) await query(database, `ALTER TABLE "${t}" DISABLE TRIGGER USER`);
  await load(globalRows(passwordHash));
  for (let b = 0; b < BRANCH_COUNT; b++) {
    const rows = branchRows(b, passwordHash);
    const branchTotal = [...rows.values()].reduce((s, l) => s + l.length, 0);
    if (b === 0) bar.setTotal(branchTotal * BRANCH_COUNT + 1);
    await load(rows);
  }
  bar.draw(done, true);
  process.stderr.write(`${label}: building ${indexes.length} indexes…\n`);
  for (const ix of indexes) await query(database, ix.indexdef);
  if (replica) await query(database, 'SET session_replication_role = DEFAULT');
  for (const t of TRIGGER_TABLES) await query(database, `ALTER TABLE "${t}" ENABLE TRIGGER USER`);
  process.stderr.write(`${label}: service_call_facts…\n`);
  await query(database, 'SELECT rebuild_service_call_facts()');
  process.stderr.write(`${label}: fix_quality_sums…\n`);
  await query(database, 'SELECT rebuild_fix_quality_sums()');
  for (const t of SUMS_TRIGGER_TABLES) await query(database, `ALTER TABLE "${t}" ENABLE TRIGGER USER`);
  process.stderr.write(`${label}: ANALYZE…\n`);
  await query(database, 'ANALYZE');
  const meta: BenchMeta = { end: BENCH_END, rows: counts, seconds: Math.round((Date.now() - t0) / 1000) };
  await query(database, `INSERT INTO app_meta (key, value) VALUES ($1, $2::jsonb)`, [BENCH_META_KEY, JSON.stringify(meta)]);
  return meta;
}

/** Opens the benchmark database: PostgreSQL when a URL is given, else PGlite in the bench data directory. */
export async function openBenchDatabase(databaseUrl?: string, fresh = false): Promise<Database> {
  if (databaseUrl) return openDatabase({ databaseUrl });
  const dir = resolve(benchDataDir(), 'pg');
  if (fresh) rmSync(dir, { recursive: true, force: true });
  return openDatabase({ dataDir: dir });
}
