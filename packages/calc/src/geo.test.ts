import { describe, expect, it } from 'vitest';
import { driveMinutes, greatCircleDistance, roadMiles } from './geo';

describe('greatCircleDistance', () => {
  it('is zero for the same point, symmetric, and a quarter meridian is πR/2', () => {
    const p = { lat: 41.88, lon: -87.63 };
    expect(greatCircleDistance(p, p)).toBe(0);
    const q = { lat: 29.76, lon: -95.37 };
    expect(greatCircleDistance(p, q)).toBeCloseTo(greatCircleDistance(q, p), 9);
    expect(greatCircleDistance({ lat: 0, lon: 0 }, { lat: 90, lon: 0 }, 'km')).toBeCloseTo((Math.PI / 2) * 6371.0088, 6);
  });
  it('converts km to miles with the international mile', () => {
    const a = { lat: 0, lon: 0 };
    const b = { lat: 0, lon: 1 };
    expect(greatCircleDistance(a, b, 'mi')).toBeCloseTo(greatCircleDistance(a, b, 'km') / 1.609344, 9);
  });
  it('rejects bad coordinates and units', () => {
    expect(() => greatCircleDistance({ lat: 91, lon: 0 }, { lat: 0, lon: 0 })).toThrow(RangeError);
    expect(() => greatCircleDistance({ lat: 0, lon: Number.NaN }, { lat: 0, lon: 0 })).toThrow(RangeError);
    expect(() => greatCircleDistance({ lat: 0, lon: 0 }, { lat: 0, lon: 0 }, 'nm' as 'mi')).toThrow(RangeError);
  });
});

describe('driveMinutes / roadMiles', () => {
  it('applies the road factor and speed (defaults 1.3 and 30 mph)', () => {
    const a = { lat: 41.88, lon: -87.63 };
    const b = { lat: 41.98, lon: -87.9 };
    const gc = greatCircleDistance(a, b);
    expect(roadMiles(a, b)).toBeCloseTo(gc * 1.3, 9);
    expect(driveMinutes(a, b)).toBeCloseTo(((gc * 1.3) / 30) * 60, 9);
    expect(driveMinutes(a, b, { speedMph: 60, roadFactor: 1 })).toBeCloseTo(gc, 9);
    expect(() => driveMinutes(a, b, { speedMph: 0 })).toThrow(RangeError);
    expect(() => driveMinutes(a, b, { roadFactor: 0.5 })).toThrow(RangeError);
  });
});
