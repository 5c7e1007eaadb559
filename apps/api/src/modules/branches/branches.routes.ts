import { Router } from 'express';
import { asc, inArray, isNull, and } from 'drizzle-orm';
import type { AppContext } from '../../context';
import { branches } from '../../db/schema';
import { branchScope } from '../../auth/middleware';
import { endpoint } from '../../lib/endpoint';

/** Branches the signed-in person may see (the owner's branch switcher). */
export function branchesRoutes(ctx: AppContext): Router {
  const r = Router();
  r.get(
    '/',
    endpoint({}, async ({ user }) => {
      const scope = branchScope(user);
      const rows = await ctx.db
        .select({
          id: branches.id,
          name: branches.name,
          code: branches.code,
          timeZone: branches.timeZone,
          unitSystem: branches.unitSystem,
          currency: branches.currency,
          sensorTolerancePercent: branches.sensorTolerancePercent,
          sensorToleranceAbsolute: branches.sensorToleranceAbsolute,
          repeatAlarmCount: branches.repeatAlarmCount,
          repeatAlarmDays: branches.repeatAlarmDays,
          callbackWindowDays: branches.callbackWindowDays,
        })
        .from(branches)
        .where(and(isNull(branches.archivedAt), scope ? inArray(branches.id, scope) : undefined))
        .orderBy(asc(branches.name));
      return { branches: rows };
    }),
  );
  return r;
}
