/**
 *   npm run db:backup -- <file> [--force]
 *   npm run db:restore -- <file> [--force]
 *
 * Uses the same settings as the server: `DATABASE_URL` (PostgreSQL, via pg_dump/pg_restore) or the
 * PGlite data directory under `COILPATH_DATA_DIR` (default ./data). Stop the server first when it
 * runs on PGlite.
 */
import { resolve } from 'node:path';
import { readEnv } from '../lib/config';
import { BackupError, backupDatabase, restoreDatabase, type BackupTarget } from './backup';

const usage = 'Usage: npm run db:backup -- <file> [--force]   |   npm run db:restore -- <file> [--force]';

async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  const force = rest.includes('--force');
  const files = rest.filter((a) => !a.startsWith('--'));
  const unknown = rest.filter((a) => a.startsWith('--') && a !== '--force');
  if ((command !== 'backup' && command !== 'restore') || files.length !== 1 || unknown.length > 0) {
    console.error(usage);
    return 2;
  }
  const file = resolve(files[0]!);
  const env = readEnv();
  const target: BackupTarget = env.DATABASE_URL
    ? { kind: 'postgres', url: env.DATABASE_URL }
    : { kind: 'pglite', dataDir: resolve(env.COILPATH_DATA_DIR, 'pg') };
  const where = target.kind === 'postgres' ? 'the PostgreSQL database' : target.dataDir;

  if (command === 'backup') {
    const { bytes } = await backupDatabase(target, file, { force });
    console.log(`Backed up ${where} to ${file} (${(bytes / 1024).toFixed(0)} KiB).`);
  } else {
    const { movedAside } = await restoreDatabase(target, file, { force });
    console.log(`Restored ${file} into ${where}.${movedAside ? ` The previous database was moved to ${movedAside}.` : ''}`);
  }
  return 0;
}

try {
  process.exitCode = await main(process.argv.slice(2));
} catch (e) {
  if (e instanceof BackupError) {
    console.error(e.message);
    process.exitCode = 1;
  } else {
    throw e;
  }
}
