/**
 * Every query of Fix Quality: the report's counts (kept sums and the jobs of the remaining days), the
 * factory-defect cases with their warranty claims, and model alerts with their inspection work orders.
 *
 * First-time fix, callbacks and maturity are defined once, in SQL: the view `fix_quality_jobs` and
 * `fix_quality_jobs_at(at)` over `service_call_facts` (migrations 0002, 0005, 0014, 0017), whose counts the
 * triggers keep summed per branch, month and group in `fix_quality_sums`. calc's `fixQuality` is only the
 * oracle the tests check this SQL against (`fix-quality-sums.test.ts`).
 */
import { eq, inArray, sql, type SQL } from 'drizzle-orm';
import type { CauseCode, CauseOrigin, WarrantyClaimStatus, WorkOrderKind, WorkOrderState } from '@coilpath/contract';
import type { Tx } from '../../db/client';
import { auditEvents, branches, users, warrantyClaims, workOrders } from '../../db/schema';
import { bounds, splitByMonths, type Period } from './periods';

/** Rows of a raw query (PGlite and node-postgres both answer `{ rows }`). */
async function rows<T>(db: Tx, query: SQL): Promise<T[]> {
  const res = (await db.execute(query)) as unknown as { rows: T[] };
  return res.rows;
}

// ---------------------------------------------------------------------------------------------
// The report
// ---------------------------------------------------------------------------------------------

/**
 * Sums of one group of jobs, counted in SQL (see `reportGroups`).
 * `days` is the total of days from opening to the last resolved visit over `resolved_jobs`.
 */
export interface CountRow {
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
export const GROUPED = {
  all: 0b111111,
  branch: 0b011111,
  tech: 0b101111,
  month: 0b110111,
  model: 0b111011,
  cause: 0b111101,
  origin: 0b111110,
} as const;

/** The branches a report covers (one, or all) with their callback windows. */
export function reportBranches(db: Tx, branchId: string | undefined) {
  return db
    .select({ id: branches.id, name: branches.name, windowDays: branches.callbackWindowDays })
    .from(branches)
    .where(branchId ? eq(branches.id, branchId) : undefined);
}

/** A branch's name, if it exists. */
export async function branchName(db: Tx, branchId: string): Promise<string | undefined> {
  const [b] = await db.select({ name: branches.name }).from(branches).where(eq(branches.id, branchId)).limit(1);
  return b?.name;
}

/** The names of some people. */
export function userNames(db: Tx, ids: string[]) {
  return ids.length ? db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, ids)) : Promise.resolve([]);
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

// ---------------------------------------------------------------------------------------------
// Factory-defect cases and warranty claims
// ---------------------------------------------------------------------------------------------

