/**
 * Refrigerant saturation (pressure ↔ temperature), superheat and subcooling.
 *
 * Property data are the tables in `saturation-data.ts`, generated from CoolProp 8.0.0 (HEOS
 * backend) by `scripts/generate-saturation.py`. Between table points the natural logarithm of the
 * absolute pressure is interpolated against temperature with a monotone piecewise-cubic Hermite
 * curve (Fritsch–Carlson); pressure → temperature inverts that same curve, so the two directions
 * round-trip exactly. Nothing is ever extrapolated: a value outside the table is a `RangeError`.
 *
 * Caution: these values guide field work only alongside the equipment manufacturer's charging data,
 * which always wins.
 */
import { saturationTables, type SaturationTable } from './saturation-data';

/** The refrigerant ids Coilpath knows, written exactly as shown (usable with zod `z.enum`). */
export const refrigerantIds = [
  'R-410A',
  'R-32',
  'R-454B',
  'R-134a',
  'R-22',
  'R-404A',
  'R-407C',
  'R-448A',
  'R-513A',
  'R-507A',
  'R-1234yf',
] as const;

/** One of {@link refrigerantIds}. */
export type RefrigerantId = (typeof refrigerantIds)[number];

export type PressureUnit = 'psig' | 'kPag';
export type TemperatureUnit = 'F' | 'C';
/** Bubble point (saturated liquid, Q = 0) or dew point (saturated vapour, Q = 1). */
export type SaturationPoint = 'bubble' | 'dew';

/** Chemical family, used by the leak rules (ODS vs HFC). */
export type RefrigerantFamily = 'HCFC' | 'HFC' | 'HFO' | 'HFC/HFO blend';

export interface RefrigerantInfo {
  id: RefrigerantId;
  /** Plain description, e.g. "R-32/R-125 (50/50)". */
  name: string;
  /** ASHRAE 34 safety group. */
  safetyGroup: 'A1' | 'A2L';
  /** 100-year GWP on the AR4 basis (mass-weighted sum of the components' GWPs). */
  gwp: number;
  /** True when bubble and dew temperatures differ by 0.5 °F or more somewhere in the table. */
  hasGlide: boolean;
  family: RefrigerantFamily;
  /** Ozone-depleting substance (class II, HCFC) — governed by 40 CFR 82 Subpart F. */
  ozoneDepleting: boolean;
}

/**
 * Refrigerant facts. Sources (see docs/reference/LEAK-RULES.md §4):
 * - Safety groups: ASHRAE 34 as cited by a refrigerant reference page [S1] or drawdown.org [S2];
 *   R-448A [M]; R-507A A1 and R-1234yf A2L per LEAK-RULES.md's notes.
 * - GWP: AR4 component values of 42 U.S.C. 7675(c)(1) and (e)(1)(D)(i) [P]
 *   (HFC-32 675, HFC-125 3500, HFC-134a 1430, HFC-143a 4470, HCFC-22 1810) weighted by the ASHRAE 34
 *   nominal mass composition [S]; HFO-1234yf 4 and HFO-1234ze(E) 6 from memory [M].
 *   R-507A's composition (R-125/143a 50/50) is [M].
 * - hasGlide is checked against the tables by a unit test.
 */
