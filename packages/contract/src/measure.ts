/**
 * Units of refrigerant-circuit readings (docs/DESIGN.md §5, docs/UI.md "Units and numbers"). A branch reads in
 * one system: imperial (psig, °F) or SI (kPa(g), °C). Readings are stored in psig/°F; a body that
 * carries readings states its units, and every reading the API answers states the units of its values.
 *
 * Free of zod, so a screen can print a measure without loading a schema; the schemas of these units and of
 * an elevation are in `measure-schemas.ts`.
 */

export const unitSystems = ['imperial', 'si'] as const;
export type UnitSystem = (typeof unitSystems)[number];

/** Gauge pressure units (the tokens `@coilpath/calc` takes). */
export const pressureUnits = ['psig', 'kPag'] as const;
export type PressureUnit = (typeof pressureUnits)[number];

/** Temperature units (the tokens `@coilpath/calc` takes). */
export const temperatureUnits = ['F', 'C'] as const;
export type TemperatureUnit = (typeof temperatureUnits)[number];

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

/** The pressure fields of a reading (gauge pressures, psig or kPa(g)). */
export const readingPressureFields = [
  'suctionPressure',
  'liquidPressure',
  'dischargePressure',
  'suctionPressureController',
  'liquidPressureController',
  'dischargePressureController',
] as const;
/** The temperature fields of a reading (°F or °C). */
export const readingTemperatureFields = ['suctionLineTemp', 'liquidLineTemp', 'outdoorTemp'] as const;
export type ReadingPressureField = (typeof readingPressureFields)[number];
export type ReadingTemperatureField = (typeof readingTemperatureFields)[number];

const withThousands = (n: number) => n.toLocaleString('en-US');

/**
 * The values of a body's readings outside the range of its units (`readingLimits`), each with what the screen
 * and the API say: "Below a full vacuum (−14.7 psig)", "Above 205 °C". None for a mixed pair of units (refused
 * on its own). The route's schema (`saveReadingsSchema`) and the Visit screen's form apply this one rule.
 */
export function readingRangeIssues(
  units: ReadingUnits,
  readings: readonly Partial<Record<ReadingPressureField | ReadingTemperatureField, number | null>>[],
): { index: number; field: ReadingPressureField | ReadingTemperatureField; message: string }[] {
  const system = unitSystemOf(units);
  if (!system) return [];
  const lim = readingLimits[system];
  const p = pressureSymbols[units.pressure];
  const t = temperatureSymbols[units.temperature];
  const issues: { index: number; field: ReadingPressureField | ReadingTemperatureField; message: string }[] = [];
  readings.forEach((r, index) => {
    for (const field of readingPressureFields) {
      const x = r[field];
      if (x === null || x === undefined) continue;
      if (x < lim.pressure.min) issues.push({ index, field, message: `Below a full vacuum (${withThousands(lim.pressure.min)} ${p})` });
      else if (x > lim.pressure.max) issues.push({ index, field, message: `Above ${withThousands(lim.pressure.max)} ${p}` });
    }
    for (const field of readingTemperatureFields) {
      const x = r[field];
      if (x === null || x === undefined) continue;
      if (x < lim.temperature.min)
        issues.push({ index, field, message: `Below ${withThousands(lim.temperature.min).replace('-', '−')} ${t}` });
      else if (x > lim.temperature.max) issues.push({ index, field, message: `Above ${withThousands(lim.temperature.max)} ${t}` });
    }
  });
  return issues;
}

/* ------------------------------------------------------------------ elevation */

/** Metres in one foot: the international foot, exactly 0.3048 m (1959 international yard and pound agreement). */
export const METRES_PER_FOOT = 0.3048;
export const feetToMetres = (ft: number) => ft * METRES_PER_FOOT;
export const metresToFeet = (m: number) => m / METRES_PER_FOOT;

/** A branch's elevation, metres: from the shore of the Dead Sea (about −430 m) to 5,000 m, inside the standard atmosphere's range. */
export const ELEVATION_LIMITS_M = { min: -500, max: 5000 } as const;
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
