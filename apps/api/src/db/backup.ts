/**
 * Backups of Coilpath's database (`npm run db:backup -- <file>`, `npm run db:restore -- <file>`).
 *
 * - Embedded PGlite: the whole data directory as a gzip tarball (`PGlite.dumpDataDir('gzip')`);
 *   a restore loads it into an empty directory (`new PGlite(dir, { loadDataDir })`).
 * - PostgreSQL (`DATABASE_URL`): `pg_dump --format=custom` / `pg_restore --clean --if-exists`.
 *
 * A restore refuses a target that already holds data unless `force` is given; with `force` a PGlite
 * directory is moved aside (kept next to it) rather than deleted.
 */
import { execFile } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, readdirSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { promisify } from 'node:util';
import { PGlite } from '@electric-sql/pglite';
import pg from 'pg';

const run = promisify(execFile);

export type BackupTarget = { kind: 'pglite'; dataDir: string } | { kind: 'postgres'; url: string };

export class BackupError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'BackupError';
  }
}

/** PGlite keeps `postmaster.pid` while a process has the directory open (and after that process is killed). */
function pgliteInUse(dataDir: string): boolean {
  return existsSync(resolve(dataDir, 'postmaster.pid'));
}

function pgliteHasData(dataDir: string): boolean {
  return existsSync(dataDir) && readdirSync(dataDir).length > 0;
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

/** Whether `pg_dump` and `pg_restore` can be run (Debian: postgresql-client). */
export async function hasPgTools(): Promise<boolean> {
  try {
    await run('pg_dump', ['--version']);
    await run('pg_restore', ['--version']);
    return true;
  } catch {
    return false;
  }
}

/** Writes an open PGlite's data directory to `file` as a gzip tarball. */
export async function dumpPglite(pglite: PGlite, file: string): Promise<{ bytes: number }> {
  const blob = await pglite.dumpDataDir('gzip');
  const bytes = Buffer.from(await blob.arrayBuffer());
  mkdirSync(dirname(resolve(file)), { recursive: true });
  // Write beside, then rename: a backup file is either whole or absent.
  const partial = `${file}.partial`;
  writeFileSync(partial, bytes);
  renameSync(partial, file);
  return { bytes: bytes.length };
}

/**
 * Backs up the database to `file`. For PGlite the server must be stopped (one process per data
 * directory); `force` skips that check (e.g. after the server was killed).
 */
export async function backupDatabase(target: BackupTarget, file: string, opts: { force?: boolean } = {}): Promise<{ bytes: number }> {
  if (target.kind === 'postgres') {
    mkdirSync(dirname(resolve(file)), { recursive: true });
    const partial = `${file}.partial`;
    await runTool('pg_dump', ['--format=custom', '--no-owner', '--no-privileges', `--file=${partial}`, `--dbname=${target.url}`]);
    renameSync(partial, file);
    return { bytes: statSync(file).size };
  }
  if (!pgliteHasData(target.dataDir)) throw new BackupError(`There is no database in ${target.dataDir} to back up.`);
  if (pgliteInUse(target.dataDir) && !opts.force) {
    throw new BackupError(
      `The database in ${target.dataDir} is open (postmaster.pid exists). Stop the Coilpath server first; if no server is running (it was killed), add --force.`,
    );
  }
  const pglite = new PGlite(target.dataDir);
  await pglite.waitReady;
  try {
    return await dumpPglite(pglite, file);
  } finally {
    await pglite.close();
  }
}

/**
 * Restores `file` into the target. Refuses a target holding data unless `force`: then a PGlite
 * directory is moved to `<dir>.before-restore-<time>` and PostgreSQL objects are dropped and recreated.
 */
export async function restoreDatabase(
  target: BackupTarget,
  file: string,
  opts: { force?: boolean; now?: Date } = {},
): Promise<{ movedAside?: string }> {
  if (!existsSync(file)) throw new BackupError(`No backup file at ${file}.`);
  if (target.kind === 'postgres') {
    if (!opts.force && (await postgresHasData(target.url))) {
      throw new BackupError('The target database already has tables. Add --force to replace them with the backup.');
    }
    await runTool('pg_restore', ['--clean', '--if-exists', '--no-owner', '--no-privileges', '--single-transaction', `--dbname=${target.url}`, file]);
    return {};
  }

  const bytes = readFileSync(file);
  if (bytes.length < 2 || bytes[0] !== 0x1f || bytes[1] !== 0x8b) {
    throw new BackupError(`${file} is not a Coilpath PGlite backup (expected a .tar.gz data-directory dump).`);
  }
  let movedAside: string | undefined;
  if (pgliteHasData(target.dataDir)) {
    if (!opts.force) {
      throw new BackupError(`${target.dataDir} already holds a database. Add --force to replace it (the current one is kept beside it).`);
    }
    const stamp = (opts.now ?? new Date()).toISOString().replace(/[:.]/g, '-');
    movedAside = `${target.dataDir}.before-restore-${stamp}`;
    renameSync(target.dataDir, movedAside);
  }
  mkdirSync(target.dataDir, { recursive: true });
  const pglite = new PGlite(target.dataDir, { loadDataDir: new Blob([bytes]) });
  try {
    await pglite.waitReady;
    await pglite.query('SELECT 1');
  } finally {
    await pglite.close();
  }
  return movedAside ? { movedAside } : {};
}

async function runTool(cmd: string, args: string[]): Promise<void> {
  try {
    await run(cmd, args, { maxBuffer: 16 * 1024 * 1024 });
  } catch (e) {
    const err = e as NodeJS.ErrnoException & { stderr?: string };
    if (err.code === 'ENOENT') throw new BackupError(`${cmd} is not installed (Debian: apt-get install postgresql-client).`);
    throw new BackupError(`${cmd} failed: ${(err.stderr ?? err.message).trim()}`);
  }
}