const INFO: Record<RefrigerantId, Omit<RefrigerantInfo, 'id'>> = {
  'R-410A': { name: 'R-32/R-125 (50/50)', safetyGroup: 'A1', gwp: 2088, hasGlide: false, family: 'HFC', ozoneDepleting: false },
  'R-32': { name: 'Difluoromethane (HFC-32)', safetyGroup: 'A2L', gwp: 675, hasGlide: false, family: 'HFC', ozoneDepleting: false },
  'R-454B': {
    name: 'R-32/R-1234yf (68.9/31.1)',
    safetyGroup: 'A2L',
    gwp: 466,
    hasGlide: true,
    family: 'HFC/HFO blend',
    ozoneDepleting: false,
  },
  'R-134a': {
    name: '1,1,1,2-Tetrafluoroethane (HFC-134a)',
    safetyGroup: 'A1',
    gwp: 1430,
    hasGlide: false,
    family: 'HFC',
    ozoneDepleting: false,
  },
  'R-22': { name: 'Chlorodifluoromethane (HCFC-22)', safetyGroup: 'A1', gwp: 1810, hasGlide: false, family: 'HCFC', ozoneDepleting: true },
  'R-404A': { name: 'R-125/R-143a/R-134a (44/52/4)', safetyGroup: 'A1', gwp: 3922, hasGlide: true, family: 'HFC', ozoneDepleting: false },
  'R-407C': { name: 'R-32/R-125/R-134a (23/25/52)', safetyGroup: 'A1', gwp: 1774, hasGlide: true, family: 'HFC', ozoneDepleting: false },
  'R-448A': {
    name: 'R-32/R-125/R-1234yf/R-134a/R-1234ze(E) (26/26/20/21/7)',
    safetyGroup: 'A1',
    gwp: 1387,
    hasGlide: true,
    family: 'HFC/HFO blend',
    ozoneDepleting: false,
  },
  'R-513A': {
    name: 'R-1234yf/R-134a (56/44)',
    safetyGroup: 'A1',
    gwp: 631,
    hasGlide: false,
    family: 'HFC/HFO blend',
    ozoneDepleting: false,
  },
  'R-507A': { name: 'R-125/R-143a (50/50)', safetyGroup: 'A1', gwp: 3985, hasGlide: false, family: 'HFC', ozoneDepleting: false },
  'R-1234yf': {
    name: '2,3,3,3-Tetrafluoropropene (HFO-1234yf)',
    safetyGroup: 'A2L',
    gwp: 4,
    hasGlide: false,
    family: 'HFO',
    ozoneDepleting: false,
  },
};

/** All refrigerants with their ASHRAE 34 safety group, AR4 GWP and whether they glide. */
export function listRefrigerants(): RefrigerantInfo[] {
  return refrigerantIds.map((id) => ({ id, ...INFO[id] }));
}

/** Facts about one refrigerant; `RangeError` for an unknown id. */
export function refrigerantInfo(refrigerant: string): RefrigerantInfo {
  const id = assertRefrigerant(refrigerant);
  return { id, ...INFO[id] };
}

/** True when `value` is one of {@link refrigerantIds}. */
export function isRefrigerantId(value: unknown): value is RefrigerantId {
  return typeof value === 'string' && (refrigerantIds as readonly string[]).includes(value);
}

/** Returns the id or throws a `RangeError` naming the valid ids. */
export function assertRefrigerant(refrigerant: unknown): RefrigerantId {
  if (!isRefrigerantId(refrigerant)) {
    throw new RangeError(`Unknown refrigerant ${JSON.stringify(refrigerant)}; valid ids: ${refrigerantIds.join(', ')}`);
  }
  return refrigerant;
}

// ---------------------------------------------------------------------------------------------
// Units. Gauge pressures are against a standard atmosphere of 14.696 psia / 101.325 kPa unless the
// caller gives the local atmosphere (`atmosphericPressureKPa`, e.g. from `atmosphericPressureAt`
// for the branch's elevation): at 1,600 m a gauge reads about 2.6 psi more for the same absolute
// pressure than at sea level.

/** Standard atmosphere in psia used for gauge pressures. */
export const ATMOSPHERE_PSIA = 14.696;
/** Standard atmosphere in kPa used for gauge pressures. */
export const ATMOSPHERE_KPA = 101.325;
/** 1 psi in kPa, exact from 1 lbf = 4.448 221 615 260 5 N and 1 in = 0.0254 m (NIST SP 811, B.8: 6.894 757). */
export const KPA_PER_PSI = 6.894757293168361;

/** The atmosphere a gauge reads against, in both units. */
interface Atmosphere {
  psia: number;
  kpa: number;
}
const STANDARD_ATMOSPHERE: Atmosphere = { psia: ATMOSPHERE_PSIA, kpa: ATMOSPHERE_KPA };

