import { z } from 'zod';
import { idSchema, instantSchema, isoDateSchema, limits } from './common';
import { readingRangeIssues, type ReadingUnits, type UnitSystem } from './measure';
import { readingUnitsSchema } from './measure-schemas';
import type { ModelAlertRef } from './work-orders';
import type { CircuitTargets } from './target-range';
import type { VisitStatus } from './visit-status';
import type {
  AttachmentKind,
  CauseCode,
  CauseOrigin,
  NoteAudience,
  ReturnNeed,
  VisitOutcome,
  WorkOrderKind,
  WorkOrderState,
  Priority,
  UnitKind,
  ApplianceCategory,
  RefrigerantEventReason,
  Epa608Type,
  SignatureKind,
} from './vocabulary';
import {
  attachmentKindSchema,
  causeCodeSchema,
  causeOriginSchema,
  noteAudienceSchema,
  refrigerantEventReasonSchema,
  returnNeedSchema,
  visitOutcomeSchema,
} from './vocabulary-schemas';

/** Largest file a visit upload may be (photos, nameplates, PDFs). */
export const attachmentMaxBytes = 15 * 1024 * 1024;
/** Content types a visit upload may have (checked on the server by content, not by name). */
export const attachmentContentTypes = ['image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif', 'application/pdf'] as const;

/** PATCH /api/visits/:id — the technician's state buttons (closing has its own route). */
export const visitStateChangeSchema = z.strictObject({
  state: z.enum(['en_route', 'on_site']),
});
export type VisitStateChange = z.infer<typeof visitStateChangeSchema>;

/** A gauge, controller or line value as typed; its range depends on the body's units (below). */
const value = z.number({ message: 'Enter a number' });

/** One circuit's readings: reference-gauge values, and the controller's value beside each pressure. */
export const readingInputSchema = z.strictObject({
  circuitId: idSchema,
  suctionPressure: value.nullable().optional(),
  liquidPressure: value.nullable().optional(),
  dischargePressure: value.nullable().optional(),
  suctionLineTemp: value.nullable().optional(),
  liquidLineTemp: value.nullable().optional(),
  outdoorTemp: value.nullable().optional(),
  suctionPressureController: value.nullable().optional(),
  liquidPressureController: value.nullable().optional(),
  dischargePressureController: value.nullable().optional(),
  notes: z.string().trim().max(limits.longText).nullable().optional(),
});
export type ReadingInput = z.infer<typeof readingInputSchema>;

/**
 * POST /api/visits/:id/readings — one entry per circuit; saving a circuit again replaces this visit's
 * earlier entry. `units` states what the values are in (psig with F, or kPag with C; never mixed); the
 * server converts to its stored psig/°F. Each value is checked against the range in those units.
 */
export const saveReadingsSchema = z
  .strictObject({
    units: readingUnitsSchema,
    readings: z.array(readingInputSchema).min(1, 'Enter readings for at least one circuit').max(20),
  })
  .superRefine((v, ctx) => {
    // Zod runs this only on a body whose shape passed; the guards keep it safe regardless.
    if (!v.units || !Array.isArray(v.readings)) return;
    if (new Set(v.readings.map((r) => r.circuitId)).size !== v.readings.length) {
      ctx.addIssue({ code: 'custom', message: 'Each circuit may appear once', path: ['readings'] });
    }
    for (const issue of readingRangeIssues(v.units, v.readings))
      ctx.addIssue({ code: 'custom', message: issue.message, path: ['readings', issue.index, issue.field] });
  });
export type SaveReadings = z.infer<typeof saveReadingsSchema>;

/** POST /api/visits/:id/findings. `id` (made by the client) makes a retried save idempotent. */
export const findingInputSchema = z.strictObject({
  id: idSchema.optional(),
  unitId: idSchema.nullable().optional(),
  causeCode: causeCodeSchema,
  origin: causeOriginSchema,
  alarmCode: z.string().trim().max(40).nullable().optional(),
  reportedCircuit: z.number().int().min(1).max(20).nullable().optional(),
  actualCircuit: z.number().int().min(1).max(20).nullable().optional(),
  notes: z.string().trim().max(limits.longText).nullable().optional(),
  /** Who the finding's notes are for; internal notes never reach the customer's summary. */
  notesAudience: noteAudienceSchema.default('internal'),
});
export type FindingInput = z.infer<typeof findingInputSchema>;

