/** Agreement visit plans: expand a recurrence rule over the term, move visits off non-working days, level the load. */
import { TZDate } from '@date-fns/tz';
import { dayNumber, fromDayNumber, type IsoDate } from './dates';
import { RRule } from './rrule-shim';

export interface ExpandAgreementInput {
  /**
   * An RFC 5545 recurrence: an `RRULE:` line (or bare `FREQ=...` rule), optionally preceded by a
   * `DTSTART` line. Without DTSTART the rule starts on `termStart`. A DTSTART with a TZID or
   * without a zone is read as local wall time; one ending in Z is converted to `timeZone`.
   */
  rrule: string;
  /** First day of the agreement term (inclusive), local 'YYYY-MM-DD'. */
  termStart: IsoDate;
  /** Last day of the agreement term (inclusive). */
  termEnd: IsoDate;
  /** The branch's IANA time zone. */
  timeZone: string;
  /** Branch holidays, 'YYYY-MM-DD'. */
  holidays: readonly IsoDate[];
  /** Days of week that are not working days (0 = Sunday); default [0, 6]. */
  weekendDays?: readonly number[];
}

export interface AgreementVisit {
  /** The working day the visit is planned for. */
  date: IsoDate;
  /** The date the recurrence gave. */
  originalDate: IsoDate;
  /** True when moved off a weekend or holiday. */
  moved: boolean;
  /**
   * Why it moved: the date the recurrence gave is a branch holiday (said first when it is also a weekend
   * day), a weekend day, or a working day already holding another visit of the plan; null when not moved.
   */
  movedBecause: 'holiday' | 'weekend' | 'taken' | null;
}

const MAX_OCCURRENCES = 10_000;

function parseLocal(value: string): { y: number; mo: number; d: number; h: number; mi: number; s: number; utc: boolean } {
  const r = /^(\d{4})(\d{2})(\d{2})(?:T(\d{2})(\d{2})(\d{2})(Z?))?$/.exec(value.trim());
  if (!r) throw new RangeError(`DTSTART value ${JSON.stringify(value)} is not an RFC 5545 DATE or DATE-TIME`);
  return { y: +r[1]!, mo: +r[2]!, d: +r[3]!, h: +(r[4] ?? 0), mi: +(r[5] ?? 0), s: +(r[6] ?? 0), utc: r[7] === 'Z' };
}

/** Wall time of a UTC instant in a zone, as a "floating" Date (its UTC fields hold the wall time). */
function floating(ms: number, timeZone: string): Date {
  const z = new TZDate(ms, timeZone);
  return new Date(Date.UTC(z.getFullYear(), z.getMonth(), z.getDate(), z.getHours(), z.getMinutes(), z.getSeconds()));
}

/** Raw occurrence dates of the rule within [termStart, termEnd] (local dates, no shifting). */
export function recurrenceDates(rrule: string, termStart: IsoDate, termEnd: IsoDate, timeZone: string): IsoDate[] {
  const first = dayNumber(termStart, 'termStart');
  const last = dayNumber(termEnd, 'termEnd');
  if (last < first) throw new RangeError('termEnd is before termStart');
  if (!Number.isFinite(new TZDate(0, timeZone).getFullYear())) throw new RangeError(`Unknown time zone ${JSON.stringify(timeZone)}`);
  const lines = rrule
    .split(/\r?\n/)
    .map((l) => l.trim())
    .filter(Boolean);
  let dtstart = new Date(first * 86_400_000);
  let ruleLine: string | undefined;
  for (const line of lines) {
    const upper = line.toUpperCase();
    if (upper.startsWith('DTSTART')) {
      const value = line.slice(line.lastIndexOf(':') + 1);
      const p = parseLocal(value);
      const wall = Date.UTC(p.y, p.mo - 1, p.d, p.h, p.mi, p.s);
      dtstart = p.utc ? floating(wall, timeZone) : new Date(wall);
    } else if (upper.startsWith('RRULE:')) ruleLine = line.slice(6);
    else if (upper.startsWith('FREQ=') || upper.includes(';FREQ=')) ruleLine = line;
    else throw new RangeError(`Unsupported recurrence line ${JSON.stringify(line)}; give DTSTART and RRULE lines only`);
  }
  if (!ruleLine) throw new RangeError('rrule must contain an RRULE (FREQ=...)');
  let options: ReturnType<typeof RRule.parseString>;
  try {
    options = RRule.parseString(ruleLine);
  } catch (e) {
    throw new RangeError(`Invalid RRULE ${JSON.stringify(ruleLine)}: ${(e as Error).message}`, { cause: e });
  }
  if (options.freq === undefined) throw new RangeError('RRULE needs FREQ');
  // UNTIL in UTC (with Z) becomes the zone's wall time, to compare with floating occurrences.
  if (options.until && /UNTIL=\d{8}T\d{6}Z/i.test(ruleLine)) options.until = floating(options.until.getTime(), timeZone);
  const rule = new RRule({ ...options, dtstart, tzid: null });
  const out: IsoDate[] = [];
  const seen = new Set<number>();
  rule.all((date, i) => {
    if (i >= MAX_OCCURRENCES) return false;
    const day = Math.floor(date.getTime() / 86_400_000);
    if (day > last) return false;
    if (day >= first && !seen.has(day)) {
      seen.add(day);
      out.push(fromDayNumber(day));
    }
    return true;
  });
  return out;
}

/** A contracted visit the plan could not place, and why. */
export interface DroppedAgreementVisit {
  /** The date the recurrence gave. */
  originalDate: IsoDate;
  reason: string;
}