/**
 * The local atmosphere from an optional kPa value. Absent or exactly 101.325 kPa is the standard
 * atmosphere with its customary 14.696 psia, so every sea-level result is unchanged; any other value
 * is converted exactly. `RangeError` unless a finite number above 0 and at most 130 kPa (the
 * standard atmosphere at −2,000 m is about 128 kPa).
 */
function atmosphere(kpa: number | undefined): Atmosphere {
  if (kpa === undefined || kpa === ATMOSPHERE_KPA) return STANDARD_ATMOSPHERE;
  if (typeof kpa !== 'number' || !Number.isFinite(kpa) || kpa <= 0 || kpa > 130) {
    throw new RangeError(`atmosphericPressureKPa must be a finite number above 0 and at most 130 kPa; got ${String(kpa)}`);
  }
  return { psia: kpa / KPA_PER_PSI, kpa };
}

function pressureUnitOf(unit: unknown): PressureUnit {
  if (unit !== 'psig' && unit !== 'kPag') throw new RangeError(`Unknown pressure unit ${JSON.stringify(unit)}; valid: psig, kPag`);
  return unit;
}

/**
 * The atmosphere a gauge reads against, in the absolute unit that goes with `unit`: psia for psig,
 * kPa for kPa(g). Default (and exactly 101.325 kPa) is the standard 14.696 psia / 101.325 kPa.
 */
export function atmosphereFor(unit: PressureUnit, atmosphericPressureKPa?: number): number {
  const atm = atmosphere(atmosphericPressureKPa);
  return pressureUnitOf(unit) === 'psig' ? atm.psia : atm.kpa;
}

/** A gauge pressure as absolute pressure (psig → psia, kPa(g) → kPa) against the given atmosphere (default sea level). */
export function gaugeToAbsolute(value: number, unit: PressureUnit, atmosphericPressureKPa?: number): number {
  return value + atmosphereFor(unit, atmosphericPressureKPa);
}

function toPsia(value: number, unit: PressureUnit, atm: Atmosphere): number {
  return unit === 'psig' ? value + atm.psia : (value + atm.kpa) / KPA_PER_PSI;
}
function fromPsia(psia: number, unit: PressureUnit, atm: Atmosphere): number {
  return unit === 'psig' ? psia - atm.psia : psia * KPA_PER_PSI - atm.kpa;
}
function toF(value: number, unit: TemperatureUnit): number {
  return unit === 'F' ? value : (value * 9) / 5 + 32;
}
function fromF(f: number, unit: TemperatureUnit): number {
  return unit === 'F' ? f : ((f - 32) * 5) / 9;
}

export interface SaturationOptions {
  /** Default 'psig'. */
  pressureUnit?: PressureUnit;
  /** Default 'F'. */
  temperatureUnit?: TemperatureUnit;
  /** Default 'dew'. */
  point?: SaturationPoint;
  /** Local atmospheric pressure the gauge reads against, kPa; default 101.325 (sea level). */
  atmosphericPressureKPa?: number;
}

interface ResolvedOptions {
  pressureUnit: PressureUnit;
  temperatureUnit: TemperatureUnit;
  point: SaturationPoint;
  atmosphere: Atmosphere;
}

function resolveOptions(opts: SaturationOptions | undefined): ResolvedOptions {
  const pressureUnit = opts?.pressureUnit ?? 'psig';
  const temperatureUnit = opts?.temperatureUnit ?? 'F';
  const point = opts?.point ?? 'dew';
  if (pressureUnit !== 'psig' && pressureUnit !== 'kPag') {
    throw new RangeError(`Unknown pressure unit ${JSON.stringify(pressureUnit)}; valid: psig, kPag`);
  }
  if (temperatureUnit !== 'F' && temperatureUnit !== 'C') {
    throw new RangeError(`Unknown temperature unit ${JSON.stringify(temperatureUnit)}; valid: F, C`);
  }
  if (point !== 'bubble' && point !== 'dew') {
    throw new RangeError(`Unknown saturation point ${JSON.stringify(point)}; valid: bubble, dew`);
  }
  return { pressureUnit, temperatureUnit, point, atmosphere: atmosphere(opts?.atmosphericPressureKPa) };
}

