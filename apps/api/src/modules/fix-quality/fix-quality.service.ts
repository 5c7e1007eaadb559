/**
 * Fix Quality: the owner's report of first-time fix and callbacks, the factory-defect review with its
 * warranty claims, and model alerts with their inspection work orders.
 *
 * The report counts in the database: each job's counts with `fixQuality`'s definitions (@coilpath/calc) are
 * kept summed per branch, month and group by triggers (`fix_quality_sums`), and one statement adds up the
 * months of the period and the jobs of its remaining days, answering a few hundred rows; the rates come from
 * `fixQualityFromCounts`. Definitions: see packages/contract/src/fix-quality.ts.
 */
import { eq, inArray, sql, type SQL } from 'drizzle-orm';
import { addDays, fixQualityFromCounts, previousPeriod, zonedDate, zonedInstant } from '@coilpath/calc';
import {
  causeCodeLabels,
  causeOriginLabels,
  modelAlertPurpose,
  type CauseCode,
  type CauseOrigin,
  type CreateInspections,
  type CreateInspectionsResult,
  type FactoryDefectCase,
  type FactoryDefectModel,
  type FactoryDefectReview,
  type FixQualityFigures,
  type FixQualityGroup,
  type FixQualityReport,
  type ModelAlert,
  type ModelAlertUnit,
  type SessionUser,
  type WarrantyClaim,
  type WarrantyClaimStatus,
  type WarrantyClaimUpdate,
  type WorkOrderKind,
  type WorkOrderState,
} from '@coilpath/contract';
import type { Db, Tx } from '../../db/client';
import { auditEvents, branches, users, warrantyClaims, workOrders } from '../../db/schema';
import type { Clock } from '../../lib/clock';
import { notFound, unprocessable } from '../../lib/errors';
import { actAs } from '../events/actor';

const DAY_MS = 86_400_000;

/** Rows of a raw query (PGlite and node-postgres both answer `{ rows }`). */
async function rows<T>(db: Tx, query: SQL): Promise<T[]> {
  const res = (await db.execute(query)) as unknown as { rows: T[] };
  return res.rows;
}

// ---------------------------------------------------------------------------------------------
// Periods
// ---------------------------------------------------------------------------------------------

export interface Period {
  from: string;
  to: string;
}

const dayMs = (d: string) => Date.parse(`${d}T00:00:00Z`);

/** The comparison period (same length, ending the day before `from`): `previousPeriod` in @coilpath/calc, shared with the screen. */

/** [start, end) instants of a period of UTC calendar dates. */
const bounds = (p: Period) => ({ start: new Date(dayMs(p.from)).toISOString(), end: new Date(dayMs(p.to) + DAY_MS).toISOString() });

// ---------------------------------------------------------------------------------------------
// The report
// ---------------------------------------------------------------------------------------------

/**
 * Sums of one group of jobs, counted in SQL with `fixQuality`'s per-job definitions (see `reportGroups`).
 * `days` is the total of days from opening to the last resolved visit over `resolved_jobs`.
 */
interface CountRow {
  cur: boolean;
  g: number | string;
  branch_id: string | null;
  tech_id: string | null;
  month: string | null;
  make: string | null;
  model: string | null;
  cause_code: CauseCode | null;
  origin: CauseOrigin | null;
  eligible: number | string;
  first_time_fixed: number | string;
  resolved_first_visits: number | string;
  callbacks: number | string;
  return_visits: number | string | null;
  resolved_jobs: number | string;
  days: number | string | null;
  pending: number | string | null;
}

/** The kinds of group the report answers (`g` of a counted row; the bits of the former GROUPING SETS query). */
const GROUPED = { all: 0b111111, branch: 0b011111, tech: 0b101111, month: 0b110111, model: 0b111011, cause: 0b111101, origin: 0b111110 } as const;

const MONTH_MS = (y: number, m: number) => Date.UTC(y, m, 1);

/**
 * Splits [start, end) (UTC midnights) into the whole calendar months (UTC) inside it, read from
 * `fix_quality_sums`, and the days before and after them, counted from `service_call_facts`. With
 * `sumsUntil`, only months that end at or before that instant come from the sums (the sums hold the counts
 * of mature jobs; see `fixQualityReport`), the days after them are counted job by job.
 */
