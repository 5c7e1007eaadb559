/**
 * An appliance's refrigerant ledger read against the leak-repair rules of `leak-rules.ts`: the leak
 * rate at every counted addition, the repair obligations it opens and what became of them, and the
 * chronic-leaker years. Also `leakRate` and `leakRepairObligation`, the one-calculation views other
 * code uses, computed by the same core.
 *
 * Sources as in `leak-rules.ts` (docs/reference/LEAK-RULES.md, tags [P]/[S]/[M]):
 * - 82.157(b) [P]: the rate is calculated every time refrigerant is added, unless the addition is made
 *   immediately after a retrofit or the installation of a new appliance, or is a seasonal variance.
 * - 82.152 "leak rate" [S; step wording M]: annualizing — lb added to return to full charge, in one
 *   addition or several for the same leak, ÷ full charge ÷ (min(days since refrigerant was last
 *   added, 365) ÷ 365) × 100; rolling average — lb added in the previous 365 days, or since the last
 *   successful follow-up verification test if shorter, ÷ full charge × 100.
 * - 82.157(c)(1) [P]: repair is owed when the rate is *over* the threshold (strictly greater).
 * - 82.157(d)/(e) [M], 84.106(d)/(e) [S]: repair within 30 days (120 with an industrial-process
 *   shutdown); initial and follow-up verification tests.
 * - 82.157(h) [S/M], 84.106(h) [S]: a retrofit or retirement plan instead of the repair.
 * - 82.157(j) [S]/P100PI79 [P], 84.106(j) [S/M]: 125 % or more of full charge in a calendar year.
 *
 * Coilpath's decisions where the extract is silent (all [M] unless the rule text is checked):
 * - Every threshold comparison is exact: numbers are read as the decimals they print as and compared
 *   as fractions (`exact.ts`), so 21.6 lb in a 72 lb charge over 365 days is exactly 30 %, not over.
 * - An exempt addition is not counted, and no rate is calculated at it, but it is still "refrigerant
 *   added": the next annualizing interval runs from it (the rule counts days since refrigerant was
 *   last added). A 0 lb entry is no addition at all.
 * - A failed verification test puts the obligation back to open with its original deadline (repairs
 *   and tests may be repeated within the applicable window [M]); it is overdue once that has passed.
 * - Repairs, tests and plans are the appliance's, not one leak's: a repair repairs every open
 *   obligation, a test tests every repaired one, a plan covers every unfinished one.
 * - An addition with the `leakId` of an earlier obligation's trigger never opens a second obligation
 *   for that leak (a recharge after the repair is the same leak).
 * - Events on the same date are taken additions first, then repairs, then initial tests, then
 *   follow-up tests (a failed one before a passed one), then plans; their order in the input does not
 *   matter.
 */
import { dayNumber, fromDayNumber, type IsoDate } from './dates';
import { add, compare, div, exactDecimal, fraction, mul, toNumber, type Fraction } from './exact';
import {
  additionExemptions,
  applianceCategories,
  leakRateMethods,
  repairDaysFor,
  ruleInForce,
  type AdditionExemption,
  type Appliance,
  type LeakRateMethod,
  type LeakRule,
  type RefrigerantAddition,
} from './leak-rules';
import { assertRefrigerant } from './refrigerants';

// ---------------------------------------------------------------------------------------------
// Public shapes

export interface LedgerAdditionEvent {
  kind: 'addition';
  date: IsoDate;
  pounds: number;
  /** Additions for the same leak share an id: summed as one, over one interval. */
  leakId?: string;
  exempt?: AdditionExemption;
}
export interface LedgerRepairEvent {
  kind: 'repair';
  date: IsoDate;
}
export interface LedgerVerificationEvent {
  kind: 'verification';
  date: IsoDate;
  stage: 'initial' | 'follow-up';
  passed: boolean;
}
export interface LedgerPlanEvent {
  kind: 'retrofit-or-retirement-plan';
  date: IsoDate;
}
export type LedgerEvent = LedgerAdditionEvent | LedgerRepairEvent | LedgerVerificationEvent | LedgerPlanEvent;
export const ledgerEventKinds = ['addition', 'repair', 'verification', 'retrofit-or-retirement-plan'] as const;

