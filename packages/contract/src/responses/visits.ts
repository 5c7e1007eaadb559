/** Answers of `/api/visits`, `/api/attachments` and the unit briefing (the Visit screen). */
import { z } from 'zod';
import { readingUnitsSchema, unitSystemSchema } from '../measure-schemas';
import { modelAlertRefSchema } from '../work-orders';
import type {
  AttachmentDto,
  CloseVisitResult,
  CurrentVisitResult,
  FindingDto,
  ReadingDto,
  RefrigerantEventResult,
  UnitBriefing,
  VisitDetail,
  VisitSignatureDto,
  VisitUnitDto,
} from '../visits';
import type { Agree, AllAgree } from './agree';
import { circuitTargetsSchema } from '../sites';
import {
  applianceCategorySchema,
  epa608TypeSchema,
  attachmentKindSchema,
  causeCodeSchema,
  causeOriginSchema,
  noteAudienceSchema,
  prioritySchema,
  refrigerantEventReasonSchema,
  returnNeedSchema,
  unitKindSchema,
  visitOutcomeSchema,
  workOrderKindSchema,
  workOrderStateSchema,
} from '../vocabulary-schemas';

export const leakCaseDtoSchema = z.object({
  id: z.string(),
  unitId: z.string(),
  openedOn: z.string(),
  rule: z.string(),
  method: z.union([z.literal('annualizing'), z.literal('rolling-average')]),
  thresholdPercent: z.number(),
  leakRatePercent: z.number(),
  repairDueDate: z.string(),
  chronic: z.boolean(),
  status: z.string(),
});

export const leakCheckDtoSchema = z.object({
  inScope: z.boolean(),
  rule: z.string().nullable(),
  method: z.union([z.literal('annualizing'), z.literal('rolling-average')]),
  leakRatePercent: z.number(),
  thresholdPercent: z.number().nullable(),
  exceeds: z.boolean(),
  repairDueDate: z.string().nullable(),
  chronic: z.boolean(),
});

export const visitCircuitDtoSchema = z.object({
  id: z.string(),
  number: z.number(),
  compressorCount: z.number(),
  chargeLb: z.number().nullable(),
  targets: circuitTargetsSchema,
});

export const visitStatusSchema = z.union([z.literal('booked'), z.literal('en_route'), z.literal('on_site'), z.literal('closed')]);

export const visitSignatureDtoSchema = z.union([
  z.object({
    kind: z.literal('signed'),
    signerName: z.string(),
    signedAt: z.string(),
    imageUrl: z.string(),
  }),
  z.object({
    kind: z.literal('customer_not_available'),
    recordedAt: z.string(),
  }),
]);

export const summaryMailResultSchema = z.object({
  sent: z.boolean(),
  to: z.string().nullable(),
  error: z.string().nullable(),
});

export const currentVisitResultSchema = z.object({
  visitId: z.string().nullable(),
  reason: z.union([z.literal('on_site'), z.literal('en_route'), z.literal('next_booked')]).nullable(),
});

export const readingDtoSchema = z.object({
  id: z.string(),
  visitId: z.string(),
  unitId: z.string(),
  circuitId: z.string(),
  circuitNumber: z.number(),
  takenAt: z.string(),
  refrigerant: z.string(),
  suctionPressure: z.number().nullable(),
  liquidPressure: z.number().nullable(),
  dischargePressure: z.number().nullable(),
  suctionLineTemp: z.number().nullable(),
  liquidLineTemp: z.number().nullable(),
  outdoorTemp: z.number().nullable(),
  suctionPressureController: z.number().nullable(),
  liquidPressureController: z.number().nullable(),
  dischargePressureController: z.number().nullable(),
  suctionSaturationTemp: z.number().nullable(),
  liquidSaturationTemp: z.number().nullable(),
  superheat: z.number().nullable(),
  subcooling: z.number().nullable(),
  elevationMeters: z.number(),
  notes: z.string().nullable(),
  units: readingUnitsSchema,
});

export const findingDtoSchema = z.object({
  id: z.string(),
  visitId: z.string(),
  unitId: z.string().nullable(),
  causeCode: causeCodeSchema,
  origin: causeOriginSchema,
  alarmCode: z.string().nullable(),
  reportedCircuit: z.number().nullable(),
  actualCircuit: z.number().nullable(),
  notes: z.string().nullable(),
  notesAudience: noteAudienceSchema,
  createdAt: z.string(),
});

export const refrigerantEventDtoSchema = z.object({
  id: z.string(),
  unitId: z.string(),
  visitId: z.string().nullable(),
  date: z.string(),
  refrigerant: z.string(),
  poundsAdded: z.number(),
  poundsRecovered: z.number(),
  reason: refrigerantEventReasonSchema,
  circuit: z.number().nullable(),
  cylinderLot: z.string().nullable(),
  techId: z.string().nullable(),
  createdAt: z.string(),
});

export const refrigerantEventResultSchema = z.object({
  event: refrigerantEventDtoSchema,
  leakCheck: leakCheckDtoSchema.nullable(),
  leakCase: leakCaseDtoSchema.nullable(),
  leakCaseOpened: z.boolean(),
});

export const attachmentDtoSchema = z.object({
  id: z.string(),
  visitId: z.string().nullable(),
  unitId: z.string().nullable(),
  kind: attachmentKindSchema,
  displayName: z.string(),
  contentType: z.string(),
  sizeBytes: z.number(),
  createdAt: z.string(),
  url: z.string(),
  thumbUrl: z.string(),
});

export const visitEventDtoSchema = z.object({
  state: workOrderStateSchema,
  at: z.string(),
  byUserId: z.string().nullable(),
});

