import { Router } from 'express';
import { z } from 'zod';
import { circuitTargetsInputSchema, unitImportSchema, unitInputSchema, unitsQuerySchema, unitUpdateSchema } from '@coilpath/contract';
import { circuitTargetsResultSchema, unitImportResultSchema, unitPageSchema, unitRowSchema } from '@coilpath/contract/responses';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import * as svc from './units.service';
import { importUnits } from './units-import';
import { setCircuitTargets } from './circuit-targets.service';

const circuitParams = idParams.extend({ number: z.coerce.number().int().min(1).max(8) });

/**
 * `/api/units` — the office's unit records (list, CRUD, CSV import, archive). Branch-scoped; the
 * Unit file's own routes (briefing, history) are separate and open to technicians.
 */
export function unitsRoutes(ctx: AppContext): Router {
  const r = Router();
  const office = requireRole('owner', 'branch_manager', 'dispatcher');
  r.get(
    '/',
    office,
    endpoint({ query: unitsQuerySchema, response: unitPageSchema }, ({ user, query }) => svc.listUnits(ctx, user, query)),
  );
  r.post(
    '/',
    office,
    endpoint({ body: unitInputSchema, status: 201, response: unitRowSchema }, ({ user, body }) => svc.createUnit(ctx, user, body)),
  );
  r.post(
    '/import',
    office,
    endpoint({ body: unitImportSchema, response: unitImportResultSchema }, ({ user, body }) => importUnits(ctx, user, body)),
  );
  r.get(
    '/:id',
    office,
    endpoint({ params: idParams, response: unitRowSchema }, ({ user, params }) => svc.getUnit(ctx.db, user, params.id)),
  );
  r.put(
    '/:id',
    office,
    endpoint({ params: idParams, body: unitUpdateSchema, response: unitRowSchema }, ({ user, params, body }) =>
      svc.updateUnit(ctx, user, params.id, body),
    ),
  );
  r.put(
    '/:id/circuits/:number/targets',
    office,
    endpoint({ params: circuitParams, body: circuitTargetsInputSchema, response: circuitTargetsResultSchema }, ({ user, params, body }) =>
      setCircuitTargets(ctx, user, params.id, params.number, body),
    ),
  );
  r.post(
    '/:id/archive',
    office,
    endpoint({ params: idParams, response: unitRowSchema }, ({ user, params }) => svc.setUnitArchived(ctx, user, params.id, true)),
  );
  r.post(
    '/:id/unarchive',
    office,
    endpoint({ params: idParams, response: unitRowSchema }, ({ user, params }) => svc.setUnitArchived(ctx, user, params.id, false)),
  );
  r.delete(
    '/:id',
    office,
    endpoint({ params: idParams, response: 'empty' }, ({ user, params }) => svc.deleteUnit(ctx, user, params.id)),
  );
  return r;
}
