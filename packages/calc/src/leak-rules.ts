/**
 * US EPA refrigerant leak-rate and leak-repair rules (40 CFR 82 Subpart F for ozone-depleting
 * refrigerants, 40 CFR 84 Subpart C for HFCs). The rules are data in {@link LEAK_RULES}, one table,
 * so a correction is one edit. Source extract: shared/reference/LEAK-RULES.md, whose tags are kept
 * here: [P] read in an official text or a mirror, [S] seen only in a secondary source, [M] from
 * memory. Check the current eCFR before relying on an [S] or [M] item in the field.
 */
import { dayNumber, fromDayNumber, type IsoDate } from './dates';
import { assertRefrigerant, refrigerantInfo, type RefrigerantId } from './refrigerants';

export type ApplianceCategory = 'comfort_cooling' | 'commercial_refrigeration' | 'industrial_process' | 'other';
export const applianceCategories = ['comfort_cooling', 'commercial_refrigeration', 'industrial_process', 'other'] as const;

export type LeakRateMethod = 'annualizing' | 'rolling-average';

/** A refrigerant addition: the date and the pounds added. */
export interface RefrigerantAddition {
  date: IsoDate;
  pounds: number;
}

/** Which refrigerants a rule covers. */
export type RuleCoverage = 'ods' | 'ods-and-hfc' | 'hfc-gwp-over-53';

/** One leak-repair rule as data. */
export interface LeakRule {
  /** Readable id, e.g. '40 CFR 82.157'. */
  rule: string;
  /** First day in force (inclusive). */
  from: IsoDate;
  /** Last day in force (inclusive); null while still in force. */
  until: IsoDate | null;
  covers: RuleCoverage;
  /** Smallest full charge (lb) in scope. */
  minFullChargeLb: number;
  /** True when a charge equal to minFullChargeLb is in scope ("50 or more"), false for "more than 50". */
  minInclusive: boolean;
  /** Leak-rate thresholds, percent per year; repair is owed when the rate is strictly over. */
  thresholdPercent: Record<ApplianceCategory, number>;
  /** Days to repair after the addition that showed the rate over the threshold. */
  repairDays: number;
  /** Days to repair when an industrial-process shutdown is needed. */
  repairDaysWithShutdown: number;
  /** Follow-up verification test within this many days of a successful initial test. */
  followUpVerificationDays: number;
  /** Chronic leaker: this percent of full charge or more added in a calendar year (≥, not >). */
  chronicPercent: number;
  /** Additions before this date are not counted (Part 84 counts from its start). */
  countFrom: IsoDate | null;
  /** Where each item comes from, with LEAK-RULES.md's tags. */
  sources: string;
}

/**
 * The rule table (one place to correct). Order matters only for readability; at most one rule
 * covers a given refrigerant on a given date.
 */
