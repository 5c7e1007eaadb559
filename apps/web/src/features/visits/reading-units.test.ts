import { describe, expect, it } from 'vitest';
import { readingUnitsBySystem, type ReadingDto } from '@coilpath/contract';
import {
  computeLive,
  convertEntries,
  entriesFromReading,
  fieldLabel,
  parseEntry,
  readingsForm,
  sensorCheckView,
  toggleSign,
} from './reading-units';

const si = readingUnitsBySystem.si;
const imperial = readingUnitsBySystem.imperial;
const branch = { sensorTolerancePercent: 3, sensorToleranceAbsolute: 5 };
const C1 = '00000000-0000-4000-8000-000000000001';

/** The number in "Superheat 6.6 K". */
const figure = (text: string) => Number(/(-?\d+(\.\d+)?)/.exec(text)![1]);

describe('field labels', () => {
  it('name the unit the field takes', () => {
    expect(fieldLabel('suctionPressure', 'circuit 1', imperial)).toBe('Suction pressure, circuit 1 (psig)');
    expect(fieldLabel('suctionPressure', 'circuit 1', si)).toBe('Suction pressure, circuit 1 (kPa(g))');
    expect(fieldLabel('liquidLineTemp', 'RTU-2 circuit 2', si)).toBe('Liquid line temperature, RTU-2 circuit 2 (°C)');
    expect(fieldLabel('outdoorTemp', 'circuit 1', imperial)).toBe('Outdoor air temperature, circuit 1 (°F)');
  });
});

describe('typed values', () => {
  it('reads a comma as the decimal mark, a Unicode minus as minus, and a lone minus as not yet typed', () => {
    expect(parseEntry('4,5')).toBe(4.5);
    expect(parseEntry('−4.5')).toBe(-4.5);
    expect(parseEntry('-')).toBeNull();
    expect(parseEntry('')).toBeNull();
    expect(parseEntry('12a')).toBeNaN();
  });

  it('flips the sign for the ± key', () => {
    expect(toggleSign('4.5')).toBe('-4.5');
    expect(toggleSign('-4.5')).toBe('4.5');
    expect(toggleSign('')).toBe('-');
  });

  it('moves a draft typed in psig/°F to kPa(g)/°C (1 psi = 6.894757293168 kPa, NIST SP 811; °C = (°F − 32) × 5/9)', () => {
    const moved = convertEntries(
      { suctionPressure: '118', suctionLineTemp: '50', outdoorTemp: '14', notes: 'x', liquidPressure: 'abc' },
      imperial,
      si,
    );
    expect(moved).toEqual({ suctionPressure: '813.58', suctionLineTemp: '10', outdoorTemp: '-10', notes: 'x', liquidPressure: 'abc' });
    expect(convertEntries({ suctionPressure: '813.58' }, si, imperial)).toEqual({ suctionPressure: '118' });
    const same = { suctionPressure: '118' };
    expect(convertEntries(same, imperial, imperial)).toBe(same);
  });

  it('fills the form with a saved reading exactly as the API gives it', () => {
    const r = { suctionPressure: 765.3, suctionLineTemp: 4.4, liquidPressure: null, outdoorTemp: -4.5 } as unknown as ReadingDto;
    expect(entriesFromReading(r)).toEqual({ suctionPressure: '765.3', suctionLineTemp: '4.4', outdoorTemp: '-4.5' });
  });
});