export type ObligationState = 'open' | 'overdue' | 'repaired' | 'verified' | 'plan';

export interface LeakObligation {
  /** The addition whose rate went over the threshold. */
  triggeredOn: IsoDate;
  /** The rate at that addition, percent per year. */
  leakRate: number;
  repairDueDate: IsoDate;
  /** Latest repair that stands (null while open, and again after a failed verification test). */
  repairedOn: IsoDate | null;
  state: ObligationState;
}

export interface LeakObligationsInput {
  appliance: Appliance;
  events: readonly LedgerEvent[];
  asOf: IsoDate;
  /** Default 'annualizing'. One method for all appliances at a facility [S]. */
  method?: LeakRateMethod;
  /** The repair needs an industrial-process shutdown: 120 days, for industrial-process refrigeration only. */
  industrialShutdown?: boolean;
}

export interface LeakObligationsResult {
  /** A rule applies on `asOf`. */
  inScope: boolean;
  /** The rule in force on `asOf`, e.g. '40 CFR 82.157'; null when out of scope. */
  rule: string | null;
  thresholdPercent: number | null;
  /** Percent per year at the latest counted addition on or before `asOf` (computed even out of scope); 0 when none. */
  leakRate: number;
  /** Oldest first. */
  obligations: LeakObligation[];
  /** The obligation still waiting for a repair (open or overdue), the oldest if two are. */
  openObligation: LeakObligation | null;
  /** Calendar years with 125 % or more of full charge added while a rule with the chronic-leaker report was in force. */
  chronicYears: number[];
}

// ---------------------------------------------------------------------------------------------
// Reading input

interface Add {
  day: number;
  pounds: Fraction;
  leakId: string | null;
  exempt: boolean;
}

