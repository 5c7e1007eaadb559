import type { HistoryCounts } from '@coilpath/contract';
import { conflict } from '../../lib/errors';

/** How much history hangs on some units (and, for a site, on the site itself). One query per table. */
export { historyCounts } from './sites.repo';

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
