/** What the health and config routes answer. */
import type { AppContext } from '../../context';
import { DEMO_PASSWORD } from '../../db/seed';
import { findDemoSeeded, pingDatabase } from './health.repo';

export async function health(ctx: AppContext): Promise<{ ok: true; database: AppContext['database']['kind'] }> {
  await pingDatabase(ctx.db);
  return { ok: true, database: ctx.database.kind };
}

/**
 * What the sign-in page may show before anyone signs in: the demo password only on a server started in demo
 * mode with the demo data loaded — never on a production start, whatever the database holds.
 */
export async function publicConfig(ctx: AppContext): Promise<{ demo: boolean; demoPassword: string | null }> {
  if (!ctx.config.demoMode) return { demo: false, demoPassword: null };
  const demo = await findDemoSeeded(ctx.db);
  return { demo: Boolean(demo), demoPassword: demo ? DEMO_PASSWORD : null };
}
