/** Unit controller reading against a reference gauge. */

/** Default percent tolerance (common practice, no source). */
export const DEFAULT_SENSOR_TOLERANCE_PERCENT = 3;
/** Default absolute tolerance in the reading's unit, meant for psi (common practice, no source). */
export const DEFAULT_SENSOR_TOLERANCE_ABSOLUTE = 5;

export interface SensorCheckInput {
  /** What the unit's controller shows. */
  controllerValue: number;
  /** What the technician's reference gauge shows on the same point. */
  referenceValue: number;
  /** Percent of the reference value; default 3 (common practice, no source). */
  tolerancePercent?: number;
  /** Absolute difference in the reading's unit; default 5 (psi; common practice, no source). */
  toleranceAbsolute?: number;
}

export interface SensorCheckResult {
  /** controller − reference. */
  difference: number;
  /** difference as a percent of the reference; null when the reference is 0. */
  percent: number | null;
  /** True when |difference| is within either the percent or the absolute tolerance (inclusive). */
  withinTolerance: boolean;
}

function finite(value: unknown, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new RangeError(`${what} must be a finite number`);
  return value;
}

/**
 * Compares a controller reading with a reference gauge. `difference = controller − reference`;
 * `percent` is that difference as a percent of the reference. Within tolerance when inside either
 * bound (3 % or 5 psi by default — common practice, no source); the branch can set both.
 */
export function sensorCheck(input: SensorCheckInput): SensorCheckResult {
  const controller = finite(input.controllerValue, 'controllerValue');
  const reference = finite(input.referenceValue, 'referenceValue');
  const tolPct = finite(input.tolerancePercent ?? DEFAULT_SENSOR_TOLERANCE_PERCENT, 'tolerancePercent');
  const tolAbs = finite(input.toleranceAbsolute ?? DEFAULT_SENSOR_TOLERANCE_ABSOLUTE, 'toleranceAbsolute');
  if (tolPct < 0 || tolAbs < 0) throw new RangeError('tolerances must be zero or positive');
  const difference = controller - reference;
  const percent = reference === 0 ? null : (difference / Math.abs(reference)) * 100;
  const abs = Math.abs(difference);
  // A tiny slack absorbs binary rounding (e.g. 103 − 100 against a 3 % bound).
  const slack = 1e-9 * Math.max(1, Math.abs(reference));
  const withinTolerance = abs <= tolAbs + slack || (percent !== null && Math.abs(percent) <= tolPct + 1e-9);
  return { difference, percent, withinTolerance };
}
