/**
 * Conversions between the two unit systems a branch can read in: psig / °F (imperial) and
 * kPa(g) / °C (SI). Pure arithmetic with the exact factors; no rounding (round at display).
 *
 * Sources: NIST Special Publication 811 (2008), Guide for the Use of the International System of
 * Units, Appendix B.8/B.9 — psi to kPa 6.894 757 (rounded there; exact from 1 lbf = 4.448 221 615 260 5 N
 * and 1 in = 0.0254 m), t/°C = (t/°F − 32)/1.8, and a temperature *interval* of 1 °F = 5/9 K.
 */
import { KPA_PER_PSI, type PressureUnit, type TemperatureUnit } from './refrigerants';

/**
 * psi → kPa. A gauge pressure (psig → kPa(g)) converts with the factor alone: both gauges read zero at
 * the same atmosphere, so there is no offset. Also right for a pressure difference.
 */
export function psiToKpa(psi: number): number {
  return psi * KPA_PER_PSI;
}

/** kPa → psi (gauge or difference; see `psiToKpa`). */
export function kpaToPsi(kpa: number): number {
  return kpa / KPA_PER_PSI;
}

/** A temperature °F → °C: (°F − 32) × 5/9. */
export function fToC(f: number): number {
  return ((f - 32) * 5) / 9;
}

/** A temperature °C → °F: °C × 9/5 + 32. */
export function cToF(c: number): number {
  return (c * 9) / 5 + 32;
}

/**
 * A temperature *difference* °F → K (the same as a difference in °C): × 5/9, no offset. Superheat,
 * subcooling and any "line − saturation" value convert this way, never with `fToC`.
 */
export function fDeltaToK(deltaF: number): number {
  return (deltaF * 5) / 9;
}

/** A temperature difference K (or °C) → °F: × 9/5, no offset. */
export function kDeltaToF(deltaK: number): number {
  return (deltaK * 9) / 5;
}

/** A gauge pressure (or difference) from one unit to another. */
export function convertPressure(value: number, from: PressureUnit, to: PressureUnit): number {
  if (from === to) return value;
  return from === 'psig' ? psiToKpa(value) : kpaToPsi(value);
}

/** A temperature from one unit to another (with the offset). */
export function convertTemperature(value: number, from: TemperatureUnit, to: TemperatureUnit): number {
  if (from === to) return value;
  return from === 'F' ? fToC(value) : cToF(value);
}

/** A temperature difference from one unit to another (no offset): °F ↔ K. */
export function convertTemperatureDifference(value: number, from: TemperatureUnit, to: TemperatureUnit): number {
  if (from === to) return value;
  return from === 'F' ? fDeltaToK(value) : kDeltaToF(value);
}
