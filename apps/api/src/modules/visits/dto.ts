import type { AttachmentDto, FindingDto, LeakCaseDto, ReadingDto, RefrigerantEventDto } from '@coilpath/contract';
import type { attachments, findings, leakCases, readings, refrigerantEvents } from '../../db/schema';

const iso = (d: Date) => d.toISOString();

export function readingDto(r: typeof readings.$inferSelect, circuitNumber: number): ReadingDto {
  return {
    id: r.id,
    visitId: r.visitId,
    unitId: r.unitId,
    circuitId: r.circuitId,
    circuitNumber,
    takenAt: iso(r.takenAt),
    refrigerant: r.refrigerant,
    suctionPressure: r.suctionPressure,
    liquidPressure: r.liquidPressure,
    dischargePressure: r.dischargePressure,
    suctionLineTemp: r.suctionLineTemp,
    liquidLineTemp: r.liquidLineTemp,
    outdoorTemp: r.outdoorTemp,
    suctionPressureController: r.suctionPressureController,
    liquidPressureController: r.liquidPressureController,
    dischargePressureController: r.dischargePressureController,
    suctionSaturationTemp: r.suctionSaturationTemp,
    liquidSaturationTemp: r.liquidSaturationTemp,
    superheat: r.superheat,
    subcooling: r.subcooling,
    notes: r.notes,
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