const pounds = z.number({ message: 'Enter pounds as a number' }).min(0, 'Pounds cannot be negative').max(10_000, 'Above 10,000 lb');

/** POST /api/units/:id/refrigerant-events. `id` (made by the client) makes a retried save idempotent. */
export const refrigerantEventInputSchema = z
  .strictObject({
    id: idSchema.optional(),
    visitId: idSchema.nullable().optional(),
    /** Defaults to today in the branch's time zone. */
    date: isoDateSchema.optional(),
    refrigerant: z.string().trim().min(1, 'Choose the refrigerant').max(20),
    poundsAdded: pounds.default(0),
    poundsRecovered: pounds.default(0),
    reason: refrigerantEventReasonSchema,
    /** The circuit, by number, on a unit with several (the leak rate stays per appliance). */
    circuit: z
      .number({ error: 'Choose a circuit' })
      .int('Choose a circuit')
      .min(1, 'Choose a circuit')
      .max(99, 'Choose a circuit')
      .nullable()
      .optional(),
    cylinderLot: z.string().trim().max(60).nullable().optional(),
  })
  .refine((v) => v.poundsAdded > 0 || v.poundsRecovered > 0, {
    message: 'Enter the pounds added or recovered',
    path: ['poundsAdded'],
  });
export type RefrigerantEventInput = z.input<typeof refrigerantEventInputSchema>;

/** Largest signature image a close-out carries: the PNG's bytes (a signature pad's PNG is typically 5–40 KB). */
export const signatureMaxBytes = 200 * 1024;
/** The base64 text of `signatureMaxBytes` bytes. */
const signatureMaxBase64 = Math.ceil(signatureMaxBytes / 3) * 4;
/** Every PNG begins with the same 8 bytes (PNG spec §5.2, 89 50 4E 47 0D 0A 1A 0A): "iVBORw0KGgo" in base64. */
const PNG_BASE64_PREFIX = 'iVBORw0KGgo';

/**
 * The customer's sign-off in a close-out: the signer's printed name and the drawn signature as a PNG (base64,
 * without a `data:` prefix), or "customer not available" (no signature). The API decodes the image in full
 * and refuses one that is not a PNG. `signedAt` is when the phone took the signature (a close-out can wait
 * offline); the server keeps it when it lies between arriving on site and now, else uses its own clock.
 */
export const closeSignatureSchema = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({
      kind: z.literal('signed'),
      signerName: z.string().trim().min(1, 'Enter the name of the person signing').max(120, 'Use at most 120 characters for the name'),
      imagePng: z
        .string()
        .min(1, 'Draw the signature on the pad')
        .max(signatureMaxBase64, `The signature image is larger than ${signatureMaxBytes / 1024} KB; clear the pad and sign again`)
        .regex(/^[A-Za-z0-9+/]+={0,2}$/, 'The signature image must be PNG data in base64')
        .refine((s) => s.startsWith(PNG_BASE64_PREFIX), 'The signature image must be a PNG'),
      signedAt: instantSchema.optional(),
    }),
    z.strictObject({ kind: z.literal('customer_not_available') }),
  ],
  { error: 'Choose whether the customer signs or is not available' },
);
export type CloseSignature = z.input<typeof closeSignatureSchema>;

/**
 * The sign-off rule of a close-out: every close-out says whether the customer's on-site contact signed or was
 * not available (`signature` in the body). The API answers a close-out without it with 422 and this message; the
 * Visit screen asks with the same words.
 */
export function signatureChoiceRefusal(
  signature: { kind: SignatureKind } | null | undefined,
): { code: 'signature_required'; message: string } | null {
  if (signature) return null;
  return {
    code: 'signature_required',
    message: 'Ask the customer’s on-site contact to sign with their printed name, or choose “Customer not available”, before closing.',
  };
}

