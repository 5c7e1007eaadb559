/** Unit controller reading against a reference gauge. */
import { ATMOSPHERE_KPA, atmosphereFor, type PressureUnit } from './refrigerants';

/** Default percent tolerance (common practice, no source). */
export const DEFAULT_SENSOR_TOLERANCE_PERCENT = 3;
/** Default absolute tolerance in the reading's unit, meant for psi (common practice, no source). */
export const DEFAULT_SENSOR_TOLERANCE_ABSOLUTE = 5;

/**
 * What a controller's gauge value is measured against: `local` — a vented transducer that, like the
 * reference gauge, reads 0 at the air around it; `standard` — a sealed or absolute transducer that
 * reports gauge pressure against the standard 101.325 kPa whatever the altitude (above sea level it
 * reads low by the difference, about 2.6 psi at 1,600 m).
 */
export type ControllerPressureReference = 'local' | 'standard';

export interface SensorCheckInput {
  /** What the unit's controller shows. */
  controllerValue: number;
  /** What the technician's reference gauge shows on the same point. */
  referenceValue: number;
  /** Percent of the reference value; default 3 (common practice, no source). */
  tolerancePercent?: number;
  /** Absolute difference in the reading's unit; default 5 (psi; common practice, no source). */
  toleranceAbsolute?: number;
  /** Unit of both (gauge) values; default 'psig'. */
  pressureUnit?: PressureUnit;
  /** Local atmospheric pressure the reference gauge reads against, kPa; default 101.325 (sea level). */
  atmosphericPressureKPa?: number;
  /** Default 'local'. With 'standard' the controller's value is made absolute with 101.325 kPa, the reference's with the local atmosphere. */
  controllerReference?: ControllerPressureReference;
}

export interface SensorCheckResult {
  /** controller − reference, as absolute pressures (the same as the gauge difference when both read against one atmosphere). */
  difference: number;
  /** difference as a percent of the reference gauge value; null when the reference is 0. */
  percent: number | null;
  /** True when |difference| is within either the percent or the absolute tolerance (inclusive). */
  withinTolerance: boolean;
  /** The controller's value as absolute pressure (psia or kPa, by `pressureUnit`). */
  controllerAbsolute: number;
  /** The reference gauge's value as absolute pressure. */
  referenceAbsolute: number;
}

function finite(value: unknown, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) throw new RangeError(`${what} must be a finite number`);
  return value;
}

/**
 * Compares a controller reading with a reference gauge. `difference = controller − reference`;
 * `percent` is that difference as a percent of the reference. Within tolerance when inside either
 * bound (3 % or 5 psi by default — common practice, no source); the branch can set both.
 *
 * At altitude, give the local atmosphere: both values are turned into absolute pressure, the
 * reference against the local atmosphere and the controller against the local one too (`local`,
 * default) or against the standard atmosphere (`standard`). At sea level every result is as before.
 */
export function sensorCheck(input: SensorCheckInput): SensorCheckResult {
  const controller = finite(input.controllerValue, 'controllerValue');
  const reference = finite(input.referenceValue, 'referenceValue');
  const tolPct = finite(input.tolerancePercent ?? DEFAULT_SENSOR_TOLERANCE_PERCENT, 'tolerancePercent');
  const tolAbs = finite(input.toleranceAbsolute ?? DEFAULT_SENSOR_TOLERANCE_ABSOLUTE, 'toleranceAbsolute');
  if (tolPct < 0 || tolAbs < 0) throw new RangeError('tolerances must be zero or positive');
  const unit = input.pressureUnit ?? 'psig';
  const controllerReference = input.controllerReference ?? 'local';
  if (controllerReference !== 'local' && controllerReference !== 'standard') {
    throw new RangeError(`Unknown controllerReference ${JSON.stringify(controllerReference)}; valid: local, standard`);
  }
  const localAtm = atmosphereFor(unit, input.atmosphericPressureKPa);
  const controllerAtm = controllerReference === 'local' ? localAtm : atmosphereFor(unit, ATMOSPHERE_KPA);
  // The gauge difference plus the difference of the two zeros (exactly 0 at sea level or when both are local).
  const difference = controller - reference + (controllerAtm - localAtm);
  const percent = reference === 0 ? null : (difference / Math.abs(reference)) * 100;
  const abs = Math.abs(difference);
  // A tiny slack absorbs binary rounding (e.g. 103 − 100 against a 3 % bound).
  const slack = 1e-9 * Math.max(1, Math.abs(reference));
  const withinTolerance = abs <= tolAbs + slack || (percent !== null && Math.abs(percent) <= tolPct + 1e-9);
  return { difference, percent, withinTolerance, controllerAbsolute: controller + controllerAtm, referenceAbsolute: reference + localAtm };
}
