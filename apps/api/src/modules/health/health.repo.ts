/** The queries of the health and config routes: a round trip to the database, and the demo-data marker. */
import { eq, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { appMeta } from '../../db/schema';

export async function pingDatabase(db: Db): Promise<void> {
  await db.execute(sql`select 1`);
}

export async function findDemoSeeded(db: Db) {
  const [demo] = await db.select().from(appMeta).where(eq(appMeta.key, 'demo_seeded')).limit(1);
  return demo;
}