export function splitByMonths(start: string, end: string, sumsUntil?: string): { months: [string, string] | null; edges: [string, string][] } {
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

/**
 * The report's figures for every group: one row per (current or previous period) × (everything, branch,
 * technician, month, model, cause, origin) group — a few hundred rows.
 *
 * Whole calendar months (UTC) of the period come from `fix_quality_sums`: per branch and month, the sums of
 * its jobs per technician, per make and model, per cause and per origin, kept by triggers (migration 0005).
 * The days before and after the whole months are counted from the view `fix_quality_jobs` (one row per job
 * of `service_call_facts` with its counts: the definition the sums are kept with), so a year reads about five
 * thousand rows of sums and the jobs of a month or two instead of two years of jobs. The previous period
 * needs its total only: one dimension ('origin') of its sums.
 *
 * A job is a service call whose first visit (its earliest closed visit) closed in [start, end). Per job, with
 * its own branch's callback window W (whole 24-hour days after the first visit closed, inclusive; a follow-up
 * opened before the close counts as inside), the same definitions as `fixQuality` in @coilpath/calc:
 *   eligible             first visit not declined (a closed visit without an outcome counts as needs return)
 *   resolved first visit eligible and the first visit resolved
 *   first-time fixed     resolved first visit and no callback or return visit opened within W
 *   callback             resolved first visit and a callback opened within W
 * and for eligible jobs: return visits booked off the job (any time), and the days from opening to the last
 * closed visit of the job and its follow-ups when that visit resolved it (summed exactly in microseconds).
 */
export async function reportGroups(
  db: Tx,
  range: { start: string; curStart: string; end: string },
  branchId: string | undefined,
  maturity: { at: Date; sumsUntil: string },
): Promise<CountRow[]> {
  const ofBranch = (alias: string) => (branchId ? sql`AND ${sql.raw(alias)}.branch_id = ${branchId}` : sql``);
  const columns = sql`branch_id, month, dim, tech_id, make, model, cause_code, origin, jobs, eligible, first_time_fixed,
    resolved_first_visits, callbacks, return_visits, resolved_jobs, resolve_us, 0 AS pending`;
  const parts = (cur: boolean, from: string, to: string, onlyTotals: boolean): SQL[] => {
    const { months, edges } = splitByMonths(from, to, maturity.sumsUntil);
    const flag = sql.raw(cur ? 'true' : 'false');
    const out: SQL[] = [];
    if (months) {
      out.push(sql`SELECT ${flag} AS cur, ${columns} FROM fix_quality_sums s
        WHERE s.month >= ${months[0]}::date AND s.month < ${months[1]}::date ${onlyTotals ? sql`AND s.dim = 'origin'` : sql``} ${ofBranch('s')}`);
    }
    if (edges.length) {
      const within = sql.join(
        edges.map(([a, b]) => sql`(j.first_closed_at >= ${a}::timestamptz AND j.first_closed_at < ${b}::timestamptz)`),
        sql` OR `,
      );
      // The same rows as the table's, counted from the jobs.
      out.push(sql`SELECT ${flag} AS cur, branch_id, month,
          ${onlyTotals ? sql`'origin'` : sql`CASE GROUPING(tech_id, make, model, cause_code, origin) WHEN 15 THEN 'technician' WHEN 19 THEN 'model' WHEN 29 THEN 'cause' ELSE 'origin' END`} AS dim,
          ${onlyTotals ? sql`NULL::uuid AS tech_id, NULL::text AS make, NULL::text AS model, NULL::text AS cause_code` : sql`tech_id, make, model, cause_code`}, origin,
          count(*)::int AS jobs, sum(eligible)::int AS eligible, sum(first_time_fixed)::int AS first_time_fixed,
          sum(resolved_first_visits)::int AS resolved_first_visits, sum(callbacks)::int AS callbacks, sum(return_visits)::int AS return_visits,
          sum(resolved_jobs)::int AS resolved_jobs, sum(resolve_us)::bigint AS resolve_us, sum(pending)::int AS pending
        FROM fix_quality_jobs_at(${maturity.at.toISOString()}::timestamptz) j WHERE (${within}) ${ofBranch('j')}
        GROUP BY branch_id, month, ${onlyTotals ? sql`origin` : sql`GROUPING SETS ((tech_id), (make, model), (cause_code), (origin))`}`);
    }
    return out;
  };
  const all = [...parts(true, range.curStart, range.end, false), ...parts(false, range.start, range.curStart, true)];
  if (all.length === 0) return [];
  const sums = sql`sum(eligible)::int AS eligible, sum(first_time_fixed)::int AS first_time_fixed,
      sum(resolved_first_visits)::int AS resolved_first_visits, sum(callbacks)::int AS callbacks, sum(return_visits)::int AS return_visits,
      sum(resolved_jobs)::int AS resolved_jobs, sum(resolve_us)::float8 / 86400000000 AS days, sum(pending)::int AS pending`;
  const g = (bits: number) => sql.raw(String(bits));
  // Each job is counted once in every dimension: the totals, per branch and per month add up one of them.
  return rows<CountRow>(
    db,
    sql`
    WITH parts AS MATERIALIZED (${sql.join(all, sql` UNION ALL `)})
    SELECT cur, ${g(GROUPED.all)} AS g, NULL::uuid AS branch_id, NULL::uuid AS tech_id, NULL::text AS month, NULL::text AS make,
      NULL::text AS model, NULL::text AS cause_code, NULL::text AS origin, ${sums}
    FROM parts WHERE dim = 'origin' GROUP BY cur HAVING sum(jobs) > 0
    UNION ALL
    SELECT true, ${g(GROUPED.branch)}, branch_id, NULL, NULL, NULL, NULL, NULL, NULL, ${sums}
    FROM parts WHERE cur AND dim = 'origin' GROUP BY branch_id HAVING sum(jobs) > 0
    UNION ALL
    SELECT true, ${g(GROUPED.month)}, NULL, NULL, to_char(month, 'YYYY-MM'), NULL, NULL, NULL, NULL, ${sums}
    FROM parts WHERE cur AND dim = 'origin' GROUP BY month HAVING sum(jobs) > 0
    UNION ALL
    SELECT true, ${g(GROUPED.tech)}, NULL, tech_id, NULL, NULL, NULL, NULL, NULL, ${sums}
    FROM parts WHERE cur AND dim = 'technician' GROUP BY tech_id HAVING sum(jobs) > 0
    UNION ALL
    SELECT true, ${g(GROUPED.model)}, NULL, NULL, NULL, make, model, NULL, NULL, ${sums}
    FROM parts WHERE cur AND dim = 'model' GROUP BY make, model HAVING sum(jobs) > 0
    UNION ALL
    SELECT true, ${g(GROUPED.cause)}, NULL, NULL, NULL, NULL, NULL, cause_code, NULL, ${sums}
    FROM parts WHERE cur AND dim = 'cause' GROUP BY cause_code HAVING sum(jobs) > 0
    UNION ALL
    SELECT true, ${g(GROUPED.origin)}, NULL, NULL, NULL, NULL, NULL, NULL, origin, ${sums}
    FROM parts WHERE cur AND dim = 'origin' GROUP BY origin HAVING sum(jobs) > 0
  `,
  );
}

const EMPTY: FixQualityFigures = figuresOf(undefined);

/** The figures of one counted group: rates by `fixQualityFromCounts` (@coilpath/calc). */
export function figuresOf(r: CountRow | undefined): FixQualityFigures {
  const n = (v: number | string | null | undefined) => Number(v ?? 0);
  const q = fixQualityFromCounts({
    eligible: n(r?.eligible),
    firstTimeFixed: n(r?.first_time_fixed),
    resolvedFirstVisits: n(r?.resolved_first_visits),
    callbacks: n(r?.callbacks),
  });
  const returnVisits = n(r?.return_visits);
  const resolvedJobs = n(r?.resolved_jobs);
  return {
    ...q,
    returnVisits,
    returnVisitsPerServiceCall: q.eligible === 0 ? null : returnVisits / q.eligible,
    resolvedJobs,
    avgDaysToResolve: resolvedJobs === 0 ? null : n(r?.days) / resolvedJobs,
    pending: n(r?.pending),
  };
}

const diff = (a: number | null, b: number | null) => (a === null || b === null ? null : a - b);
const byEligibleDesc = (a: FixQualityGroup, b: FixQualityGroup) => b.eligible - a.eligible || a.label.localeCompare(b.label);

function monthsOf(p: Period): string[] {
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

export const NONE = '(none recorded)';

/**
 * The report as of `at` (the server's clock). A job whose callback window has not run out by `at` is
 * `pending` and counts in nothing else (`fix_quality_jobs_at`, migration 0014): its first-time fix cannot be
 * known yet. The kept sums hold the counts of mature jobs, so they are read only for months that end at least
 * the longest callback window of the branches shown before `at`; the later days are counted job by job.
 */
export async function fixQualityReport(db: Db, period: Period, branchId: string | undefined, at: Date): Promise<FixQualityReport> {
  const prev = previousPeriod(period);
  const cur = bounds(period);
  const branchRows = await db
    .select({ id: branches.id, name: branches.name, windowDays: branches.callbackWindowDays })
    .from(branches)
    .where(branchId ? eq(branches.id, branchId) : undefined);
  const longestWindow = Math.max(0, ...branchRows.map((b) => b.windowDays));
  const sumsUntil = new Date(at.getTime() - longestWindow * DAY_MS).toISOString();
  const counted = await reportGroups(db, { start: bounds(prev).start, curStart: cur.start, end: cur.end }, branchId, { at, sumsUntil });
  const current = counted.filter((r) => r.cur);
  const ofKind = (g: number) => current.filter((r) => Number(r.g) === g);

  const windows = new Map(branchRows.map((b) => [b.id, b.windowDays]));
  const branchNames = new Map(branchRows.map((b) => [b.id, b.name]));
  const techIds = ofKind(GROUPED.tech).map((r) => r.tech_id!);
  const techs = techIds.length
    ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, techIds))
    : [];
  const techNames = new Map(techs.map((t) => [t.id, t.name]));

  const groups = (g: number, keyOf: (r: CountRow) => string, labelOf: (key: string) => string): FixQualityGroup[] =>
    ofKind(g).map((r) => {
      const key = keyOf(r);
      return { key, label: labelOf(key), ...figuresOf(r) };
    });

  const head = figuresOf(current.find((r) => Number(r.g) === GROUPED.all)) ?? EMPTY;
  const before = figuresOf(counted.find((r) => !r.cur && Number(r.g) === GROUPED.all));
  const byMonth = groups(GROUPED.month, (r) => r.month!, (k) => k);
  const months = new Set(byMonth.map((m) => m.key));
  for (const key of monthsOf(period)) if (!months.has(key)) byMonth.push({ key, label: key, ...EMPTY });
  return {
    period,
    previousPeriod: prev,
    branchId: branchId ?? null,
    windowDays: [...new Set(windows.values())].sort((a, b) => a - b),
    ...head,
    previous: before,
    change: {
      firstTimeFixRate: diff(head.firstTimeFixRate, before.firstTimeFixRate),
      callbackRate: diff(head.callbackRate, before.callbackRate),
      returnVisitsPerServiceCall: diff(head.returnVisitsPerServiceCall, before.returnVisitsPerServiceCall),
      avgDaysToResolve: diff(head.avgDaysToResolve, before.avgDaysToResolve),
      eligible: head.eligible - before.eligible,
    },
    byBranch: groups(GROUPED.branch, (r) => r.branch_id!, (k) => branchNames.get(k) ?? 'Unknown branch').sort((a, b) => a.label.localeCompare(b.label)),
    byTechnician: groups(GROUPED.tech, (r) => r.tech_id!, (k) => techNames.get(k) ?? 'Unknown technician').sort(byEligibleDesc),
    byMonth: byMonth.sort((a, b) => a.key.localeCompare(b.key)),
    byModel: groups(GROUPED.model, (r) => (r.make === null ? NONE : `${r.make}|${r.model}`), (k) => (k === NONE ? 'No unit recorded' : k.replace('|', ' '))).sort(
      byEligibleDesc,
    ),
    byCause: groups(GROUPED.cause, (r) => r.cause_code ?? NONE, (k) => causeCodeLabels[k as CauseCode] ?? 'No finding recorded').sort(byEligibleDesc),
    byOrigin: groups(GROUPED.origin, (r) => r.origin ?? NONE, (k) => causeOriginLabels[k as CauseOrigin] ?? 'No finding recorded').sort(byEligibleDesc),
  };
}

