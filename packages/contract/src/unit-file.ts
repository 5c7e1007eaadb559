import { z } from 'zod';
import { idSchema, limits } from './common';
import { circuitTargetsSchema } from './sites';
import { pressureUnitSchema, temperatureUnitSchema, unitSystemSchema } from './measure-schemas';
import { refrigerantEventReasonLabels, refrigerantRecordEventKindLabels } from './vocabulary';
import {
  additionExemptionSchema,
  alarmSourceSchema,
  applianceCategorySchema,
  attachmentKindSchema,
  causeCodeSchema,
  causeOriginSchema,
  leakCaseStatusSchema,
  leakObligationStateSchema,
  prioritySchema,
  refrigerantEventReasonSchema,
  refrigerantRecordEventKindSchema,
  unitKindSchema,
  visitOutcomeSchema,
  workOrderKindSchema,
  workOrderStateSchema,
} from './vocabulary-schemas';

/**
 * Unit file (docs/DESIGN.md §3, `/units/:id`): everything known about one unit. Readable by the owner, the unit
 * branch's managers and dispatchers, and technicians who have (or had) a visit or booking on the unit.
 */

const instant = z.string();
const n = z.number().nullable();

export const unitFileAttachmentSchema = z.object({
  id: idSchema,
  kind: attachmentKindSchema,
  displayName: z.string(),
  contentType: z.string(),
  sizeBytes: z.number().int(),
  visitId: idSchema.nullable(),
  createdAt: instant,
  /** Where the file can be fetched (same-origin, signed-in). */
  url: z.string(),
});
export type UnitFileAttachment = z.infer<typeof unitFileAttachmentSchema>;

export const unitFileReadingSchema = z.object({
  id: idSchema,
  visitId: idSchema,
  circuitId: idSchema,
  circuitNumber: z.number().int(),
  takenAt: instant,
  refrigerant: z.string(),
  suctionPressure: n,
  liquidPressure: n,
  dischargePressure: n,
  suctionLineTemp: n,
  liquidLineTemp: n,
  outdoorTemp: n,
  suctionPressureController: n,
  liquidPressureController: n,
  dischargePressureController: n,
  suctionSaturationTemp: n,
  liquidSaturationTemp: n,
  superheat: n,
  subcooling: n,
  /** The units of the values above (the unit branch's system; see ReadingDto). */
  elevationMeters: z.number(),
  units: z.object({ pressure: pressureUnitSchema, temperature: temperatureUnitSchema }),
});
export type UnitFileReading = z.infer<typeof unitFileReadingSchema>;

