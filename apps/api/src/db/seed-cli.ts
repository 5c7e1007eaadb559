/** `npm run db:seed`: loads the demo scenario into the configured database unless it is already there. */
import { resolve } from 'node:path';
import { readEnv } from '../lib/config';
import { openDatabase } from './client';
import { seedDemo } from './seed';

const env = readEnv();
const database = await openDatabase({
  databaseUrl: env.DATABASE_URL,
  dataDir: env.DATABASE_URL ? undefined : resolve(env.COILPATH_DATA_DIR, 'pg'),
});
try {
  const today = new Date().toISOString().slice(0, 10);
  const { seeded } = await seedDemo(database.db, { today });
  console.log(seeded ? `Demo data loaded for ${today}` : 'Demo data already present; nothing changed');
} finally {
  await database.close();
}
