/**
 * First-time-fix and callback rates over service jobs.
 *
 * The product counts in SQL (the view `fix_quality_jobs`, `fix_quality_jobs_at(at)` and the sums its
 * triggers keep, in the API's migrations); that is the one definition the reports use. `fixQuality` below
 * is the same rule written plainly, job by job: the test oracle the SQL is checked against over generated
 * histories (`apps/api/src/modules/fix-quality/fix-quality-sums.test.ts`), not called by the product.
 * `fixQualityFromCounts` turns the SQL's counts into rates.
 */
import { DAY_MS, instantMs, type Instant } from './dates';

export type FirstVisitOutcome = 'resolved' | 'needs_return' | 'declined';
export type FollowUpKind = 'return_visit' | 'callback';

export interface FixQualityJob {
  id: string;
  /** Only 'service_call' jobs are eligible. */
  kind: string;
  firstVisitOutcome: FirstVisitOutcome;
  firstVisitClosedAt: Instant;
  followUps: readonly { kind: FollowUpKind; openedAt: Instant }[];
}

export interface FixQualityOptions {
  /** Callback window in days after the first visit closed; default 30 (common practice, no source). */
  windowDays?: number;
  /**
   * "Now" for maturity: a job whose window has not run out by then (first visit closed + window ≥ asOf; a
   * follow-up opened at the window's last instant still counts) is pending and counts in nothing else.
   * Without it every job counts as mature.
   */
  asOf?: Instant;
}

export interface FixQualityResult {
  /** service_call jobs whose first visit was not declined. */
  eligible: number;
  /** Eligible, first visit resolved, and no follow-up opened within the window. */
  firstTimeFixed: number;
  /** firstTimeFixed / eligible; null when nothing is eligible. */
  firstTimeFixRate: number | null;
  /** Eligible jobs resolved on the first visit with a callback opened within the window. */
  callbacks: number;
  /** callbacks / eligible jobs resolved on the first visit; null when there are none. */
  callbackRate: number | null;
  /** Eligible jobs resolved on the first visit (the callback-rate denominator). */
  resolvedFirstVisits: number;
  /** Jobs that would be eligible but whose callback window had not run out by `asOf`. */
  pending: number;
}

/**
 * First-time-fix and callback rates. A follow-up is "within the window" when it was opened no later
 * than `windowDays` × 24 h after the first visit closed (inclusive); a follow-up dated before the
 * close counts as within the window too. Rates are fractions 0..1, or null with a zero denominator.
 */
export function fixQuality(jobs: readonly FixQualityJob[], opts: FixQualityOptions = {}): FixQualityResult {
  const windowDays = opts.windowDays ?? 30;
  if (typeof windowDays !== 'number' || !Number.isFinite(windowDays) || windowDays < 0) {
    throw new RangeError('windowDays must be a finite number of 0 or more');
  }
  const windowMs = windowDays * DAY_MS;
  const asOf = opts.asOf === undefined ? null : instantMs(opts.asOf, 'asOf');
  let pending = 0;
  let eligible = 0;
  let firstTimeFixed = 0;
  let callbacks = 0;
  let resolved = 0;
  for (const job of jobs) {
    if (job.kind !== 'service_call' || job.firstVisitOutcome === 'declined') continue;
    const closed = instantMs(job.firstVisitClosedAt, `job ${job.id} firstVisitClosedAt`);
    if (asOf !== null && closed + windowMs >= asOf) {
      pending++;
      continue;
    }
    eligible++;
    if (job.firstVisitOutcome !== 'resolved') continue;
    resolved++;
    let anyFollowUp = false;
    let callback = false;
    for (const f of job.followUps) {
      const opened = instantMs(f.openedAt, `job ${job.id} follow-up openedAt`);
      if (opened - closed <= windowMs) {
        anyFollowUp = true;
        if (f.kind === 'callback') callback = true;
      }
    }
    if (!anyFollowUp) firstTimeFixed++;
    if (callback) callbacks++;
  }
  return fixQualityFromCounts({ eligible, firstTimeFixed, callbacks, resolvedFirstVisits: resolved, pending });
}

/** The counts behind {@link FixQualityResult}, e.g. as a database aggregates them job by job (`pending` 0 when left out). */
export type FixQualityCounts = Pick<FixQualityResult, 'eligible' | 'firstTimeFixed' | 'callbacks' | 'resolvedFirstVisits'> & {
  pending?: number;
};

/**
 * The rates of {@link fixQuality} from counts made elsewhere with the same per-job definitions (eligible:
 * a service call whose first visit was not declined; first-time fixed: eligible, resolved on the first visit
 * and no follow-up opened within the window; callback: resolved on the first visit and a callback opened
 * within the window). Rates are null with a zero denominator.
 */
export function fixQualityFromCounts(c: FixQualityCounts): FixQualityResult {
  for (const [k, v] of Object.entries(c)) {
    if (!Number.isInteger(v) || v < 0) throw new RangeError(`${k} must be a whole number of 0 or more`);
  }
  if (c.firstTimeFixed > c.resolvedFirstVisits || c.callbacks > c.resolvedFirstVisits || c.resolvedFirstVisits > c.eligible) {
    throw new RangeError('firstTimeFixed and callbacks cannot exceed resolvedFirstVisits, nor resolvedFirstVisits exceed eligible');
  }
  return {
    eligible: c.eligible,
    firstTimeFixed: c.firstTimeFixed,
    firstTimeFixRate: c.eligible === 0 ? null : c.firstTimeFixed / c.eligible,
    callbacks: c.callbacks,
    callbackRate: c.resolvedFirstVisits === 0 ? null : c.callbacks / c.resolvedFirstVisits,
    resolvedFirstVisits: c.resolvedFirstVisits,
    pending: c.pending ?? 0,
  };
}
