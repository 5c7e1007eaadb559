import { Router } from 'express';
import type { AppContext } from './context';
import { requireAuth } from './auth/middleware';
import { authRoutes } from './modules/auth/auth.routes';
import { healthRoutes } from './modules/health/health.routes';
import { outboxRoutes } from './modules/outbox/outbox.routes';
import { branchesRoutes } from './modules/branches/branches.routes';
import { calendarRoutes, dayRoutes } from './modules/day/day.routes';
import { attachmentsRoutes, briefingRoutes, visitsRoutes } from './modules/visits/visits.routes';

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
  api.use('/day', requireAuth, dayRoutes(ctx));
  api.use('/calendar', calendarRoutes(ctx));
  api.use('/visits', requireAuth, visitsRoutes(ctx));
  api.use('/attachments', requireAuth, attachmentsRoutes(ctx));
  api.use('/units', requireAuth, briefingRoutes(ctx));
  return api;
}
