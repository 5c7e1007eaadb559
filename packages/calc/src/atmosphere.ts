/**
 * The local atmosphere that gauges read against. A refrigerant gauge reads pressure above the air
 * around it; the saturation tables are in absolute pressure, so a reading taken at altitude needs the
 * local atmosphere, not sea level's 101.325 kPa.
 *
 * The ISA / ISO 2533 standard atmosphere, troposphere layer (temperature 288.15 K falling 6.5 K/km
 * from 101.325 kPa at sea level): p = 101.325 · (1 − 2.25577 × 10⁻⁵ · h)^5.25588 kPa, h in metres.
 * The constants are the rounded ISA ones (0.0065 / 288.15 and g₀·M / (R*·L)). ISO 2533 tabulates
 * pressure against geopotential height; a site's elevation (geometric, from a map) is used here as
 * that height directly, which changes the result by less than 0.02 kPa (0.003 psi) below 3,000 m.
 * This is the standard atmosphere, not the day's weather: a barometer reading, when known, is better.
 */

import { ATMOSPHERE_KPA } from './refrigerants';

/** Sea-level pressure of the standard atmosphere, kPa (ISO 2533; also the gauge zero Coilpath assumes by default). */
export const STANDARD_SEA_LEVEL_KPA = ATMOSPHERE_KPA;

/** Lowest and highest elevation the troposphere formula is used for, metres (ISO 2533 starts at −2,000 m; the layer ends at 11,000 m). */
export const ATMOSPHERE_ELEVATION_RANGE_M = { min: -2000, max: 11000 } as const;

/**
 * Standard-atmosphere pressure at an elevation, kPa (ISA / ISO 2533 troposphere). `RangeError` for a
 * value that is not a finite number between −2,000 m and 11,000 m.
 */
export function atmosphericPressureAt(elevationMeters: number): number {
  const { min, max } = ATMOSPHERE_ELEVATION_RANGE_M;
  if (typeof elevationMeters !== 'number' || !Number.isFinite(elevationMeters) || elevationMeters < min || elevationMeters > max) {
    throw new RangeError(`Elevation must be a finite number of metres from ${min} to ${max}; got ${String(elevationMeters)}`);
  }
  return STANDARD_SEA_LEVEL_KPA * Math.pow(1 - 2.25577e-5 * elevationMeters, 5.25588);
}
