/**
 * The unit briefing: what a technician wants to know before arriving — last visit's findings, last
 * readings per circuit, the open leak case, refrigerant added this year against full charge, repeat
 * alarms, photos. One query per section, run side by side.
 */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { readingUnitsBySystem, type SessionUser, type UnitBriefing } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { notFound } from '../../lib/errors';
import { enforce, unitMayRead } from '../../auth/policy';
import { prepareJson, type PreparedJson } from '../../lib/prepared-json';
import type { RevisionCache } from '../../lib/revision-cache';
import * as repo from './briefing.repo';
import { attachmentDto, circuitDto, findingDto, leakCaseDto, readingDto, unitSummaryDto } from './visits.present';

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
  const row = await repo.briefingAccess(db, user.role === 'technician' ? user.id : null, unitId);
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
  const row = await repo.briefingUnit(db, unitId);
  if (!row) return null;
  const u = row.unit;
  const now = ctx.clock.now();
  const year = format(new TZDate(now.getTime(), row.timeZone), 'yyyy');
  const windowMs = row.repeatAlarmDays * 86_400_000;
  const alarmSince = new Date(now.getTime() - windowMs);

  const [circuitRows, unitVisitRows, siteVisitRows, readingRows, caseRows, refrigerantRows, alarmRows, photoRows] =
    await repo.briefingSections(db, u, year, alarmSince, PHOTO_LIMIT);

  const [unitVisit, siteVisit] = [unitVisitRows[0], siteVisitRows[0]];
  const last =
    unitVisit && siteVisit ? (siteVisit.visit.closedAt! > unitVisit.visit.closedAt! ? siteVisit : unitVisit) : (unitVisit ?? siteVisit);
  const lastFindings = last ? await repo.findingsOfVisitForUnit(db, last.visit.id, u.id) : [];

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
      ...unitSummaryDto(u),
      siteId: u.siteId,
      siteName: row.siteName,
    },
    circuits: circuitRows.map((c) => circuitDto(c, row.unitSystem)),
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
