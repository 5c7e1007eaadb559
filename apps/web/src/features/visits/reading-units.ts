/**
 * The Visit screen's readings logic, free of React: which unit each field is in, what the technician
 * typed as numbers, live superheat/subcooling in the branch's units (@coilpath/calc), the sensor check
 * with the branch's psi tolerance in the same units, and the body the API receives (units stated).
 */
import {
  atmosphericPressureAt,
  convertPressure,
  convertTemperature,
  pressureRange,
  psiToKpa,
  sensorCheck,
  subcooling,
  superheat,
} from '@coilpath/calc';
import { formatMeasure, measureSymbol, readingRangeIssues } from '@coilpath/contract/measure';
import type { ReadingDto, ReadingInput, ReadingUnits, SaveReadings } from '@coilpath/contract';

export const readingFields = [
  'suctionPressure',
  'suctionPressureController',
  'suctionLineTemp',
  'liquidPressure',
  'liquidPressureController',
  'liquidLineTemp',
  'dischargePressure',
  'dischargePressureController',
  'outdoorTemp',
] as const;
export type ReadingField = (typeof readingFields)[number];

const fieldInfo: Record<ReadingField, [label: string, kind: 'pressure' | 'temperature']> = {
  suctionPressure: ['Suction pressure', 'pressure'],
  suctionPressureController: ['Suction pressure on the controller', 'pressure'],
  suctionLineTemp: ['Suction line temperature', 'temperature'],
  liquidPressure: ['Liquid pressure', 'pressure'],
  liquidPressureController: ['Liquid pressure on the controller', 'pressure'],
  liquidLineTemp: ['Liquid line temperature', 'temperature'],
  dischargePressure: ['Discharge pressure', 'pressure'],
  dischargePressureController: ['Discharge pressure on the controller', 'pressure'],
  outdoorTemp: ['Outdoor air temperature', 'temperature'],
};

export const fieldKind = (f: ReadingField) => fieldInfo[f][1];

/** "Suction pressure, circuit 1 (kPa(g))": the input's accessible name, with its unit. */
export function fieldLabel(f: ReadingField, where: string, units: ReadingUnits): string {
  const [label, kind] = fieldInfo[f];
  return `${label}, ${where} (${measureSymbol(kind, units)})`;
}

/** A typed value as a number; a comma is taken as the decimal mark. Empty (or a lone minus) → null; not a number → NaN. */
export function parseEntry(s: string | undefined): number | null {
  if (s === undefined || s.trim() === '' || /^[-−–]$/.test(s.trim())) return null;
  const n = Number(s.trim().replace(',', '.').replace(/^[−–]/, '-'));
  return Number.isFinite(n) ? n : Number.NaN;
}

const valueOf = (s: string | undefined) => {
  const n = parseEntry(s);
  return n === null || Number.isNaN(n) ? null : n;
};

/** Typed text with its sign flipped (the phone's decimal keypad has no minus key). */
export function toggleSign(s: string): string {
  const t = s.trim();
  if (t === '') return '-';
  return t.startsWith('-') || t.startsWith('−') ? t.slice(1) : `-${t}`;
}

/** A saved reading's values as form text. The API answers in the branch's units, already rounded to 0.01. */
export function entriesFromReading(r: ReadingDto | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  if (!r) return out;
  for (const f of readingFields) {
    const v = r[f];
    if (typeof v === 'number') out[f] = String(v);
  }
  return out;
}

const trim2 = (n: number) => String(Math.round(n * 100) / 100);

/**
 * Typed values moved from one unit system to another (a draft kept on the phone while the branch's
 * setting changed). Text that is not a number is kept as typed.
 */
export function convertEntries(values: Record<string, string>, from: ReadingUnits, to: ReadingUnits): Record<string, string> {
  if (from.pressure === to.pressure && from.temperature === to.temperature) return values;
  const out: Record<string, string> = { ...values };
  for (const f of readingFields) {
    const n = valueOf(values[f]);
    if (n === null) continue;
    out[f] = trim2(
      fieldKind(f) === 'pressure'
        ? convertPressure(n, from.pressure, to.pressure)
        : convertTemperature(n, from.temperature, to.temperature),
    );
  }
  return out;
}

export interface ComputedLine {
  key: 'sh' | 'sc';
  /** "Superheat 6.6 K" */
  text: string;
  /** "line 9.3 °C − dew 2.7 °C" */
  detail: string;
  error?: boolean;
}

/** One side of the live computation: the saturation temperature and the difference from the line, or why there is none. */
export type LiveSide = { ok: true; saturation: number; line: number; value: number } | { ok: false; why: string };

export interface LiveValues {
  /** Superheat from suction pressure (dew point) and suction line temperature; absent until both are typed. */
  superheat?: LiveSide;
  /** Subcooling from liquid pressure (or discharge, when no liquid pressure) and liquid line temperature. */
  subcooling?: LiveSide & { fromDischarge: boolean };
}

/**
 * Live superheat and subcooling from what is typed, computed by calc in the branch's units, the gauges
 * read against the standard atmosphere at the branch's elevation (ISA / ISO 2533; 0 m = sea level).
 */
