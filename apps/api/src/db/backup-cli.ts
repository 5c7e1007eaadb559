/**
 *   npm run db:backup -- <file>
 *   npm run db:restore -- <file> [--force]
 *
 * Uses the same settings as the server: the data directory `COILPATH_DATA_DIR` (default ./data: the embedded
 * database, the stored files, the session secret) and, with `DATABASE_URL`, PostgreSQL through
 * pg_dump / pg_restore / psql. With `S3_BUCKET` the stored files stay in the bucket: the backup records where
 * (the manifest's `storage`) and a restore says so. On the embedded database a running server holds the data directory: stop it
 * first (it is named when it is running).
 */
import { resolve } from 'node:path';
import { DataDirLocked } from '../data-dir-lock';
import { readEnv } from '../lib/config';
import { s3SettingsFromEnv, type S3Settings } from '../storage/s3';
import { BackupError, createBackup, restoreBackup, type BackupTarget, type RestoreReport } from './backup';

const usage = 'Usage: npm run db:backup -- <file>   |   npm run db:restore -- <file> [--force]';

const mib = (bytes: number) => (bytes < 1024 * 1024 ? `${(bytes / 1024).toFixed(1)} KiB` : `${(bytes / 1024 / 1024).toFixed(1)} MiB`);
const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`;

/** `name count, name count, …` wrapped to lines of about 100 characters, indented. */
function countLines(tables: Record<string, number>): string[] {
  const lines: string[] = [];
  let line = '';
  for (const [t, n] of Object.entries(tables).sort(([a], [b]) => a.localeCompare(b))) {
    const part = `${t} ${n.toLocaleString('en-US')}`;
    if (line && line.length + part.length + 2 > 100) {
      lines.push(`    ${line},`);
      line = '';
    }
    line = line ? `${line}, ${part}` : part;
  }
  if (line) lines.push(`    ${line}`);
  return lines;
}

const bucketAt = (s: { bucket: string; endpoint: string | null; region: string }) =>
  `S3 bucket ${s.bucket} ${s.endpoint ? `at ${s.endpoint}` : `in ${s.region}`}`;

function describeRestore(r: RestoreReport, secretFromEnvironment: boolean, s3Now: S3Settings | null): string[] {
  const rows = Object.values(r.tables).reduce((s, n) => s + n, 0);
  const out: string[] = [];
  if (!r.manifest) {
    out.push(`Restored ${r.file} into ${r.dataDir}: a database-only backup from an earlier Coilpath (no manifest, no files, no secret).`);
    out.push(`  database: ${plural(Object.keys(r.tables).length, 'table')}, ${plural(rows, 'row')}`);
    out.push('  The stored files and the session secret in the data directory were left as they were.');
  } else {
    const m = r.manifest;
    out.push(`Verified ${r.file} (made ${m.createdAt}): every entry matches its SHA-256 in the manifest.`);
    out.push(`Restored into ${r.dataDir}:`);
    out.push(
      `  database (${m.database.kind}, schema ${m.schemaVersion ?? 'empty'}): ${plural(Object.keys(r.tables).length, 'table')}, ${plural(rows, 'row')} — the counts match the manifest:`,
    );
    out.push(...countLines(r.tables));
    if (r.objectStore) {
      const o = r.objectStore;
      out.push(
        `  files: not in this backup — the database refers to ${plural(o.referencedObjects, 'object')} in the ${bucketAt(o)}; they were not touched.`,
      );
      const same = s3Now && s3Now.bucket === o.bucket && s3Now.endpoint === o.endpoint;
      if (!same)
        out.push(
          `  Point S3_URL${o.endpoint ? `=${o.endpoint}` : ' (unset: Amazon S3)'}, S3_BUCKET=${o.bucket} and S3_REGION=${o.region} at that bucket (with its credentials) before starting the server.`,
        );
    } else {
      out.push(`  files: ${plural(r.files.count, 'file')}, ${mib(r.files.totalBytes)}`);
      if (s3Now)
        out.push(
          `  note: the files were restored into ${r.dataDir}/files, but S3_BUCKET is set: the server reads files from the ${bucketAt(s3Now)}.`,
        );
    }
    if (m.files.missing.length > 0) {
      out.push(
        `  note: ${plural(m.files.missing.length, 'file')} the database refers to were already missing when the backup was made; they answer 410.`,
      );
    }
    if (m.secret.included) {
      out.push(
        secretFromEnvironment
          ? '  session secret: restored into the data directory, but COILPATH_SECRET is set, so the server signs with that instead.'
          : '  session secret: restored — sessions signed before the backup are still valid.',
      );
    } else {
      out.push(
        m.secret.fromEnvironment
          ? '  session secret: not in the backup (it came from COILPATH_SECRET); set the same COILPATH_SECRET to keep sessions valid.'
          : '  session secret: none in the backup; the server makes a new one and everyone signs in again.',
      );
    }
    if (r.pendingMigrations.length > 0)
      out.push(
        `  The server applies ${plural(r.pendingMigrations.length, 'newer migration')} when it starts (${r.pendingMigrations.join(', ')}).`,
      );
  }
  if (r.movedAside) out.push(`The data it replaced was moved to ${r.movedAside}.`);
  return out;
}

async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  const force = rest.includes('--force');
  const files = rest.filter((a) => !a.startsWith('--'));
  const unknown = rest.filter((a) => a.startsWith('--') && !(a === '--force' && command === 'restore'));
  if ((command !== 'backup' && command !== 'restore') || files.length !== 1 || unknown.length > 0) {
    console.error(usage);
    return 2;
  }
  const file = resolve(files[0]!);
  const env = readEnv();
  const dataDir = resolve(env.COILPATH_DATA_DIR);
  const target: BackupTarget = env.DATABASE_URL ? { kind: 'postgres', url: env.DATABASE_URL, dataDir } : { kind: 'pglite', dataDir };
  const secretFromEnvironment = Boolean(env.COILPATH_SECRET);
  const s3 = s3SettingsFromEnv(env);

  if (command === 'backup') {
    const objectStore = s3 ? { endpoint: s3.endpoint, bucket: s3.bucket, region: s3.region } : null;
    const { bytes, manifest: m } = await createBackup(target, file, { secretFromEnvironment, objectStore });
    const rows = Object.values(m.tables).reduce((s, n) => s + n, 0);
    console.log(`Backed up ${target.kind === 'postgres' ? 'the PostgreSQL database' : dataDir} to ${file} (${mib(bytes)}):`);
    console.log(
      `  database (${m.database.kind}, schema ${m.schemaVersion ?? 'empty'}): ${plural(Object.keys(m.tables).length, 'table')}, ${plural(rows, 'row')}`,
    );
    if (m.storage?.kind === 's3') {
      console.log(
        `  files: not copied — they stay in the ${bucketAt(m.storage)} (${plural(m.storage.referencedObjects, 'object')} the database refers to); the manifest records where.`,
      );
      console.log("  Back the bucket up with the object store's own means (versioning, replication): this file does not hold its objects.");
    } else {
      console.log(`  files: ${plural(m.files.count, 'file')}, ${mib(m.files.totalBytes)}`);
    }
    console.log(
      `  session secret: ${m.secret.included ? 'included' : 'none in the data directory'}${secretFromEnvironment ? ' (the server signs with COILPATH_SECRET: keep that with the backup)' : ''}`,
    );
    if (m.files.missing.length > 0) {
      console.warn(
        `Warning: ${plural(m.files.missing.length, 'file')} the database refers to are missing from storage: ${m.files.missing.slice(0, 5).join(', ')}${m.files.missing.length > 5 ? ', …' : ''}`,
      );
    }
    console.log(
      `The backup holds the session secret${m.storage?.kind === 's3' ? '' : ' and every stored file'}: keep it as safe as the server.`,
    );
  } else {
    const report = await restoreBackup(target, file, { force });
    for (const line of describeRestore(report, secretFromEnvironment, s3)) console.log(line);
  }
  return 0;
}

try {
  process.exitCode = await main(process.argv.slice(2));
} catch (e) {
  if (e instanceof BackupError || e instanceof DataDirLocked) {
    console.error(e.message);
    process.exitCode = 1;
  } else {
    throw e;
  }
}
