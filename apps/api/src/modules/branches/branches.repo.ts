/** Every query of the branches: the list a person may see, one branch, its code, inserting and changing it. */
import { and, asc, eq, inArray, isNull } from 'drizzle-orm';
import type { Db, Tx } from '../../db/client';
import { branches } from '../../db/schema';

type Q = Db | Tx;
export type BranchRecord = typeof branches.$inferSelect;
export type BranchColumns = Partial<typeof branches.$inferInsert>;

/** The branches not archived, all of them (`scope` null) or those in `scope`, by name. */
export async function listBranches(db: Q, scope: string[] | null) {
  return db
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
}

export type BranchListRecord = Awaited<ReturnType<typeof listBranches>>[number];

export async function findBranchByCode(db: Q, code: string) {
  const [b] = await db.select({ id: branches.id, name: branches.name }).from(branches).where(eq(branches.code, code)).limit(1);
  return b;
}

export async function findBranch(db: Q, id: string): Promise<BranchRecord | undefined> {
  const [b] = await db.select().from(branches).where(eq(branches.id, id)).limit(1);
  return b;
}

export async function insertBranch(db: Q, values: BranchColumns): Promise<{ id: string }> {
  const [b] = await db
    .insert(branches)
    .values(values as typeof branches.$inferInsert)
    .returning({ id: branches.id });
  return b!;
}

export async function updateBranchRow(db: Q, id: string, set: BranchColumns): Promise<void> {
  await db.update(branches).set(set).where(eq(branches.id, id));
}
