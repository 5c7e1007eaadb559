/**
 * Reference check: great-circle distance against
 * - the geodesy package geolib 3.3.14 (npm): getDistance (spherical, radius 6,378,137 m) scaled to
 *   Coilpath's mean radius, and getPreciseDistance (Vincenty on the WGS-84 ellipsoid);
 * - a published city-pair distance: Rosetta Code, "Haversine formula" task
 *   (rosettacode.org/wiki/Haversine_formula): Nashville BNA (36.12, −86.67) to Los Angeles LAX
 *   (33.94, −118.40) = 2886.44444283798329974715782394574671655 km with a radius of 6371.0 km.
 */
import * as geolibNs from 'geolib';
import { describe, expect, it } from 'vitest';
import { EARTH_RADIUS_KM, greatCircleDistance } from '@coilpath/calc';

type Geolib = typeof geolibNs;
const geolib = ((geolibNs as { getDistance?: unknown }).getDistance ? geolibNs : Reflect.get(geolibNs, 'default')) as Geolib;

const GEOLIB_RADIUS_M = 6378137; // geolib 3.3.14 constants.earthRadius

const pairs: [string, { lat: number; lon: number }, { lat: number; lon: number }][] = [
  ['Chicago Loop – O’Hare', { lat: 41.8781, lon: -87.6298 }, { lat: 41.9742, lon: -87.9073 }],
  ['Dallas – Houston', { lat: 32.7767, lon: -96.797 }, { lat: 29.7604, lon: -95.3698 }],
  ['New York – Los Angeles', { lat: 40.7128, lon: -74.006 }, { lat: 34.0522, lon: -118.2437 }],
  ['Minneapolis – Saint Paul', { lat: 44.9778, lon: -93.265 }, { lat: 44.9537, lon: -93.09 }],
  ['Quito – Singapore', { lat: -0.1807, lon: -78.4678 }, { lat: 1.3521, lon: 103.8198 }],
];

describe('greatCircleDistance vs geolib 3.3.14', () => {
  it.each(pairs)('%s: equals geolib getDistance scaled to a 6371.0088 km sphere (within 1 m)', (_name, a, b) => {
    const theirsKm =
      (geolib.getDistance({ latitude: a.lat, longitude: a.lon }, { latitude: b.lat, longitude: b.lon }, 0.001) / 1000) *
      ((EARTH_RADIUS_KM * 1000) / GEOLIB_RADIUS_M);
    expect(Math.abs(greatCircleDistance(a, b, 'km') - theirsKm)).toBeLessThan(0.001);
  });

  it.each(pairs)('%s: within 0.5 %% of geolib getPreciseDistance (WGS-84 ellipsoid)', (_name, a, b) => {
    const precise = geolib.getPreciseDistance({ latitude: a.lat, longitude: a.lon }, { latitude: b.lat, longitude: b.lon }, 0.001) / 1000;
    const ours = greatCircleDistance(a, b, 'km');
    expect(Math.abs(ours - precise) / precise).toBeLessThan(0.005);
  });

  it('miles agree with geolib convertDistance', () => {
    const [, a, b] = pairs[2]!;
    const m =
      geolib.getDistance({ latitude: a.lat, longitude: a.lon }, { latitude: b.lat, longitude: b.lon }, 0.001) *
      ((EARTH_RADIUS_KM * 1000) / GEOLIB_RADIUS_M);
    expect(greatCircleDistance(a, b, 'mi')).toBeCloseTo(geolib.convertDistance(m, 'mi'), 3);
  });
});

describe('published city pair (Rosetta Code, "Haversine formula")', () => {
  it('BNA–LAX: 2886.444 km at R = 6371.0 km, scaled to R = 6371.0088 km', () => {
    const bna = { lat: 36.12, lon: -86.67 };
    const lax = { lat: 33.94, lon: -118.4 };
    const published = 2886.4444428379834; // km, radius 6371.0 km (published as 2886.44444283798329974715782394574671655; a double keeps 17 digits)
    expect(greatCircleDistance(bna, lax, 'km')).toBeCloseTo((published * EARTH_RADIUS_KM) / 6371.0, 6);
  });
});
