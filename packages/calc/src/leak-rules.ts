/**
 * US EPA refrigerant leak-repair rules (40 CFR 82 Subpart F for ozone-depleting refrigerants, 40 CFR
 * 84 Subpart C for HFCs) kept as data in {@link LEAK_RULES}, one table, so a correction is one edit,
 * and the choice of the rule in force ({@link ruleInForce}). The computations over a unit's
 * refrigerant ledger (leak rate, obligations, chronic-leaker years) are in `leak-ledger.ts`.
 *
 * Source extract: docs/reference/LEAK-RULES.md, whose tags are kept here: [P] read in an official
 * text or a mirror, [S] seen only in a secondary source, [M] from memory. Check the current eCFR
 * before relying on an [S] or [M] item in the field.
 */
import { dayNumber, fromDayNumber, type IsoDate } from './dates';
import { assertRefrigerant, refrigerantInfo, type RefrigerantId } from './refrigerants';

export type ApplianceCategory = 'comfort_cooling' | 'commercial_refrigeration' | 'industrial_process' | 'other';
export const applianceCategories = ['comfort_cooling', 'commercial_refrigeration', 'industrial_process', 'other'] as const;

export type LeakRateMethod = 'annualizing' | 'rolling-average';
export const leakRateMethods = ['annualizing', 'rolling-average'] as const;

/** Why an addition is not counted toward the leak rate (82.157(b) [P]; 84.106 follows it [S]). */
export type AdditionExemption = 'installation' | 'retrofit' | 'seasonal-variance';
export const additionExemptions = ['installation', 'retrofit', 'seasonal-variance'] as const;

/** A refrigerant addition: the date and the pounds added. */
export interface RefrigerantAddition {
  date: IsoDate;
  pounds: number;
  /** Additions for the same leak share an id and are summed as one (82.152 "leak rate" [S]). */
  leakId?: string;
  /** Made immediately after an installation or a retrofit, or a seasonal variance: not counted (82.157(b) [P]). */
  exempt?: AdditionExemption;
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
  /** Residential and light-commercial air conditioning and heat pumps are left out of the rule. */
  excludesResidentialOrLightCommercial: boolean;
  /** Leak-rate thresholds, percent per year; repair is owed when the rate is strictly over. */
  thresholdPercent: Record<ApplianceCategory, number>;
  /** Days to repair after the addition that showed the rate over the threshold. */
  repairDays: number;
  /** Days to repair when an industrial-process shutdown is needed… */
  repairDaysWithShutdown: number;
  /** …which only these categories can claim. */
  shutdownCategories: readonly ApplianceCategory[];
  /** Follow-up verification test within this many days of a successful initial test. */
  followUpVerificationDays: number;
  /**
   * Chronic leaker: this percent of full charge or more added in a calendar year (≥, not >) must be
   * reported to EPA by 1 March of the next year; null where the rule has no such report.
   */
  chronicPercent: number | null;
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
    excludesResidentialOrLightCommercial: false,
    thresholdPercent: { commercial_refrigeration: 35, industrial_process: 35, comfort_cooling: 15, other: 15 },
    repairDays: 30, // [M]
    repairDaysWithShutdown: 120, // [M]
    shutdownCategories: ['industrial_process'], // [M]
    followUpVerificationDays: 10, // [M]
    // No chronic-leaker report before 2019: it is 82.157(j) of the 2016 rule, in force from
    // 1 Jan 2019 ([S] application note; EPA fact sheet P100PI79 [P]).
    chronicPercent: null,
    countFrom: null,
    sources: 'pre-2019 Subpart F: thresholds 35/35/15/15 and >50 lb [P]; section number and deadlines [M]; no chronic-leaker report [P]',
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
    excludesResidentialOrLightCommercial: false,
    thresholdPercent: { commercial_refrigeration: 20, industrial_process: 30, comfort_cooling: 10, other: 10 }, // 82.157(c)(2) [P]
    repairDays: 30, // 82.157(d) [M]
    repairDaysWithShutdown: 120, // 82.157(d) [M]: "if an industrial process shutdown is needed"
    shutdownCategories: ['industrial_process'],
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
    excludesResidentialOrLightCommercial: false,
    thresholdPercent: { commercial_refrigeration: 20, industrial_process: 30, comfort_cooling: 10, other: 10 }, // 82.157(c)(2) [P]
    repairDays: 30, // 82.157(d) [M]
    repairDaysWithShutdown: 120, // 82.157(d) [M]
    shutdownCategories: ['industrial_process'],
    followUpVerificationDays: 10, // 82.157(e) [M]
    chronicPercent: 125, // 82.157(j) [S], EPA fact sheet P100PI79 [P]
    countFrom: null,
    sources: '82.157(a),(c)(2) [P]; (d),(e) [M]; (j) [S]/[P]',
  },
  {
    // 89 FR 82682 (11 Oct 2024) [P]. Applicability 84.106(a) [S]: from 1 Jan 2026, 15 lb or more,
    // HFC or substitute with GWP > 53; residential and light-commercial air conditioning and heat
    // pumps excluded [S]. Thresholds 84.106(c)(2) [S] (hvacinsider). Deadlines (d),(e) [S]
    // (hixson-inc.com). Chronic leaker 84.106(j) [S/M]. 84.106(b): counts start 1 Jan 2026 [S/M].
    rule: '40 CFR 84.106',
    from: '2026-01-01',
    until: null,
    covers: 'hfc-gwp-over-53',
    minFullChargeLb: 15,
    minInclusive: true,
    excludesResidentialOrLightCommercial: true,
    thresholdPercent: { commercial_refrigeration: 20, industrial_process: 30, comfort_cooling: 10, other: 10 },
    repairDays: 30,
    repairDaysWithShutdown: 120, // 84.106(d) [S]: "with an industrial shutdown"
    shutdownCategories: ['industrial_process'],
    followUpVerificationDays: 10,
    chronicPercent: 125,
    countFrom: '2026-01-01',
    sources: '89 FR 82682 [P]; 84.106(a),(c)(2),(d),(e) [S]; (b),(j) [S/M]',
  },
];

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

