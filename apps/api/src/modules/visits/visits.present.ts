/** The visit's answers: readings in the branch's units, findings, refrigerant entries, leak cases, attachments, circuit targets. */
import { convertPressure, convertTemperature, convertTemperatureDifference } from '@coilpath/calc';
import {
  readingUnitsBySystem,
  type AttachmentDto,
  type CircuitTargets,
  type FindingDto,
  type LeakCaseDto,
  type ReadingDto,
  type RefrigerantEventDto,
  type UnitSystem,
} from '@coilpath/contract';
import type { attachments, circuits, findings, leakCases, readings, refrigerantEvents, units } from '../../db/schema';
import { STORED_UNITS } from './reading-calc';

const iso = (d: Date) => d.toISOString();

const round = (digits: number) => (n: number | null) => {
  if (n === null) return null;
  const f = 10 ** digits;
  const r = Math.round(n * f) / f;
  return Object.is(r, -0) ? 0 : r;
};
/** Gauge and line values: 0.01 removes conversion noise (765 kPa(g) typed comes back 765) and nothing a gauge shows. */
const gauge = round(2);
/** Computed values (saturation, superheat, subcooling): 0.1, as the screens show them. */
const computed = round(1);

/**
 * A stored reading (psig/°F) as the API answers it: in the branch's unit system, with the units stated.
 * Superheat and subcooling are temperature differences (× 5/9 to kelvin, no offset).
 */
export function readingDto(r: typeof readings.$inferSelect, circuitNumber: number, system: UnitSystem): ReadingDto {
  const units = readingUnitsBySystem[system];
  const p = (x: number | null) => gauge(x === null ? null : convertPressure(x, STORED_UNITS.pressure, units.pressure));
  const t = (x: number | null, round = gauge) =>
    round(x === null ? null : convertTemperature(x, STORED_UNITS.temperature, units.temperature));
  const dt = (x: number | null) =>
    computed(x === null ? null : convertTemperatureDifference(x, STORED_UNITS.temperature, units.temperature));
  return {
    id: r.id,
    visitId: r.visitId,
    unitId: r.unitId,
    circuitId: r.circuitId,
    circuitNumber,
    takenAt: iso(r.takenAt),
    refrigerant: r.refrigerant,
    suctionPressure: p(r.suctionPressure),
    liquidPressure: p(r.liquidPressure),
    dischargePressure: p(r.dischargePressure),
    suctionLineTemp: t(r.suctionLineTemp),
    liquidLineTemp: t(r.liquidLineTemp),
    outdoorTemp: t(r.outdoorTemp),
    suctionPressureController: p(r.suctionPressureController),
    liquidPressureController: p(r.liquidPressureController),
    dischargePressureController: p(r.dischargePressureController),
    suctionSaturationTemp: t(r.suctionSaturationTemp, computed),
    liquidSaturationTemp: t(r.liquidSaturationTemp, computed),
    superheat: dt(r.superheat),
    subcooling: dt(r.subcooling),
    elevationMeters: r.elevationMeters,
    notes: r.notes,
    units,
  };
}

export function findingDto(f: typeof findings.$inferSelect): FindingDto {
  return {
    id: f.id,
    visitId: f.visitId,
    unitId: f.unitId,
    causeCode: f.causeCode,
    origin: f.origin,
    alarmCode: f.alarmCode,
    reportedCircuit: f.reportedCircuit,
    actualCircuit: f.actualCircuit,
    notes: f.notes,
    notesAudience: f.notesAudience,
    createdAt: iso(f.createdAt),
  };
}

export function refrigerantEventDto(e: typeof refrigerantEvents.$inferSelect): RefrigerantEventDto {
  return {
    id: e.id,
    unitId: e.unitId,
    visitId: e.visitId,
    date: e.date,
    refrigerant: e.refrigerant,
    poundsAdded: e.poundsAdded,
    poundsRecovered: e.poundsRecovered,
    reason: e.reason,
    circuit: e.circuit,
    cylinderLot: e.cylinderLot,
    techId: e.techId,
    createdAt: iso(e.createdAt),
  };
}

export function leakCaseDto(c: typeof leakCases.$inferSelect): LeakCaseDto {
  return {
    id: c.id,
    unitId: c.unitId,
    openedOn: c.openedOn,
    rule: c.rule,
    method: c.method,
    thresholdPercent: c.thresholdPercent,
    leakRatePercent: c.leakRatePercent,
    repairDueDate: c.repairDueDate,
    chronic: c.chronic,
    status: c.status,
  };
}

export function attachmentDto(a: typeof attachments.$inferSelect): AttachmentDto {
  return {
    id: a.id,
    visitId: a.visitId,
    unitId: a.unitId,
    kind: a.kind,
    displayName: a.displayName,
    contentType: a.contentType,
    sizeBytes: a.sizeBytes,
    createdAt: iso(a.createdAt),
    url: `/api/attachments/${a.id}`,
    thumbUrl: `/api/attachments/${a.id}?thumb=1`,
  };
}

/**
 * A circuit's stored target ranges (°F differences) as the API answers them: in the branch's system (°F or K),
 * to 0.01 like the values typed on a gauge (a range typed in K comes back as typed).
 */
export function circuitTargetsDto(
  c: Pick<
    typeof circuits.$inferSelect,
    'targetSuperheatMinF' | 'targetSuperheatMaxF' | 'targetSubcoolingMinF' | 'targetSubcoolingMaxF' | 'targetSource'
  >,
  system: UnitSystem,
): CircuitTargets {
  const to = readingUnitsBySystem[system].temperature;
  const dt = (x: number) => gauge(convertTemperatureDifference(x, STORED_UNITS.temperature, to))!;
  const range = (min: number | null, max: number | null) => (min === null || max === null ? null : { min: dt(min), max: dt(max) });
  return {
    superheat: range(c.targetSuperheatMinF, c.targetSuperheatMaxF),
    subcooling: range(c.targetSubcoolingMinF, c.targetSubcoolingMaxF),
    source: c.targetSource,
  };
}

/** A circuit as the visit, the briefing and the Unit file answer it: its targets in the branch's system. */
export function circuitDto(c: typeof circuits.$inferSelect, unitSystem: UnitSystem) {
  return {
    id: c.id,
    number: c.number,
    compressorCount: c.compressorCount,
    chargeLb: c.chargeLb,
    targets: circuitTargetsDto(c, unitSystem),
  };
}

/** A unit's identity, refrigerant and charge as the visit and the briefing answer it. */
export function unitSummaryDto(u: typeof units.$inferSelect) {
  return {
    id: u.id,
    tag: u.tag,
    kind: u.kind,
    make: u.make,
    model: u.model,
    serial: u.serial,
    refrigerant: u.refrigerant,
    fullChargeLb: u.fullChargeLb,
    applianceCategory: u.applianceCategory,
  };
}