/** POST /api/visits/:id/close. */
export const closeVisitSchema = z
  .strictObject({
    outcome: visitOutcomeSchema,
    returnNeeds: z.array(returnNeedSchema).max(4).default([]),
    returnNotes: z.string().trim().max(limits.longText).nullable().optional(),
    notes: z.string().trim().max(limits.longText).nullable().optional(),
    /** Who the notes are for: `customer` notes go into the service summary, `internal` ones never do. */
    notesAudience: noteAudienceSchema.default('internal'),
    labourMinutes: z
      .number()
      .int()
      .min(0)
      .max(24 * 60)
      .nullable()
      .optional(),
    /** The finding marked as the call's root cause (see `rootCauseChoice`). */
    rootCauseFindingId: idSchema.nullable().optional(),
    /** The technician confirms closing a leak repair as resolved with nothing to show it (see `leakRepairCloseRefusal`). */
    confirmedWithoutVerification: z.boolean().optional(),
    /** The customer's sign-off: signed or not available (required at close-out, see `signatureChoiceRefusal`). */
    signature: closeSignatureSchema.optional(),
  })
  .refine((v) => v.outcome !== 'needs_return' || v.returnNeeds.length > 0, {
    message: 'Say what the return visit needs',
    path: ['returnNeeds'],
  });
export type CloseVisit = z.input<typeof closeVisitSchema>;

/** The form fields of POST /api/visits/:id/attachments. `id` (made by the client) makes a retried upload idempotent. */
/**
 * Closing a leak repair as resolved with nothing to show the leak is fixed — no verification test recorded on
 * its leak case and no refrigerant entry on the visit — needs the technician's explicit confirmation
 * (`confirmedWithoutVerification: true`). The API answers a close without it with 422 and this message; the
 * Visit screen asks with the same words before sending.
 */
export function leakRepairCloseRefusal(p: {
  leakRepair: { verificationTests: number } | null;
  outcome: VisitOutcome;
  refrigerantEntries: number;
  confirmed: boolean | undefined;
}): { code: 'leak_repair_unverified'; message: string } | null {
  if (!p.leakRepair || p.outcome !== 'resolved' || p.confirmed === true) return null;
  if (p.leakRepair.verificationTests > 0 || p.refrigerantEntries > 0) return null;
  return {
    code: 'leak_repair_unverified',
    message:
      'This visit is the repair of an open leak case, and neither a verification test nor a refrigerant entry is recorded. Confirm that you are closing the repair as resolved without them.',
  };
}

/**
 * The root-cause rule of a close-out: a call's cause is the finding the technician marks as its root cause.
 * With more than one finding the choice is required; with one, that finding is the root cause unless
 * another is named; with none there is no root cause. A chosen id that is not one of the visit's findings
 * is refused. The API answers a refusal with 422 and this message; the Visit screen asks with the same words.
 */
export function rootCauseChoice(
  findingIds: readonly string[],
  chosen: string | null | undefined,
): { ok: true; findingId: string | null } | { ok: false; code: 'root_cause_required' | 'root_cause_unknown'; message: string } {
  if (chosen) {
    return findingIds.includes(chosen)
      ? { ok: true, findingId: chosen }
      : {
          ok: false,
          code: 'root_cause_unknown',
          message: 'The root cause must be one of this visit’s findings. Choose it again from the list.',
        };
  }
  if (findingIds.length === 0) return { ok: true, findingId: null };
  if (findingIds.length === 1) return { ok: true, findingId: findingIds[0]! };
  return {
    ok: false,
    code: 'root_cause_required',
    message: `This visit has ${findingIds.length} findings: mark the one that caused the call as its root cause before closing.`,
  };
}

export const attachmentUploadFieldsSchema = z.object({
  id: idSchema.optional(),
  kind: attachmentKindSchema.optional(),
});

// ---- Response shapes -------------------------------------------------------------------------

/**
 * A saved reading, in the units it states (the branch's system): pressures in `units.pressure`,
 * line and saturation temperatures in `units.temperature`, superheat and subcooling as temperature
 * differences (°F, or K for °C). Gauge values are given to 0.01, computed ones to 0.1.
 */