describe('live superheat and subcooling', () => {
  // Check values: tests/reference/data/refrigerant-saturation.json (CoolProp 8.0.0), R-410A:
  // 111.5 psig = 768.8 kPa(g): dew 36.93 °F = 2.74 °C; 349.9 psig = 2412.5 kPa(g): bubble 106.66 °F = 41.48 °C.
  it('computes in kPa(g)/°C and gives superheat and subcooling in K', () => {
    const [sh, sc] = computeLive(
      'R-410A',
      { suctionPressure: '768.8', suctionLineTemp: '9.3', liquidPressure: '2412.5', liquidLineTemp: '35.8' },
      si,
    );
    expect(sh!.text).toMatch(/^Superheat \d+\.\d K$/);
    expect(Math.abs(figure(sh!.text) - (9.3 - 2.74))).toBeLessThanOrEqual(0.1);
    expect(sh!.detail).toMatch(/^line 9\.3 °C − dew 2\.7 °C$/);
    expect(sc!.text).toMatch(/^Subcooling \d+\.\d K$/);
    expect(Math.abs(figure(sc!.text) - (41.48 - 35.8))).toBeLessThanOrEqual(0.1);
    expect(sc!.detail).toMatch(/^bubble 41\.[45] °C − line 35\.8 °C$/);
  });

  it('in psig/°F is unchanged: °F, and the SI result is the imperial one × 5/9 (a difference, no offset)', () => {
    const [shF] = computeLive('R-410A', { suctionPressure: '111.5', suctionLineTemp: '48.7' }, imperial);
    expect(shF!.text).toMatch(/^Superheat \d+\.\d °F$/);
    expect(Math.abs(figure(shF!.text) - (48.7 - 36.93))).toBeLessThanOrEqual(0.1);
    const [shK] = computeLive(
      'R-410A',
      { suctionPressure: String(111.5 * 6.894757293168), suctionLineTemp: String(((48.7 - 32) * 5) / 9) },
      si,
    );
    expect(Math.abs(figure(shK!.text) - (figure(shF!.text) * 5) / 9)).toBeLessThanOrEqual(0.06);
  });

  it('at a branch 1,609 m up reads the gauge against the ISA atmosphere there: the reference point’s dew, not sea level’s', () => {
    // ISA / ISO 2533 table [S] (tests/reference/atmosphere.test.ts): 1,600 m 83.5235 kPa, 2,000 m 79.4952 kPa,
    // log-linear to 1,609 m: 83.4306 kPa = 12.100 psia. 111.5 psig at 14.696 psia (126.196 psia) has dew 36.93 °F
    // (CoolProp reference above); on a gauge at 1,609 m that absolute pressure reads 111.5 + 14.696 − 12.100 psig.
    const atm = (83.5235 * Math.exp((Math.log(79.4952 / 83.5235) * 9) / 400)) / 6.894757293168;
    const gauge = String(111.5 + 14.696 - atm);
    const [high] = computeLive('R-410A', { suctionPressure: gauge, suctionLineTemp: '48.7' }, imperial, 1609);
    expect(Math.abs(figure(high!.text) - (48.7 - 36.93))).toBeLessThanOrEqual(0.1);
    const [sea] = computeLive('R-410A', { suctionPressure: gauge, suctionLineTemp: '48.7' }, imperial);
    expect(figure(high!.text) - figure(sea!.text)).toBeGreaterThan(1);
  });

  it('says the table range in the branch’s units when a pressure is outside it', () => {
    const [sh] = computeLive('R-410A', { suctionPressure: '40000', suctionLineTemp: '10' }, si);
    expect(sh).toMatchObject({ text: 'Superheat cannot be computed', error: true });
    expect(sh!.detail).toMatch(/^R-410A table covers -?[\d.]+ kPa\(g\) to [\d.]+ kPa\(g\)$/);
  });
});

describe('sensor check in the branch’s units', () => {
  it('converts the branch’s 5 psi tolerance to 34.5 kPa, so a 30 kPa gap is within and a 40 kPa gap is not', () => {
    // Reference 2,000 kPa(g): 3 % is 60 kPa, so use a low pressure where the absolute bound decides.
    const within = sensorCheckView(330, 300, si, branch)!;
    expect(within.withinTolerance).toBe(true); // 30 kPa < 34.47 kPa (the 10 % gap is over 3 %)
    expect(within.difference).toBe('+30.0 kPa, 10.0 %');
    expect(within.allowed).toBe('34.5 kPa or 3 %');
    const outside = sensorCheckView(260, 300, si, branch)!;
    expect(outside.withinTolerance).toBe(false); // 40 kPa > 34.47 kPa and 13.3 % > 3 %
    expect(outside.difference).toBe('−40.0 kPa, 13.3 %');
  });

  it('gives the same verdict as the same gauges read in psig', () => {
    for (const [c, r] of [
      [330, 300],
      [260, 300],
      [2050, 2000],
      [2100, 2000],
      [-20, -10],
    ] as const) {
      const k = 6.894757293168;
      expect(sensorCheckView(c, r, si, branch)!.withinTolerance).toBe(sensorCheckView(c / k, r / k, imperial, branch)!.withinTolerance);
    }
    expect(sensorCheckView(104, 100, imperial, branch)).toMatchObject({
      withinTolerance: true,
      difference: '+4.0 psi, 4.0 %',
      allowed: '5 psi or 3 %',
    });
    expect(sensorCheckView(null, 100, imperial, branch)).toBeNull();
  });
});

describe('the body sent to the API', () => {
  it('states the units and carries what was typed', () => {
    const f = readingsForm([C1], () => ({ suctionPressure: '768.8', suctionLineTemp: '-4,5' }), si);
    expect(f.errors).toEqual({});
    expect(f.body).toEqual({
      units: { pressure: 'kPag', temperature: 'C' },
      readings: [{ circuitId: C1, suctionPressure: 768.8, suctionLineTemp: -4.5 }],
    });
  });

  it('marks values out of range in the stated units and sends nothing', () => {
    const f = readingsForm([C1], () => ({ suctionLineTemp: '250', dischargePressure: '7000', liquidPressure: 'x' }), si);
    expect(f.body).toBeNull();
    expect(f.errors).toEqual({
      [`${C1}.liquidPressure`]: 'Enter a number',
      [`${C1}.dischargePressure`]: 'Above 6,900 kPa(g)',
      [`${C1}.suctionLineTemp`]: 'Above 205 °C',
    });
    // 250 is a fine °F line temperature.
    expect(readingsForm([C1], () => ({ suctionLineTemp: '250' }), imperial).errors).toEqual({});
  });

  it('sends nothing when nothing is typed', () => {
    expect(readingsForm([C1], () => ({}), si)).toEqual({ body: null, errors: {} });
  });
});
