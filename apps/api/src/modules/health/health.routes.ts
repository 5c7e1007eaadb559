import { Router } from 'express';
import { sql } from 'drizzle-orm';
import type { AppContext } from '../../context';
import { appMeta } from '../../db/schema';
import { DEMO_PASSWORD } from '../../db/seed';
import { eq } from 'drizzle-orm';

export function healthRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get('/health', async (_req, res) => {
    await ctx.db.execute(sql`select 1`);
    res.json({ ok: true, database: ctx.database.kind });
  });
  /** What the sign-in page may show before anyone signs in. */
  r.get('/config', async (_req, res) => {
    const [demo] = await ctx.db.select().from(appMeta).where(eq(appMeta.key, 'demo_seeded')).limit(1);
    res.json({ demo: Boolean(demo), demoPassword: demo ? DEMO_PASSWORD : null });
  });
  return r;
}