// ---------------------------------------------------------------------------------------------
// Factory-defect review
// ---------------------------------------------------------------------------------------------

interface CaseRow {
  id: string;
  number: number | null;
  kind: WorkOrderKind;
  branch_id: string;
  branch_name: string;
  branch_time_zone: string;
  currency: string;
  labour_rate_cents: number;
  refrigerant_price_cents_per_lb: number;
  site_id: string;
  site_name: string;
  unit_id: string;
  unit_tag: string;
  make: string;
  model: string;
  causes: CauseCode[] | string;
  created_at: Date | string;
  origin_work_order_id: string | null;
  visits: number | null;
  labour_minutes: number | string | null;
  refrigerant_lb: number | string | null;
  claim_status: WarrantyClaimStatus | null;
  claim_amount_cents: number | null;
  claim_reference: string | null;
  claim_notes: string | null;
  claim_updated_at: Date | string | null;
}

const iso = (v: Date | string) => (v instanceof Date ? v : new Date(v)).toISOString();
/** node-postgres may answer a text[] as '{a,b}'. */
const textArray = (v: string[] | string): string[] => (Array.isArray(v) ? v : v.replace(/^{|}$/g, '').split(',').filter(Boolean));

/**
 * The factory-defect cases: service calls (first visits included: a warranty repair on the first visit is
 * claimable too), callbacks and return visits opened in the period whose root cause (the finding marked on
 * one of their visits, the view `visit_root_causes` of migration 0017) is of origin `factory_defect`. A case costs the labour of its visits — and, for a callback or return visit, of the
 * visits of work booked off it (a return visit whose origin is the callback; a service call's follow-ups are
 * cases of their own) — recorded labour minutes, else on-site to close — at the branch's labour rate, and the
 * refrigerant added on those visits at the branch's price per pound. The claim's amount defaults to that cost;
 * `amountDifferenceCents` is the recorded amount minus the cost.
 */