export interface AgreementPlan {
  visits: AgreementVisit[];
  /** Contracted visits that found no free working day in the term (empty whenever the term has room). */
  dropped: DroppedAgreementVisit[];
}

/**
 * Visit dates of a maintenance agreement: the recurrence (via the `rrule` package, RFC 5545)
 * expanded over the term, each date on a weekend or holiday moved to the next working day — or,
 * when that would fall after the term, to the previous working day. A contracted visit is never
 * silently lost: when its working day already holds another visit of the plan (a weekly
 * Saturday-and-Sunday rule, say), it takes the next free working day (or, at the end of the term,
 * the previous free one). Only a visit for which the term has no free working day left is dropped,
 * and it is listed with the reason. Sorted by date.
 */
export function planAgreementVisits(input: ExpandAgreementInput): AgreementPlan {
  const weekend = new Set(input.weekendDays ?? [0, 6]);
  if (weekend.size >= 7) throw new RangeError('weekendDays leaves no working day');
  const holidays = new Set(input.holidays.map((h) => dayNumber(h, 'holiday')));
  const first = dayNumber(input.termStart, 'termStart');
  const last = dayNumber(input.termEnd, 'termEnd');
  const onWeekend = (n: number) => weekend.has(new Date(n * 86_400_000).getUTCDay());
  const working = (n: number) => !holidays.has(n) && !onWeekend(n);
  const used = new Set<number>();
  const free = (n: number) => working(n) && !used.has(n);
  const visits: AgreementVisit[] = [];
  const dropped: DroppedAgreementVisit[] = [];
  for (const date of recurrenceDates(input.rrule, input.termStart, input.termEnd, input.timeZone)) {
    const n0 = dayNumber(date);
    let n = n0;
    while (n <= last && !free(n)) n++;
    if (n > last) {
      n = n0;
      while (n >= first && !free(n)) n--;
    }
    if (n < first) {
      dropped.push({
        originalDate: date,
        reason:
          'no free working day is left in the term for it (every working day up to the end of the term already holds one of its visits)',
      });
      continue;
    }
    used.add(n);
    const movedBecause = n === n0 ? null : holidays.has(n0) ? 'holiday' : onWeekend(n0) ? 'weekend' : 'taken';
    visits.push({ date: fromDayNumber(n), originalDate: date, moved: n !== n0, movedBecause });
  }
  return { visits: visits.sort((a, b) => a.date.localeCompare(b.date)), dropped };
}

/** The placed visits of `planAgreementVisits` (see there). */
export function expandAgreementVisits(input: ExpandAgreementInput): AgreementVisit[] {
  return planAgreementVisits(input).visits;
}

export interface LevelOptions {
  /** Most visits in one week. */
  maxPerWeek: number;
  /** First day of the week (0 = Sunday … 6); default 1 (Monday). */
  weekStartsOn?: number;
  holidays?: readonly IsoDate[];
  /** Default [0, 6]. */
  weekendDays?: readonly number[];
  /** Give up moving a visit after this many weeks; default 8. */
  maxShiftWeeks?: number;
}

export interface LeveledVisit {
  id: string;
  date: IsoDate;
  originalDate: IsoDate;
  moved: boolean;
}

/**
 * Levels planned visits across weeks: in any week holding more than `maxPerWeek` visits, the
 * latest ones move forward a week at a time (same weekday, then the next working day in that week)
 * until a week has room. Visits are never moved earlier. Throws when a visit cannot be placed
 * within `maxShiftWeeks`.
 */
export function levelVisitsAcrossWeeks(visits: readonly { id: string; date: IsoDate }[], opts: LevelOptions): LeveledVisit[] {
  const { maxPerWeek } = opts;
  if (!Number.isInteger(maxPerWeek) || maxPerWeek < 1) throw new RangeError('maxPerWeek must be an integer of 1 or more');
  const weekStartsOn = opts.weekStartsOn ?? 1;
  const weekend = new Set(opts.weekendDays ?? [0, 6]);
  const holidays = new Set((opts.holidays ?? []).map((h) => dayNumber(h, 'holiday')));
  const maxShift = opts.maxShiftWeeks ?? 8;
  const dow = (n: number) => new Date(n * 86_400_000).getUTCDay();
  const weekOf = (n: number) => n - ((dow(n) - weekStartsOn + 7) % 7);
  const working = (n: number) => !holidays.has(n) && !weekend.has(dow(n));
  const counts = new Map<number, number>();
  const sorted = visits
    .map((v) => ({ ...v, n: dayNumber(v.date, `visit ${v.id} date`) }))
    .sort((a, b) => a.n - b.n || a.id.localeCompare(b.id));
  const out: LeveledVisit[] = [];
  for (const v of sorted) {
    let n = v.n;
    let shifts = 0;
    while ((counts.get(weekOf(n)) ?? 0) >= maxPerWeek) {
      if (++shifts > maxShift) throw new RangeError(`visit ${v.id} cannot be placed within ${maxShift} weeks at ${maxPerWeek} a week`);
      n += 7;
      const wk = weekOf(n);
      let k = n;
      while (!working(k) && weekOf(k) === wk) k++;
      if (weekOf(k) === wk) n = k;
    }
    counts.set(weekOf(n), (counts.get(weekOf(n)) ?? 0) + 1);
    out.push({ id: v.id, date: fromDayNumber(n), originalDate: v.date, moved: n !== v.n });
  }
  return out;
}
