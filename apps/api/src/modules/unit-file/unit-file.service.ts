/**
 * Unit file: everything known about one unit, for everyone who may read it — the owner (every unit),
 * the unit branch's managers and dispatchers, and technicians with a visit or booking on the unit.
 * Anyone else gets 404, so the unit's existence is not revealed.
 */
import { and, asc, desc, eq, exists, ilike, inArray, isNull, or, sql } from 'drizzle-orm';
import type { SessionUser, UnitFile, UnitSearchQuery, UnitSearchResult } from '@coilpath/contract';
import type { Db } from '../../db/client';
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
  sites,
  units,
  users,
  verificationTests,
  visits,
  workOrders,
} from '../../db/schema';
import { notFound } from '../../lib/errors';
import { enforce, unitMayRead } from '../../auth/policy';
import { circuitTargetsDto, readingDto } from '../visits/visits.present';

/** Readings returned for the trend (the latest ones). */
const READINGS_LIMIT = 1500;
const ALARMS_LIMIT = 500;

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

/** The unit when the user may read it; otherwise 404. */
export async function readableUnit(db: Db, user: SessionUser, unitId: string) {
  const [u] = await db.select().from(units).where(eq(units.id, unitId)).limit(1);
  if (!u) throw notFound('unit');
  let onAssignments = false;
  if (user.role === 'technician') {
    const [ok] = await db
      .select({ id: units.id })
      .from(units)
      .where(and(eq(units.id, unitId), techAssigned(db, user.id)))
      .limit(1);
    onAssignments = !!ok;
  }
  enforce(unitMayRead(user, u, onAssignments));
  return u;
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);
const attachmentUrl = (unitId: string, id: string) => `/api/units/${unitId}/file/attachments/${id}`;

export async function unitFile(db: Db, user: SessionUser, unitId: string): Promise<UnitFile> {
  const u = await readableUnit(db, user, unitId);
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
      db.select().from(alarms).where(eq(alarms.unitId, unitId)).orderBy(desc(alarms.raisedAt)).limit(ALARMS_LIMIT),
      db
        .select({ r: readings, circuitNumber: circuits.number })
        .from(readings)
        .innerJoin(circuits, eq(circuits.id, readings.circuitId))
        .where(eq(readings.unitId, unitId))
        .orderBy(desc(readings.takenAt))
        .limit(READINGS_LIMIT),
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

  const site = siteRows[0]!;
  const branch = branchRows[0]!;
  const toAttachment = (a: typeof attachments.$inferSelect) => ({
    id: a.id,
    kind: a.kind,
    displayName: a.displayName,
    contentType: a.contentType,
    sizeBytes: a.sizeBytes,
    visitId: a.visitId,
    createdAt: a.createdAt.toISOString(),
    url: attachmentUrl(unitId, a.id),
  });
  const nameplate =
    attachmentRows.find((a) => a.id === u.nameplateAttachmentId) ?? attachmentRows.find((a) => a.kind === 'nameplate') ?? null;

  return {
    unit: {
      id: u.id,
      tag: u.tag,
      kind: u.kind,
      make: u.make,
      model: u.model,
      serial: u.serial,
      installDate: u.installDate,
      warrantyEnd: u.warrantyEnd,
      refrigerant: u.refrigerant,
      fullChargeLb: u.fullChargeLb,
      applianceCategory: u.applianceCategory,
      tonnage: u.tonnage,
      notes: u.notes,
      archivedAt: iso(u.archivedAt),
    },
    site,
    branch,
    nameplate: nameplate ? toAttachment(nameplate) : null,
    circuits: circuitRows.map((c) => ({
      id: c.id,
      number: c.number,
      compressorCount: c.compressorCount,
      chargeLb: c.chargeLb,
      targets: circuitTargetsDto(c, branch.unitSystem),
    })),
    agreements: agreementRows,
    alarms: alarmRows.map((a) => ({
      id: a.id,
      circuit: a.circuit,
      code: a.code,
      description: a.description,
      raisedAt: a.raisedAt.toISOString(),
      clearedAt: iso(a.clearedAt),
      source: a.source,
    })),
    readings: readingRows.reverse().map(({ r, circuitNumber }) => readingDto(r, circuitNumber, branch.unitSystem)),
    findings: findingRows.map(({ f, workOrderId, workOrderNumber, techName }) => ({
      id: f.id,
      visitId: f.visitId,
      workOrderId,
      workOrderNumber,
      causeCode: f.causeCode,
      origin: f.origin,
      alarmCode: f.alarmCode,
      reportedCircuit: f.reportedCircuit,
      actualCircuit: f.actualCircuit,
      notes: f.notes,
      createdAt: f.createdAt.toISOString(),
      techName,
    })),
    leakCases: caseRows.map((c) => ({
      id: c.id,
      openedOn: c.openedOn,
      rule: c.rule,
      method: c.method,
      thresholdPercent: c.thresholdPercent,
      leakRatePercent: c.leakRatePercent,
      repairDueDate: c.repairDueDate,
      chronic: c.chronic,
      status: c.status,
      repairedOn: c.repairedOn,
      closedAt: iso(c.closedAt),
      verificationTests: tests
        .filter((t) => t.leakCaseId === c.id)
        .map((t) => ({ id: t.id, kind: t.kind, testedOn: t.testedOn, passed: t.passed })),
    })),
    attachments: attachmentRows.map(toAttachment),
    workOrders: woRows.map((w) => ({
      id: w.id,
      number: w.number,
      kind: w.kind,
      state: w.state,
      priority: w.priority,
      complaint: w.complaint,
      purpose: w.purpose,
      createdAt: w.createdAt.toISOString(),
      closedAt: iso(w.closedAt),
      outcome: w.outcome,
      originWorkOrderId: w.originWorkOrderId,
      visits: visitRows
        .filter(({ v }) => v.workOrderId === w.id)
        .map(({ v, techName }) => ({
          id: v.id,
          techName,
          onSiteAt: iso(v.onSiteAt),
          closedAt: iso(v.closedAt),
          outcome: v.outcome,
          labourMinutes: v.labourMinutes,
        })),
    })),
  };
}

/** One attachment of the unit (or of a visit on it), for someone who may read the unit. */
export async function unitAttachment(db: Db, user: SessionUser, unitId: string, attachmentId: string) {
  await readableUnit(db, user, unitId);
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
  if (!a) throw notFound('attachment');
  return a;
}

/** Units the person may open, matching tag, serial, make, model or site name. */
export async function searchUnits(db: Db, user: SessionUser, q: UnitSearchQuery, branchId: string | undefined): Promise<UnitSearchResult> {
  const term = q.q ? `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` : undefined;
  const openWork = sql<number>`(SELECT count(*)::int FROM work_orders w WHERE w.unit_id = ${units.id} AND w.state NOT IN ('closed', 'cancelled'))`;
  const rowsFound = await db
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
        user.role === 'technician' ? techAssigned(db, user.id) : undefined,
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
    .limit(q.limit + 1);
  return {
    units: rowsFound.slice(0, q.limit).map((r) => ({ ...r, openWorkOrders: Number(r.openWorkOrders) })),
    more: rowsFound.length > q.limit,
  };
}
