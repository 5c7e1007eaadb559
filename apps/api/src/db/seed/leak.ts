/**
 * The leak-rate arithmetic the demo needs to keep its refrigerant log consistent with the leak rules
 * (reference/LEAK-RULES.md): every addition on a covered appliance either stays at or under its
 * threshold or has a leak case. The product's own computation lives in @coilpath/calc.
 */
import { daysFrom } from '@coilpath/calc';

export const PART84_FROM = '2026-01-01';

export interface CoveredBy {
  rule: '40 CFR 82.157' | '40 CFR 84.106';
  thresholdPercent: number;
}

interface LeakUnit {
  refrigerant: string;
  fullChargeLb: number;
  applianceCategory: string;
}

function threshold(category: string): number {
  if (category === 'commercial_refrigeration') return 20;
  if (category === 'industrial_process') return 30;
  return 10;
}

/**
 * Which rule covers an addition on `date`: Part 82 for an ODS appliance of 50 lb or more;
 * Part 84 from 2026-01-01 for an HFC or substitute with GWP > 53 (every refrigerant in the demo but
 * R-1234yf) and a full charge of 15 lb or more.
 */
export function coveredBy(unit: LeakUnit, date: string): CoveredBy | null {
  if (!unit.refrigerant || unit.fullChargeLb <= 0) return null;
  if (unit.refrigerant === 'R-22') {
    return unit.fullChargeLb >= 50 ? { rule: '40 CFR 82.157', thresholdPercent: threshold(unit.applianceCategory) } : null;
  }
  if (unit.refrigerant === 'R-1234yf') return null;
  if (date >= PART84_FROM && unit.fullChargeLb >= 15) {
    return { rule: '40 CFR 84.106', thresholdPercent: threshold(unit.applianceCategory) };
  }
  return null;
}

/**
 * Days in the annualizing method: days since the previous addition, capped at 365; 365 when there
 * was none, and (Part 84, 84.106(b)(1)) for the first calculation after 2026-01-01.
 */
export function annualizingDays(cover: CoveredBy, previousAddition: string | null, date: string): number {
  if (!previousAddition) return 365;
  if (cover.rule === '40 CFR 84.106' && previousAddition < PART84_FROM) return 365;
  return Math.min(Math.max(daysFrom(previousAddition, date), 1), 365);
}

/** lb added ÷ full charge × 365 ÷ days × 100. */
export function annualizedRate(poundsAdded: number, fullChargeLb: number, days: number): number {
  return (poundsAdded / fullChargeLb) * (365 / days) * 100;
}
