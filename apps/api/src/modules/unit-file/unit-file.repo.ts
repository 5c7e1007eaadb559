/** Every query of the unit file: who may read a unit, the file's sections, its attachments, the unit search. */
import { and, asc, desc, eq, exists, ilike, inArray, isNull, or, sql } from 'drizzle-orm';
import type { Db, Tx } from '../../db/client';
import {
  agreements,
  agreementUnits,
  alarms,
  attachments,
  bookings,
  branches,
  circuits,
  customers,
  findings,
  leakCases,
  readings,
  refrigerantEvents,
  sites,
  units,
  users,
  verificationTests,
  visits,
  workOrders,
} from '../../db/schema';

export type UnitRecord = typeof units.$inferSelect;
export type AttachmentRecord = typeof attachments.$inferSelect;

/** A technician may read a unit they have (or had) a visit or booking on. */
function techAssigned(db: Db, techId: string, unitId = units.id) {
  return or(
    exists(
      db
        .select({ one: sql`1` })
        .from(visits)
        .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
        .where(and(eq(visits.techId, techId), eq(workOrders.unitId, unitId))),
    ),
    exists(
      db
        .select({ one: sql`1` })
        .from(bookings)
        .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
        .where(and(eq(bookings.techId, techId), eq(workOrders.unitId, unitId))),
    ),
  );
}

export async function findUnit(db: Db, unitId: string): Promise<UnitRecord | undefined> {
  const [u] = await db.select().from(units).where(eq(units.id, unitId)).limit(1);
  return u;
}

/** Whether the unit is on the technician's assignments (`techAssigned`). */
export async function onTechAssignments(db: Db, techId: string, unitId: string): Promise<boolean> {
  const [ok] = await db
    .select({ id: units.id })
    .from(units)
    .where(and(eq(units.id, unitId), techAssigned(db, techId)))
    .limit(1);
  return !!ok;
}

/** Every section of the unit file, side by side, then the leak cases' tests and the work orders' visits. */
export async function unitFileRows(db: Db, u: UnitRecord, readingsLimit: number, alarmsLimit: number) {
  const unitId = u.id;
  const unitWorkOrders = db.select({ id: workOrders.id }).from(workOrders).where(eq(workOrders.unitId, unitId));
  const unitVisits = db.select({ id: visits.id }).from(visits).where(inArray(visits.workOrderId, unitWorkOrders));

  const [siteRows, branchRows, circuitRows, agreementRows, alarmRows, readingRows, findingRows, caseRows, attachmentRows, woRows] =
    await Promise.all([
      db
        .select({
          id: sites.id,
          name: sites.name,
          address: sites.address,
          city: sites.city,
          region: sites.region,
          accessNotes: sites.accessNotes,
          customerName: customers.name,
        })
        .from(sites)
        .innerJoin(customers, eq(customers.id, sites.customerId))
        .where(eq(sites.id, u.siteId)),
      db
        .select({ id: branches.id, name: branches.name, timeZone: branches.timeZone, unitSystem: branches.unitSystem })
        .from(branches)
        .where(eq(branches.id, u.branchId)),
      db.select().from(circuits).where(eq(circuits.unitId, unitId)).orderBy(asc(circuits.number)),
      db
        .select({
          id: agreements.id,
          name: agreements.name,
          status: agreements.status,
          termStart: agreements.termStart,
          termEnd: agreements.termEnd,
          slaHours: agreements.slaHours,
          rrule: agreements.rrule,
        })
        .from(agreementUnits)
        .innerJoin(agreements, eq(agreements.id, agreementUnits.agreementId))
        .where(eq(agreementUnits.unitId, unitId))
        .orderBy(desc(agreements.termEnd)),
      db.select().from(alarms).where(eq(alarms.unitId, unitId)).orderBy(desc(alarms.raisedAt)).limit(alarmsLimit),
      db
        .select({ r: readings, circuitNumber: circuits.number })
        .from(readings)
        .innerJoin(circuits, eq(circuits.id, readings.circuitId))
        .where(eq(readings.unitId, unitId))
        .orderBy(desc(readings.takenAt))
        .limit(readingsLimit),
      db
        .select({
          f: findings,
          workOrderId: visits.workOrderId,
          workOrderNumber: workOrders.number,
          techName: users.name,
          closedAt: visits.closedAt,
        })
        .from(findings)
        .innerJoin(visits, eq(visits.id, findings.visitId))
        .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
        .leftJoin(users, eq(users.id, visits.techId))
        .where(or(eq(findings.unitId, unitId), and(isNull(findings.unitId), eq(workOrders.unitId, unitId))))
        .orderBy(desc(findings.createdAt)),
      db.select().from(leakCases).where(eq(leakCases.unitId, unitId)).orderBy(desc(leakCases.openedOn)),
      db
        .select()
        .from(attachments)
        .where(or(eq(attachments.unitId, unitId), inArray(attachments.visitId, unitVisits)))
        .orderBy(desc(attachments.createdAt)),
      db.select().from(workOrders).where(eq(workOrders.unitId, unitId)).orderBy(desc(workOrders.createdAt)),
    ]);

  const [tests, visitRows] = await Promise.all([
    caseRows.length
      ? db
          .select()
          .from(verificationTests)
          .where(
            inArray(
              verificationTests.leakCaseId,
              caseRows.map((c) => c.id),
            ),
          )
          .orderBy(asc(verificationTests.testedOn))
      : Promise.resolve([]),
    woRows.length
      ? db
          .select({ v: visits, techName: users.name })
          .from(visits)
          .innerJoin(users, eq(users.id, visits.techId))
          .where(
            inArray(
              visits.workOrderId,
              woRows.map((w) => w.id),
            ),
          )
          .orderBy(asc(visits.createdAt))
      : Promise.resolve([]),
  ]);

  return {
    siteRows,
    branchRows,
    circuitRows,
    agreementRows,
    alarmRows,
    readingRows,
    findingRows,
    caseRows,
    attachmentRows,
    woRows,
    tests,
    visitRows,
  };
}