function finitePositive(value: unknown, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new RangeError(`${what} must be a finite number greater than 0; got ${String(value)}`);
  }
  return value;
}

export interface RuleScopeOptions {
  /** Residential or light-commercial air conditioning or heat pump (left out of Part 84 [S]). */
  residentialOrLightCommercial?: boolean;
}

/** The rule governing this refrigerant and full charge on `date`, or null when none applies. */
export function ruleInForce(
  refrigerant: RefrigerantId | string,
  fullCharge: number,
  date: IsoDate,
  options?: RuleScopeOptions,
): LeakRule | null {
  const id = assertRefrigerant(refrigerant);
  const charge = finitePositive(fullCharge, 'fullCharge');
  const day = dayNumber(date, 'date');
  const residential = options?.residentialOrLightCommercial === true;
  for (const r of LEAK_RULES) {
    if (day < dayNumber(r.from) || (r.until !== null && day > dayNumber(r.until))) continue;
    if (!covers(r, id)) continue;
    if (residential && r.excludesResidentialOrLightCommercial) continue;
    const bigEnough = r.minInclusive ? charge >= r.minFullChargeLb : charge > r.minFullChargeLb;
    if (bigEnough) return r;
  }
  return null;
}

/**
 * Days to repair under `rule`: the longer window when an industrial-process shutdown is needed, for
 * a category that may claim it (industrial-process refrigeration only), else the normal window.
 */
export function repairDaysFor(rule: LeakRule, category: ApplianceCategory, industrialShutdown: boolean | undefined): number {
  return industrialShutdown === true && rule.shutdownCategories.includes(category) ? rule.repairDaysWithShutdown : rule.repairDays;
}

export interface Appliance {
  category: ApplianceCategory;
  /** Full charge, lb. */
  fullCharge: number;
  refrigerant: RefrigerantId | string;
  /** Residential or light-commercial air conditioning or heat pump: outside Part 84 [S]. */
  residentialOrLightCommercial?: boolean;
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
