/** Small calendar-date and instant helpers shared by the calc modules (UTC day arithmetic). */

const DAY_MS = 86_400_000;
const DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** A calendar date written 'YYYY-MM-DD'. */
export type IsoDate = string;
/** An instant: an ISO-8601 string with offset (or Z) or a Date. */
export type Instant = string | Date;

/** Days since 1970-01-01 for a 'YYYY-MM-DD' date; `RangeError` when it is not a real date. */
export function dayNumber(date: IsoDate, what = 'date'): number {
  const m = typeof date === 'string' ? DATE_RE.exec(date) : null;
  if (!m) throw new RangeError(`${what} must be a 'YYYY-MM-DD' string; got ${JSON.stringify(date)}`);
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const ms = Date.UTC(y, mo - 1, d);
  const back = new Date(ms);
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d) {
    throw new RangeError(`${what} ${JSON.stringify(date)} is not a calendar date`);
  }
  return ms / DAY_MS;
}

/** 'YYYY-MM-DD' for a day number (days since 1970-01-01). */
export function fromDayNumber(n: number): IsoDate {
  return new Date(n * DAY_MS).toISOString().slice(0, 10);
}

/** The date `days` days after `date`. */
export function addDays(date: IsoDate, days: number): IsoDate {
  return fromDayNumber(dayNumber(date) + days);
}

/** Whole calendar days from `from` to `to` (negative when `to` is earlier). */
export function daysFrom(from: IsoDate, to: IsoDate): number {
  return dayNumber(to, 'to') - dayNumber(from, 'from');
}

/** Milliseconds since the epoch for an instant; `RangeError` when it cannot be read. */
export function instantMs(value: Instant, what = 'instant'): number {
  const ms = value instanceof Date ? value.getTime() : typeof value === 'string' ? Date.parse(value) : Number.NaN;
  if (!Number.isFinite(ms)) throw new RangeError(`${what} must be an ISO-8601 string or a valid Date; got ${String(value)}`);
  return ms;
}

export { DAY_MS };
