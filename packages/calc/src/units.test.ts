import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { KPA_PER_PSI, saturationTemperature, subcooling, superheat } from './refrigerants';
import {
  cToF,
  convertPressure,
  convertTemperature,
  convertTemperatureDifference,
  fDeltaToK,
  fToC,
  kDeltaToF,
  kpaToPsi,
  psiToKpa,
} from './units';

const finite = fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true });

describe('pressure: psi ↔ kPa', () => {
  it('1 psi = 6.894757293168 kPa (NIST SP 811 (2008), B.8, 6.894 757 E+00; exact from 1 lbf = 4.448 221 615 260 5 N and 1 in = 0.0254 m)', () => {
    expect(psiToKpa(1)).toBeCloseTo(6.894757293168, 12);
    // The factor follows from the definitions: lbf in N over in² in m², in kPa.
    expect(KPA_PER_PSI).toBeCloseTo(4.4482216152605 / (0.0254 * 0.0254) / 1000, 12);
    expect(psiToKpa(100)).toBeCloseTo(689.4757293168, 9);
    expect(kpaToPsi(6.894757293168)).toBeCloseTo(1, 12);
  });

  it('a gauge pressure converts without an offset: 0 psig is 0 kPa(g), a vacuum stays negative', () => {
    expect(psiToKpa(0)).toBe(0);
    expect(kpaToPsi(0)).toBe(0);
    // −14.696 psig (a full vacuum against 14.696 psia) is −101.325 kPa(g) within 0.001 kPa.
    expect(psiToKpa(-14.696)).toBeCloseTo(-101.325, 3);
  });

  it('round-trips within floating-point rounding', () => {
    fc.assert(fc.property(finite, (p) => Math.abs(kpaToPsi(psiToKpa(p)) - p) <= 1e-12 * Math.max(1, Math.abs(p))));
    expect(convertPressure(118, 'psig', 'psig')).toBe(118);
    expect(convertPressure(118, 'psig', 'kPag')).toBe(psiToKpa(118));
    expect(convertPressure(813.6, 'kPag', 'psig')).toBe(kpaToPsi(813.6));
  });

  it('agrees with the saturation tables: the same pressure in psig and in kPa(g) gives the same saturation temperature', () => {
    // R-410A at 118 psig: dew point in °F and in °C from calc's own unit handling, against our conversions.
    const f = saturationTemperature('R-410A', 118);
    const c = saturationTemperature('R-410A', psiToKpa(118), { pressureUnit: 'kPag', temperatureUnit: 'C' });
    expect(c).toBeCloseTo(fToC(f), 3);
  });
});

describe('temperature: °F ↔ °C (NIST SP 811 (2008), B.9: t/°C = (t/°F − 32)/1.8)', () => {
  it('converts the fixed points of water and −40', () => {
    expect(fToC(32)).toBe(0);
    expect(fToC(212)).toBe(100);
    expect(fToC(-40)).toBe(-40);
    expect(cToF(0)).toBe(32);
    expect(cToF(100)).toBe(212);
    expect(cToF(-40)).toBe(-40);
    expect(fToC(98.6)).toBeCloseTo(37, 12);
  });

  it('round-trips within floating-point rounding', () => {
    fc.assert(fc.property(finite, (t) => Math.abs(cToF(fToC(t)) - t) <= 1e-9 * Math.max(1, Math.abs(t))));
    expect(convertTemperature(50, 'F', 'C')).toBe(fToC(50));
    expect(convertTemperature(10, 'C', 'F')).toBe(50);
    expect(convertTemperature(10, 'C', 'C')).toBe(10);
  });
});

describe('temperature difference: °F → K is × 5/9 with no offset (NIST SP 811 (2008), B.8: 1 °F interval = 5.555 556 E−01 K)', () => {
  it('a 9 °F superheat is 5 K, not (9 − 32) × 5/9', () => {
    expect(fDeltaToK(9)).toBe(5);
    expect(fDeltaToK(9)).not.toBeCloseTo(fToC(9), 3);
    expect(fDeltaToK(0)).toBe(0);
    expect(kDeltaToF(5)).toBe(9);
    expect(fDeltaToK(1)).toBeCloseTo(0.5555556, 7);
    expect(convertTemperatureDifference(18, 'F', 'C')).toBe(10);
    expect(convertTemperatureDifference(10, 'C', 'F')).toBe(18);
    expect(convertTemperatureDifference(10, 'C', 'C')).toBe(10);
  });

  it('is the difference of two converted temperatures', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -200, max: 400, noNaN: true }),
        fc.double({ min: -200, max: 400, noNaN: true }),
        (a, b) => Math.abs(fToC(a) - fToC(b) - fDeltaToK(a - b)) <= 1e-9,
      ),
    );
  });

  it('superheat and subcooling computed in kPa(g)/°C equal the psig/°F results × 5/9', () => {
    // R-410A, 118 psig suction, 52 °F line; 340 psig liquid, 95 °F line (check values from calc itself:
    // the point is that the SI path and the converted imperial path agree).
    const shF = superheat({ refrigerant: 'R-410A', suctionPressure: 118, suctionLineTemp: 52 });
    const shC = superheat({
      refrigerant: 'R-410A',
      suctionPressure: psiToKpa(118),
      suctionLineTemp: fToC(52),
      pressureUnit: 'kPag',
      temperatureUnit: 'C',
    });
    expect(shC.superheat).toBeCloseTo(fDeltaToK(shF.superheat), 3);
    expect(shC.saturationTemp).toBeCloseTo(fToC(shF.saturationTemp), 3);
    const scF = subcooling({ refrigerant: 'R-410A', liquidPressure: 340, liquidLineTemp: 95 });
    const scC = subcooling({
      refrigerant: 'R-410A',
      liquidPressure: psiToKpa(340),
      liquidLineTemp: fToC(95),
      pressureUnit: 'kPag',
      temperatureUnit: 'C',
    });
    expect(scC.subcooling).toBeCloseTo(fDeltaToK(scF.subcooling), 3);
  });
});