// ---------------------------------------------------------------------------------------------
// Monotone cubic Hermite curve of ln(P) against T on the table's uniform grid.

interface Curve {
  tMinF: number;
  tMaxF: number;
  step: number;
  /** ln(psia) at each grid temperature. */
  y: Float64Array;
  /** dy/dT at each grid temperature (Fritsch–Carlson limited). */
  m: Float64Array;
}

const curves = new Map<string, Curve>();

function buildCurve(table: SaturationTable, psia: readonly number[]): Curve {
  const n = psia.length;
  const h = table.stepF;
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = Math.log(psia[i] as number);
  const delta = new Float64Array(n - 1);
  for (let i = 0; i < n - 1; i++) delta[i] = ((y[i + 1] as number) - (y[i] as number)) / h;
  const m = new Float64Array(n);
  // Three-point interior slopes, one-sided at the ends, then Fritsch–Carlson limiting.
  m[0] = delta[0] as number;
  m[n - 1] = delta[n - 2] as number;
  for (let i = 1; i < n - 1; i++) {
    const a = delta[i - 1] as number;
    const b = delta[i] as number;
    m[i] = a * b <= 0 ? 0 : (a + b) / 2;
  }
  for (let i = 0; i < n - 1; i++) {
    const d = delta[i] as number;
    if (d === 0) {
      m[i] = 0;
      m[i + 1] = 0;
      continue;
    }
    const alpha = (m[i] as number) / d;
    const beta = (m[i + 1] as number) / d;
    const s = alpha * alpha + beta * beta;
    if (s > 9) {
      const tau = 3 / Math.sqrt(s);
      m[i] = tau * alpha * d;
      m[i + 1] = tau * beta * d;
    }
  }
  return { tMinF: table.tMinF, tMaxF: table.tMaxF, step: h, y, m };
}

function curveFor(id: RefrigerantId, point: SaturationPoint): Curve {
  const key = `${id}|${point}`;
  let c = curves.get(key);
  if (!c) {
    const table: SaturationTable = saturationTables[id];
    const psia = point === 'dew' && table.dewPsia ? table.dewPsia : table.bubblePsia;
    c = buildCurve(table, psia);
    curves.set(key, c);
  }
  return c;
}

function hermite(c: Curve, i: number, t: number): number {
  const h = c.step;
  const t2 = t * t;
  const t3 = t2 * t;
  return (
    (2 * t3 - 3 * t2 + 1) * (c.y[i] as number) +
    (t3 - 2 * t2 + t) * h * (c.m[i] as number) +
    (-2 * t3 + 3 * t2) * (c.y[i + 1] as number) +
    (t3 - t2) * h * (c.m[i + 1] as number)
  );
}

/** ln(psia) at temperature tF (°F) inside the table. */
function lnPressureAt(c: Curve, tF: number): number {
  const last = c.y.length - 1;
  let i = Math.floor((tF - c.tMinF) / c.step);
  if (i >= last) i = last - 1;
  if (i < 0) i = 0;
  const t = (tF - (c.tMinF + i * c.step)) / c.step;
  return hermite(c, i, t);
}

