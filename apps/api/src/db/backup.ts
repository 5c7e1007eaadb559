/**
 * Backups of a whole Coilpath installation (`npm run db:backup -- <file>`, `npm run db:restore -- <file>`):
 * the database, the stored files (photos, attachments, e-mailed PDFs under `<data dir>/files`) and the
 * session-signing secret, in one gzipped tar with a manifest:
 *
 *   database/pglite.tar.gz | database/postgres.dump   the embedded data directory, or `pg_dump --format=custom`
 *   session-secret                                     when the data directory holds one
 *   files/<key>                                        every stored file
 *   manifest.json                                      rows per table, the schema version (latest applied
 *                                                      migration), and the size and SHA-256 of every entry
 *
 * A restore unpacks into a staging directory inside the data directory, checks every entry against the
 * manifest (SHA-256 and size, no file missing or extra), loads the database and checks its row counts — on
 * PGlite in the staging directory, on PostgreSQL inside the restoring transaction, which rolls back on a
 * mismatch — and only then moves the current database, files and secret aside (`--force`) and the restored
 * ones in. On PGlite the data directory is locked (`coilpath.lock`) throughout, so a running server is named
 * and refused.
 *
 * With an S3 bucket for the files (`S3_BUCKET`), the objects are not copied: the manifest says where they are
 * (`storage`: endpoint, bucket, region, how many objects the database refers to) and a restore says so; the
 * bucket is backed up with the object store's own means (versioning, replication).
 *
 * Backups made before files and secret were included (a bare PGlite data-directory dump, or a bare
 * `pg_dump` file) are still restored, database only, saying so.
 */
import { execFile } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import {
  createReadStream,
  createWriteStream,
  existsSync,
  mkdirSync,
  openAsBlob,
  readFileSync,
  readdirSync,
  renameSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs';
import { open, readFile } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { promisify } from 'node:util';
import { createGunzip, createGzip } from 'node:zlib';
import { PGlite } from '@electric-sql/pglite';
import pg from 'pg';
import { z } from 'zod';
import { lockDataDir, type DataDirLock } from '../data-dir-lock';
import { keyPattern } from '../storage/storage';
import { migrationsFolder } from './client';
import { readTar, tarEnd, tarHeader, tarPadding, TarError } from './tar';

const run = promisify(execFile);

/**
 * Where Coilpath keeps its data: the data directory (`COILPATH_DATA_DIR`: `pg/` for the embedded database,
 * `files/`, `session-secret`) and, with `DATABASE_URL`, a PostgreSQL database instead of `pg/`.
 */
export type BackupTarget = { kind: 'pglite'; dataDir: string } | { kind: 'postgres'; url: string; dataDir: string };

export class BackupError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BackupError';
  }
}

const SECRET_FILE = 'session-secret';
const DB_ENTRY = { pglite: 'database/pglite.tar.gz', postgres: 'database/postgres.dump' } as const;
const MANIFEST = 'manifest.json';

const sha256Hex = z.string().regex(/^[0-9a-f]{64}$/);
const manifestSchema = z.object({
  format: z.literal('coilpath-backup'),
  version: z.literal(1),
  createdAt: z.string(),
  /** The latest migration applied to the database when it was backed up (its tag, e.g. `0008_ended-sessions`). */
  schemaVersion: z.string().nullable(),
  /** Rows per table of the public schema. */
  tables: z.record(z.string(), z.number().int().min(0)),
  database: z.object({ kind: z.enum(['pglite', 'postgres']), entry: z.string(), bytes: z.number().int().min(0), sha256: sha256Hex }),
  files: z.object({
    count: z.number().int().min(0),
    totalBytes: z.number().int().min(0),
    entries: z.array(z.object({ key: z.string().regex(keyPattern), bytes: z.number().int().min(0), sha256: sha256Hex })),
    /** Files the database refers to that were already missing from storage when the backup was made. */
    missing: z.array(z.string()),
  }),
  /**
   * Where the stored files live: `files` (in this backup, under `files/`) or an S3 bucket (not copied; the
   * database's keys are object names there). Absent in backups made before S3 storage: `files`.
   */
  storage: z
    .discriminatedUnion('kind', [
      z.object({ kind: z.literal('files') }),
      z.object({
        kind: z.literal('s3'),
        endpoint: z.string().nullable(),
        bucket: z.string(),
        region: z.string(),
        referencedObjects: z.number().int().min(0),
      }),
    ])
    .optional(),
  secret: z.discriminatedUnion('included', [
    z.object({ included: z.literal(true), entry: z.literal(SECRET_FILE), sha256: sha256Hex, fromEnvironment: z.boolean() }),
    z.object({ included: z.literal(false), fromEnvironment: z.boolean() }),
  ]),
});
export type BackupManifest = z.infer<typeof manifestSchema>;

