import { Router } from 'express';
import {
  alarmImportSchema,
  alarmInputSchema,
  alarmListQuerySchema,
  bookRepairSchema,
  leakCasePatchSchema,
  leakCaseQuerySchema,
  queueReturnVisitSchema,
  repeatAlarmQuerySchema,
  returnVisitQuerySchema,
  verificationTestInputSchema,
} from '@coilpath/contract';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { createAlarm, importAlarms, listAlarms } from './alarms.service';
import {
  addVerificationTest,
  bookLeakRepair,
  branchesInScope,
  listLeakCases,
  listReturnVisits,
  patchLeakCase,
  queueReturnVisit,
  repeatAlarmUnits,
  unitChoices,
} from './watchlist.service';
import {
  alarmAnswerSchema,
  alarmImportResultSchema,
  alarmListAnswerSchema,
  bookRepairResultSchema,
  leakCaseAnswerSchema,
  leakCaseListAnswerSchema,
  repeatAlarmResponseSchema,
  returnVisitAnswerSchema,
  returnVisitListAnswerSchema,
  unitChoicesAnswerSchema,
} from '@coilpath/contract/responses';

const managers = requireRole('branch_manager', 'owner');

/** `/api/alarms`: managers and the owner; dispatchers may also enter alarms phoned in. */
export function alarmsRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/',
    managers,
    endpoint({ query: alarmListQuerySchema, response: alarmListAnswerSchema }, async ({ user, query }) => ({
      alarms: await listAlarms(ctx, user, query),
    })),
  );
  r.post(
    '/import',
    managers,
    endpoint({ body: alarmImportSchema, response: alarmImportResultSchema }, ({ user, body }) => importAlarms(ctx, user, body)),
  );
  r.post(
    '/',
    requireRole('branch_manager', 'owner', 'dispatcher'),
    endpoint({ body: alarmInputSchema, status: 201, response: alarmAnswerSchema }, async ({ user, body }) => ({
      alarm: await createAlarm(ctx, user, body),
    })),
  );
  return r;
}

/** `/api/watchlist`: repeat-alarm units and return visits to book. */
export function watchlistRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(managers);
  r.get(
    '/repeat-alarms',
    endpoint({ query: repeatAlarmQuerySchema, response: repeatAlarmResponseSchema }, async ({ user, query }) =>
      repeatAlarmUnits(ctx, await branchesInScope(ctx.db, user, query.branchId), ctx.clock.now()),
    ),
  );
  r.get(
    '/units',
    endpoint({ query: returnVisitQuerySchema, response: unitChoicesAnswerSchema }, async ({ user, query }) => ({
      units: await unitChoices(ctx, user, query.branchId),
    })),
  );
  r.get(
    '/return-visits',
    endpoint({ query: returnVisitQuerySchema, response: returnVisitListAnswerSchema }, async ({ user, query }) => ({
      returnVisits: await listReturnVisits(ctx, user, query.branchId),
    })),
  );
  r.patch(
    '/return-visits/:id',
    endpoint({ params: idParams, body: queueReturnVisitSchema, response: returnVisitAnswerSchema }, async ({ user, params, body }) => ({
      returnVisit: await queueReturnVisit(ctx, user, params.id, body),
    })),
  );
  return r;
}

/** `/api/leak-cases`: open cases, their deadlines, tests and actions. */
export function leakCasesRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(managers);
  r.get(
    '/',
    endpoint({ query: leakCaseQuerySchema, response: leakCaseListAnswerSchema }, async ({ user, query }) => ({
      leakCases: await listLeakCases(ctx, user, query),
    })),
  );
  r.patch(
    '/:id',
    endpoint({ params: idParams, body: leakCasePatchSchema, response: leakCaseAnswerSchema }, async ({ user, params, body }) => ({
      leakCase: await patchLeakCase(ctx, user, params.id, body),
    })),
  );
  r.post(
    '/:id/verification-tests',
    endpoint(
      { params: idParams, body: verificationTestInputSchema, status: 201, response: leakCaseAnswerSchema },
      async ({ user, params, body }) => ({ leakCase: await addVerificationTest(ctx, user, params.id, body) }),
    ),
  );
  r.post(
    '/:id/repair-visit',
    endpoint({ params: idParams, body: bookRepairSchema, status: 201, response: bookRepairResultSchema }, ({ user, params, body }) =>
      bookLeakRepair(ctx, user, params.id, body),
    ),
  );
  return r;
}
