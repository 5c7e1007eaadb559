/** Repeat-alarm detection: the same unit and alarm code N times within M days. */
import { DAY_MS, instantMs, type Instant } from './dates';

/** Epoch ms of an instant (V8's Date.parse is fast on ISO-8601 strings); NaN when unreadable. */
function parseInstant(v: string | Date): number {
  if (v instanceof Date) return v.getTime();
  return typeof v === 'string' ? Date.parse(v) : Number.NaN;
}

/**
 * The key two alarm codes are the same code by: without regard to case (Unicode default case folding
 * approximated by upper-casing, locale-independent), surrounding spaces dropped.
 */
export function sameCode(code: string): string {
  return code.trim().toUpperCase();
}

export interface UnitAlarm {
  unitId: string;
  /** Circuit the controller reported (e.g. 1, 2, 'A'). */
  circuit: string | number | null;
  code: string;
  raisedAt: Instant;
}

export interface RepeatAlarmOptions {
  /** Span in days; default 30. */
  windowDays?: number;
  /** Least number of alarms in the span; default 2. */
  minCount?: number;
  /** When given, only alarms raised in [asOf − windowDays, asOf] count ("in the last M days"). */
  asOf?: Instant;
}

export interface RepeatAlarmGroup {
  unitId: string;
  code: string;
  /** Alarms in the reported span. */
  count: number;
  /** First and last raisedAt in the span (ISO-8601, UTC). */
  first: string;
  last: string;
  /** Distinct circuits reported in the span, in order of first appearance (null dropped). */
  circuits: (string | number)[];
  /** More than one circuit reported: a hint that the alarm may be attributed to the wrong circuit. */
  circuitsDiffer: boolean;
  /** All alarms of this unit and code in the input, in or out of the span. */
  totalCount: number;
}

/**
 * Groups alarms by unit and code and reports the groups that repeat.
 *
 * The window: a group repeats when at least `minCount` of its alarms have raisedAt values lying
 * within a span of `windowDays` days — last − first ≤ windowDays × 24 h, inclusive (so exactly N in
 * exactly M days counts; N spread over M days + 1 ms does not). Without `asOf` the reported span is
 * the one holding the most alarms (the latest such span on a tie: the most recent burst is the one
 * to act on); with `asOf` it is [asOf − windowDays, asOf]. Alarm codes are compared without regard to
 * case ("lp1" and "LP1" are one code, as a controller and a person typing may spell it); a group reports
 * the code as spelled by the last alarm of its span. Results are sorted by count (descending), then unit
 * and code.
 */
export function repeatAlarms(alarms: readonly UnitAlarm[], opts: RepeatAlarmOptions = {}): RepeatAlarmGroup[] {
  const windowDays = opts.windowDays ?? 30;
  const minCount = opts.minCount ?? 2;
  if (typeof windowDays !== 'number' || !Number.isFinite(windowDays) || windowDays < 0)
    throw new RangeError('windowDays must be a finite number of 0 or more');
  if (!Number.isInteger(minCount) || minCount < 1) throw new RangeError('minCount must be an integer of 1 or more');
  const windowMs = windowDays * DAY_MS;
  const asOf = opts.asOf === undefined ? null : instantMs(opts.asOf, 'asOf');

  interface Bucket {
    unitId: string;
    code: string;
    /** Alarms to look at: all of them, or with `asOf` only those inside the span (the rest are only counted). */
    idx: number[];
    total: number;
  }
  const lo = asOf === null ? -Infinity : asOf - windowMs;
  const hi = asOf === null ? Infinity : asOf;
  const buckets = new Map<string, Map<string, Bucket>>();
  const all: Bucket[] = [];
  const times = new Float64Array(alarms.length);
  for (let i = 0; i < alarms.length; i++) {
    const a = alarms[i] as UnitAlarm;
    const t = parseInstant(a.raisedAt);
    if (!Number.isFinite(t)) throw new RangeError(`alarms[${i}].raisedAt must be an ISO-8601 string or a valid Date`);
    times[i] = t;
    let byCode = buckets.get(a.unitId);
    if (!byCode) {
      byCode = new Map();
      buckets.set(a.unitId, byCode);
    }
    const key = sameCode(a.code);
    let b = byCode.get(key);
    if (!b) {
      b = { unitId: a.unitId, code: a.code, idx: [], total: 0 };
      byCode.set(key, b);
      all.push(b);
    }
    b.total++;
    if (t >= lo && t <= hi) b.idx.push(i);
  }

  const out: RepeatAlarmGroup[] = [];
  for (const b of all) {
    const idx = b.idx;
    if (idx.length < minCount) continue;
    idx.sort((x, y) => (times[x] as number) - (times[y] as number));
    let from = 0;
    let to = -1; // inclusive indices into idx
    if (asOf !== null) {
      // Only alarms inside [asOf − windowDays, asOf] were kept.
      to = idx.length - 1;
    } else {
      let bestLen = 0;
      let left = 0;
      for (let right = 0; right < idx.length; right++) {
        const tr = times[idx[right] as number] as number;
        while (tr - (times[idx[left] as number] as number) > windowMs) left++;
        // `>=`: on a tie the later span wins.
        if (right - left + 1 >= bestLen) {
          bestLen = right - left + 1;
          from = left;
          to = right;
        }
      }
    }
    const count = to - from + 1;
    if (count < minCount) continue;
    const circuits: (string | number)[] = [];
    const seen = new Set<string | number>();
    for (let k = from; k <= to; k++) {
      const c = (alarms[idx[k] as number] as UnitAlarm).circuit;
      if (c === null || c === undefined || seen.has(c)) continue;
      seen.add(c);
      circuits.push(c);
    }
    out.push({
      unitId: b.unitId,
      code: (alarms[idx[to] as number] as UnitAlarm).code,
      count,
      first: new Date(times[idx[from] as number] as number).toISOString(),
      last: new Date(times[idx[to] as number] as number).toISOString(),
      circuits,
      circuitsDiffer: circuits.length > 1,
      totalCount: b.total,
    });
  }
  out.sort(
    (a, b) => b.count - a.count || (a.unitId < b.unitId ? -1 : a.unitId > b.unitId ? 1 : a.code < b.code ? -1 : a.code > b.code ? 1 : 0),
  );
  return out;
}
