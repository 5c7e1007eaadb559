import { count, eq, inArray } from 'drizzle-orm';
import type { HistoryCounts } from '@coilpath/contract';
import type { Tx } from '../../db/client';
import {
  agreements,
  agreementUnits,
  alarms,
  alarmSources,
  attachments,
  findings,
  leakCases,
  readings,
  refrigerantEvents,
  visits,
  workOrders,
} from '../../db/schema';
import { conflict } from '../../lib/errors';

const n = async (q: Promise<{ n: number }[]>) => Number((await q)[0]?.n ?? 0);

/** How much history hangs on some units (and, for a site, on the site itself). One query per table. */
export async function historyCounts(db: Tx, unitIds: string[], siteId?: string): Promise<HistoryCounts> {
  const anyUnit = unitIds.length > 0;
  const woWhere = siteId ? eq(workOrders.siteId, siteId) : anyUnit ? inArray(workOrders.unitId, unitIds) : undefined;
  const zero = Promise.resolve([{ n: 0 }]);
  const [
    workOrderCount,
    visitCount,
    readingCount,
    alarmCount,
    refrigerantCount,
    agreementCount,
    leakCount,
    findingCount,
    attachmentCount,
    sourceCount,
  ] = await Promise.all([
    woWhere ? n(db.select({ n: count() }).from(workOrders).where(woWhere)) : 0,
    woWhere ? n(db.select({ n: count() }).from(visits).innerJoin(workOrders, eq(visits.workOrderId, workOrders.id)).where(woWhere)) : 0,
    n(anyUnit ? db.select({ n: count() }).from(readings).where(inArray(readings.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(alarms).where(inArray(alarms.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(refrigerantEvents).where(inArray(refrigerantEvents.unitId, unitIds)) : zero),
    siteId
      ? n(db.select({ n: count() }).from(agreements).where(eq(agreements.siteId, siteId)))
      : n(anyUnit ? db.select({ n: count() }).from(agreementUnits).where(inArray(agreementUnits.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(leakCases).where(inArray(leakCases.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(findings).where(inArray(findings.unitId, unitIds)) : zero),
    n(anyUnit ? db.select({ n: count() }).from(attachments).where(inArray(attachments.unitId, unitIds)) : zero),
    siteId ? n(db.select({ n: count() }).from(alarmSources).where(eq(alarmSources.siteId, siteId))) : 0,
  ]);
  return {
    workOrders: workOrderCount,
    visits: visitCount,
    readings: readingCount,
    alarms: alarmCount,
    refrigerantEvents: refrigerantCount,
    agreements: agreementCount,
    leakCases: leakCount,
    findings: findingCount,
    attachments: attachmentCount,
    alarmSources: sourceCount,
  };
}

const labels: Record<keyof HistoryCounts, [string, string]> = {
  workOrders: ['work order', 'work orders'],
  visits: ['visit', 'visits'],
  readings: ['reading', 'readings'],
  alarms: ['alarm', 'alarms'],
  refrigerantEvents: ['refrigerant event', 'refrigerant events'],
  agreements: ['maintenance agreement', 'maintenance agreements'],
  leakCases: ['leak case', 'leak cases'],
  findings: ['finding', 'findings'],
  attachments: ['photo or document', 'photos or documents'],
  alarmSources: ['alarm source', 'alarm sources'],
};

/** Refuses a delete with 409 when anything is recorded against the record, naming what. */
export function refuseIfHistory(what: string, h: HistoryCounts): void {
  const parts = (Object.keys(labels) as (keyof HistoryCounts)[])
    .filter((k) => h[k] > 0)
    .map((k) => `${h[k]} ${labels[k][h[k] === 1 ? 0 : 1]}`);
  if (parts.length === 0) return;
  throw conflict(
    'has_history',
    `${what} has history (${parts.join(', ')}) and cannot be deleted. Archive it instead: it disappears from booking and its history is kept.`,
    { history: h },
  );
}
