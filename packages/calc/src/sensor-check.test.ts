import { describe, expect, it } from 'vitest';
import { atmosphericPressureAt } from './atmosphere';
import { KPA_PER_PSI } from './refrigerants';
import { sensorCheck } from './sensor-check';

describe('sensorCheck', () => {
  it('controller 369 psig vs reference 376 psig is a slight difference, within tolerance (common practice, no source)', () => {
    const r = sensorCheck({ controllerValue: 369, referenceValue: 376 });
    expect(r.difference).toBe(-7);
    expect(r.percent).toBeCloseTo((-7 / 376) * 100, 10);
    expect(r.withinTolerance).toBe(true);
  });

  it('is within when inside either bound, and outside when beyond both', () => {
    expect(sensorCheck({ controllerValue: 104, referenceValue: 100 }).withinTolerance).toBe(true); // 4 psi < 5
    expect(sensorCheck({ controllerValue: 406, referenceValue: 400 }).withinTolerance).toBe(true); // 1.5 %
    expect(sensorCheck({ controllerValue: 106, referenceValue: 100 }).withinTolerance).toBe(false); // 6 psi, 6 %
    expect(sensorCheck({ controllerValue: 103, referenceValue: 100, toleranceAbsolute: 0 }).withinTolerance).toBe(true); // exactly 3 %
    expect(sensorCheck({ controllerValue: 103.5, referenceValue: 100, toleranceAbsolute: 0 }).withinTolerance).toBe(false);
    expect(sensorCheck({ controllerValue: 105, referenceValue: 50, tolerancePercent: 0 }).withinTolerance).toBe(false);
    expect(sensorCheck({ controllerValue: 55, referenceValue: 50, tolerancePercent: 0 }).withinTolerance).toBe(true); // exactly 5
  });

  it('reports percent null for a zero reference', () => {
    const r = sensorCheck({ controllerValue: 2, referenceValue: 0 });
    expect(r.percent).toBeNull();
    expect(r.withinTolerance).toBe(true);
  });

  it('rejects non-numbers and negative tolerances', () => {
    expect(() => sensorCheck({ controllerValue: Number.NaN, referenceValue: 1 })).toThrow(RangeError);
    expect(() => sensorCheck({ controllerValue: 1, referenceValue: 1, tolerancePercent: -1 })).toThrow(RangeError);
  });

  describe('at altitude (atmosphericPressureKPa)', () => {
    const denver = atmosphericPressureAt(1609); // ≈ 83.43 kPa, 12.10 psia
    const psiLow = 14.696 - denver / KPA_PER_PSI; // ≈ 2.595 psi

    it('gives exactly the sea-level results by default and at 101.325 kPa, whatever the controller reference', () => {
      for (const [c, r] of [
        [369, 376],
        [103, 100],
        [2, 0],
        [118.37, 121.9],
      ] as const) {
        const base = sensorCheck({ controllerValue: c, referenceValue: r });
        for (const controllerReference of ['local', 'standard'] as const) {
          const same = sensorCheck({ controllerValue: c, referenceValue: r, atmosphericPressureKPa: 101.325, controllerReference });
          expect(same).toEqual(base);
        }
        expect(base.difference).toBe(c - r);
        expect(base.referenceAbsolute).toBe(r + 14.696);
      }
    });

    it('a vented controller (local, the default) compares as at sea level; both become absolute against the local atmosphere', () => {
      const r = sensorCheck({ controllerValue: 120, referenceValue: 118, atmosphericPressureKPa: denver });
      expect(r.difference).toBe(2);
      expect(r.referenceAbsolute).toBeCloseTo(118 + denver / KPA_PER_PSI, 10);
      expect(r.controllerAbsolute - r.referenceAbsolute).toBeCloseTo(2, 10);
    });

    it('a sealed controller (standard) reads low by the atmosphere difference: 115.405 psig against 118 psig is no difference at 1,609 m', () => {
      const r = sensorCheck({
        controllerValue: 118 - psiLow,
        referenceValue: 118,
        atmosphericPressureKPa: denver,
        controllerReference: 'standard',
        toleranceAbsolute: 0,
        tolerancePercent: 0,
      });
      expect(r.difference).toBeCloseTo(0, 10);
      expect(r.withinTolerance).toBe(true);
      expect(r.controllerAbsolute).toBeCloseTo(r.referenceAbsolute, 10);
      // the same pair compared as vented shows the whole 2.6 psi
      expect(sensorCheck({ controllerValue: 118 - psiLow, referenceValue: 118, atmosphericPressureKPa: denver }).difference).toBeCloseTo(
        -psiLow,
        10,
      );
    });

    it('works in kPa(g): the offset is 101.325 − local kPa', () => {
      const r = sensorCheck({
        controllerValue: 800,
        referenceValue: 800,
        pressureUnit: 'kPag',
        atmosphericPressureKPa: denver,
        controllerReference: 'standard',
        toleranceAbsolute: 34.5,
      });
      expect(r.difference).toBeCloseTo(101.325 - denver, 10);
      expect(r.controllerAbsolute).toBeCloseTo(901.325, 10);
      expect(r.referenceAbsolute).toBeCloseTo(800 + denver, 10);
    });

    it('rejects an unknown controller reference, pressure unit or atmosphere', () => {
      expect(() => sensorCheck({ controllerValue: 1, referenceValue: 1, controllerReference: 'sealed' as 'local' })).toThrow(
        /valid: local, standard/,
      );
      expect(() => sensorCheck({ controllerValue: 1, referenceValue: 1, pressureUnit: 'bar' as 'psig' })).toThrow(/valid: psig, kPag/);
      expect(() => sensorCheck({ controllerValue: 1, referenceValue: 1, atmosphericPressureKPa: -1 })).toThrow(/atmosphericPressureKPa/);
    });
  });
});