export const visitUnitDtoSchema = z.object({
  id: z.string(),
  tag: z.string(),
  kind: unitKindSchema,
  make: z.string(),
  model: z.string(),
  serial: z.string(),
  refrigerant: z.string(),
  fullChargeLb: z.number(),
  applianceCategory: applianceCategorySchema,
  circuits: z.array(visitCircuitDtoSchema),
});

export const visitDetailSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  status: visitStatusSchema,
  techId: z.string(),
  techName: z.string(),
  enRouteAt: z.string().nullable(),
  onSiteAt: z.string().nullable(),
  closedAt: z.string().nullable(),
  outcome: visitOutcomeSchema.nullable(),
  returnNeeds: z.array(returnNeedSchema),
  returnNotes: z.string().nullable(),
  notes: z.string().nullable(),
  notesAudience: noteAudienceSchema,
  rootCauseFindingId: z.string().nullable(),
  leakRepair: z
    .object({
      leakCaseId: z.string(),
      repairDueDate: z.string(),
      verificationTests: z.number(),
    })
    .nullable(),
  summarySentAt: z.string().nullable(),
  signature: visitSignatureDtoSchema.nullable(),
  version: z.number(),
  booking: z
    .object({
      id: z.string(),
      startAt: z.string(),
      endAt: z.string(),
    })
    .nullable(),
  workOrder: z.object({
    id: z.string(),
    number: z.number().nullable(),
    kind: workOrderKindSchema,
    state: workOrderStateSchema,
    priority: prioritySchema,
    complaint: z.string(),
    requiredCertification: epa608TypeSchema.nullable(),
    latestAt: z.string().nullable(),
    modelAlert: modelAlertRefSchema.nullable(),
  }),
  site: z.object({
    id: z.string(),
    name: z.string(),
    address: z.string(),
    city: z.string(),
    accessNotes: z.string().nullable(),
    contactName: z.string().nullable(),
    contactPhone: z.string().nullable(),
  }),
  branch: z.object({
    id: z.string(),
    name: z.string(),
    timeZone: z.string(),
    unitSystem: unitSystemSchema,
    sensorTolerancePercent: z.number(),
    sensorToleranceAbsolute: z.number(),
    elevationMeters: z.number(),
  }),
  units: z.array(visitUnitDtoSchema),
  readings: z.array(readingDtoSchema),
  findings: z.array(findingDtoSchema),
  refrigerantEvents: z.array(refrigerantEventDtoSchema),
  attachments: z.array(attachmentDtoSchema),
  events: z.array(visitEventDtoSchema),
  canWrite: z.boolean(),
  canRecord: z.boolean(),
  recordRefusal: z.string().nullable(),
});

export const closeVisitResultSchema = z.object({
  visit: visitDetailSchema,
  returnWorkOrder: z
    .object({
      id: z.string(),
      number: z.number().nullable(),
      state: workOrderStateSchema,
      joined: z.boolean(),
    })
    .nullable(),
  summary: summaryMailResultSchema,
});

export const unitBriefingSchema = z.object({
  unit: z.object({
    id: z.string(),
    tag: z.string(),
    kind: unitKindSchema,
    make: z.string(),
    model: z.string(),
    serial: z.string(),
    refrigerant: z.string(),
    fullChargeLb: z.number(),
    applianceCategory: applianceCategorySchema,
    siteId: z.string(),
    siteName: z.string(),
  }),
  circuits: z.array(visitCircuitDtoSchema),
  lastVisit: z
    .object({
      visitId: z.string(),
      closedAt: z.string(),
      outcome: visitOutcomeSchema.nullable(),
      techName: z.string(),
      workOrderKind: workOrderKindSchema,
      notes: z.string().nullable(),
      findings: z.array(findingDtoSchema),
    })
    .nullable(),
  lastReadings: z.array(readingDtoSchema),
  units: readingUnitsSchema,
  openLeakCase: leakCaseDtoSchema.nullable(),
  refrigerantThisYear: z.object({
    year: z.string(),
    poundsAdded: z.number(),
    poundsRecovered: z.number(),
    fullChargeLb: z.number(),
    percentOfFullCharge: z.number(),
  }),
  repeatAlarms: z.array(
    z.object({
      code: z.string(),
      circuit: z.number().nullable(),
      count: z.number(),
      lastRaisedAt: z.string(),
    }),
  ),
  repeatAlarmWindow: z.object({
    days: z.number(),
    minCount: z.number(),
  }),
  photos: z.array(attachmentDtoSchema),
});

export const readingsAnswerSchema = z.object({ readings: z.array(readingDtoSchema) });
export const attachmentAnswerSchema = z.object({ attachment: attachmentDtoSchema });
export const summaryAnswerSchema = z.object({ summary: summaryMailResultSchema });

export type VisitsChecks = AllAgree<
  [
    Agree<ReadingDto, typeof readingDtoSchema>,
    Agree<FindingDto, typeof findingDtoSchema>,
    Agree<RefrigerantEventResult, typeof refrigerantEventResultSchema>,
    Agree<AttachmentDto, typeof attachmentDtoSchema>,
    Agree<VisitUnitDto, typeof visitUnitDtoSchema>,
    Agree<VisitSignatureDto, typeof visitSignatureDtoSchema>,
    Agree<VisitDetail, typeof visitDetailSchema>,
    Agree<CloseVisitResult, typeof closeVisitResultSchema>,
    Agree<CurrentVisitResult, typeof currentVisitResultSchema>,
    Agree<UnitBriefing, typeof unitBriefingSchema>,
  ]
>;
export const findingAnswerSchema = z.object({ finding: findingDtoSchema });
