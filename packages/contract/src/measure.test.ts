import { describe, expect, it } from 'vitest';
import {
  elevationNote,
  feetToMetres,
  formatElevation,
  formatMeasure,
  metresToFeet,
  readingsElevationNote,
  readingUnitsBySystem,
  unitSystemOf,
} from './measure';
import { elevationMetersSchema, readingUnitsSchema } from './measure-schemas';
import { saveReadingsSchema } from './visits';

const circuitId = '00000000-0000-4000-8000-000000000001';
const si = readingUnitsBySystem.si;
const imperial = readingUnitsBySystem.imperial;

function issues(body: unknown): { path: string; message: string }[] {
  const r = saveReadingsSchema.safeParse(body);
  return r.success ? [] : r.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
}

describe('reading units', () => {
  it('names the system of a pair, and null for a mixed pair', () => {
    expect(unitSystemOf({ pressure: 'psig', temperature: 'F' })).toBe('imperial');
    expect(unitSystemOf({ pressure: 'kPag', temperature: 'C' })).toBe('si');
    expect(unitSystemOf({ pressure: 'kPag', temperature: 'F' })).toBeNull();
    expect(unitSystemOf({ pressure: 'psig', temperature: 'C' })).toBeNull();
  });

  it('refuses a mixed pair, an unknown unit and extra keys', () => {
    expect(readingUnitsSchema.safeParse(si).success).toBe(true);
    expect(readingUnitsSchema.safeParse({ pressure: 'kPag', temperature: 'F' }).error?.issues[0]?.message).toMatch(/one system/);
    expect(readingUnitsSchema.safeParse({ pressure: 'bar', temperature: 'C' }).error?.issues[0]?.message).toBe(
      'State the pressure unit: psig or kPag',
    );
    expect(readingUnitsSchema.safeParse({ pressure: 'kPag', temperature: 'K' }).error?.issues[0]?.message).toBe(
      'State the temperature unit: F or C',
    );
    expect(readingUnitsSchema.safeParse({ ...si, system: 'si' }).success).toBe(false);
  });

  it('formats a value with one decimal and its symbol', () => {
    expect(formatMeasure(118, 'pressure', imperial)).toBe('118.0 psig');
    expect(formatMeasure(813.58, 'pressure', si)).toBe('813.6 kPa(g)');
    expect(formatMeasure(4.44, 'temperature', si)).toBe('4.4 °C');
    expect(formatMeasure(6.55, 'temperatureDifference', si, 2)).toBe('6.55 K');
    expect(formatMeasure(11.8, 'temperatureDifference', imperial)).toBe('11.8 °F');
    expect(formatMeasure(-0.04, 'pressureDifference', si)).toBe('0.0 kPa');
  });
});

describe('saveReadingsSchema', () => {
  it('needs the units stated', () => {
    expect(issues({ readings: [{ circuitId, suctionPressure: 118 }] }).map((i) => i.path)).toContain('units');
  });

  it('checks each value against the range in the stated units', () => {
    // 1,000 psig and 6,900 kPa(g) are the tops; 400 °F and 205 °C.
    expect(issues({ units: imperial, readings: [{ circuitId, dischargePressure: 1000, liquidLineTemp: 400 }] })).toEqual([]);
    expect(issues({ units: si, readings: [{ circuitId, dischargePressure: 6900, liquidLineTemp: 205 }] })).toEqual([]);
    // 6,000 is a fine kPa(g) but no psig gauge reads it.
    expect(issues({ units: imperial, readings: [{ circuitId, dischargePressure: 6000 }] })).toEqual([
      { path: 'readings.0.dischargePressure', message: 'Above 1,000 psig' },
    ]);
    expect(issues({ units: si, readings: [{ circuitId, dischargePressure: 7000, suctionLineTemp: 250, outdoorTemp: -80 }] })).toEqual([
      { path: 'readings.0.dischargePressure', message: 'Above 6,900 kPa(g)' },
      { path: 'readings.0.suctionLineTemp', message: 'Above 205 °C' },
      { path: 'readings.0.outdoorTemp', message: 'Below −74 °C' },
    ]);
    expect(issues({ units: si, readings: [{ circuitId, suctionPressure: -102 }] })[0]?.message).toMatch(/^Below a full vacuum/);
    // −20 psig is past a full vacuum; −20 kPa(g) is a shallow vacuum.
    expect(issues({ units: imperial, readings: [{ circuitId, suctionPressure: -20 }] })).toHaveLength(1);
    expect(issues({ units: si, readings: [{ circuitId, suctionPressure: -20 }] })).toEqual([]);
  });

  it('refuses mixed units and the same circuit twice', () => {
    expect(issues({ units: { pressure: 'kPag', temperature: 'F' }, readings: [{ circuitId, suctionPressure: 800 }] })).toEqual([
      { path: 'units.temperature', message: 'Pressure and temperature units must come from one system: psig with F, or kPag with C' },
    ]);
    expect(issues({ units: si, readings: [{ circuitId }, { circuitId }] }).map((i) => i.message)).toEqual(['Each circuit may appear once']);
  });
});

describe('elevation', () => {
  it('converts with the international foot: 5,280 ft (a statute mile) is 1,609.344 m exactly (1959 agreement: 1 ft = 0.3048 m)', () => {
    expect(feetToMetres(5280)).toBeCloseTo(1609.344, 9);
    expect(metresToFeet(1609.344)).toBeCloseTo(5280, 9);
  });
  it('shows feet for an imperial branch and metres for an SI one, and says nothing at sea level', () => {
    expect(formatElevation(1609, 'si')).toBe('1,609 m');
    expect(formatElevation(1609.344, 'imperial')).toBe('5,280 ft (1,609 m)');
    expect(elevationNote(1609, 'si')).toBe('Gauge readings corrected for 1,609 m (standard atmosphere, ISO 2533).');
    expect(elevationNote(0, 'imperial')).toBeNull();
    expect(readingsElevationNote([{ elevationMeters: 0 }, { elevationMeters: 1609 }], 'si')).toContain('corrected for 1,609 m');
    expect(readingsElevationNote([{ elevationMeters: 0 }], 'si')).toBeNull();
  });
  it('takes −500 m to 5,000 m and refuses beyond', () => {
    expect(elevationMetersSchema.parse('1609')).toBe(1609);
    expect(elevationMetersSchema.safeParse(5001).success).toBe(false);
    expect(elevationMetersSchema.safeParse(-501).success).toBe(false);
    expect(elevationMetersSchema.safeParse('high').success).toBe(false);
  });
});