export async function factoryDefectCases(db: Tx, opts: { period?: Period; branchId?: string | undefined; workOrderId?: string }): Promise<FactoryDefectCase[]> {
  const range = opts.period ? bounds(opts.period) : null;
  const filters = [
    range ? sql`AND w.created_at >= ${range.start}::timestamptz AND w.created_at < ${range.end}::timestamptz` : sql``,
    opts.branchId ? sql`AND w.branch_id = ${opts.branchId}` : sql``,
    opts.workOrderId ? sql`AND w.id = ${opts.workOrderId}` : sql``,
  ];
  const result = await rows<CaseRow>(
    db,
    sql`
    WITH cases AS (
      SELECT w.id, w.kind, coalesce(w.unit_id, (array_agg(fd.unit_id ORDER BY fd.created_at) FILTER (WHERE fd.unit_id IS NOT NULL))[1]) AS unit_id,
        array_agg(DISTINCT fd.cause_code) AS causes
      FROM visit_root_causes fd
      JOIN visits v ON v.id = fd.visit_id
      JOIN work_orders w ON w.id = v.work_order_id
      WHERE fd.origin = 'factory_defect' AND w.kind IN ('service_call', 'callback', 'return_visit') ${sql.join(filters, sql` `)}
      GROUP BY w.id, w.kind, w.unit_id
    ),
    case_work AS (
      SELECT c.id AS case_id, c.id AS wo_id FROM cases c
      UNION ALL
      SELECT c.id, w2.id FROM cases c JOIN work_orders w2 ON w2.origin_work_order_id = c.id WHERE c.kind <> 'service_call'
    ),
    labour AS (
      SELECT cw.case_id AS work_order_id,
        (count(*) FILTER (WHERE v.closed_at IS NOT NULL))::int AS visits,
        coalesce(sum(coalesce(v.labour_minutes::float8,
          CASE WHEN v.closed_at IS NOT NULL AND v.on_site_at IS NOT NULL
            THEN extract(epoch FROM v.closed_at - v.on_site_at) / 60 END)), 0)::float8 AS labour_minutes
      FROM visits v JOIN case_work cw ON cw.wo_id = v.work_order_id
      GROUP BY cw.case_id
    ),
    gas AS (
      SELECT cw.case_id AS work_order_id, sum(re.pounds_added)::float8 AS refrigerant_lb
      FROM refrigerant_events re JOIN visits v ON v.id = re.visit_id JOIN case_work cw ON cw.wo_id = v.work_order_id
      GROUP BY cw.case_id
    )
    SELECT w.id, w.number, w.kind, w.branch_id, b.name AS branch_name, b.time_zone AS branch_time_zone, b.currency, b.labour_rate_cents,
      b.refrigerant_price_cents_per_lb, w.site_id, s.name AS site_name, u.id AS unit_id, u.tag AS unit_tag,
      u.make, u.model, c.causes, w.created_at, w.origin_work_order_id,
      l.visits, l.labour_minutes, g.refrigerant_lb,
      wc.status AS claim_status, wc.amount_cents AS claim_amount_cents, wc.reference AS claim_reference,
      wc.notes AS claim_notes, wc.updated_at AS claim_updated_at
    FROM cases c
    JOIN work_orders w ON w.id = c.id
    JOIN branches b ON b.id = w.branch_id
    JOIN sites s ON s.id = w.site_id
    JOIN units u ON u.id = c.unit_id
    LEFT JOIN labour l ON l.work_order_id = c.id
    LEFT JOIN gas g ON g.work_order_id = c.id
    LEFT JOIN warranty_claims wc ON wc.work_order_id = c.id
    ORDER BY u.make, u.model, w.created_at
  `,
  );
  return result.map((r) => {
    const labourMinutes = Number(r.labour_minutes ?? 0);
    const refrigerantLb = Number(r.refrigerant_lb ?? 0);
    const labourCostCents = Math.round((labourMinutes / 60) * r.labour_rate_cents);
    const refrigerantCostCents = Math.round(refrigerantLb * r.refrigerant_price_cents_per_lb);
    const claim: WarrantyClaim = {
      status: r.claim_status ?? 'to_claim',
      amountCents: r.claim_amount_cents,
      reference: r.claim_reference,
      notes: r.claim_notes,
      updatedAt: r.claim_updated_at ? iso(r.claim_updated_at) : null,
    };
    return {
      workOrderId: r.id,
      number: r.number,
      kind: r.kind,
      branchId: r.branch_id,
      branchName: r.branch_name,
      branchTimeZone: r.branch_time_zone,
      currency: r.currency,
      siteId: r.site_id,
      siteName: r.site_name,
      unitId: r.unit_id,
      unitTag: r.unit_tag,
      make: r.make,
      model: r.model,
      causeCodes: textArray(r.causes) as CauseCode[],
      openedAt: iso(r.created_at),
      originWorkOrderId: r.origin_work_order_id,
      visits: r.visits ?? 0,
      labourMinutes: Math.round(labourMinutes * 10) / 10,
      labourCostCents,
      refrigerantLb: Math.round(refrigerantLb * 100) / 100,
      refrigerantCostCents,
      costCents: labourCostCents + refrigerantCostCents,
      amountDifferenceCents: claim.amountCents === null ? null : claim.amountCents - (labourCostCents + refrigerantCostCents),
      claim,
    };
  });
}

