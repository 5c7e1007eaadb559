/** The unit briefing's queries (briefing.service.ts): one per section, run side by side. */
import { and, asc, desc, eq, gte, inArray, isNotNull, isNull, or, sql, sum } from 'drizzle-orm';
import type { Db } from '../../db/client';
import {
  alarms,
  attachments,
  branches,
  circuits,
  findings,
  leakCases,
  readings,
  refrigerantEvents,
  sites,
  units,
  users,
  visits,
  workOrders,
} from '../../db/schema';
import { OPEN_LEAK_CASE_STATUSES, unitOnAssignments } from './visits.repo';

/** The unit's site, branch and time zone, and whether it is on the technician's assignments (`techId` null: not asked, true). */
export async function briefingAccess(db: Db, techId: string | null, unitId: string) {
  const [row] = await db
    .select({
      siteId: units.siteId,
      branchId: units.branchId,
      timeZone: branches.timeZone,
      assigned: techId !== null ? sql<boolean>`${unitOnAssignments(db, techId, units.id, units.siteId)}` : sql<boolean>`true`,
    })
    .from(units)
    .innerJoin(branches, eq(branches.id, units.branchId))
    .where(eq(units.id, unitId))
    .limit(1);
  return row;
}

/** The unit with its site's name and its branch's settings. */
export async function briefingUnit(db: Db, unitId: string) {
  const [row] = await db
    .select({
      unit: units,
      siteName: sites.name,
      timeZone: branches.timeZone,
      repeatAlarmCount: branches.repeatAlarmCount,
      repeatAlarmDays: branches.repeatAlarmDays,
      unitSystem: branches.unitSystem,
    })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .innerJoin(branches, eq(branches.id, units.branchId))
    .where(eq(units.id, unitId))
    .limit(1);
  return row;
}

/** Every section of the briefing of unit `u`, side by side. */
export function briefingSections(db: Db, u: { id: string; siteId: string }, year: string, alarmSince: Date, photoLimit: number) {
  const latest = db
    .select()
    .from(readings)
    .where(eq(readings.circuitId, circuits.id))
    .orderBy(desc(readings.takenAt))
    .limit(1)
    .as('latest');
  const lastVisitColumns = { visit: visits, techName: users.name, kind: workOrders.kind };
  return Promise.all([
    db.select().from(circuits).where(eq(circuits.unitId, u.id)).orderBy(asc(circuits.number)),
    // Visits that touched this unit: its own work orders' (one descent of visits_unit_closed_idx, the unit
    // being on the visit since migration 0021), or site-wide ones' at its site (few).
    db
      .select(lastVisitColumns)
      .from(visits)
      .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
      .innerJoin(users, eq(users.id, visits.techId))
      .where(and(eq(visits.unitId, u.id), isNotNull(visits.closedAt)))
      .orderBy(desc(visits.closedAt))
      .limit(1),
    db
      .select(lastVisitColumns)
      .from(visits)
      .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
      .innerJoin(users, eq(users.id, visits.techId))
      .where(and(isNull(workOrders.unitId), eq(workOrders.siteId, u.siteId), isNotNull(visits.closedAt)))
      .orderBy(desc(visits.closedAt))
      .limit(1),
    // Each circuit's latest reading: one descent of the (circuit, taken) index, instead of reading every
    // reading the unit ever had (scattered over many pages). A circuit's readings are its unit's.
    db
      .select()
      .from(circuits)
      .innerJoinLateral(latest, sql`true`)
      .where(eq(circuits.unitId, u.id)),
    db
      .select()
      .from(leakCases)
      .where(and(eq(leakCases.unitId, u.id), inArray(leakCases.status, [...OPEN_LEAK_CASE_STATUSES])))
      .orderBy(asc(leakCases.repairDueDate))
      .limit(1),
    db
      .select({
        added: sum(refrigerantEvents.poundsAdded).mapWith(Number),
        recovered: sum(refrigerantEvents.poundsRecovered).mapWith(Number),
      })
      .from(refrigerantEvents)
      .where(and(eq(refrigerantEvents.unitId, u.id), gte(refrigerantEvents.date, `${year}-01-01`))),
    // The window's alarms one by one (a unit has a few a month): counted here, and the earliest tells how long
    // the count stands.
    db
      .select({ code: alarms.code, circuit: alarms.circuit, raisedAt: alarms.raisedAt })
      .from(alarms)
      .where(and(eq(alarms.unitId, u.id), gte(alarms.raisedAt, alarmSince))),
    db.select().from(attachments).where(eq(attachments.unitId, u.id)).orderBy(desc(attachments.createdAt)).limit(photoLimit),
  ]);
}

/** The findings of the unit (or of no unit) on a visit. */
export function findingsOfVisitForUnit(db: Db, visitId: string, unitId: string) {
  return db
    .select()
    .from(findings)
    .where(and(eq(findings.visitId, visitId), or(eq(findings.unitId, unitId), isNull(findings.unitId))))
    .orderBy(asc(findings.createdAt));
}
