import { Router } from 'express';
import { asc, inArray, isNull, and } from 'drizzle-orm';
import type { AppContext } from '../../context';
import { branches } from '../../db/schema';
import { branchInputSchema, branchPatchSchema } from '@coilpath/contract';
import { requireRole } from '../../auth/middleware';
import { branchScope } from '../../auth/policy';
import { endpoint, idParams } from '../../lib/endpoint';
import { onlySent } from '../sites/list-query';
import { createBranch, getBranch, updateBranch } from './branches.service';
import { branchDetailSchema, branchListAnswerSchema } from '@coilpath/contract/responses';

/** `/api/branches` — the branches a person may see (the owner's branch switcher) and their settings. */
export function branchesRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/',
    endpoint({ response: branchListAnswerSchema }, async ({ user }) => {
      const scope = branchScope(user);
      const rows = await ctx.db
        .select({
          id: branches.id,
          name: branches.name,
          code: branches.code,
          timeZone: branches.timeZone,
          unitSystem: branches.unitSystem,
          currency: branches.currency,
          elevationMeters: branches.elevationMeters,
          sensorTolerancePercent: branches.sensorTolerancePercent,
          sensorToleranceAbsolute: branches.sensorToleranceAbsolute,
          repeatAlarmCount: branches.repeatAlarmCount,
          repeatAlarmDays: branches.repeatAlarmDays,
          callbackWindowDays: branches.callbackWindowDays,
          inspectionDueDays: branches.inspectionDueDays,
          baseAddress: branches.baseAddress,
          baseLat: branches.baseLat,
          baseLon: branches.baseLon,
          holidays: branches.holidays,
          labourRateCents: branches.labourRateCents,
          tradingName: branches.tradingName,
          officeAddress: branches.officeAddress,
          officePhone: branches.officePhone,
          licenceNumber: branches.licenceNumber,
          officeEmail: branches.officeEmail,
        })
        .from(branches)
        .where(and(isNull(branches.archivedAt), scope ? inArray(branches.id, scope) : undefined))
        .orderBy(asc(branches.name));
      return { branches: rows.map(({ labourRateCents, ...b }) => ({ ...b, labourRate: labourRateCents / 100, archivedAt: null })) };
    }),
  );
  /** Full settings; branch people may read their own branch, only the owner changes branches. */
  r.get(
    '/:id',
    endpoint({ params: idParams, response: branchDetailSchema }, ({ user, params }) => getBranch(ctx, user, params.id)),
  );
  r.post(
    '/',
    requireRole('owner'),
    endpoint({ body: branchInputSchema, status: 201, response: branchDetailSchema }, ({ user, body }) => createBranch(ctx, user, body)),
  );
  r.patch(
    '/:id',
    requireRole('owner'),
    endpoint({ params: idParams, body: branchPatchSchema, response: branchDetailSchema }, ({ user, params, body, req }) =>
      updateBranch(ctx, user, params.id, onlySent(body, req.body)),
    ),
  );
  return r;
}
