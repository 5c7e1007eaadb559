/**
 * Period arithmetic of Fix Quality: a period is a run of UTC calendar dates (`from`..`to`, both included); the
 * report reads whole UTC months from the kept sums and counts the days around them job by job. The comparison
 * period is `previousPeriod` in @coilpath/calc (shared with the screen).
 */
export const DAY_MS = 86_400_000;

export interface Period {
  from: string;
  to: string;
}

const dayMs = (d: string) => Date.parse(`${d}T00:00:00Z`);

/** [start, end) instants of a period of UTC calendar dates. */
export const bounds = (p: Period) => ({ start: new Date(dayMs(p.from)).toISOString(), end: new Date(dayMs(p.to) + DAY_MS).toISOString() });

const MONTH_MS = (y: number, m: number) => Date.UTC(y, m, 1);

/**
 * Splits [start, end) (UTC midnights) into the whole calendar months (UTC) inside it, read from
 * `fix_quality_sums`, and the days before and after them, counted from `service_call_facts`. With
 * `sumsUntil`, only months that end at or before that instant come from the sums (the sums hold the counts
 * of mature jobs; see `fixQualityReport`), the days after them are counted job by job.
 */
export function splitByMonths(
  start: string,
  end: string,
  sumsUntil?: string,
): { months: [string, string] | null; edges: [string, string][] } {
  const s = new Date(start);
  const e = new Date(end);
  const firstFull = s.getUTCDate() === 1 ? s.getTime() : MONTH_MS(s.getUTCFullYear(), s.getUTCMonth() + 1);
  let lastFullEnd = MONTH_MS(e.getUTCFullYear(), e.getUTCMonth());
  if (sumsUntil !== undefined) {
    const h = new Date(sumsUntil);
    lastFullEnd = Math.min(lastFullEnd, MONTH_MS(h.getUTCFullYear(), h.getUTCMonth()));
  }
  const iso = (ms: number) => new Date(ms).toISOString();
  if (firstFull >= lastFullEnd) return { months: null, edges: s.getTime() < e.getTime() ? [[start, end]] : [] };
  const edges: [string, string][] = [];
  if (s.getTime() < firstFull) edges.push([start, iso(firstFull)]);
  if (lastFullEnd < e.getTime()) edges.push([iso(lastFullEnd), end]);
  return { months: [iso(firstFull).slice(0, 10), iso(lastFullEnd).slice(0, 10)], edges };
}

/** The UTC months (`YYYY-MM`) a period touches, first to last (at most 61). */
export function monthsOf(p: Period): string[] {
  const out: string[] = [];
  let y = Number(p.from.slice(0, 4));
  let m = Number(p.from.slice(5, 7));
  const last = p.to.slice(0, 7);
  for (;;) {
    const key = `${y}-${String(m).padStart(2, '0')}`;
    out.push(key);
    if (key >= last || out.length > 60) break;
    m++;
    if (m > 12) {
      m = 1;
      y++;
    }
  }
  return out;
}
