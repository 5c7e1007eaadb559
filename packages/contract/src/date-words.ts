/**
 * How Coilpath writes a calendar date for a person (DEVELOPERS.md, "Dates on screen"). One style per context:
 *
 * - **records** — a deadline, an entry in the refrigerant record, an agreement's plan, a leak case's dates:
 *   `recordDate` → "7 Dec 2026" (the year always, since records outlive the year);
 * - **the schedule** — a day on the Route, the Roster or a visit's timeline: `scheduleDay` → "Mon 7 Dec",
 *   with the year ("Mon 7 Dec 2027") when the day is not in the year of `today`;
 * - times of day are 24-hour "14:25" in the branch's zone; files (CSV, iCalendar) and date inputs keep ISO 8601.
 *
 * Dates are `YYYY-MM-DD` calendar dates (no zone): they are read at noon UTC and written in UTC. Anything else
 * (a half-typed date in an address bar) is given back as it came.
 */
const isIsoDate = (s: string) => /^\d{4}-\d{2}-\d{2}$/.test(s) && !Number.isNaN(Date.parse(`${s}T12:00:00Z`));
const parts = (iso: string, options: Intl.DateTimeFormatOptions) => {
  const out: Partial<Record<Intl.DateTimeFormatPartTypes, string>> = {};
  for (const p of new Intl.DateTimeFormat('en-US', { ...options, timeZone: 'UTC' }).formatToParts(new Date(`${iso}T12:00:00Z`)))
    out[p.type] = p.value;
  return out;
};

/** A date on a record: "7 Dec 2026". */
export function recordDate(iso: string): string {
  if (!isIsoDate(iso)) return iso;
  const p = parts(iso, { day: 'numeric', month: 'short', year: 'numeric' });
  return `${p.day} ${p.month} ${p.year}`;
}

/** A day on the schedule: "Mon 7 Dec", or "Mon 7 Dec 2027" outside the year of `today` (`YYYY-MM-DD`). */
export function scheduleDay(iso: string, today?: string): string {
  if (!isIsoDate(iso)) return iso;
  const p = parts(iso, { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' });
  const sameYear = today !== undefined && today.slice(0, 4) === iso.slice(0, 4);
  return `${p.weekday} ${p.day} ${p.month}${sameYear ? '' : ` ${p.year}`}`;
}