export const unitFileSchema = z.object({
  unit: z.object({
    id: idSchema,
    tag: z.string(),
    kind: unitKindSchema,
    make: z.string(),
    model: z.string(),
    serial: z.string(),
    installDate: z.string().nullable(),
    warrantyEnd: z.string().nullable(),
    refrigerant: z.string(),
    fullChargeLb: z.number(),
    applianceCategory: applianceCategorySchema,
    tonnage: n,
    notes: z.string().nullable(),
    archivedAt: instant.nullable(),
  }),
  site: z.object({
    id: idSchema,
    name: z.string(),
    address: z.string(),
    city: z.string(),
    region: z.string(),
    accessNotes: z.string().nullable(),
    customerName: z.string(),
  }),
  branch: z.object({ id: idSchema, name: z.string(), timeZone: z.string(), unitSystem: unitSystemSchema }),
  nameplate: unitFileAttachmentSchema.nullable(),
  circuits: z.array(
    z.object({
      id: idSchema,
      number: z.number().int(),
      compressorCount: z.number().int(),
      chargeLb: n,
      /** Target superheat and subcooling ranges, in the branch's system (°F or K). */
      targets: circuitTargetsSchema,
    }),
  ),
  agreements: z.array(
    z.object({
      id: idSchema,
      name: z.string(),
      status: z.enum(['active', 'ended', 'cancelled']),
      termStart: z.string(),
      termEnd: z.string(),
      slaHours: z.number().int(),
      rrule: z.string(),
    }),
  ),
  alarms: z.array(
    z.object({
      id: idSchema,
      circuit: z.number().int().nullable(),
      code: z.string(),
      description: z.string().nullable(),
      raisedAt: instant,
      clearedAt: instant.nullable(),
      source: alarmSourceSchema,
    }),
  ),
  readings: z.array(unitFileReadingSchema),
  findings: z.array(
    z.object({
      id: idSchema,
      visitId: idSchema,
      workOrderId: idSchema,
      workOrderNumber: z.number().int().nullable(),
      causeCode: causeCodeSchema,
      origin: causeOriginSchema,
      alarmCode: z.string().nullable(),
      reportedCircuit: z.number().int().nullable(),
      actualCircuit: z.number().int().nullable(),
      notes: z.string().nullable(),
      createdAt: instant,
      techName: z.string().nullable(),
    }),
  ),
  leakCases: z.array(
    z.object({
      id: idSchema,
      openedOn: z.string(),
      rule: z.string(),
      method: z.enum(['annualizing', 'rolling-average']),
      thresholdPercent: z.number(),
      leakRatePercent: z.number(),
      repairDueDate: z.string(),
      chronic: z.boolean(),
      status: leakCaseStatusSchema,
      repairedOn: z.string().nullable(),
      closedAt: instant.nullable(),
      verificationTests: z.array(
        z.object({ id: idSchema, kind: z.enum(['initial', 'follow_up']), testedOn: z.string(), passed: z.boolean() }),
      ),
    }),
  ),
  attachments: z.array(unitFileAttachmentSchema),
  workOrders: z.array(
    z.object({
      id: idSchema,
      number: z.number().int().nullable(),
      kind: workOrderKindSchema,
      state: workOrderStateSchema,
      priority: prioritySchema,
      complaint: z.string(),
      purpose: z.string().nullable(),
      createdAt: instant,
      closedAt: instant.nullable(),
      outcome: visitOutcomeSchema.nullable(),
      originWorkOrderId: idSchema.nullable(),
      visits: z.array(
        z.object({
          id: idSchema,
          techName: z.string(),
          onSiteAt: instant.nullable(),
          closedAt: instant.nullable(),
          outcome: visitOutcomeSchema.nullable(),
          labourMinutes: z.number().int().nullable(),
        }),
      ),
    }),
  ),
});
export type UnitFile = z.infer<typeof unitFileSchema>;

