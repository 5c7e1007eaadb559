/** `npm run db:seed`: loads the demo scenario into the configured database unless it is already there. */
import { resolve } from 'node:path';
import { DataDirLocked, lockDataDir } from '../data-dir-lock';
import { clockFromEnv, readEnv } from '../lib/config';
import { openDatabase } from './client';
import { demoToday, seedDemo } from './seed';

const env = readEnv();
// The embedded database is one process's: refused (naming it) while a server holds the data directory.
let lock: ReturnType<typeof lockDataDir> | undefined;
try {
  if (!env.DATABASE_URL) lock = lockDataDir(resolve(env.COILPATH_DATA_DIR), 'seed');
} catch (e) {
  if (!(e instanceof DataDirLocked)) throw e;
  console.error(e.message);
  process.exit(1);
}
const database = await openDatabase({
  databaseUrl: env.DATABASE_URL,
  dataDir: env.DATABASE_URL ? undefined : resolve(env.COILPATH_DATA_DIR, 'pg'),
});
try {
  const today = demoToday(clockFromEnv(env).clock.now());
  const { seeded } = await seedDemo(database.db, { today });
  console.log(seeded ? `Demo data loaded for ${today}` : 'Demo data already present; nothing changed');
} finally {
  await database.close();
  lock?.release();
}
