/** The close-out's queries (closeout.service.ts): the visit's close, its return visit, and its summary's addressee and context. */
import { and, eq, inArray } from 'drizzle-orm';
import type { Db, Tx } from '../../db/client';
import {
  branches,
  customers,
  findings,
  leakCases,
  refrigerantEvents,
  sites,
  units,
  users,
  visitSignatures,
  visits,
  workOrders,
} from '../../db/schema';
import { OPEN_LEAK_CASE_STATUSES } from './visits.repo';

export async function findingIdsOf(db: Tx, visitId: string): Promise<string[]> {
  return (await db.select({ id: findings.id }).from(findings).where(eq(findings.visitId, visitId))).map((f) => f.id);
}

export async function workOrderLeakCase(db: Tx, workOrderId: string) {
  const [wo] = await db
    .select({ id: workOrders.id, leakCaseId: workOrders.leakCaseId })
    .from(workOrders)
    .where(eq(workOrders.id, workOrderId));
  return wo;
}

export async function refrigerantEntryCount(db: Tx, visitId: string): Promise<number> {
  return (await db.select({ id: refrigerantEvents.id }).from(refrigerantEvents).where(eq(refrigerantEvents.visitId, visitId))).length;
}

export async function insertSignature(db: Tx, values: typeof visitSignatures.$inferInsert): Promise<void> {
  await db.insert(visitSignatures).values(values);
}

export async function updateWorkOrder(db: Tx, id: string, set: Partial<typeof workOrders.$inferInsert>) {
  const [wo] = await db.update(workOrders).set(set).where(eq(workOrders.id, id)).returning();
  return wo;
}

/** The unit's full charge and its branch's time zone. */
export async function unitChargeAndZone(db: Tx, unitId: string) {
  const [unit] = await db
    .select({ fullChargeLb: units.fullChargeLb, timeZone: branches.timeZone })
    .from(units)
    .innerJoin(branches, eq(branches.id, units.branchId))
    .where(eq(units.id, unitId));
  return unit;
}

/** The unit's standing leak case: id, status and repair deadline. */
export async function standingLeakCaseOf(db: Tx, unitId: string) {
  const [openCase] = await db
    .select({ id: leakCases.id, status: leakCases.status, repairDueDate: leakCases.repairDueDate })
    .from(leakCases)
    .where(and(eq(leakCases.unitId, unitId), inArray(leakCases.status, [...OPEN_LEAK_CASE_STATUSES])))
    .limit(1);
  return openCase;
}

export async function insertWorkOrder(db: Tx, values: typeof workOrders.$inferInsert) {
  const [created] = await db
    .insert(workOrders)
    .values(values)
    .returning({ id: workOrders.id, number: workOrders.number, state: workOrders.state });
  return created;
}

export async function setRepairWorkOrder(db: Tx, leakCaseId: string, workOrderId: string, now: Date): Promise<void> {
  await db.update(leakCases).set({ repairWorkOrderId: workOrderId, updatedAt: now }).where(eq(leakCases.id, leakCaseId));
}

/** The site's and the customer's contact e-mail addresses of a visit. */
export async function summaryAddresses(db: Db, visitId: string) {
  const [row] = await db
    .select({ site: sites.contactEmail, customer: customers.contactEmail })
    .from(visits)
    .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(eq(visits.id, visitId))
    .limit(1);
  return row;
}

/** The visit's branch, and its technician's name and EPA 608 number. */
export async function summarySpeaker(db: Db, visitId: string) {
  const [row] = await db
    .select({ branch: branches, techName: users.name, epa608Number: users.epa608Number })
    .from(visits)
    .innerJoin(branches, eq(branches.id, visits.branchId))
    .innerJoin(users, eq(users.id, visits.techId))
    .where(eq(visits.id, visitId))
    .limit(1);
  return row;
}

/** The units' open leak cases, by repair deadline. */
export function openLeakCasesOf(db: Db, unitIds: string[]) {
  return db
    .select({
      unitTag: units.tag,
      openedOn: leakCases.openedOn,
      leakRatePercent: leakCases.leakRatePercent,
      thresholdPercent: leakCases.thresholdPercent,
      repairDueDate: leakCases.repairDueDate,
    })
    .from(leakCases)
    .innerJoin(units, eq(units.id, leakCases.unitId))
    .where(and(inArray(leakCases.unitId, unitIds), eq(leakCases.status, 'open')))
    .orderBy(leakCases.repairDueDate);
}
