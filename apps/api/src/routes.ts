import { Router } from 'express';
import type { AppContext } from './context';
import { requireAuth } from './auth/middleware';
import { authRoutes } from './modules/auth/auth.routes';
import { healthRoutes } from './modules/health/health.routes';
import { outboxRoutes } from './modules/outbox/outbox.routes';
import { branchesRoutes } from './modules/branches/branches.routes';
import { alarmsRoutes, leakCasesRoutes, watchlistRoutes } from './modules/watchlist/watchlist.routes';
import { agreementsRoutes } from './modules/agreements/agreements.routes';

/**
 * Every API module, mounted under `/api`. Modules behind `requireAuth` need a session; each module
 * applies its own role and branch rules. An unknown path falls through to the 404 in app.ts.
 */
export function apiRoutes(ctx: AppContext): Router {
  const api = Router();
  api.use(healthRoutes(ctx));
  api.use('/auth', authRoutes(ctx));
  api.use('/branches', requireAuth, branchesRoutes(ctx));
  api.use('/outbox', requireAuth, outboxRoutes(ctx));
  api.use('/alarms', requireAuth, alarmsRoutes(ctx));
  api.use('/watchlist', requireAuth, watchlistRoutes(ctx));
  api.use('/leak-cases', requireAuth, leakCasesRoutes(ctx));
  api.use('/agreements', requireAuth, agreementsRoutes(ctx));
  return api;
}