export async function factoryDefectReview(db: Db, period: Period, branchId: string | undefined): Promise<FactoryDefectReview> {
  const cases = await factoryDefectCases(db, { period, branchId });
  const models = new Map<string, { m: FactoryDefectModel; units: Set<string>; sites: Set<string>; minutes: number }>();
  for (const c of cases) {
    const key = `${c.make}|${c.model}`;
    let g = models.get(key);
    if (!g) {
      g = {
        m: {
          key,
          make: c.make,
          model: c.model,
          cases: 0,
          firstVisits: 0,
          callbacks: 0,
          returnVisits: 0,
          unitsAffected: 0,
          sitesAffected: 0,
          labourHours: 0,
          labourCostCents: 0,
          refrigerantLb: 0,
          refrigerantCostCents: 0,
          costCents: 0,
          toClaimCents: 0,
          claimedCents: 0,
          paidCents: 0,
          deniedCents: 0,
        },
        units: new Set(),
        sites: new Set(),
        minutes: 0,
      };
      models.set(key, g);
    }
    const m = g.m;
    m.cases++;
    if (c.kind === 'callback') m.callbacks++;
    else if (c.kind === 'service_call') m.firstVisits++;
    else m.returnVisits++;
    g.units.add(c.unitId);
    g.sites.add(c.siteId);
    g.minutes += c.labourMinutes;
    m.labourCostCents += c.labourCostCents;
    m.refrigerantLb += c.refrigerantLb;
    m.refrigerantCostCents += c.refrigerantCostCents;
    m.costCents += c.costCents;
    const amount = c.claim.amountCents ?? c.costCents;
    if (c.claim.status === 'to_claim') m.toClaimCents += amount;
    else if (c.claim.status === 'claimed') m.claimedCents += amount;
    else if (c.claim.status === 'paid') m.paidCents += amount;
    else m.deniedCents += amount;
  }
  const list = [...models.values()].map((g) => ({
    ...g.m,
    unitsAffected: g.units.size,
    sitesAffected: g.sites.size,
    labourHours: Math.round((g.minutes / 60) * 10) / 10,
    refrigerantLb: Math.round(g.m.refrigerantLb * 100) / 100,
  }));
  list.sort((a, b) => b.costCents - a.costCents || a.key.localeCompare(b.key));
  return { period, branchId: branchId ?? null, models: list, cases };
}