/** Temperature (°F) where ln(psia) equals lnP, inside the table. */
function temperatureAt(c: Curve, lnP: number): number {
  const y = c.y;
  let lo = 0;
  let hi = y.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((y[mid] as number) <= lnP) lo = mid;
    else hi = mid;
  }
  // The segment's Hermite curve is monotone (Fritsch–Carlson): bisection with Newton steps.
  let a = 0;
  let b = 1;
  let t = (lnP - (y[lo] as number)) / ((y[lo + 1] as number) - (y[lo] as number)) || 0;
  for (let k = 0; k < 60; k++) {
    const f = hermite(c, lo, t) - lnP;
    if (Math.abs(f) < 1e-14) break;
    if (f > 0) b = t;
    else a = t;
    const h = c.step;
    const t2 = t * t;
    const d =
      (6 * t2 - 6 * t) * (c.y[lo] as number) +
      (3 * t2 - 4 * t + 1) * h * (c.m[lo] as number) +
      (-6 * t2 + 6 * t) * (c.y[lo + 1] as number) +
      (3 * t2 - 2 * t) * h * (c.m[lo + 1] as number);
    let next = d > 0 ? t - f / d : (a + b) / 2;
    if (!(next > a && next < b)) next = (a + b) / 2;
    if (b - a < 1e-15) break;
    t = next;
  }
  return c.tMinF + (lo + t) * c.step;
}

function fmt(x: number): string {
  return String(Math.round(x * 100) / 100);
}

function assertFiniteNumber(value: unknown, what: string, range: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new RangeError(`${what} must be a finite number; valid range ${range}`);
  }
  return value;
}

/**
 * Pressure range of the refrigerant's table (in the chosen unit and point), e.g. so a screen can
 * warn about a reading typed ten times too large. Defaults psig, dew point.
 */
export function pressureRange(refrigerant: RefrigerantId | string, opts?: SaturationOptions): { min: number; max: number } {
  const id = assertRefrigerant(refrigerant);
  const o = resolveOptions(opts);
  const c = curveFor(id, o.point);
  return {
    min: fromPsia(Math.exp(c.y[0] as number), o.pressureUnit, o.atmosphere),
    max: fromPsia(Math.exp(c.y[c.y.length - 1] as number), o.pressureUnit, o.atmosphere),
  };
}

/** Temperature range of the refrigerant's table in the chosen unit (same for bubble and dew). */
export function temperatureRange(
  refrigerant: RefrigerantId | string,
  opts?: Pick<SaturationOptions, 'temperatureUnit'>,
): { min: number; max: number } {
  const id = assertRefrigerant(refrigerant);
  const o = resolveOptions(opts);
  const t = saturationTables[id];
  return { min: fromF(t.tMinF, o.temperatureUnit), max: fromF(t.tMaxF, o.temperatureUnit) };
}

/**
 * Saturation temperature at a gauge pressure. Defaults: psig in, °F out, dew point, gauge read at
 * sea level (`atmosphericPressureKPa` 101.325; give the local atmosphere at altitude).
 *
 * Throws `RangeError` for an unknown refrigerant (naming the valid ids) and for a pressure that is
 * NaN, not a number or outside the table (naming the valid range). Never extrapolates.
 *
 * Caution: a guide for field work only alongside the manufacturer's charging data.
 */
export function saturationTemperature(refrigerant: RefrigerantId | string, pressure: number, opts?: SaturationOptions): number {
  const id = assertRefrigerant(refrigerant);
  const o = resolveOptions(opts);
  const c = curveFor(id, o.point);
  const { min, max } = pressureRange(id, o);
  const range = `for ${id} (${o.point} point) is ${fmt(min)} to ${fmt(max)} ${o.pressureUnit}`;
  const p = assertFiniteNumber(pressure, 'Pressure', range);
  const psia = toPsia(p, o.pressureUnit, o.atmosphere);
  const lnP = Math.log(psia);
  const y0 = c.y[0] as number;
  const yn = c.y[c.y.length - 1] as number;
  // Allow a hair of rounding slack at the ends so pressureRange's own values are accepted.
  const eps = 1e-12;
  if (!(psia > 0) || lnP < y0 - eps || lnP > yn + eps) {
    throw new RangeError(`Pressure ${p} ${o.pressureUnit} is outside the table; valid range ${range}`);
  }
  const f = temperatureAt(c, Math.min(Math.max(lnP, y0), yn));
  return fromF(f, o.temperatureUnit);
}

