import { Router } from 'express';
import type { AppContext } from './context';
import { requireAuth } from './auth/middleware';
import { authRoutes, setupRoutes } from './modules/auth/auth.routes';
import { healthRoutes } from './modules/health/health.routes';
import { outboxRoutes } from './modules/outbox/outbox.routes';
import { branchesRoutes } from './modules/branches/branches.routes';
import { customersRoutes, sitesRoutes } from './modules/sites/sites.routes';
import { unitsRoutes } from './modules/units/units.routes';
import { invitationsRoutes, usersRoutes } from './modules/team/team.routes';
import { calendarRoutes, dayRoutes } from './modules/day/day.routes';
import { attachmentsRoutes, briefingRoutes, visitsRoutes } from './modules/visits/visits.routes';
import { workOrdersRoutes } from './modules/work-orders/work-orders.routes';
import { bookingsRoutes, rosterRoutes } from './modules/roster/roster.routes';
import { fixQualityRoutes, warrantyClaimRoutes } from './modules/fix-quality/fix-quality.routes';
import { unitFileRoutes, unitSearchRoutes } from './modules/unit-file/unit-file.routes';
import { alarmsRoutes, leakCasesRoutes, watchlistRoutes } from './modules/watchlist/watchlist.routes';
import { agreementsRoutes } from './modules/agreements/agreements.routes';
import { alarmSourcesRoutes } from './modules/alarm-sources/alarm-sources.routes';
import { eventsRoutes } from './modules/events/events.routes';

/**
 * Every API module, mounted under `/api`. Modules behind `requireAuth` need a session; each module
 * applies its own role and branch rules. An unknown path falls through to the 404 in app.ts.
 * Machine-to-machine routes (`/api/ingest`, `lib/machine-routes.ts`) are mounted in app.ts, before the body parsers.
 */
export function apiRoutes(ctx: AppContext): Router {
  const api = Router();
  api.use(healthRoutes(ctx));
  api.use('/auth', authRoutes(ctx));
  api.use('/setup', setupRoutes(ctx));
  api.use('/branches', requireAuth, branchesRoutes(ctx));
  api.use('/outbox', requireAuth, outboxRoutes(ctx));
  api.use('/customers', requireAuth, customersRoutes(ctx));
  api.use('/sites', requireAuth, sitesRoutes(ctx));
  api.use('/units', requireAuth, unitsRoutes(ctx));
  api.use('/users', requireAuth, usersRoutes(ctx));
  // Public `check` and `accept` (the e-mailed token is the credential); the rest needs the owner.
  api.use('/invitations', invitationsRoutes(ctx));
  api.use('/day', requireAuth, dayRoutes(ctx));
  api.use('/calendar', calendarRoutes(ctx));
  api.use('/visits', requireAuth, visitsRoutes(ctx));
  api.use('/attachments', requireAuth, attachmentsRoutes(ctx));
  api.use('/units', requireAuth, briefingRoutes(ctx));
  api.use('/work-orders', requireAuth, workOrdersRoutes(ctx));
  api.use('/bookings', requireAuth, bookingsRoutes(ctx));
  api.use('/roster', requireAuth, rosterRoutes(ctx));
  api.use('/reports', requireAuth, fixQualityRoutes(ctx));
  api.use('/warranty-claims', requireAuth, warrantyClaimRoutes(ctx));
  api.use('/units', requireAuth, unitFileRoutes(ctx));
  api.use('/unit-file', requireAuth, unitSearchRoutes(ctx));
  api.use('/alarms', requireAuth, alarmsRoutes(ctx));
  api.use('/watchlist', requireAuth, watchlistRoutes(ctx));
  api.use('/leak-cases', requireAuth, leakCasesRoutes(ctx));
  api.use('/agreements', requireAuth, agreementsRoutes(ctx));
  api.use('/alarm-sources', requireAuth, alarmSourcesRoutes(ctx));
  // Server-Sent Events for the signed-in person's screens (modules/events/).
  api.use('/events', requireAuth, eventsRoutes(ctx));
  return api;
}
