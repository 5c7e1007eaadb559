/**
 * A circuit's target range (the manufacturer's target superheat or subcooling, from the nameplate or the
 * installation manual) and where a computed value lies against it. Values and bounds are temperature
 * differences in one unit (°F or K) — the caller converts both the same way.
 *
 * The rule, defined once: the value and both bounds are compared as they are shown, rounded to
 * `decimals` places (one by default, the resolution every screen prints superheat and subcooling at),
 * and the bounds are inclusive. So a superheat shown as "8.0 °F" against "8.0–12.0 °F" is within,
 * "7.9 °F" is below and "12.1 °F" is above — never a verdict that contradicts the figures on screen.
 * The verdict is guidance only: the manufacturer's charging data and licensed practice decide.
 */

export interface TargetRange {
  min: number;
  max: number;
}

export type TargetVerdict = 'below' | 'within' | 'above';

/** Rounded as a screen prints it (`toFixed`, as `formatMeasure` in @coilpath/contract does). */
const roundTo = (value: number, decimals: number) => Number(value.toFixed(decimals));

/** True when `min ≤ max`, both finite. */
export function isTargetRange(range: { min: number; max: number }): boolean {
  return Number.isFinite(range.min) && Number.isFinite(range.max) && range.min <= range.max;
}

/**
 * Below, within or above `range` (inclusive bounds, compared at `decimals` places); null when there is no
 * range or no finite value.
 */
export function targetVerdict(value: number | null | undefined, range: TargetRange | null | undefined, decimals = 1): TargetVerdict | null {
  if (range == null || value == null || !Number.isFinite(value)) return null;
  if (!isTargetRange(range)) throw new RangeError(`A target range needs min ≤ max (got ${range.min}–${range.max})`);
  const v = roundTo(value, decimals);
  if (v < roundTo(range.min, decimals)) return 'below';
  if (v > roundTo(range.max, decimals)) return 'above';
  return 'within';
}