function finitePositive(value: unknown, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${what} must be a finite number greater than 0; got ${String(value)}`);
  }
  return value;
}

/** null for a 0 lb entry, which adds nothing. */
function readAddition(a: { date: IsoDate; pounds: number; leakId?: string; exempt?: string }, where: string): Add | null {
  const day = dayNumber(a?.date, `${where}.date`);
  const pounds = a.pounds;
  if (typeof pounds !== 'number' || !Number.isFinite(pounds) || pounds < 0) {
    throw new RangeError(`${where}.pounds must be a finite number of 0 or more`);
  }
  if (a.leakId !== undefined && (typeof a.leakId !== 'string' || a.leakId === '')) {
    throw new RangeError(`${where}.leakId must be a non-empty string when given`);
  }
  if (a.exempt !== undefined && !(additionExemptions as readonly string[]).includes(a.exempt)) {
    throw new RangeError(`${where}.exempt must be one of ${additionExemptions.join(', ')}; got ${JSON.stringify(a.exempt)}`);
  }
  if (pounds === 0) return null;
  return { day, pounds: exactDecimal(pounds), leakId: a.leakId ?? null, exempt: a.exempt !== undefined };
}

type Parsed =
  | { kind: 'addition'; day: number; add: Add | null }
  | { kind: 'repair'; day: number }
  | { kind: 'verification'; day: number; stage: 'initial' | 'follow-up'; passed: boolean }
  | { kind: 'plan'; day: number };

function readEvent(e: LedgerEvent, i: number): Parsed {
  const where = `events[${i}]`;
  const kind = (e as { kind?: unknown })?.kind;
  switch (kind) {
    case 'addition':
      return { kind: 'addition', day: dayNumber(e.date, `${where}.date`), add: readAddition(e as LedgerAdditionEvent, where) };
    case 'repair':
      return { kind: 'repair', day: dayNumber(e.date, `${where}.date`) };
    case 'verification': {
      const v = e as LedgerVerificationEvent;
      if (v.stage !== 'initial' && v.stage !== 'follow-up') throw new RangeError(`${where}.stage must be initial or follow-up`);
      if (typeof v.passed !== 'boolean') throw new RangeError(`${where}.passed must be true or false`);
      return { kind: 'verification', day: dayNumber(v.date, `${where}.date`), stage: v.stage, passed: v.passed };
    }
    case 'retrofit-or-retirement-plan':
      return { kind: 'plan', day: dayNumber(e.date, `${where}.date`) };
    default:
      throw new RangeError(`${where}.kind must be one of ${ledgerEventKinds.join(', ')}; got ${JSON.stringify(kind)}`);
  }
}

function readAppliance(appliance: Appliance): { fullCharge: Fraction } {
  finitePositive(appliance?.fullCharge, 'appliance.fullCharge');
  if (!(applianceCategories as readonly string[]).includes(appliance.category)) {
    throw new RangeError(`Unknown appliance category ${JSON.stringify(appliance.category)}; valid: ${applianceCategories.join(', ')}`);
  }
  assertRefrigerant(appliance.refrigerant);
  return { fullCharge: exactDecimal(appliance.fullCharge) };
}

function readMethod(method: unknown): LeakRateMethod {
  if (method !== 'annualizing' && method !== 'rolling-average') {
    throw new RangeError(`Unknown leak-rate method ${JSON.stringify(method)}; valid: ${leakRateMethods.join(', ')}`);
  }
  return method;
}

// ---------------------------------------------------------------------------------------------
// The rate core

interface Rate {
  exact: Fraction;
  value: number;
}

function rate(exact: Fraction): Rate {
  return { exact, value: toNumber(exact) };
}

/**
 * Annualizing rate at `day`, a day with a counted addition (else null). The leak is that day's
 * additions, widened to every counted addition on or before `day` sharing a `leakId` with one of
 * them; the interval runs from the last addition (counted or exempt) before the leak's first, capped
 * at 365 days, and is 365 days when there is none. Additions before `countFrom` do not exist here.
 */
function annualizingAt(adds: readonly Add[], day: number, fullCharge: Fraction, countFrom: number): Rate | null {
  const known = adds.filter((a) => a.day >= countFrom && a.day <= day);
  const today = known.filter((a) => a.day === day && !a.exempt);
  if (today.length === 0) return null;
  const leak = new Set<Add>();
  for (const a of today) {
    if (a.leakId === null) leak.add(a);
    else for (const b of known) if (!b.exempt && b.leakId === a.leakId) leak.add(b);
  }
  let pounds = fraction(0);
  let first = day;
  for (const a of leak) {
    pounds = add(pounds, a.pounds);
    if (a.day < first) first = a.day;
  }
  let previous = -Infinity;
  for (const a of known) if (a.day < first && a.day > previous) previous = a.day;
  const days = previous === -Infinity ? 365 : Math.min(day - previous, 365);
  return rate(div(mul(pounds, fraction(36500)), mul(fullCharge, fraction(days))));
}

/** Rolling average at `day`: counted lb added from max(day − 364, countFrom, since + 1) to day ÷ full charge × 100. */
function rollingAt(adds: readonly Add[], day: number, fullCharge: Fraction, countFrom: number, since: number): Rate {
  const start = Math.max(day - 364, countFrom, since + 1);
  let pounds = fraction(0);
  for (const a of adds) if (!a.exempt && a.day >= start && a.day <= day) pounds = add(pounds, a.pounds);
  return rate(div(mul(pounds, fraction(100)), fullCharge));
}

function over(r: Rate, percent: number): boolean {
  return compare(r.exact, exactDecimal(percent)) > 0;
}

// ---------------------------------------------------------------------------------------------
// The ledger

interface Working {
  triggeredDay: number;
  rate: Rate;
  dueDay: number;
  repairedDay: number | null;
  status: 'open' | 'repaired' | 'verified' | 'plan';
  initialPassed: boolean;
  leakIds: Set<string>;
}

interface Evaluation {
  rule: LeakRule | null;
  threshold: number | null;
  /** The latest counted addition on or before asOf and the rate there; null when none. */
  latest: { day: number; rate: Rate } | null;
  obligations: LeakObligation[];
  chronicYears: number[];
}

const KIND_ORDER = { addition: 0, repair: 1, verification: 2, plan: 3 } as const;

function evaluate(input: LeakObligationsInput, options: { since?: number } = {}): Evaluation {
  const { appliance } = input;
  const { fullCharge } = readAppliance(appliance);
  const method = readMethod(input.method ?? 'annualizing');
  const asOf = dayNumber(input.asOf, 'asOf');
  if (!Array.isArray(input.events)) throw new RangeError('events must be an array');
  const events = input.events.map(readEvent).filter((e) => e.day <= asOf);

  const scope = { residentialOrLightCommercial: appliance.residentialOrLightCommercial === true };
  const rules = new Map<number, LeakRule | null>();
  const ruleAt = (day: number): LeakRule | null => {
    let r = rules.get(day);
    if (r === undefined) {
      r = ruleInForce(appliance.refrigerant, appliance.fullCharge, fromDayNumber(day), scope);
      rules.set(day, r);
    }
    return r;
  };
  const countFromOf = (r: LeakRule | null) => (r?.countFrom ? dayNumber(r.countFrom) : -Infinity);

  const adds: Add[] = [];
  for (const e of events) if (e.kind === 'addition' && e.add) adds.push(e.add);
  adds.sort((a, b) => a.day - b.day);

  // Follow-up tests that passed, for the rolling average's "since" (unless the caller fixes one).
  const passedFollowUps = events.filter((e) => e.kind === 'verification' && e.stage === 'follow-up' && e.passed).map((e) => e.day);
  const sinceBefore = (day: number): number => {
    if (options.since !== undefined) return options.since;
    let s = -Infinity;
    for (const d of passedFollowUps) if (d < day && d > s) s = d;
    return s;
  };
  const rateAt = (day: number, countFrom: number): Rate | null => {
    if (!adds.some((a) => a.day === day && !a.exempt && a.day >= countFrom)) return null;
    return method === 'annualizing'
      ? annualizingAt(adds, day, fullCharge, countFrom)
      : rollingAt(adds, day, fullCharge, countFrom, sinceBefore(day));
  };

  // Walk the days in order; within a day, a fixed order of kinds (see the module notes).
  const ordered = [...events].sort((a, b) => {
    if (a.day !== b.day) return a.day - b.day;
    if (a.kind !== b.kind) return KIND_ORDER[a.kind] - KIND_ORDER[b.kind];
    if (a.kind === 'verification' && b.kind === 'verification') {
      if (a.stage !== b.stage) return a.stage === 'initial' ? -1 : 1;
      return Number(a.passed) - Number(b.passed);
    }
    return 0;
  });
  const work: Working[] = [];
  let lastDay: number | null = null;
  for (const e of ordered) {
    if (e.kind === 'addition') {
      if (e.day === lastDay) continue; // the day's additions are taken together, once
      lastDay = e.day;
      const rule = ruleAt(e.day);
      if (!rule) continue;
      const r = rateAt(e.day, countFromOf(rule));
      const threshold = rule.thresholdPercent[appliance.category];
      if (!r || !over(r, threshold)) continue;
      if (work.some((o) => o.status === 'open')) continue;
      const ids = adds.filter((a) => a.day === e.day && !a.exempt && a.leakId !== null).map((a) => a.leakId as string);
      if (ids.some((id) => work.some((o) => o.leakIds.has(id)))) continue;
      work.push({
        triggeredDay: e.day,
        rate: r,
        dueDay: e.day + repairDaysFor(rule, appliance.category, input.industrialShutdown),
        repairedDay: null,
        status: 'open',
        initialPassed: false,
        leakIds: new Set(ids),
      });
    } else if (e.kind === 'repair') {
      for (const o of work) {
        if (o.status !== 'open') continue;
        o.status = 'repaired';
        o.repairedDay = e.day;
        o.initialPassed = false;
      }
    } else if (e.kind === 'verification') {
      for (const o of work) {
        if (o.status !== 'repaired') continue;
        if (!e.passed) {
          o.status = 'open';
          o.repairedDay = null;
          o.initialPassed = false;
        } else if (e.stage === 'initial') {
          o.initialPassed = true;
        } else if (o.initialPassed) {
          o.status = 'verified';
        }
      }
    } else {
      for (const o of work) if (o.status === 'open' || o.status === 'repaired') o.status = 'plan';
    }
  }

  const obligations: LeakObligation[] = work.map((o) => ({
    triggeredOn: fromDayNumber(o.triggeredDay),
    leakRate: o.rate.value,
    repairDueDate: fromDayNumber(o.dueDay),
    repairedOn: o.repairedDay === null ? null : fromDayNumber(o.repairedDay),
    state: o.status === 'open' && asOf > o.dueDay ? 'overdue' : o.status,
  }));

  // The rate at the latest counted addition on or before asOf, counted as the rule of asOf counts.
  const rule = ruleAt(asOf);
  const countFrom = countFromOf(rule);
  let latestDay = -Infinity;
  for (const a of adds) if (!a.exempt && a.day >= countFrom && a.day > latestDay) latestDay = a.day;
  const latestRate = latestDay === -Infinity ? null : rateAt(latestDay, countFrom);

  // Chronic leaker: calendar years, counting additions made under a rule that has the report.
  const yearPounds = new Map<number, { pounds: Fraction; percent: number }>();
  for (const a of adds) {
    if (a.exempt) continue;
    const r = ruleAt(a.day);
    if (!r || r.chronicPercent === null || a.day < countFromOf(r)) continue;
    const year = Number(fromDayNumber(a.day).slice(0, 4));
    const sum = yearPounds.get(year);
    yearPounds.set(year, { pounds: sum ? add(sum.pounds, a.pounds) : a.pounds, percent: r.chronicPercent });
  }
  const chronicYears = [...yearPounds.entries()]
    .filter(([, y]) => compare(mul(y.pounds, fraction(100)), mul(exactDecimal(y.percent), fullCharge)) >= 0)
    .map(([year]) => year)
    .sort((a, b) => a - b);

  return {
    rule,
    threshold: rule ? rule.thresholdPercent[appliance.category] : null,
    latest: latestRate ? { day: latestDay, rate: latestRate } : null,
    obligations,
    chronicYears,
  };
}

/**
 * The leak-repair obligations of an appliance from its refrigerant ledger, as of `asOf` (events
 * after it are ignored). The rate is calculated at every counted addition under the rule in force
 * on that day (Part 82 Subpart F or Part 84 Subpart C, by date, refrigerant and full charge, from
 * {@link LEAK_RULES}); an obligation opens when it is over that rule's threshold for the appliance's
 * category and none is waiting for a repair, stays open (overdue after its due date) until a
 * repair, is verified after a passed initial and a passed follow-up test, goes back to open when a
 * test fails, and turns to `plan` with a retrofit or retirement plan.
 */
export function leakObligations(input: LeakObligationsInput): LeakObligationsResult {
  const ev = evaluate(input);
  const open = ev.obligations.find((o) => o.state === 'open' || o.state === 'overdue') ?? null;
  return {
    inScope: ev.rule !== null,
    rule: ev.rule?.rule ?? null,
    thresholdPercent: ev.threshold,
    leakRate: ev.latest?.rate.value ?? 0,
    obligations: ev.obligations,
    openObligation: open,
    chronicYears: ev.chronicYears,
  };
}

// ---------------------------------------------------------------------------------------------
// One-calculation views (kept for the code that uses them)

export interface LeakRateInput {
  method: LeakRateMethod;
  /** Full charge of the appliance, lb. */
  fullCharge: number;
  additions: readonly RefrigerantAddition[];
  /** The day of the calculation (normally the day of the latest addition). */
  asOf: IsoDate;
  /** Rolling average only: date of the last successful follow-up verification test; additions after it count when it is later than the 365-day window start. */
  since?: IsoDate;
  /** Additions before this date are ignored by both methods (e.g. 40 CFR 84.106(b): from 2026-01-01). */
  countFrom?: IsoDate;
}

function readAdditions(additions: readonly RefrigerantAddition[]): Add[] {
  if (!Array.isArray(additions)) throw new RangeError('additions must be an array');
  const out: Add[] = [];
  additions.forEach((a, i) => {
    const r = readAddition(a, `additions[${i}]`);
    if (r) out.push(r);
  });
  return out.sort((a, b) => a.day - b.day);
}

/**
 * Leak rate in percent of full charge per year (40 CFR 82.152 "leak rate" [S]).
 *
 * - Annualizing: at the latest counted addition on or before `asOf` — the pounds of that day's
 *   additions (with every earlier addition sharing a `leakId` with them) ÷ full charge × 365 ÷
 *   min(days since the last addition before the leak's first, 365); 365 days when there is none. × 100.
 * - Rolling average: counted pounds added in the 365 days ending `asOf` (asOf − 364 … asOf
 *   inclusive), or only those dated after `since` when that is later, ÷ full charge × 100.
 *
 * Exempt additions are not counted. Returns 0 when nothing counts.
 */
export function leakRate(input: LeakRateInput): number {
  const fullCharge = exactDecimal(finitePositive(input.fullCharge, 'fullCharge'));
  const asOf = dayNumber(input.asOf, 'asOf');
  const countFrom = input.countFrom === undefined ? -Infinity : dayNumber(input.countFrom, 'countFrom');
  const adds = readAdditions(input.additions).filter((a) => a.day <= asOf);
  const method = readMethod(input.method);
  if (method === 'annualizing') {
    let latest = -Infinity;
    for (const a of adds) if (!a.exempt && a.day >= countFrom && a.day > latest) latest = a.day;
    if (latest === -Infinity) return 0;
    return annualizingAt(adds, latest, fullCharge, countFrom)?.value ?? 0;
  }
  const since = input.since === undefined ? -Infinity : dayNumber(input.since, 'since');
  return rollingAt(adds, asOf, fullCharge, countFrom, since).value;
}

export interface LeakRepairInput {
  appliance: Appliance;
  additions: readonly RefrigerantAddition[];
  asOf: IsoDate;
  /** Default 'annualizing'. One method for all appliances at a facility [S]. */
  method?: LeakRateMethod;
  /** Rolling average: last successful follow-up verification test. */
  since?: IsoDate;
  /** An industrial-process shutdown is needed for the repair (120 days, industrial-process refrigeration only). */
  industrialShutdown?: boolean;
}

export interface LeakRepairObligation {
  inScope: boolean;
  /** e.g. '40 CFR 82.157', '40 CFR 84.106'; null when out of scope. */
  rule: string | null;
  thresholdPercent: number | null;
  /** Percent per year at the latest counted addition (computed even out of scope). */
  leakRate: number;
  /** That rate is strictly over the threshold (exact: a rate equal to it is not over). */
  exceeds: boolean;
  /** Date of that addition + the repair days; null when not exceeding. */
  repairDueDate: IsoDate | null;
  /** Initial and follow-up verification tests are owed (whenever a repair is owed). */
  verificationRequired: boolean;
  /** 125 % or more of full charge added in the calendar year of `asOf` (up to asOf) under a rule with the chronic-leaker report. */
  chronic: boolean;
}

/**
 * The calculation at the latest addition on or before `asOf`, under the rule in force on `asOf`
 * (R-22 under 40 CFR 82 Subpart F; HFCs and HFC blends under 40 CFR 84.106 from 1 Jan 2026, and under
 * 82.157 from 1 Jan 2019 to 9 Apr 2020). It knows no repairs, so it answers only "does this addition
 * owe a repair?"; {@link leakObligations} keeps the obligations over the whole ledger.
 */
export function leakRepairObligation(input: LeakRepairInput): LeakRepairObligation {
  if (!Array.isArray(input.additions)) throw new RangeError('additions must be an array');
  const events: LedgerEvent[] = input.additions.map((a) => ({ ...a, kind: 'addition' as const }));
  const ev = evaluate(
    {
      appliance: input.appliance,
      events,
      asOf: input.asOf,
      method: input.method ?? 'annualizing',
      ...(input.industrialShutdown !== undefined ? { industrialShutdown: input.industrialShutdown } : {}),
    },
    input.since !== undefined ? { since: dayNumber(input.since, 'since') } : {},
  );
  const leakRateValue = ev.latest?.rate.value ?? 0;
  if (!ev.rule || ev.threshold === null) {
    return {
      inScope: false,
      rule: null,
      thresholdPercent: null,
      leakRate: leakRateValue,
      exceeds: false,
      repairDueDate: null,
      verificationRequired: false,
      chronic: false,
    };
  }
  const exceeds = ev.latest !== null && over(ev.latest.rate, ev.threshold);
  const repairDueDate =
    exceeds && ev.latest ? fromDayNumber(ev.latest.day + repairDaysFor(ev.rule, input.appliance.category, input.industrialShutdown)) : null;
  const chronic = ev.chronicYears.includes(Number(input.asOf.slice(0, 4)));
  return {
    inScope: true,
    rule: ev.rule.rule,
    thresholdPercent: ev.threshold,
    leakRate: leakRateValue,
    exceeds,
    repairDueDate,
    verificationRequired: exceeds,
    chronic,
  };
}
