/** The unit file's answer (unit-file.service.ts). */
import type { UnitFile } from '@coilpath/contract';
import { circuitDto, readingDto } from '../visits/visits.present';
import type { AttachmentRecord, UnitFileRows, UnitRecord } from './unit-file.repo';

const iso = (d: Date | null) => (d ? d.toISOString() : null);
const attachmentUrl = (unitId: string, id: string) => `/api/units/${unitId}/file/attachments/${id}`;

export function presentUnitFile(u: UnitRecord, rows: UnitFileRows): UnitFile {
  const unitId = u.id;
  const {
    siteRows,
    branchRows,
    circuitRows,
    agreementRows,
    alarmRows,
    readingRows,
    findingRows,
    caseRows,
    attachmentRows,
    woRows,
    tests,
    visitRows,
  } = rows;
  const site = siteRows[0]!;
  const branch = branchRows[0]!;
  const toAttachment = (a: AttachmentRecord) => ({
    id: a.id,
    kind: a.kind,
    displayName: a.displayName,
    contentType: a.contentType,
    sizeBytes: a.sizeBytes,
    visitId: a.visitId,
    createdAt: a.createdAt.toISOString(),
    url: attachmentUrl(unitId, a.id),
  });
  const nameplate =
    attachmentRows.find((a) => a.id === u.nameplateAttachmentId) ?? attachmentRows.find((a) => a.kind === 'nameplate') ?? null;

  return {
    unit: {
      id: u.id,
      tag: u.tag,
      kind: u.kind,
      make: u.make,
      model: u.model,
      serial: u.serial,
      installDate: u.installDate,
      warrantyEnd: u.warrantyEnd,
      refrigerant: u.refrigerant,
      fullChargeLb: u.fullChargeLb,
      applianceCategory: u.applianceCategory,
      tonnage: u.tonnage,
      notes: u.notes,
      archivedAt: iso(u.archivedAt),
    },
    site,
    branch,
    nameplate: nameplate ? toAttachment(nameplate) : null,
    circuits: circuitRows.map((c) => circuitDto(c, branch.unitSystem)),
    agreements: agreementRows,
    alarms: alarmRows.map((a) => ({
      id: a.id,
      circuit: a.circuit,
      code: a.code,
      description: a.description,
      raisedAt: a.raisedAt.toISOString(),
      clearedAt: iso(a.clearedAt),
      source: a.source,
    })),
    readings: readingRows.reverse().map(({ r, circuitNumber }) => readingDto(r, circuitNumber, branch.unitSystem)),
    findings: findingRows.map(({ f, workOrderId, workOrderNumber, techName }) => ({
      id: f.id,
      visitId: f.visitId,
      workOrderId,
      workOrderNumber,
      causeCode: f.causeCode,
      origin: f.origin,
      alarmCode: f.alarmCode,
      reportedCircuit: f.reportedCircuit,
      actualCircuit: f.actualCircuit,
      notes: f.notes,
      createdAt: f.createdAt.toISOString(),
      techName,
    })),
    leakCases: caseRows.map((c) => ({
      id: c.id,
      openedOn: c.openedOn,
      rule: c.rule,
      method: c.method,
      thresholdPercent: c.thresholdPercent,
      leakRatePercent: c.leakRatePercent,
      repairDueDate: c.repairDueDate,
      chronic: c.chronic,
      status: c.status,
      repairedOn: c.repairedOn,
      closedAt: iso(c.closedAt),
      verificationTests: tests
        .filter((t) => t.leakCaseId === c.id)
        .map((t) => ({ id: t.id, kind: t.kind, testedOn: t.testedOn, passed: t.passed })),
    })),
    attachments: attachmentRows.map(toAttachment),
    workOrders: woRows.map((w) => ({
      id: w.id,
      number: w.number,
      kind: w.kind,
      state: w.state,
      priority: w.priority,
      complaint: w.complaint,
      purpose: w.purpose,
      createdAt: w.createdAt.toISOString(),
      closedAt: iso(w.closedAt),
      outcome: w.outcome,
      originWorkOrderId: w.originWorkOrderId,
      visits: visitRows
        .filter(({ v }) => v.workOrderId === w.id)
        .map(({ v, techName }) => ({
          id: v.id,
          techName,
          onSiteAt: iso(v.onSiteAt),
          closedAt: iso(v.closedAt),
          outcome: v.outcome,
          labourMinutes: v.labourMinutes,
        })),
    })),
  };
}
