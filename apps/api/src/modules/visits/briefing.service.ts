/**
 * The unit briefing: what a technician wants to know before arriving — last visit's findings, last
 * readings per circuit, the open leak case, refrigerant added this year against full charge, repeat
 * alarms, photos. One query per section, run side by side.
 */
import { and, asc, count, desc, eq, gte, inArray, isNotNull, isNull, max, or, sql, sum } from 'drizzle-orm';
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { readingUnitsBySystem, type SessionUser, type UnitBriefing } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { alarms, attachments, branches, circuits, findings, leakCases, readings, refrigerantEvents, sites, units, users, visits, workOrders } from '../../db/schema';
import { notFound } from '../../lib/errors';
import { enforce, unitMayRead } from '../../auth/policy';
import { unitOnAssignments } from './access';
import { attachmentDto, circuitTargetsDto, findingDto, leakCaseDto, readingDto } from './dto';
import { OPEN_LEAK_CASE_STATUSES } from './refrigerant.service';

const PHOTO_LIMIT = 8;

export async function unitBriefing(ctx: AppContext, user: SessionUser, unitId: string): Promise<UnitBriefing> {
  const db = ctx.db;
  const [row] = await db
    .select({
      unit: units,
      siteName: sites.name,
      timeZone: branches.timeZone,
      repeatAlarmCount: branches.repeatAlarmCount,
      repeatAlarmDays: branches.repeatAlarmDays,
      unitSystem: branches.unitSystem,
      assigned:
        user.role === 'technician' ? sql<boolean>`${unitOnAssignments(db, user.id, units.id, units.siteId)}` : sql<boolean>`true`,
    })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .innerJoin(branches, eq(branches.id, units.branchId))
    .where(eq(units.id, unitId))
    .limit(1);
  if (!row) throw notFound('unit');
  enforce(unitMayRead(user, row.unit, row.assigned));
  const u = row.unit;
  const now = ctx.clock.now();
  const year = format(new TZDate(now.getTime(), row.timeZone), 'yyyy');
  const alarmSince = new Date(now.getTime() - row.repeatAlarmDays * 86_400_000);

  // Visits that touched this unit: its own work orders, or site-wide ones at its site.
  const touchesUnit = or(eq(workOrders.unitId, u.id), and(isNull(workOrders.unitId), eq(workOrders.siteId, u.siteId)));

  const latest = db
    .select()
    .from(readings)
    .where(eq(readings.circuitId, circuits.id))
    .orderBy(desc(readings.takenAt))
    .limit(1)
    .as('latest');
  const [circuitRows, lastVisitRows, readingRows, caseRows, refrigerantRows, alarmRows, photoRows] = await Promise.all([
    db.select().from(circuits).where(eq(circuits.unitId, u.id)).orderBy(asc(circuits.number)),
    db
      .select({ visit: visits, techName: users.name, kind: workOrders.kind })
      .from(visits)
      .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
      .innerJoin(users, eq(users.id, visits.techId))
      .where(and(touchesUnit, isNotNull(visits.closedAt)))
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
      .select({ added: sum(refrigerantEvents.poundsAdded).mapWith(Number), recovered: sum(refrigerantEvents.poundsRecovered).mapWith(Number) })
      .from(refrigerantEvents)
      .where(and(eq(refrigerantEvents.unitId, u.id), gte(refrigerantEvents.date, `${year}-01-01`))),
    db
      .select({ code: alarms.code, circuit: alarms.circuit, count: count(), last: max(alarms.raisedAt) })
      .from(alarms)
      .where(and(eq(alarms.unitId, u.id), gte(alarms.raisedAt, alarmSince)))
      .groupBy(alarms.code, alarms.circuit)
      .having(sql`count(*) >= ${row.repeatAlarmCount}`)
      .orderBy(desc(count())),
    db.select().from(attachments).where(eq(attachments.unitId, u.id)).orderBy(desc(attachments.createdAt)).limit(PHOTO_LIMIT),
  ]);

  const last = lastVisitRows[0];
  const lastFindings = last
    ? await db
        .select()
        .from(findings)
        .where(and(eq(findings.visitId, last.visit.id), or(eq(findings.unitId, u.id), isNull(findings.unitId))))
        .orderBy(asc(findings.createdAt))
    : [];

  const added = refrigerantRows[0]?.added ?? 0;
  return {
    unit: {
      id: u.id,
      tag: u.tag,
      kind: u.kind,
      make: u.make,
      model: u.model,
      serial: u.serial,
      refrigerant: u.refrigerant,
      fullChargeLb: u.fullChargeLb,
      applianceCategory: u.applianceCategory,
      siteId: u.siteId,
      siteName: row.siteName,
    },
    circuits: circuitRows.map((c) => ({ id: c.id, number: c.number, compressorCount: c.compressorCount, chargeLb: c.chargeLb, targets: circuitTargetsDto(c, row.unitSystem) })),
    lastVisit: last
      ? {
          visitId: last.visit.id,
          closedAt: last.visit.closedAt!.toISOString(),
          outcome: last.visit.outcome,
          techName: last.techName,
          workOrderKind: last.kind,
          notes: last.visit.notes,
          findings: lastFindings.map(findingDto),
        }
      : null,
    lastReadings: readingRows.map((x) => readingDto(x.latest, x.circuits.number, row.unitSystem)).sort((a, b) => a.circuitNumber - b.circuitNumber),
    units: readingUnitsBySystem[row.unitSystem],
    openLeakCase: caseRows[0] ? leakCaseDto(caseRows[0]) : null,
    refrigerantThisYear: {
      year,
      poundsAdded: added,
      poundsRecovered: refrigerantRows[0]?.recovered ?? 0,
      fullChargeLb: u.fullChargeLb,
      percentOfFullCharge: u.fullChargeLb > 0 ? Math.round((added / u.fullChargeLb) * 1000) / 10 : 0,
    },
    repeatAlarms: alarmRows.map((a) => ({
      code: a.code,
      circuit: a.circuit,
      count: Number(a.count),
      lastRaisedAt: new Date(a.last as unknown as string | Date).toISOString(),
    })),
    repeatAlarmWindow: { days: row.repeatAlarmDays, minCount: row.repeatAlarmCount },
    photos: photoRows.map(attachmentDto),
  };
}