/**
 * Saturation gauge pressure at a temperature. Defaults: °F in, psig out, dew point, gauge read at
 * sea level (`atmosphericPressureKPa` 101.325).
 *
 * Throws `RangeError` for an unknown refrigerant and for a temperature that is NaN, not a number or
 * outside the table. Never extrapolates.
 *
 * Caution: a guide for field work only alongside the manufacturer's charging data.
 */
export function saturationPressure(refrigerant: RefrigerantId | string, temperature: number, opts?: SaturationOptions): number {
  const id = assertRefrigerant(refrigerant);
  const o = resolveOptions(opts);
  const c = curveFor(id, o.point);
  const tr = temperatureRange(id, o);
  const range = `for ${id} is ${fmt(tr.min)} to ${fmt(tr.max)} °${o.temperatureUnit}`;
  const t = assertFiniteNumber(temperature, 'Temperature', range);
  const f = toF(t, o.temperatureUnit);
  const eps = 1e-9;
  if (f < c.tMinF - eps || f > c.tMaxF + eps) {
    throw new RangeError(`Temperature ${t} °${o.temperatureUnit} is outside the table; valid range ${range}`);
  }
  const psia = Math.exp(lnPressureAt(c, Math.min(Math.max(f, c.tMinF), c.tMaxF)));
  return fromPsia(psia, o.pressureUnit, o.atmosphere);
}

export interface SuperheatInput {
  refrigerant: RefrigerantId | string;
  /** Suction pressure at the evaporator outlet (gauge). */
  suctionPressure: number;
  /** Suction line temperature measured at the same place. */
  suctionLineTemp: number;
  pressureUnit?: PressureUnit;
  temperatureUnit?: TemperatureUnit;
  /** Local atmospheric pressure the gauge reads against, kPa; default 101.325 (sea level). */
  atmosphericPressureKPa?: number;
}

/**
 * Superheat = suction line temperature − dew-point saturation temperature at the suction pressure.
 * Both results are in the chosen temperature unit (a difference in °C equals kelvin). A negative
 * superheat is returned as is (liquid at the sensor, or a reading error).
 *
 * Caution: a guide for field work only alongside the manufacturer's charging data.
 */
export function superheat(input: SuperheatInput): { saturationTemp: number; superheat: number } {
  const unit = input.temperatureUnit ?? 'F';
  const saturationTemp = saturationTemperature(input.refrigerant, input.suctionPressure, {
    pressureUnit: input.pressureUnit ?? 'psig',
    temperatureUnit: unit,
    point: 'dew',
    atmosphericPressureKPa: input.atmosphericPressureKPa,
  });
  const line = assertFiniteNumber(input.suctionLineTemp, 'Suction line temperature', `any finite °${unit}`);
  return { saturationTemp, superheat: line - saturationTemp };
}

export interface SubcoolingInput {
  refrigerant: RefrigerantId | string;
  /** Liquid line pressure at the condenser outlet (gauge). */
  liquidPressure: number;
  /** Liquid line temperature measured at the same place. */
  liquidLineTemp: number;
  pressureUnit?: PressureUnit;
  temperatureUnit?: TemperatureUnit;
  /** Local atmospheric pressure the gauge reads against, kPa; default 101.325 (sea level). */
  atmosphericPressureKPa?: number;
}

/**
 * Subcooling = bubble-point saturation temperature at the liquid pressure − liquid line temperature.
 *
 * Caution: a guide for field work only alongside the manufacturer's charging data.
 */
export function subcooling(input: SubcoolingInput): { saturationTemp: number; subcooling: number } {
  const unit = input.temperatureUnit ?? 'F';
  const saturationTemp = saturationTemperature(input.refrigerant, input.liquidPressure, {
    pressureUnit: input.pressureUnit ?? 'psig',
    temperatureUnit: unit,
    point: 'bubble',
    atmosphericPressureKPa: input.atmosphericPressureKPa,
  });
  const line = assertFiniteNumber(input.liquidLineTemp, 'Liquid line temperature', `any finite °${unit}`);
  return { saturationTemp, subcooling: saturationTemp - line };
}
