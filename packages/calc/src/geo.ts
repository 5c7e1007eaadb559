/** Great-circle distance and drive-time estimates. */

/** Mean Earth radius (IUGG), km. */
export const EARTH_RADIUS_KM = 6371.0088;
/** International mile, km (exact). */
export const KM_PER_MILE = 1.609344;
/** Default average speed for drive estimates, mph (common practice, no source). */
export const DEFAULT_SPEED_MPH = 30;
/** Default ratio of road distance to great-circle distance (common practice, no source). */
export const DEFAULT_ROAD_FACTOR = 1.3;

export interface LatLon {
  lat: number;
  lon: number;
}
export type DistanceUnit = 'mi' | 'km';

export function assertLatLon(p: LatLon, what = 'point'): void {
  const { lat, lon } = p ?? ({} as LatLon);
  if (typeof lat !== 'number' || !Number.isFinite(lat) || lat < -90 || lat > 90)
    throw new RangeError(`${what}.lat must be a number from -90 to 90`);
  if (typeof lon !== 'number' || !Number.isFinite(lon) || lon < -180 || lon > 180)
    throw new RangeError(`${what}.lon must be a number from -180 to 180`);
}

function haversineKm(a: LatLon, b: LatLon): number {
  const rad = Math.PI / 180;
  const dLat = (b.lat - a.lat) * rad;
  const dLon = (b.lon - a.lon) * rad;
  const s = Math.sin(dLat / 2) ** 2 + Math.cos(a.lat * rad) * Math.cos(b.lat * rad) * Math.sin(dLon / 2) ** 2;
  return 2 * EARTH_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(s)));
}

/** Great-circle (haversine) distance on a sphere of radius 6371.0088 km; default miles. */
export function greatCircleDistance(a: LatLon, b: LatLon, unit: DistanceUnit = 'mi'): number {
  assertLatLon(a, 'a');
  assertLatLon(b, 'b');
  if (unit !== 'mi' && unit !== 'km') throw new RangeError(`unit must be 'mi' or 'km'`);
  const km = haversineKm(a, b);
  return unit === 'km' ? km : km / KM_PER_MILE;
}

export interface DriveOptions {
  /** Average speed, mph; default 30. */
  speedMph?: number;
  /** Road distance ÷ great-circle distance; default 1.3. */
  roadFactor?: number;
}

export function resolveDrive(opts: DriveOptions = {}): { speedMph: number; roadFactor: number } {
  const speedMph = opts.speedMph ?? DEFAULT_SPEED_MPH;
  const roadFactor = opts.roadFactor ?? DEFAULT_ROAD_FACTOR;
  if (typeof speedMph !== 'number' || !Number.isFinite(speedMph) || speedMph <= 0)
    throw new RangeError('speedMph must be a number greater than 0');
  if (typeof roadFactor !== 'number' || !Number.isFinite(roadFactor) || roadFactor < 1)
    throw new RangeError('roadFactor must be a number of 1 or more');
  return { speedMph, roadFactor };
}

/** Estimated road miles: great-circle miles × road factor. */
export function roadMiles(a: LatLon, b: LatLon, opts: DriveOptions = {}): number {
  return greatCircleDistance(a, b, 'mi') * resolveDrive(opts).roadFactor;
}

/** Estimated drive minutes: great-circle miles × road factor ÷ speed × 60. */
export function driveMinutes(a: LatLon, b: LatLon, opts: DriveOptions = {}): number {
  const { speedMph, roadFactor } = resolveDrive(opts);
  return ((greatCircleDistance(a, b, 'mi') * roadFactor) / speedMph) * 60;
}