export interface ReadingDto {
  id: string;
  visitId: string;
  unitId: string;
  circuitId: string;
  circuitNumber: number;
  takenAt: string;
  refrigerant: string;
  suctionPressure: number | null;
  liquidPressure: number | null;
  dischargePressure: number | null;
  suctionLineTemp: number | null;
  liquidLineTemp: number | null;
  outdoorTemp: number | null;
  suctionPressureController: number | null;
  liquidPressureController: number | null;
  dischargePressureController: number | null;
  suctionSaturationTemp: number | null;
  liquidSaturationTemp: number | null;
  superheat: number | null;
  subcooling: number | null;
  /** The branch elevation (metres) the saturation temperatures were computed at (gauge values are as read). */
  elevationMeters: number;
  notes: string | null;
  units: ReadingUnits;
}

export interface FindingDto {
  id: string;
  visitId: string;
  unitId: string | null;
  causeCode: CauseCode;
  origin: CauseOrigin;
  alarmCode: string | null;
  reportedCircuit: number | null;
  actualCircuit: number | null;
  notes: string | null;
  notesAudience: NoteAudience;
  createdAt: string;
}

export interface RefrigerantEventDto {
  id: string;
  unitId: string;
  visitId: string | null;
  date: string;
  refrigerant: string;
  poundsAdded: number;
  poundsRecovered: number;
  reason: RefrigerantEventReason;
  circuit: number | null;
  cylinderLot: string | null;
  techId: string | null;
  createdAt: string;
}

export interface LeakCaseDto {
  id: string;
  unitId: string;
  openedOn: string;
  rule: string;
  method: 'annualizing' | 'rolling-average';
  thresholdPercent: number;
  leakRatePercent: number;
  repairDueDate: string;
  chronic: boolean;
  status: string;
}

export interface LeakCheckDto {
  inScope: boolean;
  rule: string | null;
  method: 'annualizing' | 'rolling-average';
  leakRatePercent: number;
  thresholdPercent: number | null;
  exceeds: boolean;
  repairDueDate: string | null;
  chronic: boolean;
}

export interface RefrigerantEventResult {
  event: RefrigerantEventDto;
  /** null when the unit's refrigerant or charge is outside what Coilpath can compute. */
  leakCheck: LeakCheckDto | null;
  leakCase: LeakCaseDto | null;
  leakCaseOpened: boolean;
}

export interface AttachmentDto {
  id: string;
  visitId: string | null;
  unitId: string | null;
  kind: AttachmentKind;
  displayName: string;
  contentType: string;
  sizeBytes: number;
  createdAt: string;
  url: string;
  thumbUrl: string;
}

export interface VisitEventDto {
  state: WorkOrderState;
  at: string;
  byUserId: string | null;
}

export interface VisitCircuitDto {
  id: string;
  number: number;
  compressorCount: number;
  chargeLb: number | null;
  /** The manufacturer's target superheat and subcooling ranges, in the unit branch's system (°F or K); null ranges where none is set. */
  targets: CircuitTargets;
}

export interface VisitUnitDto {
  id: string;
  tag: string;
  kind: UnitKind;
  make: string;
  model: string;
  serial: string;
  refrigerant: string;
  fullChargeLb: number;
  applianceCategory: ApplianceCategory;
  circuits: VisitCircuitDto[];
}