export type UnitFileRows = Awaited<ReturnType<typeof unitFileRows>>;

/** One attachment of the unit or of a visit on it. */
export async function findUnitAttachment(db: Db, unitId: string, attachmentId: string): Promise<AttachmentRecord | undefined> {
  const unitVisits = db
    .select({ id: visits.id })
    .from(visits)
    .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
    .where(eq(workOrders.unitId, unitId));
  const [a] = await db
    .select()
    .from(attachments)
    .where(and(eq(attachments.id, attachmentId), or(eq(attachments.unitId, unitId), inArray(attachments.visitId, unitVisits))))
    .limit(1);
  return a;
}

/** The active units matching the search (one more than `limit`, to tell whether there are more). */
export async function searchUnitRows(db: Db, techId: string | null, term: string | undefined, branchId: string | undefined, limit: number) {
  const openWork = sql<number>`(SELECT count(*)::int FROM work_orders w WHERE w.unit_id = ${units.id} AND w.state NOT IN ('closed', 'cancelled'))`;
  return db
    .select({
      id: units.id,
      tag: units.tag,
      kind: units.kind,
      make: units.make,
      model: units.model,
      serial: units.serial,
      siteName: sites.name,
      branchName: branches.name,
      openWorkOrders: openWork,
    })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .innerJoin(branches, eq(branches.id, units.branchId))
    .where(
      and(
        isNull(units.archivedAt),
        branchId ? eq(units.branchId, branchId) : undefined,
        techId !== null ? techAssigned(db, techId) : undefined,
        term
          ? or(
              ilike(units.tag, term),
              ilike(units.serial, term),
              ilike(units.make, term),
              ilike(units.model, term),
              ilike(sites.name, term),
            )
          : undefined,
      ),
    )
    .orderBy(asc(sites.name), asc(units.tag))
    .limit(limit + 1);
}

/** What a unit's refrigerant ledger is built from: its entries, leak cases and their tests, each with its person. */
export async function ledgerRows(db: Db | Tx, unitId: string) {
  const [eventRows, caseRows] = await Promise.all([
    db
      .select({ e: refrigerantEvents, name: users.name, epa608Type: users.epa608Type, epa608Number: users.epa608Number })
      .from(refrigerantEvents)
      .leftJoin(users, eq(users.id, refrigerantEvents.techId))
      .where(eq(refrigerantEvents.unitId, unitId))
      .orderBy(asc(refrigerantEvents.date), asc(refrigerantEvents.createdAt)),
    db.select().from(leakCases).where(eq(leakCases.unitId, unitId)).orderBy(asc(leakCases.openedOn), asc(leakCases.createdAt)),
  ]);
  const testRows = caseRows.length
    ? await db
        .select({ t: verificationTests, name: users.name, epa608Type: users.epa608Type, epa608Number: users.epa608Number })
        .from(verificationTests)
        .leftJoin(users, eq(users.id, verificationTests.byUserId))
        .where(
          inArray(
            verificationTests.leakCaseId,
            caseRows.map((c) => c.id),
          ),
        )
        .orderBy(asc(verificationTests.testedOn), asc(verificationTests.createdAt))
    : [];
  return { eventRows, caseRows, testRows };
}

/** The refrigerant record's site, branch and circuits of a unit. */
export function recordHeaderRows(db: Db, u: { id: string; siteId: string; branchId: string }) {
  return Promise.all([
    db
      .select({ name: sites.name, address: sites.address, city: sites.city, region: sites.region, customerName: customers.name })
      .from(sites)
      .innerJoin(customers, eq(customers.id, sites.customerId))
      .where(eq(sites.id, u.siteId)),
    db.select({ id: branches.id, name: branches.name, timeZone: branches.timeZone }).from(branches).where(eq(branches.id, u.branchId)),
    db
      .select({ number: circuits.number, chargeLb: circuits.chargeLb })
      .from(circuits)
      .where(and(eq(circuits.unitId, u.id)))
      .orderBy(asc(circuits.number)),
  ]);
}
