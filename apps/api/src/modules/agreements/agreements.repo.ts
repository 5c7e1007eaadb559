/** Every query of the maintenance agreements: the agreements, their units, their planned visits, the audit of their changes, PM completion. */
import { and, asc, eq, gte, inArray, lte, ne, sql } from 'drizzle-orm';
import type { SessionUser } from '@coilpath/contract';
import type { Db, Tx } from '../../db/client';
import { agreementUnits, agreements, auditEvents, branches, customers, sites, units, users, workOrders } from '../../db/schema';
import { branchFilter } from '../watchlist/scope';

type Q = Db | Tx;
export type AgreementRecord = typeof agreements.$inferSelect;
type AgreementInsert = typeof agreements.$inferInsert;
type WorkOrderInsert = typeof workOrders.$inferInsert;

/** Agreements in the user's scope (or the branch asked for), with site and customer name, by site then name. */
export async function listAgreementRecords(db: Q, user: SessionUser, branchId: string | undefined, status: string, onlyIds?: string[]) {
  return db
    .select({ a: agreements, siteName: sites.name, customerName: customers.name })
    .from(agreements)
    .innerJoin(sites, eq(sites.id, agreements.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(
      and(
        branchFilter(user, branchId, agreements.branchId),
        status !== 'all' ? eq(agreements.status, status as 'active') : undefined,
        onlyIds ? inArray(agreements.id, onlyIds) : undefined,
      ),
    )
    .orderBy(asc(sites.name), asc(agreements.name));
}

/** The covered units of the agreements `ids`, by tag. */
export async function agreementUnitRows(db: Q, ids: string[]) {
  return db
    .select({ agreementId: agreementUnits.agreementId, id: units.id, tag: units.tag, make: units.make, model: units.model })
    .from(agreementUnits)
    .innerJoin(units, eq(units.id, agreementUnits.unitId))
    .where(inArray(agreementUnits.agreementId, ids))
    .orderBy(asc(units.tag));
}

/** The planned-maintenance work orders (not cancelled) of the agreements `ids`. */
export async function plannedVisitsOf(db: Q, ids: string[]) {
  return db
    .select({ agreementId: workOrders.agreementId, plannedDate: workOrders.plannedDate, state: workOrders.state })
    .from(workOrders)
    .where(and(inArray(workOrders.agreementId, ids), eq(workOrders.kind, 'planned_maintenance'), ne(workOrders.state, 'cancelled')));
}

/** One agreement's planned-maintenance visits (not cancelled), by planned date. */
export async function agreementVisits(db: Q, id: string) {
  return db
    .select({
      workOrderId: workOrders.id,
      number: workOrders.number,
      plannedDate: workOrders.plannedDate,
      state: workOrders.state,
      closedAt: workOrders.closedAt,
    })
    .from(workOrders)
    .where(and(eq(workOrders.agreementId, id), eq(workOrders.kind, 'planned_maintenance'), ne(workOrders.state, 'cancelled')))
    .orderBy(asc(workOrders.plannedDate));
}

export async function unitSites(db: Q, unitIds: string[]) {
  return db
    .select({ id: units.id, siteId: units.siteId })
    .from(units)
    .where(inArray(units.id, [...new Set(unitIds)]));
}

export async function findSiteBranch(db: Q, siteId: string) {
  const [site] = await db.select({ id: sites.id, branchId: sites.branchId }).from(sites).where(eq(sites.id, siteId)).limit(1);
  return site;
}

export async function insertAgreement(db: Q, values: AgreementInsert): Promise<{ id: string }> {
  const [a] = await db.insert(agreements).values(values).returning({ id: agreements.id });
  return a!;
}

export async function insertAgreementUnits(db: Q, agreementId: string, unitIds: string[]): Promise<void> {
  await db.insert(agreementUnits).values(unitIds.map((unitId) => ({ agreementId, unitId })));
}

export async function deleteAgreementUnits(db: Q, agreementId: string): Promise<void> {
  await db.delete(agreementUnits).where(eq(agreementUnits.agreementId, agreementId));
}

export async function insertAudit(
  db: Q,
  userId: string,
  action: string,
  entityId: string,
  details: Record<string, unknown>,
): Promise<void> {
  await db.insert(auditEvents).values({ actorId: userId, action, entity: 'agreement', entityId, details });
}

/** The agreement, locked for the rest of the transaction when asked. */
export async function findAgreement(db: Q, id: string, lock = false): Promise<AgreementRecord | undefined> {
  const q = db.select().from(agreements).where(eq(agreements.id, id)).limit(1);
  const [a] = lock ? await q.for('update') : await q;
  return a;
}

export async function updateAgreementRow(db: Q, id: string, set: Partial<AgreementInsert>): Promise<void> {
  await db.update(agreements).set(set).where(eq(agreements.id, id));
}

export async function findBranchRecord(db: Q, branchId: string) {
  const [b] = await db.select().from(branches).where(eq(branches.id, branchId));
  return b;
}

/** The branch's other agreements' planned visits (not cancelled) planned within [from, to]. */
export async function otherPlannedVisits(db: Q, branchId: string, agreementId: string, from: string, to: string) {
  return db
    .select({ id: workOrders.id, plannedDate: workOrders.plannedDate })
    .from(workOrders)
    .where(
      and(
        eq(workOrders.branchId, branchId),
        eq(workOrders.kind, 'planned_maintenance'),
        ne(workOrders.state, 'cancelled'),
        sql`${workOrders.agreementId} is distinct from ${agreementId}`,
        gte(workOrders.plannedDate, from),
        lte(workOrders.plannedDate, to),
      ),
    );
}

/** The branch's active technicians, counted. */
export async function countActiveTechnicians(db: Q, branchId: string) {
  const [techs] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(users)
    .where(and(eq(users.branchId, branchId), eq(users.role, 'technician'), eq(users.active, true)));
  return techs;
}

/** Every planned-maintenance work order of the agreement, cancelled ones too. */
export async function existingPlanVisits(db: Q, agreementId: string) {
  return db
    .select({ id: workOrders.id, state: workOrders.state, plannedDate: workOrders.plannedDate, purpose: workOrders.purpose })
    .from(workOrders)
    .where(and(eq(workOrders.agreementId, agreementId), eq(workOrders.kind, 'planned_maintenance')));
}

/** The agreement's covered units (id, tag), by tag. */
export async function coveredUnits(db: Q, agreementId: string) {
  return db
    .select({ id: units.id, tag: units.tag })
    .from(agreementUnits)
    .innerJoin(units, eq(units.id, agreementUnits.unitId))
    .where(eq(agreementUnits.agreementId, agreementId))
    .orderBy(asc(units.tag));
}

export async function insertWorkOrders(db: Q, values: WorkOrderInsert[]): Promise<void> {
  await db.insert(workOrders).values(values);
}

/** Changes the work order only while it is still in `state` (a visit booked meanwhile is left alone). */
export async function updateWorkOrderIfState(
  db: Q,
  id: string,
  state: WorkOrderInsert['state'] & string,
  set: Partial<WorkOrderInsert>,
): Promise<void> {
  await db
    .update(workOrders)
    .set(set)
    .where(and(eq(workOrders.id, id), eq(workOrders.state, state)));
}

/** The branches in the user's scope (or the branch asked for), by name. */
export async function scopedBranches(db: Q, user: SessionUser, branchId: string | undefined) {
  return db
    .select({ id: branches.id, name: branches.name, timeZone: branches.timeZone })
    .from(branches)
    .where(branchFilter(user, branchId, branches.id))
    .orderBy(asc(branches.name));
}

/** The planned-maintenance work orders (not cancelled) of the branches, planned on or after `from`. */
export async function pmWorkOrders(db: Q, branchIds: string[], from: string) {
  return db
    .select({
      agreementId: workOrders.agreementId,
      branchId: workOrders.branchId,
      plannedDate: workOrders.plannedDate,
      state: workOrders.state,
      closedAt: workOrders.closedAt,
    })
    .from(workOrders)
    .where(
      and(
        inArray(workOrders.branchId, branchIds),
        eq(workOrders.kind, 'planned_maintenance'),
        ne(workOrders.state, 'cancelled'),
        gte(workOrders.plannedDate, from),
      ),
    );
}

/** Every agreement of the branches with site and customer name, by site. */
export async function branchAgreements(db: Q, branchIds: string[]) {
  return db
    .select({ a: agreements, siteName: sites.name, customerName: customers.name })
    .from(agreements)
    .innerJoin(sites, eq(sites.id, agreements.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(inArray(agreements.branchId, branchIds))
    .orderBy(asc(sites.name));
}
