import { eq } from 'drizzle-orm';
import type { z } from 'zod';
import type { BranchDetail, BranchValues, SessionUser, branchPatchSchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { branches } from '../../db/schema';
import { assertBranch } from '../../auth/policy';
import { conflict, notFound } from '../../lib/errors';
import { changeAs } from '../events/actor';

type BranchRow = typeof branches.$inferSelect;

const toDetail = (b: BranchRow): BranchDetail => ({
  id: b.id,
  name: b.name,
  code: b.code,
  timeZone: b.timeZone,
  baseAddress: b.baseAddress,
  baseLat: b.baseLat,
  baseLon: b.baseLon,
  holidays: b.holidays,
  labourRate: b.labourRateCents / 100,
  currency: b.currency,
  unitSystem: b.unitSystem,
  elevationMeters: b.elevationMeters,
  sensorTolerancePercent: b.sensorTolerancePercent,
  sensorToleranceAbsolute: b.sensorToleranceAbsolute,
  repeatAlarmCount: b.repeatAlarmCount,
  repeatAlarmDays: b.repeatAlarmDays,
  callbackWindowDays: b.callbackWindowDays,
  inspectionDueDays: b.inspectionDueDays,
  tradingName: b.tradingName,
  officeAddress: b.officeAddress,
  officePhone: b.officePhone,
  licenceNumber: b.licenceNumber,
  officeEmail: b.officeEmail,
  archivedAt: b.archivedAt?.toISOString() ?? null,
});

function columns(v: Partial<BranchValues>): Partial<typeof branches.$inferInsert> {
  const { labourRate, ...rest } = v;
  return { ...rest, ...(labourRate !== undefined ? { labourRateCents: Math.round(labourRate * 100) } : {}) };
}

async function refuseTakenCode(ctx: AppContext, code: string | undefined, exceptId?: string) {
  if (!code) return;
  const [b] = await ctx.db.select({ id: branches.id, name: branches.name }).from(branches).where(eq(branches.code, code)).limit(1);
  if (b && b.id !== exceptId) throw conflict('code_taken', `The code ${code} is already used by ${b.name}. Choose another.`);
}

export async function getBranch(ctx: AppContext, user: SessionUser, id: string): Promise<BranchDetail> {
  const [b] = await ctx.db.select().from(branches).where(eq(branches.id, id)).limit(1);
  if (!b) throw notFound('branch');
  assertBranch(user, b.id, 'branch');
  return toDetail(b);
}

export async function createBranch(ctx: AppContext, user: SessionUser, v: BranchValues): Promise<BranchDetail> {
  await refuseTakenCode(ctx, v.code);
  const [b] = await changeAs(ctx.db, user.id, (tx) =>
    tx
      .insert(branches)
      .values(columns(v) as typeof branches.$inferInsert)
      .returning({ id: branches.id }),
  );
  return getBranch(ctx, user, b!.id);
}

export async function updateBranch(
  ctx: AppContext,
  user: SessionUser,
  id: string,
  v: z.output<typeof branchPatchSchema>,
): Promise<BranchDetail> {
  await getBranch(ctx, user, id);
  await refuseTakenCode(ctx, v.code, id);
  const set = columns(v);
  if (Object.keys(set).length) await changeAs(ctx.db, user.id, (tx) => tx.update(branches).set(set).where(eq(branches.id, id)));
  return getBranch(ctx, user, id);
}