/** The unit search behind `/units` (no id): the units the person may open. */
export const unitSearchQuerySchema = z.object({
  q: z.string().trim().max(limits.shortText).optional(),
  branchId: idSchema.optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type UnitSearchQuery = z.infer<typeof unitSearchQuerySchema>;

export const unitSearchResultSchema = z.object({
  units: z.array(
    z.object({
      id: idSchema,
      tag: z.string(),
      kind: unitKindSchema,
      make: z.string(),
      model: z.string(),
      serial: z.string(),
      siteName: z.string(),
      branchName: z.string(),
      openWorkOrders: z.number().int(),
    }),
  ),
  /** True when more units matched than were returned. */
  more: z.boolean(),
});
export type UnitSearchResult = z.infer<typeof unitSearchResultSchema>;

/* ------------------------------------------------------------ refrigerant record */

/** `GET /api/units/:id/refrigerant-record`: JSON (default), or the auditor's copy as CSV or PDF. */
export const refrigerantRecordQuerySchema = z.strictObject({
  format: z.enum(['json', 'csv', 'pdf']).default('json'),
});
export type RefrigerantRecordQuery = z.infer<typeof refrigerantRecordQuerySchema>;

const person = z.object({
  name: z.string(),
  /** EPA 608 certification type and number as recorded on the person (null when none is recorded). */
  epa608Type: z.string(),
  epa608Number: z.string().nullable(),
});

/** The leak rate computed at one counted addition, under the rule in force that day. */
export const refrigerantRecordRateSchema = z.object({
  /** Percent of full charge per year, full precision. */
  leakRatePercent: z.number(),
  inScope: z.boolean(),
  rule: z.string().nullable(),
  thresholdPercent: z.number().nullable(),
  /** Strictly over the threshold, compared exactly (a rate equal to it is not over). */
  overThreshold: z.boolean(),
});

export const refrigerantRecordEventSchema = z.object({
  kind: refrigerantRecordEventKindSchema,
  date: z.string(),
  /** The refrigerant event, leak case or verification test the entry comes from. */
  sourceId: idSchema,
  /** When it was written down (UTC); null where the record keeps only a date. */
  recordedAt: z.string().nullable(),
  poundsAdded: z.number().nullable(),
  poundsRecovered: z.number().nullable(),
  reason: refrigerantEventReasonSchema.nullable(),
  exempt: additionExemptionSchema.nullable(),
  /** Refrigerant entries: the circuit, by number, when one was named. */
  circuit: z.number().int().nullable(),
  /** Counted toward the leak rate (a non-exempt addition). */
  counted: z.boolean(),
  /** The leak case this entry belongs to (grouped by leak), when there is one. */
  leakCaseId: idSchema.nullable(),
  cylinderLot: z.string().nullable(),
  visitId: idSchema.nullable(),
  /** Who did it: the technician of an addition, the person who recorded a test. */
  by: person.nullable(),
  /** Verification tests. */
  stage: z.enum(['initial', 'follow-up']).nullable(),
  passed: z.boolean().nullable(),
  /** Counted additions: the rate at that moment. */
  rate: refrigerantRecordRateSchema.nullable(),
  /** This addition opened the obligation triggered on its date. */
  opensObligation: z.boolean(),
  note: z.string().nullable(),
});
export type RefrigerantRecordEvent = z.infer<typeof refrigerantRecordEventSchema>;

/**
 * An entry of the record in words, the same on screen and in the auditor's PDF: "Refrigerant added —
 * Leak top-off — circuit 2", "Initial verification test — passed".
 */
export function refrigerantRecordEntryText(
  e: Pick<RefrigerantRecordEvent, 'kind' | 'stage' | 'passed' | 'reason' | 'circuit' | 'note'>,
): string {
  if (e.kind === 'verification')
    return `${e.stage === 'initial' ? 'Initial' : 'Follow-up'} verification test — ${e.passed ? 'passed' : 'failed'}`;
  const parts = [
    refrigerantRecordEventKindLabels[e.kind],
    e.reason ? refrigerantEventReasonLabels[e.reason] : e.note,
    e.circuit != null ? `circuit ${e.circuit}` : null,
  ];
  return parts.filter(Boolean).join(' — ');
}

export const refrigerantRecordObligationSchema = z.object({
  triggeredOn: z.string(),
  leakRatePercent: z.number(),
  rule: z.string().nullable(),
  thresholdPercent: z.number().nullable(),
  repairDueDate: z.string(),
  repairedOn: z.string().nullable(),
  /** Initial verification test due by the repair deadline; follow-up within 10 days of a passed initial test. */
  initialTestDue: z.string(),
  followUpTestDue: z.string().nullable(),
  state: leakObligationStateSchema,
  /** The Watchlist's leak case opened for it, when one was. */
  leakCaseId: idSchema.nullable(),
  /** Repairs, tests and plans dated from the trigger to the next obligation's, in order. */
  timeline: z.array(z.object({ date: z.string(), kind: refrigerantRecordEventKindSchema, text: z.string() })),
});
export type RefrigerantRecordObligation = z.infer<typeof refrigerantRecordObligationSchema>;

export const refrigerantRecordSchema = z.object({
  /** The branch's date the record is computed for. */
  asOf: z.string(),
  generatedAt: z.string(),
  appliance: z.object({
    unitId: idSchema,
    tag: z.string(),
    kind: unitKindSchema,
    make: z.string(),
    model: z.string(),
    serial: z.string(),
    installDate: z.string().nullable(),
    refrigerant: z.string(),
    applianceCategory: applianceCategorySchema,
    fullChargeLb: z.number(),
    /** How the full charge was determined. */
    fullChargeBasis: z.string(),
    circuits: z.array(z.object({ number: z.number().int(), chargeLb: z.number().nullable() })),
    site: z.object({ name: z.string(), address: z.string(), city: z.string(), region: z.string(), customerName: z.string() }),
    branch: z.object({ id: idSchema, name: z.string(), timeZone: z.string() }),
  }),
  method: z.enum(['annualizing', 'rolling-average']),
  industrialShutdown: z.boolean(),
  /** The rule in force on asOf. */
  inScope: z.boolean(),
  rule: z.string().nullable(),
  thresholdPercent: z.number().nullable(),
  /** At the latest counted addition. */
  leakRatePercent: z.number(),
  chronicYears: z.array(z.number().int()),
  events: z.array(refrigerantRecordEventSchema),
  obligations: z.array(refrigerantRecordObligationSchema),
  openObligation: refrigerantRecordObligationSchema.nullable(),
  /** Set when the ledger could not be computed (e.g. a refrigerant Coilpath has no rule data for). */
  computeError: z.string().nullable(),
  cautions: z.array(z.string()),
  sources: z.array(z.string()),
});
export type RefrigerantRecord = z.infer<typeof refrigerantRecordSchema>;