export function liveValues(refrigerant: string, v: Record<string, string>, units: ReadingUnits, elevationMeters = 0): LiveValues {
  const sp = valueOf(v.suctionPressure);
  const st = valueOf(v.suctionLineTemp);
  const lp = valueOf(v.liquidPressure);
  const high = lp ?? valueOf(v.dischargePressure);
  const lt = valueOf(v.liquidLineTemp);
  const opts = {
    pressureUnit: units.pressure,
    temperatureUnit: units.temperature,
    atmosphericPressureKPa: atmosphericPressureAt(elevationMeters),
  } as const;
  const outside = () => {
    try {
      const r = pressureRange(refrigerant, opts);
      return `${refrigerant} table covers ${formatMeasure(r.min, 'pressure', units)} to ${formatMeasure(r.max, 'pressure', units)}`;
    } catch {
      return `${refrigerant} is not in Coilpath’s tables`;
    }
  };
  const out: LiveValues = {};
  if (sp !== null && st !== null) {
    try {
      const s = superheat({ refrigerant, suctionPressure: sp, suctionLineTemp: st, ...opts });
      out.superheat = { ok: true, saturation: s.saturationTemp, line: st, value: s.superheat };
    } catch {
      out.superheat = { ok: false, why: outside() };
    }
  }
  if (high !== null && lt !== null) {
    const fromDischarge = lp === null;
    try {
      const s = subcooling({ refrigerant, liquidPressure: high, liquidLineTemp: lt, ...opts });
      out.subcooling = { ok: true, saturation: s.saturationTemp, line: lt, value: s.subcooling, fromDischarge };
    } catch {
      out.subcooling = { ok: false, why: outside(), fromDischarge };
    }
  }
  return out;
}

/** The live values as sentences (superheat, then subcooling). */
export function computeLive(refrigerant: string, v: Record<string, string>, units: ReadingUnits, elevationMeters = 0): ComputedLine[] {
  const live = liveValues(refrigerant, v, units, elevationMeters);
  const t = (n: number) => formatMeasure(n, 'temperature', units);
  const d = (n: number) => formatMeasure(n, 'temperatureDifference', units);
  const out: ComputedLine[] = [];
  const sh = live.superheat;
  if (sh) {
    out.push(
      sh.ok
        ? { key: 'sh', text: `Superheat ${d(sh.value)}`, detail: `line ${t(sh.line)} − dew ${t(sh.saturation)}` }
        : { key: 'sh', text: 'Superheat cannot be computed', detail: sh.why, error: true },
    );
  }
  const sc = live.subcooling;
  if (sc) {
    out.push(
      sc.ok
        ? {
            key: 'sc',
            text: `Subcooling ${d(sc.value)}`,
            detail: `bubble ${t(sc.saturation)} − line ${t(sc.line)}${sc.fromDischarge ? ' (from discharge pressure)' : ''}`,
          }
        : { key: 'sc', text: 'Subcooling cannot be computed', detail: sc.why, error: true },
    );
  }
  return out;
}

export interface SensorCheckView {
  withinTolerance: boolean;
  /** "+21.2 kPa, 2.8 %" */
  difference: string;
  /** "34.5 kPa or 3 %" — the branch's tolerance in the reading's units. */
  allowed: string;
}

/**
 * Controller against gauge, both in the branch's units. The branch sets its absolute tolerance in psi;
 * it is converted to kPa here, so the comparison never mixes units (the percent bound has no unit).
 */
export function sensorCheckView(
  controller: number | null,
  reference: number | null,
  units: ReadingUnits,
  branch: { sensorTolerancePercent: number; sensorToleranceAbsolute: number; elevationMeters?: number },
): SensorCheckView | null {
  if (controller === null || reference === null) return null;
  const toleranceAbsolute = units.pressure === 'kPag' ? psiToKpa(branch.sensorToleranceAbsolute) : branch.sensorToleranceAbsolute;
  const c = sensorCheck({
    controllerValue: controller,
    referenceValue: reference,
    tolerancePercent: branch.sensorTolerancePercent,
    toleranceAbsolute,
    pressureUnit: units.pressure,
    atmosphericPressureKPa: atmosphericPressureAt(branch.elevationMeters ?? 0),
  });
  const sign = c.difference >= 0 ? '+' : '−';
  const pct = c.percent === null ? '' : `, ${(Math.round(Math.abs(c.percent) * 10) / 10).toFixed(1)} %`;
  return {
    withinTolerance: c.withinTolerance,
    difference: `${sign}${formatMeasure(Math.abs(c.difference), 'pressureDifference', units)}${pct}`,
    allowed: `${formatMeasure(toleranceAbsolute, 'pressureDifference', units).replace(/\.0 /, ' ')} or ${branch.sensorTolerancePercent} %`,
  };
}

export interface ReadingsForm {
  body: SaveReadings | null;
  /** Field errors by input id `${circuitId}.${field}`, by the contract's rule (`readingRangeIssues`). */
  errors: Record<string, string>;
}

/**
 * The body the API receives — the units stated, one entry per circuit with something typed — checked
 * with the range rule the route's schema applies (`readingRangeIssues`), so a value out of range is marked
 * before it is sent (without loading zod on the Visit screen).
 */
export function readingsForm(
  circuitIds: string[],
  valuesOf: (circuitId: string) => Record<string, string>,
  units: ReadingUnits,
): ReadingsForm {
  const readings: ReadingInput[] = [];
  const errors: Record<string, string> = {};
  for (const circuitId of circuitIds) {
    const v = valuesOf(circuitId);
    const entry: ReadingInput = { circuitId };
    let any = false;
    for (const f of readingFields) {
      const n = parseEntry(v[f]);
      if (n === null) continue;
      if (Number.isNaN(n)) errors[`${circuitId}.${f}`] = 'Enter a number';
      else {
        entry[f] = n;
        any = true;
      }
    }
    if (any) readings.push(entry);
  }
  if (!readings.length) return { body: null, errors };
  const body = { units, readings };
  for (const issue of readingRangeIssues(units, readings)) errors[`${readings[issue.index]!.circuitId}.${issue.field}`] ??= issue.message;
  return { body: Object.keys(errors).length ? null : body, errors };
}