/** Records a warranty claim's status, amount and reference for one factory-defect case. */
export async function updateWarrantyClaim(db: Db, clock: Clock, user: SessionUser, workOrderId: string, body: WarrantyClaimUpdate): Promise<WarrantyClaim> {
  return db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const [wo] = await tx.select({ id: workOrders.id, branchId: workOrders.branchId }).from(workOrders).where(eq(workOrders.id, workOrderId)).limit(1);
    if (!wo || (user.role !== 'owner' && wo.branchId !== user.branchId)) throw notFound('work order');
    const [isCase] = await factoryDefectCases(tx, { workOrderId });
    if (!isCase) {
      throw unprocessable('A warranty claim belongs to a service call, callback or return visit whose root cause is a factory defect; this work order has none.');
    }
    const [existing] = await tx.select().from(warrantyClaims).where(eq(warrantyClaims.workOrderId, workOrderId)).limit(1);
    // The amount defaults to the job's computed cost once the claim is claimed or paid.
    const kept = body.amountCents !== undefined ? body.amountCents : (existing?.amountCents ?? null);
    const amountCents = kept === null && (body.status === 'claimed' || body.status === 'paid') ? isCase.costCents : kept;
    if ((body.status === 'claimed' || body.status === 'paid') && amountCents === null) {
      throw unprocessable('Enter the amount claimed from the manufacturer before marking the claim claimed or paid.', {
        fields: [{ path: 'amountCents', message: 'Enter the amount' }],
      });
    }
    const values = {
      status: body.status,
      amountCents,
      reference: body.reference !== undefined ? body.reference || null : (existing?.reference ?? null),
      notes: body.notes !== undefined ? body.notes || null : (existing?.notes ?? null),
      updatedById: user.id,
      updatedAt: clock.now(),
    };
    const [saved] = await tx
      .insert(warrantyClaims)
      .values({ workOrderId, ...values })
      .onConflictDoUpdate({ target: warrantyClaims.workOrderId, set: values })
      .returning();
    await tx.insert(auditEvents).values({
      actorId: user.id,
      action: 'warranty_claim.updated',
      entity: 'work_order',
      entityId: workOrderId,
      details: { from: existing?.status ?? 'to_claim', to: body.status, amountCents },
    });
    return {
      status: saved!.status,
      amountCents: saved!.amountCents,
      reference: saved!.reference,
      notes: saved!.notes,
      updatedAt: saved!.updatedAt.toISOString(),
    };
  });
}

// ---------------------------------------------------------------------------------------------
// Model alerts
// ---------------------------------------------------------------------------------------------

interface AlertRow {
  make: string;
  model: string;
  cause_code: CauseCode;
  sites: number;
  affected_units: number;
  findings: number;
  first_found: Date | string;
  last_found: Date | string;
  raised_at: Date | string;
}

interface AlertUnitRow {
  make: string;
  model: string;
  cause_code: CauseCode;
  unit_id: string;
  tag: string;
  serial: string;
  branch_id: string;
  branch_name: string;
  site_id: string;
  site_name: string;
  install_date: string | null;
  warranty_end: string | null;
  /** One of the units the factory defect was found on (the alert's evidence). */
  affected: boolean;
  /** A finding with the alert's cause code recorded since the alert was raised. */
  found_since: boolean;
  inspection: 'open' | 'closed' | null;
}

interface AlertInspectionRow {
  purpose: string;
  work_order_id: string;
  number: number | null;
  state: WorkOrderState;
  latest_at: Date | string | null;
  unit_id: string;
  unit_tag: string;
  site_name: string;
  branch_id: string;
  branch_name: string;
}

/**
 * Model alerts: the same cause code with origin `factory_defect` on one make and model at two or more
 * sites (over all time and all branches), raised the moment a second site's factory-defect finding was
 * recorded (closing time of its visit). For each, every unit of the model (not archived) with whether it
 * has been checked for that cause (the rule is stated once, beside `modelAlertPurpose` in the contract):
 *   1. it is one of the units the defect was found on, or
 *   2. it has a finding with the alert's cause code (any origin) recorded at or after the alert was raised, or
 *   3. it has an inspection work order created from the alert (purpose `model-alert:<make>|<model>|<cause>`),
 *      not cancelled, open or closed.
 * A visit for other work after the alert does not check the unit: nobody looked for that cause.
 */