/** An object store the files live in (from `S3_*`): recorded in the manifest, never copied. */
export interface ObjectStoreLocation {
  endpoint: string | null;
  bucket: string;
  region: string;
}

export interface BackupReport {
  file: string;
  bytes: number;
  manifest: BackupManifest;
}

export interface RestoreReport {
  file: string;
  dataDir: string;
  /** Null for a database-only backup made before manifests. */
  manifest: BackupManifest | null;
  /** Rows per table in the restored database (equal to the manifest's). */
  tables: Record<string, number>;
  files: { count: number; totalBytes: number };
  /** The files stayed in this bucket (an S3 deployment's backup): nothing under `files/` was touched. */
  objectStore: (ObjectStoreLocation & { referencedObjects: number }) | null;
  secretRestored: boolean;
  /** Where the replaced database, files and secret were moved (with `force`). */
  movedAside?: string;
  /** Migrations newer than the backup, which the server applies when it starts. */
  pendingMigrations: string[];
}

// ── helpers ─────────────────────────────────────────────────────────────────────────────────────────

type Rows = (sql: string) => Promise<Record<string, unknown>[]>;

const quoteIdent = (name: string) => `"${name.replace(/"/g, '""')}"`;

/** Rows per table of the public schema, read in one statement (one snapshot). */
async function tableCounts(query: Rows): Promise<Record<string, number>> {
  const tables = await query(
    `SELECT table_name AS t FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY 1`,
  );
  if (tables.length === 0) return {};
  const parts = tables.map((r) => `(SELECT count(*) FROM public.${quoteIdent(String(r.t))})::text AS ${quoteIdent(String(r.t))}`);
  const [row] = await query(`SELECT ${parts.join(', ')}`);
  return Object.fromEntries(Object.entries(row ?? {}).map(([t, n]) => [t, Number(n)]));
}

interface JournalEntry {
  idx: number;
  when: number;
  tag: string;
}
function journal(): JournalEntry[] {
  return (JSON.parse(readFileSync(join(migrationsFolder, 'meta', '_journal.json'), 'utf8')) as { entries: JournalEntry[] }).entries;
}

/** The tag of the latest migration applied to the database, or null when none is. */
async function schemaVersion(query: Rows): Promise<string | null> {
  const [exists] = await query(`SELECT to_regclass('drizzle.__drizzle_migrations') IS NOT NULL AS ok`);
  if (!exists?.ok) return null;
  const [last] = await query(`SELECT created_at::text AS at FROM drizzle.__drizzle_migrations ORDER BY created_at DESC LIMIT 1`);
  if (!last) return null;
  const when = Number(last.at);
  return journal().find((e) => e.when === when)?.tag ?? `unknown migration of ${new Date(when).toISOString()}`;
}

/** Storage keys the database refers to (attachments, e-mailed files in the outbox). */
async function referencedKeys(query: Rows): Promise<Set<string>> {
  try {
    const rows = await query(
      `SELECT storage_key AS k FROM attachments
       UNION SELECT a->>'storageKey' FROM mail_outbox, jsonb_array_elements(mail_outbox.attachments) a WHERE a ? 'storageKey'`,
    );
    return new Set(rows.map((r) => String(r.k)));
  } catch {
    return new Set(); // a database from before these tables: nothing to compare
  }
}