export interface VisitDetail {
  id: string;
  branchId: string;
  status: VisitStatus;
  techId: string;
  techName: string;
  enRouteAt: string | null;
  onSiteAt: string | null;
  closedAt: string | null;
  outcome: VisitOutcome | null;
  returnNeeds: ReturnNeed[];
  returnNotes: string | null;
  notes: string | null;
  notesAudience: NoteAudience;
  /** The finding marked as the call's root cause (null: none marked, or no findings). */
  rootCauseFindingId: string | null;
  /** This visit repairs an open leak case: the case and how many verification tests it has (`leakRepairCloseRefusal`). */
  leakRepair: { leakCaseId: string; repairDueDate: string; verificationTests: number } | null;
  summarySentAt: string | null;
  /** The customer's sign-off at close-out; null while open (and for visits closed before sign-offs were asked). */
  signature: VisitSignatureDto | null;
  version: number;
  booking: { id: string; startAt: string; endAt: string } | null;
  workOrder: {
    id: string;
    number: number | null;
    kind: WorkOrderKind;
    state: WorkOrderState;
    priority: Priority;
    complaint: string;
    requiredCertification: Epa608Type | null;
    /** Latest acceptable time for the work (leak-repair deadlines, model-alert inspections). */
    latestAt: string | null;
    /** An inspection created from a model alert: what to check for. */
    modelAlert: ModelAlertRef | null;
  };
  site: {
    id: string;
    name: string;
    address: string;
    city: string;
    accessNotes: string | null;
    contactName: string | null;
    contactPhone: string | null;
  };
  branch: {
    id: string;
    name: string;
    timeZone: string;
    /** The system the Visit screen reads and shows readings in. */
    unitSystem: UnitSystem;
    sensorTolerancePercent: number;
    /** The branch setting, in psi (a pressure difference) whatever the unit system. */
    sensorToleranceAbsolute: number;
    /** Metres above sea level: gauge readings are made absolute with the standard atmosphere there. */
    elevationMeters: number;
  };
  units: VisitUnitDto[];
  readings: ReadingDto[];
  findings: FindingDto[];
  refrigerantEvents: RefrigerantEventDto[];
  attachments: AttachmentDto[];
  events: VisitEventDto[];
  /** True when the signed-in person is the assigned technician and the visit is not closed. */
  canWrite: boolean;
  /** `canWrite` and the visit is on site: readings, findings and refrigerant may be recorded (`recordingRefusal`). */
  canRecord: boolean;
  /** For the assigned technician of an open visit not on site yet: why nothing can be recorded (the API's refusal). */
  recordRefusal: string | null;
}

/** A closed visit's sign-off: the signer's name and when they signed (the image at `imageUrl`), or not available. */
export type VisitSignatureDto =
  { kind: 'signed'; signerName: string; signedAt: string; imageUrl: string } | { kind: 'customer_not_available'; recordedAt: string };

export interface SummaryMailResult {
  sent: boolean;
  to: string | null;
  /** Why the summary was not sent (no address, the mail server refused…). */
  error: string | null;
}

export interface CloseVisitResult {
  visit: VisitDetail;
  /** The return visit: a new one, or (`joined`) the unit's open return visit the need was added to. */
  returnWorkOrder: { id: string; number: number | null; state: WorkOrderState; joined: boolean } | null;
  summary: SummaryMailResult;
}

export interface CurrentVisitResult {
  visitId: string | null;
  /** Why this visit was chosen. */
  reason: 'on_site' | 'en_route' | 'next_booked' | null;
}

// ---- Unit briefing ---------------------------------------------------------------------------

export interface UnitBriefing {
  unit: {
    id: string;
    tag: string;
    kind: UnitKind;
    make: string;
    model: string;
    serial: string;
    refrigerant: string;
    fullChargeLb: number;
    applianceCategory: ApplianceCategory;
    siteId: string;
    siteName: string;
  };
  circuits: VisitCircuitDto[];
  lastVisit: {
    visitId: string;
    closedAt: string;
    outcome: VisitOutcome | null;
    techName: string;
    workOrderKind: WorkOrderKind;
    notes: string | null;
    findings: FindingDto[];
  } | null;
  /** The latest reading of each circuit, in the unit branch's system. */
  lastReadings: ReadingDto[];
  /** The unit branch's reading units (also stated on each reading). */
  units: ReadingUnits;
  openLeakCase: LeakCaseDto | null;
  refrigerantThisYear: {
    year: string;
    poundsAdded: number;
    poundsRecovered: number;
    fullChargeLb: number;
    /** poundsAdded ÷ full charge × 100. */
    percentOfFullCharge: number;
  };
  repeatAlarms: { code: string; circuit: number | null; count: number; lastRaisedAt: string }[];
  repeatAlarmWindow: { days: number; minCount: number };
  photos: AttachmentDto[];
}