export async function loadModelAlerts(db: Tx, filter?: { make: string; model: string; causeCode: CauseCode }) {
  const only = filter
    ? sql`AND u.make = ${filter.make} AND u.model = ${filter.model} AND fd.cause_code = ${filter.causeCode}`
    : sql``;
  const alertRows = await rows<AlertRow>(
    db,
    sql`
    WITH defects AS (
      SELECT u.make, u.model, fd.cause_code, u.site_id, u.id AS unit_id, coalesce(v.closed_at, fd.created_at) AS found_at
      FROM findings fd
      JOIN visits v ON v.id = fd.visit_id
      JOIN work_orders w ON w.id = v.work_order_id
      JOIN units u ON u.id = coalesce(fd.unit_id, w.unit_id)
      WHERE fd.origin = 'factory_defect' ${only}
    ),
    per_site AS (
      SELECT make, model, cause_code, site_id, min(found_at) AS first_at FROM defects GROUP BY 1, 2, 3, 4
    ),
    raised AS (
      SELECT make, model, cause_code, (array_agg(first_at ORDER BY first_at))[2] AS raised_at
      FROM per_site GROUP BY 1, 2, 3 HAVING count(*) >= 2
    )
    SELECT d.make, d.model, d.cause_code,
      count(DISTINCT d.site_id)::int AS sites, count(DISTINCT d.unit_id)::int AS affected_units, count(*)::int AS findings,
      min(d.found_at) AS first_found, max(d.found_at) AS last_found, r.raised_at
    FROM defects d JOIN raised r USING (make, model, cause_code)
    GROUP BY d.make, d.model, d.cause_code, r.raised_at
    ORDER BY count(DISTINCT d.site_id) DESC, d.make, d.model, d.cause_code
  `,
  );
  if (alertRows.length === 0) return [];
  const alertValues = sql.join(
    alertRows.map(
      (a) =>
        sql`(${a.make}, ${a.model}, ${a.cause_code}, ${modelAlertPurpose(a.make, a.model, a.cause_code)}, ${iso(a.raised_at)}::timestamptz)`,
    ),
    sql`, `,
  );
  const unitRows = await rows<AlertUnitRow>(
    db,
    sql`
    WITH alerts(make, model, cause_code, purpose, raised_at) AS (VALUES ${alertValues})
    SELECT a.make, a.model, a.cause_code, u.id AS unit_id, u.tag, u.serial, u.branch_id, b.name AS branch_name,
      u.site_id, s.name AS site_name, u.install_date::text AS install_date, u.warranty_end::text AS warranty_end,
      EXISTS (
        SELECT 1 FROM findings f2 JOIN visits v2 ON v2.id = f2.visit_id JOIN work_orders w2 ON w2.id = v2.work_order_id
        WHERE f2.cause_code = a.cause_code AND f2.origin = 'factory_defect' AND coalesce(f2.unit_id, w2.unit_id) = u.id
      ) AS affected,
      EXISTS (
        SELECT 1 FROM findings f3 JOIN visits v3 ON v3.id = f3.visit_id JOIN work_orders w3 ON w3.id = v3.work_order_id
        WHERE f3.cause_code = a.cause_code AND coalesce(f3.unit_id, w3.unit_id) = u.id
          AND coalesce(v3.closed_at, f3.created_at) >= a.raised_at
      ) AS found_since,
      (SELECT CASE WHEN bool_or(wi.state <> 'closed') THEN 'open' ELSE 'closed' END
         FROM work_orders wi WHERE wi.unit_id = u.id AND wi.purpose = a.purpose AND wi.state <> 'cancelled'
         HAVING count(*) > 0) AS inspection
    FROM alerts a
    JOIN units u ON u.make = a.make AND u.model = a.model AND u.archived_at IS NULL
    JOIN branches b ON b.id = u.branch_id
    JOIN sites s ON s.id = u.site_id
    ORDER BY b.name, s.name, u.tag
  `,
  );
  const purposes = alertRows.map((a) => modelAlertPurpose(a.make, a.model, a.cause_code));
  const inspectionRows = await rows<AlertInspectionRow>(
    db,
    sql`
    SELECT w.purpose, w.id AS work_order_id, w.number, w.state, w.latest_at, w.unit_id, u.tag AS unit_tag,
      s.name AS site_name, w.branch_id, b.name AS branch_name
    FROM work_orders w
    JOIN units u ON u.id = w.unit_id
    JOIN sites s ON s.id = w.site_id
    JOIN branches b ON b.id = w.branch_id
    WHERE w.purpose IN (${sql.join(purposes.map((p) => sql`${p}`), sql`, `)})
    ORDER BY w.latest_at NULLS LAST, w.number
  `,
  );
  return alertRows.map((a) => {
    const purpose = modelAlertPurpose(a.make, a.model, a.cause_code);
    const units = unitRows.filter((u) => u.make === a.make && u.model === a.model && u.cause_code === a.cause_code);
    return { alert: a, units, inspections: inspectionRows.filter((i) => i.purpose === purpose) };
  });
}

const isChecked = (u: AlertUnitRow) => u.affected || u.found_since || u.inspection !== null;

const toAlertUnit = (u: AlertUnitRow): ModelAlertUnit => ({
  unitId: u.unit_id,
  tag: u.tag,
  serial: u.serial,
  branchId: u.branch_id,
  branchName: u.branch_name,
  siteId: u.site_id,
  siteName: u.site_name,
  installDate: u.install_date,
  warrantyEnd: u.warranty_end,
});

