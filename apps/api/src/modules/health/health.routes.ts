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
  /**
   * What the sign-in page may show before anyone signs in: the demo password only on a server started in demo
   * mode with the demo data loaded — never on a production start, whatever the database holds.
   */
  r.get('/config', async (_req, res) => {
    if (!ctx.config.demoMode) return void res.json({ demo: false, demoPassword: null });
    const [demo] = await ctx.db.select().from(appMeta).where(eq(appMeta.key, 'demo_seeded')).limit(1);
    res.json({ demo: Boolean(demo), demoPassword: demo ? DEMO_PASSWORD : null });
  });
  return r;
}
