/**
 * The visit's queries: the visit, its units and circuits, readings, findings, attachments, refrigerant entries,
 * leak cases and the signature. The briefing's are in briefing.repo.ts, the close-out's in closeout.repo.ts.
 */
import { and, asc, eq, exists, gt, inArray, isNull, or, sql } from 'drizzle-orm';
import type { AnyPgColumn } from 'drizzle-orm/pg-core';
import type { Tx } from '../../db/client';
import {
  attachments,
  bookings,
  branches,
  circuits,
  findings,
  leakCases,
  readings,
  refrigerantEvents,
  sites,
  units,
  users,
  visitEvents,
  visitSignatures,
  visits,
  workOrders,
} from '../../db/schema';

export type VisitRow = typeof visits.$inferSelect;
export type UnitRow = typeof units.$inferSelect;

/** Leak cases in these states still stand: a new case is not opened beside one. */
export const OPEN_LEAK_CASE_STATUSES = ['open', 'retrofit_planned', 'retire_planned'] as const;

export async function loadVisit(db: Tx, id: string, opts: { lock?: boolean } = {}): Promise<VisitRow | undefined> {
  const q = db.select().from(visits).where(eq(visits.id, id)).limit(1);
  const [v] = opts.lock ? await q.for('update') : await q;
  return v;
}

/** SQL condition: the unit (by id and site) is on one of the technician's assignments. */
export function unitOnAssignments(db: Tx, techId: string, unitId: string | AnyPgColumn, siteId: string | AnyPgColumn) {
  return exists(
    db
      .select({ one: sql`1` })
      .from(visits)
      .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
      .where(
        and(eq(visits.techId, techId), or(eq(workOrders.unitId, unitId), and(isNull(workOrders.unitId), eq(workOrders.siteId, siteId)))),
      ),
  );
}

/** The unit, and whether it is on the technician's assignments (`techId` null: not asked, true). */
export async function unitWithAssignment(db: Tx, techId: string | null, unitId: string) {
  const [row] = await db
    .select({
      unit: units,
      assigned: techId !== null ? sql<boolean>`${unitOnAssignments(db, techId, units.id, units.siteId)}` : sql<boolean>`true`,
    })
    .from(units)
    .where(eq(units.id, unitId))
    .limit(1);
  return row;
}

/** The units a visit covers: the work order's unit, or every active unit at the site when it names none. */
export async function unitsOfWorkOrder(db: Tx, wo: { unitId: string | null; siteId: string }) {
  return db
    .select()
    .from(units)
    .where(wo.unitId ? eq(units.id, wo.unitId) : and(eq(units.siteId, wo.siteId), isNull(units.archivedAt)))
    .orderBy(asc(units.tag));
}

/** The unit and site a work order names. */
export async function workOrderPlace(db: Tx, workOrderId: string) {
  const [wo] = await db
    .select({ unitId: workOrders.unitId, siteId: workOrders.siteId })
    .from(workOrders)
    .where(eq(workOrders.id, workOrderId));
  return wo;
}

export async function circuitsOfUnits(db: Tx, unitIds: string[]) {
  return db.select().from(circuits).where(inArray(circuits.unitId, unitIds)).orderBy(asc(circuits.number));
}

/** The open leak case a work order repairs, with its count of verification tests (see `leakRepairOf`). */
export async function openLeakRepair(db: Tx, wo: { id: string; leakCaseId: string | null }) {
  const [c] = await db
    .select({
      leakCaseId: leakCases.id,
      repairDueDate: leakCases.repairDueDate,
      verificationTests: sql<number>`(SELECT count(*) FROM verification_tests vt WHERE vt.leak_case_id = "leak_cases"."id")::int`,
    })
    .from(leakCases)
    .where(
      and(
        eq(leakCases.status, 'open'),
        wo.leakCaseId
          ? sql`(${leakCases.repairWorkOrderId} = ${wo.id} OR ${leakCases.id} = ${wo.leakCaseId})`
          : eq(leakCases.repairWorkOrderId, wo.id),
      ),
    )
    .orderBy(asc(leakCases.repairDueDate))
    .limit(1);
  return c;
}

/** The visit with its work order, site, branch, technician's name and booking. */
export async function visitHead(db: Tx, id: string) {
  const [row] = await db
    .select({
      visit: visits,
      wo: workOrders,
      site: sites,
      branch: branches,
      techName: users.name,
      booking: { id: bookings.id, startAt: bookings.startAt, endAt: bookings.endAt },
    })
    .from(visits)
    .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .innerJoin(branches, eq(branches.id, visits.branchId))
    .innerJoin(users, eq(users.id, visits.techId))
    .leftJoin(bookings, eq(bookings.id, visits.bookingId))
    .where(eq(visits.id, id))
    .limit(1);
  return row;
}

export function visitReadings(db: Tx, id: string) {
  return db
    .select({ r: readings, number: circuits.number })
    .from(readings)
    .innerJoin(circuits, eq(circuits.id, readings.circuitId))
    .where(eq(readings.visitId, id))
    .orderBy(asc(circuits.number));
}

export function visitFindings(db: Tx, id: string) {
  return db.select().from(findings).where(eq(findings.visitId, id)).orderBy(asc(findings.createdAt), asc(findings.id));
}

export function visitRefrigerantEvents(db: Tx, id: string) {
  return db.select().from(refrigerantEvents).where(eq(refrigerantEvents.visitId, id)).orderBy(asc(refrigerantEvents.createdAt));
}

export function visitAttachments(db: Tx, id: string) {
  return db.select().from(attachments).where(eq(attachments.visitId, id)).orderBy(asc(attachments.createdAt));
}

export function visitStateEvents(db: Tx, id: string) {
  return db.select().from(visitEvents).where(eq(visitEvents.visitId, id)).orderBy(asc(visitEvents.at));
}