export const LEAK_RULES: readonly LeakRule[] = [
  {
    // Section number from memory [M]; thresholds and "more than 50 pounds" [P]
    // (www3.epa.gov/ozone/title6/608/leak.html; fedcenter.gov id=30540; EPA fact sheet P100PI79).
    rule: '40 CFR 82.156(i)',
    from: '1900-01-01',
    until: '2018-12-31',
    covers: 'ods',
    minFullChargeLb: 50,
    minInclusive: false,
    thresholdPercent: { commercial_refrigeration: 35, industrial_process: 35, comfort_cooling: 15, other: 15 },
    repairDays: 30, // [M]
    repairDaysWithShutdown: 120, // [M]
    followUpVerificationDays: 10, // [M]
    chronicPercent: 125, // the chronic-leaker report began with the 2016 rule; kept for continuity [M]
    countFrom: null,
    sources: 'pre-2019 Subpart F: thresholds 35/35/15/15 and >50 lb [P]; section number and deadlines [M]',
  },
  {
    // 82.157(a) [P]: from 1 Jan 2019; substitutes (HFCs) were covered until the 2020 rescission
    // (85 FR 14150, effective 10 Apr 2020) [P]. Exempt substitutes (e.g. HFOs) are treated as out [M].
    rule: '40 CFR 82.157',
    from: '2019-01-01',
    until: '2020-04-09',
    covers: 'ods-and-hfc',
    minFullChargeLb: 50,
    minInclusive: true,
    thresholdPercent: { commercial_refrigeration: 20, industrial_process: 30, comfort_cooling: 10, other: 10 }, // 82.157(c)(2) [P]
    repairDays: 30, // 82.157(d) [M]
    repairDaysWithShutdown: 120, // 82.157(d) [M]
    followUpVerificationDays: 10, // 82.157(e) [M]
    chronicPercent: 125, // 82.157(j) [S], EPA fact sheet P100PI79 [P]
    countFrom: null,
    sources: '82.157(a),(c)(2) [P]; (d),(e) [M]; (j) [S]/[P]; 85 FR 14150 [P]',
  },
  {
    rule: '40 CFR 82.157',
    from: '2020-04-10',
    until: null,
    covers: 'ods',
    minFullChargeLb: 50,
    minInclusive: true,
    thresholdPercent: { commercial_refrigeration: 20, industrial_process: 30, comfort_cooling: 10, other: 10 }, // 82.157(c)(2) [P]
    repairDays: 30, // 82.157(d) [M]
    repairDaysWithShutdown: 120, // 82.157(d) [M]
    followUpVerificationDays: 10, // 82.157(e) [M]
    chronicPercent: 125, // 82.157(j) [S], EPA fact sheet P100PI79 [P]
    countFrom: null,
    sources: '82.157(a),(c)(2) [P]; (d),(e) [M]; (j) [S]/[P]',
  },
  {
    // 89 FR 82682 (11 Oct 2024) [P]. Applicability 84.106(a) [S]: from 1 Jan 2026, 15 lb or more,
    // HFC or substitute with GWP > 53. Thresholds 84.106(c)(2) [S] (hvacinsider). Deadlines (d),(e) [S]
    // (hixson-inc.com). Chronic leaker 84.106(j) [S/M]. 84.106(b): counts start 1 Jan 2026 [S/M].
    // Residential and light-commercial AC/heat pumps are excluded [S]; Coilpath's categories are
    // commercial, so that exclusion is left to the caller.
    rule: '40 CFR 84.106',
    from: '2026-01-01',
    until: null,
    covers: 'hfc-gwp-over-53',
    minFullChargeLb: 15,
    minInclusive: true,
    thresholdPercent: { commercial_refrigeration: 20, industrial_process: 30, comfort_cooling: 10, other: 10 },
    repairDays: 30,
    repairDaysWithShutdown: 120,
    followUpVerificationDays: 10,
    chronicPercent: 125,
    countFrom: '2026-01-01',
    sources: '89 FR 82682 [P]; 84.106(a),(c)(2),(d),(e) [S]; (b),(j) [S/M]',
  },
];

