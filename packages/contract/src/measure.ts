import { z } from 'zod';

/**
 * Units of refrigerant-circuit readings (DESIGN §5, UI.md "Units and numbers"). A branch reads in
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