/** A factory-defect case as counted: the job, its branch's rates, its unit, root causes, labour, refrigerant and claim. */
export interface CaseRow {
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

/**
 * The factory-defect cases: service calls (first visits included: a warranty repair on the first visit is
 * claimable too), callbacks and return visits opened in the period whose root cause (the finding marked on
 * one of their visits, the view `visit_root_causes` of migration 0017) is of origin `factory_defect`, with
 * the work they cost — the visits of the case and, for a callback or return visit, of the work booked off it
 * (a return visit whose origin is the callback; a service call's follow-ups are cases of their own): their
 * closed visits, labour minutes (recorded, else on-site to close) and the refrigerant added on them.
 */
export function factoryDefectCaseRows(
  db: Tx,
  opts: { period?: Period; branchId?: string | undefined; workOrderId?: string },
): Promise<CaseRow[]> {
  const range = opts.period ? bounds(opts.period) : null;
  const filters = [
    range ? sql`AND w.created_at >= ${range.start}::timestamptz AND w.created_at < ${range.end}::timestamptz` : sql``,
    opts.branchId ? sql`AND w.branch_id = ${opts.branchId}` : sql``,
    opts.workOrderId ? sql`AND w.id = ${opts.workOrderId}` : sql``,
  ];
  return rows<CaseRow>(
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
}

/** A work order's branch, if it exists. */
export async function findWorkOrder(db: Tx, workOrderId: string) {
  const [wo] = await db
    .select({ id: workOrders.id, branchId: workOrders.branchId })
    .from(workOrders)
    .where(eq(workOrders.id, workOrderId))
    .limit(1);
  return wo;
}

export type WarrantyClaimRecord = typeof warrantyClaims.$inferSelect;
export type WarrantyClaimValues = Omit<typeof warrantyClaims.$inferInsert, 'workOrderId'>;

/** The warranty claim recorded for a work order, if any. */
export async function findWarrantyClaim(db: Tx, workOrderId: string): Promise<WarrantyClaimRecord | undefined> {
  const [existing] = await db.select().from(warrantyClaims).where(eq(warrantyClaims.workOrderId, workOrderId)).limit(1);
  return existing;
}

/** Records a work order's warranty claim (one per work order: a second write replaces the first). */
export async function saveWarrantyClaim(db: Tx, workOrderId: string, values: WarrantyClaimValues): Promise<WarrantyClaimRecord> {
  const [saved] = await db
    .insert(warrantyClaims)
    .values({ workOrderId, ...values })
    .onConflictDoUpdate({ target: warrantyClaims.workOrderId, set: values })
    .returning();
  return saved!;
}

/** One row of the audit trail. */
export async function audit(db: Tx, event: typeof auditEvents.$inferInsert): Promise<void> {
  await db.insert(auditEvents).values(event);
}

// ---------------------------------------------------------------------------------------------
// Model alerts
// ---------------------------------------------------------------------------------------------

export interface AlertRow {
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

export interface AlertUnitRow {
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

export interface AlertInspectionRow {
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
 * The model alerts (see `loadModelAlerts`): per make, model and cause code with origin `factory_defect` found
 * at two or more sites, its sites, units and findings, first and last found, and when it was raised (the
 * first finding at the second site). With `filter`, that one alert only.
 */
export function alertRows(db: Tx, filter?: { make: string; model: string; causeCode: CauseCode }): Promise<AlertRow[]> {
  const only = filter ? sql`AND u.make = ${filter.make} AND u.model = ${filter.model} AND fd.cause_code = ${filter.causeCode}` : sql``;
  return rows<AlertRow>(
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
}

/** An alert as the unit query takes it: its key, its inspection work orders' purpose and when it was raised. */
export interface AlertKey {
  make: string;
  model: string;
  causeCode: CauseCode;
  purpose: string;
  raisedAt: string;
}

/** Every unit (not archived) of the alerts' models, with whether each was checked for the alert's cause. */
export function alertUnitRows(db: Tx, alerts: AlertKey[]): Promise<AlertUnitRow[]> {
  const alertValues = sql.join(
    alerts.map((a) => sql`(${a.make}, ${a.model}, ${a.causeCode}, ${a.purpose}, ${a.raisedAt}::timestamptz)`),
    sql`, `,
  );
  return rows<AlertUnitRow>(
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
}

/** The inspection work orders created from alerts (by their purpose), any state. */
export function alertInspectionRows(db: Tx, purposes: string[]): Promise<AlertInspectionRow[]> {
  return rows<AlertInspectionRow>(
    db,
    sql`
    SELECT w.purpose, w.id AS work_order_id, w.number, w.state, w.latest_at, w.unit_id, u.tag AS unit_tag,
      s.name AS site_name, w.branch_id, b.name AS branch_name
    FROM work_orders w
    JOIN units u ON u.id = w.unit_id
    JOIN sites s ON s.id = w.site_id
    JOIN branches b ON b.id = w.branch_id
    WHERE w.purpose IN (${sql.join(
      purposes.map((p) => sql`${p}`),
      sql`, `,
    )})
    ORDER BY w.latest_at NULLS LAST, w.number
  `,
  );
}

/** Waits for, and takes until the transaction ends, the lock of one alert's inspections. */
export async function lockAlert(tx: Tx, purpose: string): Promise<void> {
  await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${purpose}))`);
}

/** The branches' time zones and days to an inspection's due date. */
export function inspectionDueSettings(db: Tx, branchIds: string[]) {
  return db
    .select({ id: branches.id, timeZone: branches.timeZone, dueDays: branches.inspectionDueDays })
    .from(branches)
    .where(inArray(branches.id, branchIds));
}

/** Creates work orders; answers their ids, numbers, branches and units. */
export function insertWorkOrders(db: Tx, values: (typeof workOrders.$inferInsert)[]) {
  return db
    .insert(workOrders)
    .values(values)
    .returning({ id: workOrders.id, number: workOrders.number, branchId: workOrders.branchId, unitId: workOrders.unitId });
}
