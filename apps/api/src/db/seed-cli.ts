/** `npm run db:seed`: loads the demo scenario into the configured database unless it is already there. */
import { resolve } from 'node:path';
import { clockFromEnv, readEnv } from '../lib/config';
import { openDatabase } from './client';
import { demoToday, seedDemo } from './seed';

const env = readEnv();
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
}
