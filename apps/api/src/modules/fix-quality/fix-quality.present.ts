/**
 * What the Fix Quality routes answer: counted rows turned into the contract's report, factory-defect cases
 * and review, warranty claims and model alerts. Rates come from `fixQualityFromCounts` (@coilpath/calc).
 */
import { fixQualityFromCounts } from '@coilpath/calc';
import {
  causeCodeLabels,
  causeOriginLabels,
  modelAlertPurpose,
  type CauseCode,
  type CauseOrigin,
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
} from '@coilpath/contract';
import {
  GROUPED,
  type AlertInspectionRow,
  type AlertRow,
  type AlertUnitRow,
  type CaseRow,
  type CountRow,
  type WarrantyClaimRecord,
} from './fix-quality.repo';
import { monthsOf, type Period } from './periods';

export const iso = (v: Date | string) => (v instanceof Date ? v : new Date(v)).toISOString();
/** node-postgres may answer a text[] as '{a,b}'. */
const textArray = (v: string[] | string): string[] => (Array.isArray(v) ? v : v.replace(/^{|}$/g, '').split(',').filter(Boolean));

// ---------------------------------------------------------------------------------------------
// The report
// ---------------------------------------------------------------------------------------------

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

const EMPTY: FixQualityFigures = figuresOf(undefined);

/** The key of the group of jobs without a unit, a cause or an origin. */
export const NONE = '(none recorded)';

export interface ReportInput {
  period: Period;
  prev: Period;
  branchId: string | undefined;
  /** The counted rows of both periods (`reportGroups`). */
  counted: CountRow[];
  branchRows: { id: string; name: string; windowDays: number }[];
  techNames: Map<string, string>;
}

/** The technicians a report names (of its current period's rows). */
export const reportTechIds = (counted: CountRow[]) => counted.filter((r) => r.cur && Number(r.g) === GROUPED.tech).map((r) => r.tech_id!);

/** The report: headline, previous period and change, and the groups by branch, technician, month, model, cause and origin. */
export function presentReport({ period, prev, branchId, counted, branchRows, techNames }: ReportInput): FixQualityReport {
  const current = counted.filter((r) => r.cur);
  const ofKind = (g: number) => current.filter((r) => Number(r.g) === g);
  const windows = new Map(branchRows.map((b) => [b.id, b.windowDays]));
  const branchNames = new Map(branchRows.map((b) => [b.id, b.name]));

  const groups = (g: number, keyOf: (r: CountRow) => string, labelOf: (key: string) => string): FixQualityGroup[] =>
    ofKind(g).map((r) => {
      const key = keyOf(r);
      return { key, label: labelOf(key), ...figuresOf(r) };
    });

  const head = figuresOf(current.find((r) => Number(r.g) === GROUPED.all)) ?? EMPTY;
  const before = figuresOf(counted.find((r) => !r.cur && Number(r.g) === GROUPED.all));
  const byMonth = groups(
    GROUPED.month,
    (r) => r.month!,
    (k) => k,
  );
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
    byBranch: groups(
      GROUPED.branch,
      (r) => r.branch_id!,
      (k) => branchNames.get(k) ?? 'Unknown branch',
    ).sort((a, b) => a.label.localeCompare(b.label)),
    byTechnician: groups(
      GROUPED.tech,
      (r) => r.tech_id!,
      (k) => techNames.get(k) ?? 'Unknown technician',
    ).sort(byEligibleDesc),
    byMonth: byMonth.sort((a, b) => a.key.localeCompare(b.key)),
    byModel: groups(
      GROUPED.model,
      (r) => (r.make === null ? NONE : `${r.make}|${r.model}`),
      (k) => (k === NONE ? 'No unit recorded' : k.replace('|', ' ')),
    ).sort(byEligibleDesc),
    byCause: groups(
      GROUPED.cause,
      (r) => r.cause_code ?? NONE,
      (k) => causeCodeLabels[k as CauseCode] ?? 'No finding recorded',
    ).sort(byEligibleDesc),
    byOrigin: groups(
      GROUPED.origin,
      (r) => r.origin ?? NONE,
      (k) => causeOriginLabels[k as CauseOrigin] ?? 'No finding recorded',
    ).sort(byEligibleDesc),
  };
}

// ---------------------------------------------------------------------------------------------
// Factory-defect cases, their review and warranty claims
// ---------------------------------------------------------------------------------------------

/**
 * One case, costed: labour minutes at the branch's labour rate and refrigerant at its price per pound. The
 * claim's amount defaults to that cost; `amountDifferenceCents` is the recorded amount minus the cost.
 */
export function presentCase(r: CaseRow): FactoryDefectCase {
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
}

/** The cases summed per make and model (most costly first), with the cases themselves. */
export function presentDefectReview(period: Period, branchId: string | undefined, cases: FactoryDefectCase[]): FactoryDefectReview {
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

export const presentClaim = (saved: WarrantyClaimRecord): WarrantyClaim => ({
  status: saved.status,
  amountCents: saved.amountCents,
  reference: saved.reference,
  notes: saved.notes,
  updatedAt: saved.updatedAt.toISOString(),
});

// ---------------------------------------------------------------------------------------------
// Model alerts
// ---------------------------------------------------------------------------------------------

/** A unit is checked for an alert's cause when the defect was found on it, the cause was found on it since the alert, or it has an inspection. */
export const isChecked = (u: AlertUnitRow) => u.affected || u.found_since || u.inspection !== null;

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

export interface LoadedAlert {
  alert: AlertRow;
  units: AlertUnitRow[];
  inspections: AlertInspectionRow[];
}

/** One alert for the owner (every unit) or a manager (the unchecked units and the inspections of the own branch). */
export function presentModelAlert({ alert: a, units, inspections }: LoadedAlert, user: SessionUser): ModelAlert {
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
}
