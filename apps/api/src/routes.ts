import { Router } from 'express';
import type { AppContext } from './context';
import { requireAuth } from './auth/middleware';
import { authRoutes } from './modules/auth/auth.routes';
import { healthRoutes } from './modules/health/health.routes';
import { outboxRoutes } from './modules/outbox/outbox.routes';
import { branchesRoutes } from './modules/branches/branches.routes';
import { fixQualityRoutes, warrantyClaimRoutes } from './modules/fix-quality/fix-quality.routes';
import { unitFileRoutes, unitSearchRoutes } from './modules/unit-file/unit-file.routes';

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
  api.use('/reports', requireAuth, fixQualityRoutes(ctx));
  api.use('/warranty-claims', requireAuth, warrantyClaimRoutes(ctx));
  api.use('/units', requireAuth, unitFileRoutes(ctx));
  api.use('/unit-file', requireAuth, unitSearchRoutes(ctx));
  return api;
}