/** The stored files under `<data dir>/files` (keys like `ab/<uuid>`); other names are reported, not kept. */
function listStoredFiles(filesDir: string): { keys: string[]; strays: string[] } {
  const keys: string[] = [];
  const strays: string[] = [];
  if (!existsSync(filesDir)) return { keys, strays };
  for (const d of readdirSync(filesDir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
    if (!d.isDirectory()) {
      strays.push(d.name);
      continue;
    }
    for (const f of readdirSync(join(filesDir, d.name), { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const key = `${d.name}/${f.name}`;
      if (f.isFile() && keyPattern.test(key)) keys.push(key);
      else strays.push(key);
    }
  }
  return { keys, strays };
}

function dirHasFiles(dir: string): boolean {
  if (!existsSync(dir)) return false;
  return readdirSync(dir, { withFileTypes: true }).some((d) => !d.isDirectory() || dirHasFiles(join(dir, d.name)));
}

async function postgresHasData(url: string): Promise<boolean> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const r = await client.query<{ n: string }>(
      `SELECT count(*)::text AS n FROM information_schema.tables WHERE table_schema NOT IN ('pg_catalog', 'information_schema')`,
    );
    return Number(r.rows[0]?.n ?? 0) > 0;
  } finally {
    await client.end();
  }
}

/** Whether `pg_dump`, `pg_restore` and `psql` can be run (Debian: postgresql-client). */
export async function hasPgTools(): Promise<boolean> {
  try {
    await run('pg_dump', ['--version']);
    await run('pg_restore', ['--version']);
    await run('psql', ['--version']);
    return true;
  } catch {
    return false;
  }
}

async function runTool(cmd: string, args: string[]): Promise<void> {
  try {
    await run(cmd, args, { maxBuffer: 16 * 1024 * 1024 });
  } catch (e) {
    const err = e as NodeJS.ErrnoException & { stderr?: string };
    if (err.code === 'ENOENT') throw new BackupError(`${cmd} is not installed (Debian: apt-get install postgresql-client).`);
    throw new BackupError(`${cmd} failed: ${(err.stderr || err.message).trim()}`);
  }
}

/** One tar entry from chunks, counting and hashing what goes out; the size must be the header's. */
async function* entry(
  name: string,
  size: number,
  chunks: AsyncIterable<Buffer | Uint8Array>,
  mtime: Date,
  record: (sha256: string) => void,
) {
  yield tarHeader(name, size, mtime, name === SECRET_FILE ? 0o600 : 0o644);
  const hash = createHash('sha256');
  let written = 0;
  for await (const c of chunks) {
    const chunk = Buffer.isBuffer(c) ? c : Buffer.from(c);
    written += chunk.length;
    if (written > size) break;
    hash.update(chunk);
    yield chunk;
  }
  if (written !== size)
    throw new BackupError(`${name} changed while it was being backed up (${size} bytes expected, ${written} read). Try again.`);
  yield tarPadding(size);
  record(hash.digest('hex'));
}

async function* once(b: Buffer) {
  yield b;
}

/** Writes the archive beside its final name and renames it: a backup file is either whole or absent. */
async function writeArchive(file: string, entries: AsyncIterable<Buffer>): Promise<number> {
  mkdirSync(dirname(file), { recursive: true });
  const partial = `${file}.partial`;
  try {
    // It holds the session secret: readable by its owner only.
    await pipeline(entries, createGzip(), createWriteStream(partial, { mode: 0o600 }));
    renameSync(partial, file);
  } catch (e) {
    rmSync(partial, { force: true });
    throw e;
  }
  return statSync(file).size;
}

// ── backup ──────────────────────────────────────────────────────────────────────────────────────────

/**
 * Backs up the database, the stored files and the session secret to `file`.
 *
 * PGlite: the data directory is locked for the backup, so a running server is refused by name (stop it
 * first). PostgreSQL: servers may keep running — the row counts are read in the snapshot `pg_dump` dumps,
 * and the files are copied after it: a file is stored before the row that refers to it is written, so every
 * file the dump refers to is in the backup (files stored later come along unreferenced).
 */
export async function createBackup(
  target: BackupTarget,
  file: string,
  opts: { now?: Date; secretFromEnvironment?: boolean; objectStore?: ObjectStoreLocation | null } = {},
): Promise<BackupReport> {
  const now = opts.now ?? new Date();
  const dataDir = resolve(target.dataDir);
  const out = resolve(file);
  let lock: DataDirLock | undefined;
  let dbBytes: Buffer | undefined;
  let dumpFile: string | undefined;
  let tables: Record<string, number>;
  let version: string | null;
  let referenced: Set<string>;

  try {
    if (target.kind === 'pglite') {
      const pgDir = join(dataDir, 'pg');
      if (!existsSync(pgDir) || readdirSync(pgDir).length === 0) throw new BackupError(`There is no database in ${pgDir} to back up.`);
      lock = lockDataDir(dataDir, 'backup');
      const pglite = new PGlite(pgDir);
      try {
        await pglite.waitReady;
        const query: Rows = async (s) => (await pglite.query<Record<string, unknown>>(s)).rows;
        tables = await tableCounts(query);
        version = await schemaVersion(query);
        referenced = await referencedKeys(query);
        dbBytes = Buffer.from(await (await pglite.dumpDataDir('gzip')).arrayBuffer());
      } finally {
        await pglite.close();
      }
    } else {
      dumpFile = `${out}.pgdump.partial`;
      mkdirSync(dirname(out), { recursive: true });
      const client = new pg.Client({ connectionString: target.url });
      await client.connect();
      try {
        await client.query('BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY');
        const snapshot = (await client.query<{ s: string }>('SELECT pg_export_snapshot() AS s')).rows[0]!.s;
        const query: Rows = async (s) => (await client.query<Record<string, unknown>>(s)).rows;
        tables = await tableCounts(query);
        version = await schemaVersion(query);
        referenced = await referencedKeys(query);
        await runTool('pg_dump', [
          '--format=custom',
          '--no-owner',
          '--no-privileges',
          `--snapshot=${snapshot}`,
          `--file=${dumpFile}`,
          `--dbname=${target.url}`,
        ]);
        await client.query('COMMIT');
      } finally {
        await client.end();
      }
    }

    const filesDir = join(dataDir, 'files');
    const objectStore = opts.objectStore ?? null;
    // On S3 the objects stay where they are: nothing is listed or copied from the data directory.
    const { keys, strays } = objectStore ? { keys: [], strays: [] } : listStoredFiles(filesDir);
    const secretPath = join(dataDir, SECRET_FILE);
    const secretIncluded = existsSync(secretPath);
    const fileEntries: BackupManifest['files']['entries'] = [];
    const database = { kind: target.kind, entry: DB_ENTRY[target.kind], bytes: 0, sha256: '' };
    let secretSha = '';

    const manifest = (): BackupManifest => {
      const present = new Set(keys);
      return {
        format: 'coilpath-backup',
        version: 1,
        createdAt: now.toISOString(),
        schemaVersion: version,
        tables,
        database,
        files: {
          count: fileEntries.length,
          totalBytes: fileEntries.reduce((s, f) => s + f.bytes, 0),
          entries: fileEntries,
          // Not checked against a bucket: its objects are not read.
          missing: objectStore ? [] : [...referenced].filter((k) => !present.has(k)).sort(),
        },
        storage: objectStore
          ? {
              kind: 's3',
              endpoint: objectStore.endpoint,
              bucket: objectStore.bucket,
              region: objectStore.region,
              referencedObjects: referenced.size,
            }
          : { kind: 'files' },
        secret: secretIncluded
          ? { included: true, entry: SECRET_FILE, sha256: secretSha, fromEnvironment: Boolean(opts.secretFromEnvironment) }
          : { included: false, fromEnvironment: Boolean(opts.secretFromEnvironment) },
      };
    };

    let written: BackupManifest | undefined;
    const entries = async function* () {
      if (dbBytes) {
        database.bytes = dbBytes.length;
        yield* entry(database.entry, dbBytes.length, once(dbBytes), now, (h) => (database.sha256 = h));
      } else {
        database.bytes = statSync(dumpFile!).size;
        yield* entry(database.entry, database.bytes, createReadStream(dumpFile!), now, (h) => (database.sha256 = h));
      }
      if (secretIncluded) {
        const secret = await readFile(secretPath);
        yield* entry(SECRET_FILE, secret.length, once(secret), now, (h) => (secretSha = h));
      }
      for (const key of keys) {
        const path = join(filesDir, key);
        const fh = await open(path, 'r');
        try {
          const bytes = (await fh.stat()).size;
          yield* entry(`files/${key}`, bytes, fh.createReadStream({ autoClose: false }), now, (sha256) =>
            fileEntries.push({ key, bytes, sha256 }),
          );
        } finally {
          await fh.close();
        }
      }
      written = manifest();
      const json = Buffer.from(`${JSON.stringify(written, null, 2)}\n`);
      yield* entry(MANIFEST, json.length, once(json), now, () => undefined);
      yield tarEnd();
    };
    const bytes = await writeArchive(out, entries());
    if (strays.length > 0) console.warn(`Left out of the backup, not stored files: ${strays.map((s) => `files/${s}`).join(', ')}`);
    return { file: out, bytes, manifest: written! };
  } finally {
    if (dumpFile) rmSync(dumpFile, { force: true });
    lock?.release();
  }
}

// ── restore ─────────────────────────────────────────────────────────────────────────────────────────

interface Unpacked {
  manifest: BackupManifest | null;
  /** Entry name → size and SHA-256 as unpacked. */
  got: Map<string, { bytes: number; sha256: string }>;
  /** A backup from before manifests: the bare database. */
  legacy?: { kind: 'pglite' | 'postgres'; path: string };
}

const allowedEntry = (name: string) =>
  name === MANIFEST ||
  name === SECRET_FILE ||
  name === DB_ENTRY.pglite ||
  name === DB_ENTRY.postgres ||
  (name.startsWith('files/') && keyPattern.test(name.slice(6)));

async function firstBytes(file: string, n: number): Promise<Buffer> {
  const fh = await open(file, 'r');
  try {
    const b = Buffer.alloc(n);
    const { bytesRead } = await fh.read(b, 0, n, 0);
    return b.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

/** Unpacks `file` into `staging`, hashing every entry; never writes outside `staging`. */
async function unpack(file: string, staging: string): Promise<Unpacked> {
  const head = await firstBytes(file, 5);
  if (head.toString('latin1') === 'PGDMP') return { manifest: null, got: new Map(), legacy: { kind: 'postgres', path: file } };
  if (head.length < 2 || head[0] !== 0x1f || head[1] !== 0x8b)
    throw new BackupError(`${file} is not a Coilpath backup (expected a .tar.gz).`);

  // A data-directory dump from before manifests is itself a .tar.gz whose entries are PostgreSQL's files.
  let legacy = false;
  let first = true;
  const got = new Map<string, { bytes: number; sha256: string }>();
  let manifestText = '';
  const input = createReadStream(file);
  const gunzip = createGunzip();
  input.on('error', (e) => gunzip.destroy(e));
  try {
    await readTar(input.pipe(gunzip), async ({ name, content }) => {
      if (first) {
        first = false;
        if (!allowedEntry(name)) {
          legacy = true;
          throw new LegacyBackup();
        }
      }
      if (!allowedEntry(name)) throw new BackupError(`${file} holds an entry Coilpath backups do not have (${name}); it was not restored.`);
      if (got.has(name)) throw new BackupError(`${file} holds ${name} twice; it was not restored.`);
      const hash = createHash('sha256');
      let bytes = 0;
      if (name === MANIFEST) {
        const parts: Buffer[] = [];
        for await (const c of content) {
          bytes += c.length;
          if (bytes > 256 * 1024 * 1024) throw new BackupError(`The manifest of ${file} is implausibly large; it was not restored.`);
          hash.update(c);
          parts.push(c);
        }
        manifestText = Buffer.concat(parts).toString('utf8');
      } else {
        const path = join(staging, name);
        mkdirSync(dirname(path), { recursive: true });
        const ws = createWriteStream(path, { mode: name === SECRET_FILE ? 0o600 : 0o644 });
        await pipeline(
          (async function* () {
            for await (const c of content) {
              bytes += c.length;
              hash.update(c);
              yield c;
            }
          })(),
          ws,
        );
      }
      got.set(name, { bytes, sha256: hash.digest('hex') });
    });
  } catch (e) {
    if (e instanceof LegacyBackup || legacy) return { manifest: null, got, legacy: { kind: 'pglite', path: file } };
    if (e instanceof TarError) throw new BackupError(`${file} is damaged: ${e.message} Nothing was restored.`);
    if ((e as { code?: string }).code === 'Z_DATA_ERROR' || (e as { code?: string }).code === 'Z_BUF_ERROR')
      throw new BackupError(`${file} is damaged (its compression is broken). Nothing was restored.`);
    throw e;
  } finally {
    input.destroy();
    gunzip.destroy();
  }
  if (!manifestText) throw new BackupError(`${file} has no manifest.json: it is incomplete. Nothing was restored.`);
  let parsed: unknown;
  try {
    parsed = JSON.parse(manifestText);
  } catch {
    throw new BackupError(`The manifest of ${file} is not valid JSON. Nothing was restored.`);
  }
  const manifest = manifestSchema.safeParse(parsed);
  if (!manifest.success)
    throw new BackupError(
      `The manifest of ${file} is not one Coilpath writes (${manifest.error.issues[0]?.path.join('.')}). Nothing was restored.`,
    );
  return { manifest: manifest.data, got };
}

class LegacyBackup extends Error {}

/** Every entry is what the manifest says, byte for byte (SHA-256); nothing missing, nothing extra. */
function verifyEntries(file: string, m: BackupManifest, got: Unpacked['got']): void {
  const problems: string[] = [];
  const check = (name: string, want: { bytes: number; sha256: string }) => {
    const g = got.get(name);
    if (!g) problems.push(`${name} is missing`);
    else if (g.bytes !== want.bytes || g.sha256 !== want.sha256) problems.push(`${name} does not match its SHA-256 in the manifest`);
  };
  check(m.database.entry, m.database);
  if (m.secret.included) {
    const g = got.get(SECRET_FILE);
    if (!g) problems.push(`${SECRET_FILE} is missing`);
    else if (g.sha256 !== m.secret.sha256) problems.push(`${SECRET_FILE} does not match its SHA-256 in the manifest`);
  } else if (got.has(SECRET_FILE)) problems.push(`${SECRET_FILE} is not in the manifest`);
  const listed = new Set<string>();
  for (const f of m.files.entries) {
    listed.add(`files/${f.key}`);
    check(`files/${f.key}`, f);
  }
  for (const name of got.keys()) if (name.startsWith('files/') && !listed.has(name)) problems.push(`${name} is not in the manifest`);
  if (m.files.count !== m.files.entries.length || m.files.totalBytes !== m.files.entries.reduce((s, f) => s + f.bytes, 0)) {
    problems.push('the file count or total size does not add up');
  }
  if (m.database.entry !== DB_ENTRY[m.database.kind])
    problems.push(`the database entry ${m.database.entry} does not fit a ${m.database.kind} backup`);
  if (problems.length > 0) {
    const shown = problems.slice(0, 10).join('; ') + (problems.length > 10 ? `; and ${problems.length - 10} more` : '');
    throw new BackupError(`${file} does not match its manifest: ${shown}. Nothing was restored.`);
  }
}

function countsDiffer(want: Record<string, number>, got: Record<string, number>): string[] {
  const names = [...new Set([...Object.keys(want), ...Object.keys(got)])].sort();
  return names
    .filter((t) => want[t] !== got[t])
    .map((t) => `${t}: ${got[t] ?? 'no table'} rows, the manifest says ${want[t] ?? 'no table'}`);
}

function pendingAfter(version: string | null): string[] {
  const entries = journal();
  if (version === null) return entries.map((e) => e.tag);
  const at = entries.findIndex((e) => e.tag === version);
  return at === -1 ? [] : entries.slice(at + 1).map((e) => e.tag);
}

/** Loads a PGlite data-directory dump into `pgDir` and returns its row counts. */
async function loadPglite(dumpPath: string, pgDir: string): Promise<Record<string, number>> {
  mkdirSync(pgDir, { recursive: true });
  const pglite = new PGlite(pgDir, { loadDataDir: await openAsBlob(dumpPath) });
  try {
    await pglite.waitReady;
    return await tableCounts(async (s) => (await pglite.query<Record<string, unknown>>(s)).rows);
  } finally {
    await pglite.close();
  }
}

async function postgresCounts(url: string): Promise<Record<string, number>> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await tableCounts(async (s) => (await client.query<Record<string, unknown>>(s)).rows);
  } finally {
    await client.end();
  }
}

/**
 * Restores `file` into the target, after checking it against its manifest. Refuses a target that holds
 * data (a database, stored files or a secret) unless `force`: then those are moved to
 * `<data dir>/before-restore-<time>/` (PostgreSQL: the database's objects are dropped and recreated).
 */
export async function restoreBackup(
  target: BackupTarget,
  file: string,
  opts: { force?: boolean; now?: Date } = {},
): Promise<RestoreReport> {
  const source = resolve(file);
  if (!existsSync(source)) throw new BackupError(`No backup file at ${source}.`);
  const dataDir = resolve(target.dataDir);
  const lock = lockDataDir(dataDir, 'restore');
  const staging = join(dataDir, `.restore-${randomBytes(6).toString('hex')}`);
  try {
    let replaced = target.kind === 'pglite' ? ['pg', 'files', SECRET_FILE] : ['files', SECRET_FILE];
    const hasData =
      (target.kind === 'pglite'
        ? existsSync(join(dataDir, 'pg')) && readdirSync(join(dataDir, 'pg')).length > 0
        : await postgresHasData(target.url)) ||
      dirHasFiles(join(dataDir, 'files')) ||
      existsSync(join(dataDir, SECRET_FILE));
    if (hasData && !opts.force) {
      throw new BackupError(
        target.kind === 'pglite'
          ? `${dataDir} already holds a database, files or a session secret. Add --force to replace them (they are kept in ${dataDir}/before-restore-<time>).`
          : `The target database already has tables, or ${dataDir} holds files or a session secret. Add --force to replace them.`,
      );
    }

    mkdirSync(staging, { recursive: true });
    const unpacked = await unpack(source, staging);
    const m = unpacked.manifest;
    let tables: Record<string, number>;

    if (unpacked.legacy) {
      if (unpacked.legacy.kind !== target.kind)
        throw new BackupError(
          `${source} is a database-only ${unpacked.legacy.kind} backup; it cannot be restored into ${target.kind === 'pglite' ? 'the embedded database' : 'PostgreSQL'}.`,
        );
      if (target.kind === 'pglite') tables = await loadPglite(source, join(staging, 'pg'));
      else tables = {};
    } else {
      if (!m) throw new BackupError(`${source} has no manifest. Nothing was restored.`);
      verifyEntries(source, m, unpacked.got);
      // The files of an S3 deployment stayed in the bucket: whatever is under files/ here is left alone.
      if (m.storage?.kind === 's3') replaced = replaced.filter((name) => name !== 'files');
      if (m.database.kind !== target.kind) {
        throw new BackupError(
          `${source} holds a ${m.database.kind === 'pglite' ? 'embedded (PGlite)' : 'PostgreSQL'} database; it cannot be restored into ${target.kind === 'pglite' ? 'the embedded database' : 'PostgreSQL (DATABASE_URL)'}. Nothing was restored.`,
        );
      }
      const known = journal().map((e) => e.tag);
      if (m.schemaVersion !== null && !known.includes(m.schemaVersion)) {
        throw new BackupError(
          `${source} was made by a newer Coilpath (schema ${m.schemaVersion}, this one knows up to ${known.at(-1)}). Update Coilpath first. Nothing was restored.`,
        );
      }
      if (target.kind === 'pglite') {
        tables = await loadPglite(join(staging, m.database.entry), join(staging, 'pg'));
        const wrong = countsDiffer(m.tables, tables);
        if (wrong.length > 0)
          throw new BackupError(
            `The database in ${source} does not hold the rows its manifest counts (${wrong.slice(0, 5).join('; ')}). Nothing was restored.`,
          );
      }
    }

    // PostgreSQL: the dump is turned into SQL and run with the manifest's row counts checked at the end of the
    // same transaction, so a mismatch rolls everything back and the database is left as it was.
    if (target.kind === 'postgres') {
      const dump = unpacked.legacy ? unpacked.legacy.path : join(staging, m!.database.entry);
      const script = join(staging, 'restore.sql');
      await runTool('pg_restore', ['--clean', '--if-exists', '--no-owner', '--no-privileges', `--file=${script}`, dump]);
      const steps = ['-f', script];
      if (m) {
        const verify = join(staging, 'verify.sql');
        writeFileSync(verify, verifyCountsSql(m.tables));
        steps.push('-f', verify);
      }
      await runTool('psql', ['-X', '-q', '-v', 'ON_ERROR_STOP=1', '--single-transaction', `--dbname=${target.url}`, ...steps]);
      tables = await postgresCounts(target.url);
    }

    // Everything checked: move the current data aside and the restored data in.
    let movedAside: string | undefined;
    const incoming = unpacked.legacy ? (target.kind === 'pglite' ? ['pg'] : []) : replaced;
    const stamp = (opts.now ?? new Date()).toISOString().replace(/[:.]/g, '-');
    for (const name of incoming) {
      const current = join(dataDir, name);
      if (!existsSync(current)) continue;
      const holdsData = name === SECRET_FILE || (name === 'files' ? dirHasFiles(current) : readdirSync(current).length > 0);
      if (!holdsData) {
        rmSync(current, { recursive: true, force: true });
        continue;
      }
      movedAside ??= join(dataDir, `before-restore-${stamp}`);
      mkdirSync(movedAside, { recursive: true });
      renameSync(current, join(movedAside, name));
    }
    for (const name of incoming) {
      const from = join(staging, name);
      if (existsSync(from)) renameSync(from, join(dataDir, name));
      else if (name === 'files') mkdirSync(join(dataDir, 'files'), { recursive: true });
    }

    const restoredFiles = m ? { count: m.files.count, totalBytes: m.files.totalBytes } : { count: 0, totalBytes: 0 };
    const store = m?.storage?.kind === 's3' ? m.storage : null;
    return {
      file: source,
      dataDir,
      manifest: m,
      tables: tables!,
      files: restoredFiles,
      objectStore: store
        ? { endpoint: store.endpoint, bucket: store.bucket, region: store.region, referencedObjects: store.referencedObjects }
        : null,
      secretRestored: Boolean(m?.secret.included),
      ...(movedAside ? { movedAside } : {}),
      pendingMigrations: m ? pendingAfter(m.schemaVersion) : [],
    };
  } finally {
    rmSync(staging, { recursive: true, force: true });
    lock.release();
  }
}

/** A DO block that raises (rolling the restore back) unless every table holds the manifest's row count. */
function verifyCountsSql(tables: Record<string, number>): string {
  const expected = JSON.stringify(tables).replace(/'/g, "''");
  return `DO $coilpath_verify$
DECLARE
  expected jsonb := '${expected}'::jsonb;
  t text;
  n bigint;
BEGIN
  FOR t IN SELECT jsonb_object_keys(expected) LOOP
    IF to_regclass(format('public.%I', t)) IS NULL THEN
      RAISE EXCEPTION 'coilpath restore: table % is missing after the restore', t;
    END IF;
    EXECUTE format('SELECT count(*) FROM public.%I', t) INTO n;
    IF n <> (expected->>t)::bigint THEN
      RAISE EXCEPTION 'coilpath restore: table % holds % rows, the manifest says %', t, n, expected->>t;
    END IF;
  END LOOP;
END
$coilpath_verify$;
`;
}
