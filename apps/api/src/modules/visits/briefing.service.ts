/**
 * The unit briefing: what a technician wants to know before arriving — last visit's findings, last
 * readings per circuit, the open leak case, refrigerant added this year against full charge, repeat
 * alarms, photos. One query per section, run side by side.
 */
import { and, asc, desc, eq, gte, inArray, isNotNull, isNull, or, sql, sum } from 'drizzle-orm';
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { readingUnitsBySystem, type SessionUser, type UnitBriefing } from '@coilpath/contract';
import type { AppContext } from '../../context';
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
import { notFound } from '../../lib/errors';
import { enforce, unitMayRead } from '../../auth/policy';
import { prepareJson, type PreparedJson } from '../../lib/prepared-json';
import type { RevisionCache } from '../../lib/revision-cache';
import { unitOnAssignments } from './access';
import { attachmentDto, circuitTargetsDto, findingDto, leakCaseDto, readingDto } from './dto';
import { OPEN_LEAK_CASE_STATUSES } from './refrigerant.service';

const PHOTO_LIMIT = 8;

/**
 * A briefing's answer, kept per unit while its site's briefing revision stands (migration 0021: every row it is
 * made of raises it at commit) and until `validUntil`: the first instant at which an alarm it counts falls out of
 * the repeat-alarm window (time, not a change, moves that window). The year is in the key.
 */
interface KeptBriefing {
  json: PreparedJson;
  validUntil: number;
}

/**
 * The briefing of `unitId` for `user`. Who may see it is checked on every request (the unit's branch, or a
 * technician's assignments); the answer itself is the same for everyone who may, and is reused from `cache`
 * when given.
 */
export async function unitBriefing(
  ctx: AppContext,
  user: SessionUser,
  unitId: string,
  cache?: RevisionCache,
): Promise<UnitBriefing | PreparedJson> {
  const db = ctx.db;
  const [row] = await db
    .select({
      siteId: units.siteId,
      branchId: units.branchId,
      timeZone: branches.timeZone,
      assigned: user.role === 'technician' ? sql<boolean>`${unitOnAssignments(db, user.id, units.id, units.siteId)}` : sql<boolean>`true`,
    })
    .from(units)
    .innerJoin(branches, eq(branches.id, units.branchId))
    .where(eq(units.id, unitId))
    .limit(1);
  if (!row) throw notFound('unit');
  enforce(unitMayRead(user, row, row.assigned));
  if (!cache) {
    const briefing = await computeBriefing(ctx, unitId);
    if (!briefing) throw notFound('unit');
    return briefing.answer;
  }
  const now = ctx.clock.now().getTime();
  const year = format(new TZDate(now, row.timeZone), 'yyyy');
  const kept = await cache.read<KeptBriefing | null>(
    ctx.database,
    row.siteId,
    `briefing ${unitId} ${year}`,
    async () => {
      const briefing = await computeBriefing(ctx, unitId);
      return briefing ? { json: prepareJson(briefing.answer), validUntil: briefing.validUntil } : null;
    },
    (k) => k !== null && ctx.clock.now().getTime() <= k.validUntil,
  );
  if (!kept) throw notFound('unit');
  return kept.json;
}

/** The briefing as the database holds it now, and until when its repeat alarms stand (null: no such unit). */
async function computeBriefing(ctx: AppContext, unitId: string): Promise<{ answer: UnitBriefing; validUntil: number } | null> {
  const db = ctx.db;
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
  if (!row) return null;
  const u = row.unit;
  const now = ctx.clock.now();
  const year = format(new TZDate(now.getTime(), row.timeZone), 'yyyy');
  const windowMs = row.repeatAlarmDays * 86_400_000;
  const alarmSince = new Date(now.getTime() - windowMs);

  const latest = db
    .select()
    .from(readings)
    .where(eq(readings.circuitId, circuits.id))
    .orderBy(desc(readings.takenAt))
    .limit(1)
    .as('latest');
  const lastVisitColumns = { visit: visits, techName: users.name, kind: workOrders.kind };
  const [circuitRows, unitVisitRows, siteVisitRows, readingRows, caseRows, refrigerantRows, alarmRows, photoRows] = await Promise.all([
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
    db.select().from(attachments).where(eq(attachments.unitId, u.id)).orderBy(desc(attachments.createdAt)).limit(PHOTO_LIMIT),
  ]);

  const [unitVisit, siteVisit] = [unitVisitRows[0], siteVisitRows[0]];
  const last =
    unitVisit && siteVisit ? (siteVisit.visit.closedAt! > unitVisit.visit.closedAt! ? siteVisit : unitVisit) : (unitVisit ?? siteVisit);
  const lastFindings = last
    ? await db
        .select()
        .from(findings)
        .where(and(eq(findings.visitId, last.visit.id), or(eq(findings.unitId, u.id), isNull(findings.unitId))))
        .orderBy(asc(findings.createdAt))
    : [];

  const groups = new Map<string, { code: string; circuit: number | null; count: number; last: number }>();
  for (const a of alarmRows) {
    const key = `${a.code} ${a.circuit}`;
    const g = groups.get(key) ?? { code: a.code, circuit: a.circuit, count: 0, last: 0 };
    g.count += 1;
    g.last = Math.max(g.last, a.raisedAt.getTime());
    groups.set(key, g);
  }
  const repeats = [...groups.values()].filter((g) => g.count >= row.repeatAlarmCount).sort((a, b) => b.count - a.count);
  const validUntil = alarmRows.reduce((t, a) => Math.min(t, a.raisedAt.getTime() + windowMs), Number.POSITIVE_INFINITY);
  const added = refrigerantRows[0]?.added ?? 0;
  const answer: UnitBriefing = {
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
    circuits: circuitRows.map((c) => ({
      id: c.id,
      number: c.number,
      compressorCount: c.compressorCount,
      chargeLb: c.chargeLb,
      targets: circuitTargetsDto(c, row.unitSystem),
    })),
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
    lastReadings: readingRows
      .map((x) => readingDto(x.latest, x.circuits.number, row.unitSystem))
      .sort((a, b) => a.circuitNumber - b.circuitNumber),
    units: readingUnitsBySystem[row.unitSystem],
    openLeakCase: caseRows[0] ? leakCaseDto(caseRows[0]) : null,
    refrigerantThisYear: {
      year,
      poundsAdded: added,
      poundsRecovered: refrigerantRows[0]?.recovered ?? 0,
      fullChargeLb: u.fullChargeLb,
      percentOfFullCharge: u.fullChargeLb > 0 ? Math.round((added / u.fullChargeLb) * 1000) / 10 : 0,
    },
    repeatAlarms: repeats.map((a) => ({ code: a.code, circuit: a.circuit, count: a.count, lastRaisedAt: new Date(a.last).toISOString() })),
    repeatAlarmWindow: { days: row.repeatAlarmDays, minCount: row.repeatAlarmCount },
    photos: photoRows.map(attachmentDto),
  };
  return { answer, validUntil };
}