/** Alerts for the owner (every unit) or a manager (the unchecked units of the own branch). */
export async function modelAlerts(db: Db, user: SessionUser): Promise<ModelAlert[]> {
  const loaded = await loadModelAlerts(db);
  return loaded.map(({ alert: a, units, inspections }) => {
    const visible = user.role === 'owner' ? units : units.filter((u) => u.branch_id === user.branchId);
    const ownInspections = user.role === 'owner' ? inspections : inspections.filter((i) => i.branch_id === user.branchId);
    return {
      key: `${a.make}|${a.model}|${a.cause_code}`,
      make: a.make,
      model: a.model,
      causeCode: a.cause_code,
      purpose: modelAlertPurpose(a.make, a.model, a.cause_code),
      sites: a.sites,
      affectedUnits: a.affected_units,
      findings: a.findings,
      firstFoundAt: iso(a.first_found),
      lastFoundAt: iso(a.last_found),
      unitsOfModel: units.length,
      checkedUnits: units.filter(isChecked).length,
      inspectionsOpen: units.filter((u) => u.inspection === 'open').length,
      raisedAt: iso(a.raised_at),
      inspections: ownInspections.map((i) => ({
        workOrderId: i.work_order_id,
        number: i.number,
        state: i.state,
        dueAt: i.latest_at === null ? null : iso(i.latest_at),
        unitId: i.unit_id,
        unitTag: i.unit_tag,
        siteName: i.site_name,
        branchName: i.branch_name,
      })),
      unchecked: visible.filter((u) => !isChecked(u)).map(toAlertUnit),
    };
  });
}

/**
 * Creates one planned inspection work order (kind planned_maintenance, unplaced) per unchecked unit of the
 * alert, each in the unit's own branch and site, so it lands in that branch's Roster queue. Units checked in
 * the meantime are skipped; the same call twice creates nothing the second time.
 */
export async function createInspections(db: Db, clock: Clock, user: SessionUser, body: CreateInspections): Promise<CreateInspectionsResult> {
  const purpose = modelAlertPurpose(body.make, body.model, body.causeCode);
  return db.transaction(async (tx) => {
    await actAs(tx, user.id);
    // One creator at a time per alert, so two clicks cannot double the work orders.
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${purpose}))`);
    const [found] = await loadModelAlerts(tx, { make: body.make, model: body.model, causeCode: body.causeCode });
    if (!found) throw notFound('model alert (the cause must be a factory defect found at two or more sites)');
    const unchecked = found.units.filter((u) => !isChecked(u));
    let chosen = unchecked;
    if (body.unitIds) {
      const ids = new Set(unchecked.map((u) => u.unit_id));
      const bad = body.unitIds.filter((id) => !ids.has(id));
      if (bad.length) {
        throw unprocessable(`${bad.length} of the chosen units are not unchecked units of this alert (already checked, archived or another model). Reload the alerts and choose again.`, {
          unitIds: bad,
        });
      }
      const want = new Set(body.unitIds);
      chosen = unchecked.filter((u) => want.has(u.unit_id));
    }
    if (chosen.length === 0) return { created: 0, workOrders: [], branches: [] };
    // Each inspection is due by the end of the day its branch's setting gives (default 30 days), in the branch's zone.
    const branchRows = await tx
      .select({ id: branches.id, timeZone: branches.timeZone, dueDays: branches.inspectionDueDays })
      .from(branches)
      .where(inArray(branches.id, [...new Set(chosen.map((u) => u.branch_id))]));
    const now = clock.now();
    const dueAt = new Map(
      branchRows.map((b) => [b.id, new Date(zonedInstant(addDays(zonedDate(now, b.timeZone), b.dueDays), '23:59', b.timeZone))]),
    );
    const complaint = `Inspect for ${causeCodeLabels[body.causeCode].toLowerCase()}: a factory defect found on ${body.make} ${body.model} at ${found.alert.sites} sites. Check this unit and record a finding.`;
    const created = await tx
      .insert(workOrders)
      .values(
        chosen.map((u) => ({
          branchId: u.branch_id,
          siteId: u.site_id,
          unitId: u.unit_id,
          kind: 'planned_maintenance' as const,
          state: 'unplaced' as const,
          priority: 'normal' as const,
          complaint,
          purpose,
          latestAt: dueAt.get(u.branch_id) ?? null,
          estimatedMinutes: 60,
          createdById: user.id,
        })),
      )
      .returning({ id: workOrders.id, number: workOrders.number, branchId: workOrders.branchId, unitId: workOrders.unitId });
    await tx.insert(auditEvents).values({
      actorId: user.id,
      action: 'model_alert.inspections_created',
      entity: 'model_alert',
      details: { purpose, count: created.length },
    });
    const perBranch = new Map<string, { branchId: string; branchName: string; created: number }>();
    for (const u of chosen) {
      const e = perBranch.get(u.branch_id) ?? { branchId: u.branch_id, branchName: u.branch_name, created: 0 };
      e.created++;
      perBranch.set(u.branch_id, e);
    }
    return {
      created: created.length,
      workOrders: created.map((w) => ({ id: w.id, number: w.number, branchId: w.branchId, unitId: w.unitId! })),
      branches: [...perBranch.values()],
    };
  });
}