function finitePositive(value: unknown, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${what} must be a finite number greater than 0; got ${String(value)}`);
  }
  return value;
}

interface DayAddition {
  day: number;
  pounds: number;
}

function readAdditions(additions: readonly RefrigerantAddition[]): DayAddition[] {
  if (!Array.isArray(additions)) throw new RangeError('additions must be an array');
  return additions
    .map((a, i) => {
      const pounds = a?.pounds;
      if (typeof pounds !== 'number' || !Number.isFinite(pounds) || pounds < 0) {
        throw new RangeError(`additions[${i}].pounds must be a finite number of 0 or more`);
      }
      return { day: dayNumber(a.date, `additions[${i}].date`), pounds };
    })
    .sort((a, b) => a.day - b.day);
}

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

/**
 * Leak rate in percent of full charge per year (40 CFR 82.152 "leak rate" [S]).
 *
 * - Annualizing: the pounds added on the latest addition day on or before `asOf` (several additions
 *   on that day are summed) ÷ full charge × 365 ÷ min(days since the previous addition day, 365);
 *   365 days when there is no previous addition. × 100.
 * - Rolling average: pounds added in the 365 days ending `asOf` (asOf − 364 … asOf inclusive), or
 *   only those dated after `since` when that is later, ÷ full charge × 100.
 *
 * Returns 0 when nothing counts.
 */
export function leakRate(input: LeakRateInput): number {
  const fullCharge = finitePositive(input.fullCharge, 'fullCharge');
  const asOf = dayNumber(input.asOf, 'asOf');
  const countFrom = input.countFrom === undefined ? -Infinity : dayNumber(input.countFrom, 'countFrom');
  const list = readAdditions(input.additions).filter((a) => a.day <= asOf && a.day >= countFrom);
  if (input.method === 'annualizing') {
    const last = list[list.length - 1];
    if (!last) return 0;
    let pounds = 0;
    let prevDay: number | undefined;
    for (let i = list.length - 1; i >= 0; i--) {
      const a = list[i] as DayAddition;
      if (a.day === last.day) pounds += a.pounds;
      else {
        prevDay = a.day;
        break;
      }
    }
    const days = prevDay === undefined ? 365 : Math.min(last.day - prevDay, 365);
    return (pounds / fullCharge) * (365 / days) * 100;
  }
  if (input.method === 'rolling-average') {
    let start = asOf - 364;
    if (input.since !== undefined) start = Math.max(start, dayNumber(input.since, 'since') + 1);
    let pounds = 0;
    for (const a of list) if (a.day >= start) pounds += a.pounds;
    return (pounds / fullCharge) * 100;
  }
  throw new RangeError(`Unknown leak-rate method ${JSON.stringify(input.method)}; valid: annualizing, rolling-average`);
}

function covers(rule: LeakRule, id: RefrigerantId): boolean {
  const info = refrigerantInfo(id);
  switch (rule.covers) {
    case 'ods':
      return info.ozoneDepleting;
    case 'ods-and-hfc':
      // HFC substitutes and HFC-containing blends; a pure HFO is treated as an exempt substitute [M].
      return info.ozoneDepleting || info.family !== 'HFO';
    case 'hfc-gwp-over-53':
      return !info.ozoneDepleting && info.gwp > 53;
  }
}

/** The rule governing this refrigerant and full charge on `date`, or null when none applies. */
export function ruleInForce(refrigerant: RefrigerantId | string, fullCharge: number, date: IsoDate): LeakRule | null {
  const id = assertRefrigerant(refrigerant);
  const charge = finitePositive(fullCharge, 'fullCharge');
  const day = dayNumber(date, 'date');
  for (const r of LEAK_RULES) {
    if (day < dayNumber(r.from) || (r.until !== null && day > dayNumber(r.until))) continue;
    if (!covers(r, id)) continue;
    const bigEnough = r.minInclusive ? charge >= r.minFullChargeLb : charge > r.minFullChargeLb;
    if (bigEnough) return r;
  }
  return null;
}

export interface Appliance {
  category: ApplianceCategory;
  /** Full charge, lb. */
  fullCharge: number;
  refrigerant: RefrigerantId | string;
}

export interface LeakRepairInput {
  appliance: Appliance;
  additions: readonly RefrigerantAddition[];
  asOf: IsoDate;
  /** Default 'annualizing'. One method for all appliances at a facility [S]. */
  method?: LeakRateMethod;
  /** Rolling average: last successful follow-up verification test. */
  since?: IsoDate;
  /** An industrial-process shutdown is needed for the repair (repair window 120 days instead of 30). */
  industrialShutdown?: boolean;
}

export interface LeakRepairObligation {
  inScope: boolean;
  /** e.g. '40 CFR 82.157', '40 CFR 84.106'; null when out of scope. */
  rule: string | null;
  thresholdPercent: number | null;
  /** Percent per year by the chosen method (computed even out of scope). */
  leakRate: number;
  /** Strictly over the threshold (a rate exactly at it is not over). */
  exceeds: boolean;
  /** Date of the triggering addition + the repair days; null when not exceeding. */
  repairDueDate: IsoDate | null;
  /** Initial and follow-up verification tests are owed (whenever a repair is owed). */
  verificationRequired: boolean;
  /** In scope and 125 % or more of full charge added in the calendar year of `asOf` (up to asOf). */
  chronic: boolean;
}

/**
 * Leak-repair obligation under the rule in force on `asOf`: R-22 under 40 CFR 82 Subpart F, HFCs and
 * HFC blends under 40 CFR 84.106 from 1 Jan 2026 (and under 82.157 from 1 Jan 2019 to 9 Apr 2020).
 *
 * The triggering addition is the latest addition on or before `asOf` (the leak rate is calculated
 * each time refrigerant is added, 82.157(b) [P]); the repair is due 30 days after it (120 with an
 * industrial-process shutdown).
 */
export function leakRepairObligation(input: LeakRepairInput): LeakRepairObligation {
  const { appliance } = input;
  const method = input.method ?? 'annualizing';
  const fullCharge = finitePositive(appliance?.fullCharge, 'appliance.fullCharge');
  if (!(applianceCategories as readonly string[]).includes(appliance.category)) {
    throw new RangeError(`Unknown appliance category ${JSON.stringify(appliance.category)}; valid: ${applianceCategories.join(', ')}`);
  }
  const rule = ruleInForce(appliance.refrigerant, fullCharge, input.asOf);
  const rate = leakRate({
    method,
    fullCharge,
    additions: input.additions,
    asOf: input.asOf,
    ...(input.since !== undefined ? { since: input.since } : {}),
    ...(rule?.countFrom ? { countFrom: rule.countFrom } : {}),
  });
  if (!rule) {
    return { inScope: false, rule: null, thresholdPercent: null, leakRate: rate, exceeds: false, repairDueDate: null, verificationRequired: false, chronic: false };
  }
  const threshold = rule.thresholdPercent[appliance.category];
  const exceeds = rate > threshold;
  const asOf = dayNumber(input.asOf);
  const counted = readAdditions(input.additions).filter((a) => a.day <= asOf && (rule.countFrom === null || a.day >= dayNumber(rule.countFrom)));
  const trigger = counted[counted.length - 1];
  const repairDays = input.industrialShutdown ? rule.repairDaysWithShutdown : rule.repairDays;
  const repairDueDate = exceeds && trigger ? fromDayNumber(trigger.day + repairDays) : null;
  const year = input.asOf.slice(0, 4);
  const yearPounds = counted.filter((a) => fromDayNumber(a.day).startsWith(year)).reduce((s, a) => s + a.pounds, 0);
  const chronic = (yearPounds / fullCharge) * 100 >= rule.chronicPercent;
  return { inScope: true, rule: rule.rule, thresholdPercent: threshold, leakRate: rate, exceeds, repairDueDate, verificationRequired: exceeds, chronic };
}

/**
 * Verification-test deadlines after a repair: the initial test is due by the repair deadline, and
 * the follow-up test within 10 days of a successful initial test (82.157(e) [M], 84.106(e) [S]).
 */
export function verificationDeadlines(input: { repairDueDate: IsoDate; initialTestDate?: IsoDate; followUpDays?: number }): {
  initialTestDue: IsoDate;
  followUpDue: IsoDate | null;
} {
  dayNumber(input.repairDueDate, 'repairDueDate');
  const days = input.followUpDays ?? 10;
  return {
    initialTestDue: input.repairDueDate,
    followUpDue: input.initialTestDate === undefined ? null : fromDayNumber(dayNumber(input.initialTestDate, 'initialTestDate') + days),
  };
}
