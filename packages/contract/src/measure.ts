import { z } from 'zod';

/**
 * Units of refrigerant-circuit readings (docs/DESIGN.md §5, docs/UI.md "Units and numbers"). A branch reads in
 * one system: imperial (psig, °F) or SI (kPa(g), °C). Readings are stored in psig/°F; a body that
 * carries readings states its units, and every reading the API answers states the units of its values.
 */

export const unitSystemSchema = z.enum(['imperial', 'si'], { message: 'Choose imperial or SI units' });
export type UnitSystem = z.infer<typeof unitSystemSchema>;

/** Gauge pressure units (the tokens `@coilpath/calc` takes). */
export const pressureUnitSchema = z.enum(['psig', 'kPag'], { message: 'State the pressure unit: psig or kPag' });
export type PressureUnit = z.infer<typeof pressureUnitSchema>;

/** Temperature units (the tokens `@coilpath/calc` takes). */
export const temperatureUnitSchema = z.enum(['F', 'C'], { message: 'State the temperature unit: F or C' });
export type TemperatureUnit = z.infer<typeof temperatureUnitSchema>;

export interface ReadingUnits {
  pressure: PressureUnit;
  temperature: TemperatureUnit;
}

/** The units each system reads in. */
export const readingUnitsBySystem: Record<UnitSystem, ReadingUnits> = {
  imperial: { pressure: 'psig', temperature: 'F' },
  si: { pressure: 'kPag', temperature: 'C' },
};

/** The system a pair of units belongs to; null for a mixed pair (kPag with °F, psig with °C). */
export function unitSystemOf(units: ReadingUnits): UnitSystem | null {
  if (units.pressure === 'psig' && units.temperature === 'F') return 'imperial';
  if (units.pressure === 'kPag' && units.temperature === 'C') return 'si';
  return null;
}

/** The units a body's readings are in: one system, never mixed. */
export const readingUnitsSchema = z
  .strictObject({ pressure: pressureUnitSchema, temperature: temperatureUnitSchema })
  .refine((u) => unitSystemOf(u) !== null, {
    message: 'Pressure and temperature units must come from one system: psig with F, or kPag with C',
    path: ['temperature'],
  });

/** What a screen, an e-mail or a PDF prints after a value. */
export const pressureSymbols: Record<PressureUnit, string> = { psig: 'psig', kPag: 'kPa(g)' };
export const temperatureSymbols: Record<TemperatureUnit, string> = { F: '°F', C: '°C' };
/** A temperature *difference* (superheat, subcooling): °F in imperial, kelvin in SI. */
export const temperatureDifferenceSymbols: Record<TemperatureUnit, string> = { F: '°F', C: 'K' };
/** The unit of a pressure *difference* (sensor check, tolerance). */
export const pressureDifferenceSymbols: Record<PressureUnit, string> = { psig: 'psi', kPag: 'kPa' };

export type MeasureKind = 'pressure' | 'pressureDifference' | 'temperature' | 'temperatureDifference';

export function measureSymbol(kind: MeasureKind, units: ReadingUnits): string {
  switch (kind) {
    case 'pressure':
      return pressureSymbols[units.pressure];
    case 'pressureDifference':
      return pressureDifferenceSymbols[units.pressure];
    case 'temperature':
      return temperatureSymbols[units.temperature];
    case 'temperatureDifference':
      return temperatureDifferenceSymbols[units.temperature];
  }
}

/** "118.0 psig", "813.6 kPa(g)", "6.6 K": one decimal (a gauge's resolution) and the unit symbol. */
export function formatMeasure(value: number, kind: MeasureKind, units: ReadingUnits, digits = 1): string {
  const rounded = Number(value.toFixed(digits));
  return `${(Object.is(rounded, -0) ? 0 : rounded).toFixed(digits)} ${measureSymbol(kind, units)}`;
}

/**
 * The range a reading may have, in each system. The SI bounds are the imperial ones rounded outward
 * to whole units: a full vacuum (−14.7 psig ≈ −101.4 kPa(g)) to 1,000 psig (≈ 6,895 kPa(g));
 * −100 °F (≈ −73.3 °C) to 400 °F (≈ 204.4 °C).
 */
export const readingLimits: Record<UnitSystem, { pressure: { min: number; max: number }; temperature: { min: number; max: number } }> = {
  imperial: { pressure: { min: -14.7, max: 1000 }, temperature: { min: -100, max: 400 } },
  si: { pressure: { min: -101.4, max: 6900 }, temperature: { min: -74, max: 205 } },
};

/* ------------------------------------------------------------------ elevation */

/** Metres in one foot: the international foot, exactly 0.3048 m (1959 international yard and pound agreement). */
export const METRES_PER_FOOT = 0.3048;
export const feetToMetres = (ft: number) => ft * METRES_PER_FOOT;
export const metresToFeet = (m: number) => m / METRES_PER_FOOT;

/** A branch's elevation, metres: from the shore of the Dead Sea (about −430 m) to 5,000 m, inside the standard atmosphere's range. */
export const ELEVATION_LIMITS_M = { min: -500, max: 5000 } as const;
export const elevationMetersSchema = z.coerce
  .number({ message: 'Enter the elevation' })
  .min(ELEVATION_LIMITS_M.min, 'At least −500 m (−1,640 ft)')
  .max(ELEVATION_LIMITS_M.max, 'At most 5,000 m (16,404 ft)');

const grouped = (n: number) => Math.round(n).toLocaleString('en-US').replace('-', '−');

/** "1,609 m" for an SI branch; "5,280 ft (1,609 m)" for an imperial one. */
export function formatElevation(metres: number, system: UnitSystem): string {
  return system === 'imperial' ? `${grouped(metresToFeet(metres))} ft (${grouped(metres)} m)` : `${grouped(metres)} m`;
}

/**
 * What a screen says about readings computed at an elevation — "Gauge readings corrected for 1,609 m" —
 * or null at sea level (0 m), where nothing is corrected.
 */
export function elevationNote(metres: number | null | undefined, system: UnitSystem): string | null {
  if (metres === null || metres === undefined || metres === 0) return null;
  return `Gauge readings corrected for ${formatElevation(metres, system)} (standard atmosphere, ISO 2533).`;
}

/** The note for a set of saved readings, each computed at its own stored elevation (null when all were at 0 m). */
export function readingsElevationNote(readings: readonly { elevationMeters: number }[], system: UnitSystem): string | null {
  const at = [...new Set(readings.map((r) => r.elevationMeters).filter((m) => m !== 0))].sort((a, b) => a - b);
  if (at.length === 0) return null;
  if (at.length === 1) return elevationNote(at[0], system);
  return `Gauge readings corrected for the elevation each was taken at: ${at.map((m) => formatElevation(m, system)).join(', ')} (standard atmosphere, ISO 2533).`;
}
