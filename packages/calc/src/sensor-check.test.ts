import { describe, expect, it } from 'vitest';
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
});
