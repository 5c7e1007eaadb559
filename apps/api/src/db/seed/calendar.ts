import { TZDate } from '@date-fns/tz';
import { addDays } from '@coilpath/calc';

/** Calendar helpers on `YYYY-MM-DD` strings (no time zone) and local wall times. */

const parts = (d: string) => [Number(d.slice(0, 4)), Number(d.slice(5, 7)), Number(d.slice(8, 10))] as const;
const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const utcMs = (d: string) => {
  const [y, m, dd] = parts(d);
  return Date.UTC(y, m - 1, dd);
};

export { addDays };
/** 0 = Sunday … 6 = Saturday. */
export const weekday = (d: string): number => new Date(utcMs(d)).getUTCDay();
export const weekdayKey = (d: string) => (['sun', 'mon', 'tue', 'wed', 'thu', 'fri', 'sat'] as const)[weekday(d)]!;
export const month = (d: string): number => parts(d)[1];
export const year = (d: string): number => parts(d)[0];

/** Adds calendar months, clamping the day to the month's length. */
export function addMonths(d: string, n: number): string {
  const [y, m, dd] = parts(d);
  const total = y * 12 + (m - 1) + n;
  const ny = Math.floor(total / 12);
  const nm = total % 12;
  const last = new Date(Date.UTC(ny, nm + 1, 0)).getUTCDate();
  return iso(Date.UTC(ny, nm, Math.min(dd, last)));
}

export const ymd = (y: number, m: number, d: number): string => iso(Date.UTC(y, m - 1, d));

/** The UTC instant of a local wall time (`minutes` after local midnight) on a date in a time zone. */
export function wallTime(date: string, minutes: number, timeZone: string): Date {
  const [y, m, d] = parts(date);
  const t = new TZDate(y, m - 1, d, Math.floor(minutes / 60), minutes % 60, 0, timeZone);
  return new Date(t.getTime());
}

/** The local calendar date of an instant in a time zone. */
export function localDate(at: Date, timeZone: string): string {
  const t = new TZDate(at.getTime(), timeZone);
  return ymd(t.getFullYear(), t.getMonth() + 1, t.getDate());
}

export const hhmmToMinutes = (s: string): number => Number(s.slice(0, 2)) * 60 + Number(s.slice(3, 5));
export const addMinutes = (at: Date, minutes: number): Date => new Date(at.getTime() + minutes * 60_000);

/** The n-th (1-based) given weekday of a month; n = -1 for the last. */
function nthWeekday(y: number, m: number, wd: number, n: number): string {
  if (n > 0) {
    const first = ymd(y, m, 1);
    const offset = (wd - weekday(first) + 7) % 7;
    return addDays(first, offset + (n - 1) * 7);
  }
  const last = ymd(y, m + 1, 0);
  return addDays(last, -((weekday(last) - wd + 7) % 7));
}

/** A fixed-date holiday moves to Friday when it falls on a Saturday and to Monday on a Sunday. */
function observed(d: string): string {
  const wd = weekday(d);
  return wd === 6 ? addDays(d, -1) : wd === 0 ? addDays(d, 1) : d;
}

/** US federal holidays of a year, as observed (5 U.S.C. 6103). */
export function usFederalHolidays(y: number): string[] {
  return [
    observed(ymd(y, 1, 1)),
    nthWeekday(y, 1, 1, 3), // Birthday of Martin Luther King, Jr.
    nthWeekday(y, 2, 1, 3), // Washington's Birthday
    nthWeekday(y, 5, 1, -1), // Memorial Day
    observed(ymd(y, 6, 19)),
    observed(ymd(y, 7, 4)),
    nthWeekday(y, 9, 1, 1), // Labor Day
    nthWeekday(y, 10, 1, 2), // Columbus Day
    observed(ymd(y, 11, 11)),
    nthWeekday(y, 11, 4, 4), // Thanksgiving Day
    observed(ymd(y, 12, 25)),
  ].sort();
}
