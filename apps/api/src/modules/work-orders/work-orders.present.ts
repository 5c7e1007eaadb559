/** What the work-order routes answer: a work order as lists show it, site, unit, origin and leak deadline joined in. */
import { modelAlertRef, type WorkOrder } from '@coilpath/contract';
import type { WorkOrderListRecord } from './work-orders.repo';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function presentWorkOrder(r: WorkOrderListRecord): WorkOrder {
  const w = r.wo;
  return {
    id: w.id,
    number: w.number,
    branchId: w.branchId,
    siteId: w.siteId,
    siteName: r.siteName,
    siteAddress: r.siteAddress,
    siteLat: r.siteLat,
    siteLon: r.siteLon,
    unitId: w.unitId,
    unitTag: r.unitTag,
    unitMake: r.unitMake,
    unitModel: r.unitModel,
    unitRefrigerant: r.unitRefrigerant,
    kind: w.kind,
    state: w.state,
    priority: w.priority,
    complaint: w.complaint,
    requestedFrom: iso(w.requestedFrom),
    requestedTo: iso(w.requestedTo),
    slaDueAt: iso(w.slaDueAt),
    latestAt: iso(w.latestAt),
    plannedDate: w.plannedDate,
    requiredSkill: w.requiredSkill,
    requiredCertification: w.requiredCertification,
    estimatedMinutes: w.estimatedMinutes,
    originWorkOrderId: w.originWorkOrderId,
    originNumber: r.originNumber,
    leakCaseId: w.leakCaseId,
    leakRepairDueDate: r.leakRepairDueDate,
    modelAlert: modelAlertRef(w.purpose),
    booking:
      r.booking && r.booking.id
        ? {
            id: r.booking.id,
            techId: r.booking.techId,
            startAt: r.booking.startAt.toISOString(),
            endAt: r.booking.endAt.toISOString(),
            version: r.booking.version,
          }
        : null,
    createdAt: w.createdAt.toISOString(),
    updatedAt: w.updatedAt.toISOString(),
  };
}