/** A technician's open visits (work order not cancelled), by booking start. */
export function openVisitsOf(db: Tx, techId: string) {
  return db
    .select({ id: visits.id, enRouteAt: visits.enRouteAt, onSiteAt: visits.onSiteAt, startAt: bookings.startAt, endAt: bookings.endAt })
    .from(visits)
    .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
    .leftJoin(bookings, eq(bookings.id, visits.bookingId))
    .where(and(eq(visits.techId, techId), isNull(visits.closedAt), sql`${workOrders.state} <> 'cancelled'`))
    .orderBy(asc(bookings.startAt));
}

export async function updateVisit(db: Tx, id: string, set: Partial<typeof visits.$inferInsert>): Promise<void> {
  await db.update(visits).set(set).where(eq(visits.id, id));
}

export async function insertVisitEvent(db: Tx, values: typeof visitEvents.$inferInsert): Promise<void> {
  await db.insert(visitEvents).values(values);
}

export async function setWorkOrderState(db: Tx, id: string, set: Partial<typeof workOrders.$inferInsert>): Promise<void> {
  await db.update(workOrders).set(set).where(eq(workOrders.id, id));
}

export function circuitsById(db: Tx, ids: string[]) {
  return db.select().from(circuits).where(inArray(circuits.id, ids));
}

export async function branchUnits(db: Tx, branchId: string) {
  const [b] = await db
    .select({ unitSystem: branches.unitSystem, elevationMeters: branches.elevationMeters })
    .from(branches)
    .where(eq(branches.id, branchId));
  return b;
}

/** Replaces the visit's readings of these circuits with `values`. */
export async function replaceReadings(db: Tx, visitId: string, circuitIds: string[], values: (typeof readings.$inferInsert)[]) {
  await db.delete(readings).where(and(eq(readings.visitId, visitId), inArray(readings.circuitId, circuitIds)));
  return db.insert(readings).values(values).returning();
}

export async function findFinding(db: Tx, id: string) {
  const [f] = await db.select().from(findings).where(eq(findings.id, id)).limit(1);
  return f;
}

export async function insertFinding(db: Tx, values: typeof findings.$inferInsert) {
  const [f] = await db.insert(findings).values(values).returning();
  return f!;
}

// Attachments

export async function findAttachment(db: Tx, id: string) {
  const [a] = await db.select().from(attachments).where(eq(attachments.id, id)).limit(1);
  return a;
}

/** Stores an attachment; a nameplate photo becomes its unit's nameplate. */
export async function insertAttachment(db: Tx, values: typeof attachments.$inferInsert) {
  const [a] = await db.insert(attachments).values(values).returning();
  if (values.kind === 'nameplate' && values.unitId)
    await db.update(units).set({ nameplateAttachmentId: a!.id }).where(eq(units.id, values.unitId));
  return a!;
}

// Signature

export async function signatureRow(db: Tx, visitId: string) {
  const [row] = await db
    .select({ signerName: visitSignatures.signerName, signedAt: visitSignatures.signedAt, recordedAt: visitSignatures.recordedAt })
    .from(visitSignatures)
    .where(eq(visitSignatures.visitId, visitId))
    .limit(1);
  return row;
}

export async function signatureImage(db: Tx, visitId: string): Promise<Buffer | null> {
  const [row] = await db
    .select({ imagePng: visitSignatures.imagePng })
    .from(visitSignatures)
    .where(eq(visitSignatures.visitId, visitId))
    .limit(1);
  return row?.imagePng ?? null;
}

// Refrigerant

/** A unit's additions of refrigerant, oldest first. */
export function unitAdditions(db: Tx, unitId: string) {
  return db
    .select({ date: refrigerantEvents.date, poundsAdded: refrigerantEvents.poundsAdded, reason: refrigerantEvents.reason })
    .from(refrigerantEvents)
    .where(and(eq(refrigerantEvents.unitId, unitId), gt(refrigerantEvents.poundsAdded, 0)))
    .orderBy(asc(refrigerantEvents.date));
}

/** Locks the unit's row: one writer per unit at a time. */
export async function lockUnit(db: Tx, unitId: string): Promise<void> {
  await db.select({ id: units.id }).from(units).where(eq(units.id, unitId)).for('update');
}

export async function findRefrigerantEvent(db: Tx, id: string) {
  const [e] = await db.select().from(refrigerantEvents).where(eq(refrigerantEvents.id, id)).limit(1);
  return e;
}

/** The unit's standing leak case (one of `OPEN_LEAK_CASE_STATUSES`), if any. */
export async function standingLeakCase(db: Tx, unitId: string) {
  const [open] = await db
    .select()
    .from(leakCases)
    .where(and(eq(leakCases.unitId, unitId), inArray(leakCases.status, [...OPEN_LEAK_CASE_STATUSES])))
    .limit(1);
  return open;
}

export async function circuitNumbersOf(db: Tx, unitId: string): Promise<number[]> {
  return (await db.select({ number: circuits.number }).from(circuits).where(eq(circuits.unitId, unitId)).orderBy(asc(circuits.number))).map(
    (c) => c.number,
  );
}

export async function branchTimeZone(db: Tx, branchId: string) {
  const [b] = await db.select({ timeZone: branches.timeZone }).from(branches).where(eq(branches.id, branchId));
  return b;
}

export async function insertRefrigerantEvent(db: Tx, values: typeof refrigerantEvents.$inferInsert) {
  const [e] = await db.insert(refrigerantEvents).values(values).returning();
  return e!;
}

export async function insertLeakCase(db: Tx, values: typeof leakCases.$inferInsert) {
  const [c] = await db.insert(leakCases).values(values).returning();
  return c!;
}
