/**
 * Report periods of calendar dates (`YYYY-MM-DD`, both ends inclusive): the comparison period and the quick
 * presets of the Fix Quality screen, one definition for the API and the screen.
 */
import { addDays, dayNumber, type IsoDate } from './dates';

export interface DatePeriod {
  from: IsoDate;
  to: IsoDate;
}

/** Days in a period, both ends included. */
export const periodDays = (p: DatePeriod): number => dayNumber(p.to, 'to') - dayNumber(p.from, 'from') + 1;

/** The comparison period: the same number of days, ending the day before `from`. */
export function previousPeriod(p: DatePeriod): DatePeriod {
  const len = periodDays(p);
  if (len < 1) throw new RangeError(`the period ends before it starts (${p.from} to ${p.to})`);
  return { from: addDays(p.from, -len), to: addDays(p.from, -1) };
}

/** The same day `months` months away, or the last day of that month when it is shorter (31 March − 1 month → 28/29 February). */
export function addMonthsClamped(date: IsoDate, months: number): IsoDate {
  dayNumber(date);
  const y = Number(date.slice(0, 4));
  const m = Number(date.slice(5, 7)) - 1 + months;
  const d = Number(date.slice(8, 10));
  const first = new Date(Date.UTC(y, m, 1));
  const last = new Date(Date.UTC(first.getUTCFullYear(), first.getUTCMonth() + 1, 0)).getUTCDate();
  return new Date(Date.UTC(first.getUTCFullYear(), first.getUTCMonth(), Math.min(d, last))).toISOString().slice(0, 10);
}

export const reportPresetKeys = ['last12', 'last30', 'quarter', 'year'] as const;
export type ReportPresetKey = (typeof reportPresetKeys)[number];

/**
 * The quick periods ending `today`:
 *  - last12: the 12 months ending today (from the day after the same date a year before; 29 February → 1 March);
 *  - last30: the 30 days ending today;
 *  - quarter: from the first day of the calendar quarter;
 *  - year: from 1 January.
 * "Last 12 months" and "This year" coincide only on 31 December.
 */
export function reportPresets(today: IsoDate): Record<ReportPresetKey, DatePeriod> {
  dayNumber(today, 'today');
  const y = today.slice(0, 4);
  const q = Math.floor((Number(today.slice(5, 7)) - 1) / 3) * 3 + 1;
  return {
    last12: { from: addDays(addMonthsClamped(today, -12), 1), to: today },
    last30: { from: addDays(today, -29), to: today },
    quarter: { from: `${y}-${String(q).padStart(2, '0')}-01`, to: today },
    year: { from: `${y}-01-01`, to: today },
  };
}

/**
 * The one preset to show as chosen for a period: `chosen` when it matches (the one the person clicked), else
 * the first matching preset in `reportPresetKeys` order, else none — never two at once.
 */
export function activePreset(
  presets: Record<ReportPresetKey, DatePeriod>,
  period: DatePeriod,
  chosen?: string | null,
): ReportPresetKey | null {
  const same = (k: ReportPresetKey) => presets[k].from === period.from && presets[k].to === period.to;
  if (chosen && (reportPresetKeys as readonly string[]).includes(chosen) && same(chosen as ReportPresetKey))
    return chosen as ReportPresetKey;
  return reportPresetKeys.find(same) ?? null;
}
