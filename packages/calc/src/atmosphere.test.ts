import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { ATMOSPHERE_ELEVATION_RANGE_M, atmosphericPressureAt, STANDARD_SEA_LEVEL_KPA } from './atmosphere';

describe('atmosphericPressureAt (ISA / ISO 2533 troposphere)', () => {
  it('is 101.325 kPa at sea level, exactly', () => {
    expect(atmosphericPressureAt(0)).toBe(STANDARD_SEA_LEVEL_KPA);
  });

  it('follows p = 101.325 · (1 − 2.25577e-5 · h)^5.25588 (the formula, recomputed here)', () => {
    for (const h of [-400, 1, 350, 1609, 4300, 11000])
      expect(atmosphericPressureAt(h)).toBeCloseTo(101.325 * (1 - 2.25577e-5 * h) ** 5.25588, 12);
  });

  it('falls about 1.2 kPa per 100 m near sea level (12 Pa/m, from memory) and keeps falling (fast-check)', () => {
    expect(atmosphericPressureAt(0) - atmosphericPressureAt(100)).toBeCloseTo(1.2, 1);
    fc.assert(
      fc.property(fc.double({ min: -2000, max: 10999, noNaN: true }), fc.double({ min: 0.001, max: 1000, noNaN: true }), (h, dh) => {
        const higher = Math.min(h + dh, 11000);
        expect(atmosphericPressureAt(higher)).toBeLessThan(atmosphericPressureAt(h));
      }),
    );
  });

  it('works at the ends of its range and refuses outside it or a non-number', () => {
    expect(atmosphericPressureAt(ATMOSPHERE_ELEVATION_RANGE_M.min)).toBeGreaterThan(101.325);
    expect(atmosphericPressureAt(ATMOSPHERE_ELEVATION_RANGE_M.max)).toBeGreaterThan(22);
    for (const bad of [-2000.5, 11000.5, Number.NaN, Number.POSITIVE_INFINITY, '1600' as unknown as number]) {
      expect(() => atmosphericPressureAt(bad)).toThrow(/from -2000 to 11000/);
    }
  });
});
