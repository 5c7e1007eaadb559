import { z } from 'zod';
import { idSchema, limits } from './common';
import { pressureUnitSchema, temperatureUnitSchema, unitSystemSchema } from './measure';
import {
  alarmSourceSchema,
  applianceCategorySchema,
  attachmentKindSchema,
  causeCodeSchema,
  causeOriginSchema,
  leakCaseStatusSchema,
  prioritySchema,
  refrigerantEventReasonSchema,
  unitKindSchema,
  visitOutcomeSchema,
  workOrderKindSchema,
  workOrderStateSchema,
} from './vocabulary';

/**
 * Unit file (DESIGN §3, `/units/:id`): everything known about one unit. Readable by the owner, the unit
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
  units: z.object({ pressure: pressureUnitSchema, temperature: temperatureUnitSchema }),
});
export type UnitFileReading = z.infer<typeof unitFileReadingSchema>;

/** One refrigerant event with the leak rate computed at that addition (@coilpath/calc). */
export const unitFileRefrigerantEventSchema = z.object({
  id: idSchema,
  date: z.string(),
  refrigerant: z.string(),
  poundsAdded: z.number(),
  poundsRecovered: z.number(),
  reason: refrigerantEventReasonSchema,
  cylinderLot: z.string().nullable(),
  techName: z.string().nullable(),
  visitId: idSchema.nullable(),
  /** Whether this addition counts toward the leak rate (not after a retrofit, new charge or seasonal variance). */
  counts: z.boolean(),
  /** Percent per year by the annualizing method at this addition; null for events that do not count. */
  leakRatePercent: n,
  rule: z.string().nullable(),
  thresholdPercent: n,
  exceeds: z.boolean(),
  repairDueDate: z.string().nullable(),
  chronic: z.boolean(),
  /** Why no rate was computed, when none was. */
  note: z.string().nullable(),
});
export type UnitFileRefrigerantEvent = z.infer<typeof unitFileRefrigerantEventSchema>;

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
  circuits: z.array(z.object({ id: idSchema, number: z.number().int(), compressorCount: z.number().int(), chargeLb: n })),
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
  refrigerantLog: z.array(unitFileRefrigerantEventSchema),
  /** The leak-rate method the log uses. */
  leakRateMethod: z.literal('annualizing'),
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
      verificationTests: z.array(z.object({ id: idSchema, kind: z.enum(['initial', 'follow_up']), testedOn: z.string(), passed: z.boolean() })),
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
