/** Every query of the work orders: the list and one work order with what they show, the checks of a new one, the open return visit. */
import { and, desc, eq, gte, inArray, lt, notInArray, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type { z } from 'zod';
import type { workOrderListQuerySchema } from '@coilpath/contract';
import type { Db, Tx } from '../../db/client';
import { bookings, leakCases, sites, units, visits, workOrders } from '../../db/schema';

type Q = Db | Tx;
export type WorkOrderRecord = typeof workOrders.$inferSelect;
export type WorkOrderInsert = typeof workOrders.$inferInsert;

const origin = alias(workOrders, 'origin_work_order');

function selectWorkOrders(db: Q) {
  return db
    .select({
      wo: workOrders,
      siteName: sites.name,
      siteAddress: sites.address,
      siteLat: sites.lat,
      siteLon: sites.lon,
      unitTag: units.tag,
      unitMake: units.make,
      unitModel: units.model,
      unitRefrigerant: units.refrigerant,
      originNumber: origin.number,
      leakRepairDueDate: leakCases.repairDueDate,
      booking: { id: bookings.id, techId: bookings.techId, startAt: bookings.startAt, endAt: bookings.endAt, version: bookings.version },
    })
    .from(workOrders)
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .leftJoin(units, eq(units.id, workOrders.unitId))
    .leftJoin(origin, eq(origin.id, workOrders.originWorkOrderId))
    .leftJoin(leakCases, eq(leakCases.id, workOrders.leakCaseId))
    .leftJoin(bookings, eq(bookings.workOrderId, workOrders.id));
}

export type WorkOrderListRecord = Awaited<ReturnType<ReturnType<typeof selectWorkOrders>['execute']>>[number];

/** The list query, with its branch resolved: one branch, or (when null) the branches of `scope` (all when null too). */
export type WorkOrderFilter = Omit<z.output<typeof workOrderListQuerySchema>, 'branchId'> & {
  branchId: string | null | undefined;
  scope: string[] | null;
};

/** Work orders matching the filter, newest first. */
export async function listWorkOrderRecords(db: Q, f: WorkOrderFilter): Promise<WorkOrderListRecord[]> {
  const where: (SQL | undefined)[] = [
    f.branchId ? eq(workOrders.branchId, f.branchId) : f.scope ? inArray(workOrders.branchId, f.scope) : undefined,
    f.state ? inArray(workOrders.state, f.state) : undefined,
    f.kind ? eq(workOrders.kind, f.kind) : undefined,
    f.unitId ? eq(workOrders.unitId, f.unitId) : undefined,
    f.siteId ? eq(workOrders.siteId, f.siteId) : undefined,
    f.from ? gte(workOrders.createdAt, new Date(f.from)) : undefined,
    f.to ? lt(workOrders.createdAt, new Date(f.to)) : undefined,
  ];
  return selectWorkOrders(db)
    .where(and(...where))
    .orderBy(desc(workOrders.createdAt))
    .limit(f.limit);
}

export async function findWorkOrderRecord(db: Q, id: string): Promise<WorkOrderListRecord | undefined> {
  const [row] = await selectWorkOrders(db).where(eq(workOrders.id, id)).limit(1);
  return row;
}

export async function findSiteBranch(db: Q, siteId: string) {
  const [site] = await db.select({ id: sites.id, branchId: sites.branchId }).from(sites).where(eq(sites.id, siteId)).limit(1);
  return site;
}

export async function findUnitPlace(db: Q, unitId: string) {
  const [unit] = await db.select({ siteId: units.siteId, branchId: units.branchId }).from(units).where(eq(units.id, unitId)).limit(1);
  return unit;
}

export async function findWorkOrderPlace(db: Q, id: string) {
  const [o] = await db
    .select({ branchId: workOrders.branchId, siteId: workOrders.siteId })
    .from(workOrders)
    .where(eq(workOrders.id, id))
    .limit(1);
  return o;
}

export async function findLeakCaseBranch(db: Q, id: string) {
  const [lc] = await db.select({ branchId: leakCases.branchId }).from(leakCases).where(eq(leakCases.id, id)).limit(1);
  return lc;
}

export async function insertWorkOrder(db: Q, values: WorkOrderInsert): Promise<{ id: string }> {
  const [w] = await db.insert(workOrders).values(values).returning({ id: workOrders.id });
  return w!;
}

/** The work order, locked for the rest of the transaction. */
export async function lockWorkOrder(db: Q, id: string): Promise<WorkOrderRecord | undefined> {
  const [w] = await db.select().from(workOrders).where(eq(workOrders.id, id)).for('update').limit(1);
  return w;
}

export async function updateWorkOrderRow(db: Q, id: string, set: Partial<WorkOrderInsert>): Promise<void> {
  await db.update(workOrders).set(set).where(eq(workOrders.id, id));
}

/** The unit's open return visit (a return visit in none of `finished`), locked when asked. */
export async function selectOpenReturn(
  db: Q,
  unitId: string,
  finished: WorkOrderRecord['state'][],
  lock: boolean,
): Promise<WorkOrderRecord | undefined> {
  const q = db
    .select()
    .from(workOrders)
    .where(and(eq(workOrders.unitId, unitId), eq(workOrders.kind, 'return_visit'), notInArray(workOrders.state, finished)))
    .limit(1);
  const [w] = lock ? await q.for('update') : await q;
  return w;
}

/** The latest visit of a work order, if any. */
export async function latestVisitId(db: Q, workOrderId: string): Promise<string | null> {
  const [v] = await db
    .select({ id: visits.id })
    .from(visits)
    .where(eq(visits.workOrderId, workOrderId))
    .orderBy(desc(visits.createdAt))
    .limit(1);
  return v?.id ?? null;
}
