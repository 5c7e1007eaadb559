import { z } from 'zod';
import { base64FileSchema, idSchema, instantSchema, isoDateSchema, limits, oneOfCsvOrFile, oneOfCsvOrFileMessage } from './common';
import {
  leakCaseStatusSchema,
  leakObligationStateSchema,
  prioritySchema,
  returnNeedSchema,
  causeCodeSchema,
  causeOriginSchema,
  workOrderStateSchema,
  workOrderKindSchema,
  visitOutcomeSchema,
  epa608TypeSchema,
} from './vocabulary-schemas';

/* ---------------------------------------------------------------- alarms */

export const alarmCodeSchema = z.string().trim().min(1, 'Enter the alarm code').max(40, 'At most 40 characters');
export const circuitNumberSchema = z.number().int('A circuit is a whole number').min(1).max(20);

/** An alarm phoned in, typed into the form, or posted by another system. */
export const alarmInputSchema = z.strictObject({
  unitId: idSchema,
  circuit: circuitNumberSchema.nullable().default(null),
  code: alarmCodeSchema,
  description: z.string().trim().max(limits.shortText).optional(),
  raisedAt: instantSchema,
  clearedAt: instantSchema.nullable().optional(),
  /** `form` from Coilpath's own screen; anything posted by another system is `api`. */
  source: z.enum(['form', 'api']).default('api'),
});
export type AlarmInput = z.input<typeof alarmInputSchema>;

export const alarmListQuerySchema = z.object({
  branchId: idSchema.optional(),
  unitId: idSchema.optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});

export interface AlarmRow {
  id: string;
  branchId: string;
  unitId: string;
  unitTag: string;
  unitSerial: string;
  siteName: string;
  circuit: number | null;
  code: string;
  description: string | null;
  raisedAt: string;
  clearedAt: string | null;
  source: 'form' | 'csv' | 'api' | 'controller';
}

/**
 * CSV import of alarms: columns `unit_serial`, `circuit`, `code`, `raised_at` (headers in any case,
 * spaces or underscores). `raised_at` without an offset is read in the branch's time zone.
 */
export const alarmImportSchema = z
  .strictObject({
    branchId: idSchema.optional(),
    /** The file's text, already decoded. */
    csv: z.string().min(1, 'The file is empty').max(900_000, 'The file is larger than 900 kB; split it').optional(),
    /** The file's bytes, base64 (what the screen sends): the server works out the encoding. */
    file: base64FileSchema(900_000, 'The file is larger than 900 kB; split it').optional(),
    mode: z.enum(['dry_run', 'commit']).default('dry_run'),
  })
  .refine(oneOfCsvOrFile, oneOfCsvOrFileMessage);
export type AlarmImport = z.input<typeof alarmImportSchema>;

export interface AlarmImportError {
  /** 1-based data row number (the header is row 0), or 0 for the file itself. */
  row: number;
  field: string | null;
  message: string;
}
export interface AlarmImportRow {
  row: number;
  unitId: string;
  unitTag: string;
  serial: string;
  circuit: number | null;
  code: string;
  raisedAt: string;
  /** Already in Coilpath (same unit, code and instant): skipped, not an error. */
  duplicate: boolean;
}
export interface AlarmImportResult {
  mode: 'dry_run' | 'commit';
  /** What the file was read as: `UTF-8`, or the legacy encoding it was converted from (e.g. `windows-1252`). */
  encoding: string;
  total: number;
  rows: AlarmImportRow[];
  errors: AlarmImportError[];
  written: number;
  skipped: number;
}

/* --------------------------------------------------------- repeat alarms */

export const repeatAlarmQuerySchema = z.object({ branchId: idSchema.optional() });

export interface RepeatAlarmUnit {
  unitId: string;
  branchId: string;
  unitTag: string;
  make: string;
  model: string;
  serial: string;
  siteId: string;
  siteName: string;
  code: string;
  count: number;
  first: string;
  last: string;
  /** Circuits the controller reported in the span. */
  circuits: (string | number)[];
  /** A finding recorded a different actual circuit than the reported one. */
  circuitMismatch: boolean;
  visits: {
    workOrderId: string;
    number: number | null;
    kind: z.infer<typeof workOrderKindSchema>;
    state: z.infer<typeof workOrderStateSchema>;
    closedAt: string | null;
    outcome: z.infer<typeof visitOutcomeSchema> | null;
    techName: string | null;
  }[];
  findings: {
    id: string;
    causeCode: z.infer<typeof causeCodeSchema>;
    origin: z.infer<typeof causeOriginSchema>;
    alarmCode: string | null;
    reportedCircuit: number | null;
    actualCircuit: number | null;
    notes: string | null;
    createdAt: string;
  }[];
}
export interface RepeatAlarmResponse {
  asOf: string;
  /** The rule per branch: N alarms of one code within M days. */
  rules: { branchId: string; minCount: number; windowDays: number }[];
  units: RepeatAlarmUnit[];
}

/* ------------------------------------------------------------ leak cases */

export const leakCaseQuerySchema = z.object({
  branchId: idSchema.optional(),
  /** `active`: every case not closed (open, repaired awaiting follow-up, retrofit or retirement planned). */
  status: z.enum(['active', 'closed', 'all']).default('active'),
});

/** Days before a deadline at which a case counts as due soon. */
export const DUE_SOON_DAYS = 7;

export type DeadlineState = 'overdue' | 'due_soon' | 'ok' | 'met';

export interface LeakDeadline {
  what: 'repair' | 'initial_verification' | 'follow_up_verification' | 'retrofit_retire_plan' | 'retrofit_retire_complete';
  due: string;
  daysLeft: number;
  state: DeadlineState;
  /** The rule that sets it, with the tag from LEAK-RULES.md ([P], [S], [M]). */
  source: string;
}

export interface VerificationTestRow {
  id: string;
  kind: 'initial' | 'follow_up';
  testedOn: string;
  passed: boolean;
  notes: string | null;
}

export interface LeakCaseRow {
  id: string;
  branchId: string;
  unitId: string;
  unitTag: string;
  siteName: string;
  make: string;
  model: string;
  refrigerant: string;
  fullChargeLb: number;
  rule: string;
  method: 'annualizing' | 'rolling-average';
  thresholdPercent: number;
  leakRatePercent: number;
  openedOn: string;
  repairDueDate: string;
  repairedOn: string | null;
  chronic: boolean;
  status: z.infer<typeof leakCaseStatusSchema>;
  /**
   * The state of this case's obligation in the unit's refrigerant record (`leakObligations` over every
   * addition, repair and test); null when the record has no obligation for this case.
   */
  obligationState: z.infer<typeof leakObligationStateSchema> | null;
  planKind: 'retrofit' | 'retire' | null;
  planDueDate: string | null;
  notes: string | null;
  /** The repair visit's work order and its latest visit (null before it is booked). */
  repairWorkOrder: { id: string; number: number | null; state: z.infer<typeof workOrderStateSchema>; visitId: string | null } | null;
  tests: VerificationTestRow[];
  deadlines: LeakDeadline[];
  /** The nearest deadline not yet met (null when all are met). */
  next: LeakDeadline | null;
  /** EPA 608 certification the refrigerant work needs. */
  requiredCertification: Exclude<z.infer<typeof epa608TypeSchema>, 'none'>;
  today: string;
}

export const leakCasePatchSchema = z.discriminatedUnion('action', [
  z.strictObject({ action: z.literal('repaired'), repairedOn: isoDateSchema, notes: z.string().max(limits.longText).optional() }),
  z.strictObject({ action: z.literal('close'), notes: z.string().max(limits.longText).optional() }),
  z.strictObject({
    action: z.literal('plan'),
    planKind: z.enum(['retrofit', 'retire']),
    notes: z.string().max(limits.longText).optional(),
  }),
]);
export type LeakCasePatch = z.infer<typeof leakCasePatchSchema>;

export const verificationTestInputSchema = z.strictObject({
  kind: z.enum(['initial', 'follow_up']),
  testedOn: isoDateSchema,
  passed: z.boolean(),
  notes: z.string().trim().max(limits.longText).optional(),
});
export type VerificationTestInput = z.infer<typeof verificationTestInputSchema>;

export const bookRepairSchema = z.strictObject({
  priority: prioritySchema.default('high'),
  notes: z.string().trim().max(limits.longText).optional(),
});
export type BookRepair = z.input<typeof bookRepairSchema>;

/** The answer to booking a leak case's repair: the work order, new or (`joined`) the unit's open return visit it joined. */
export interface BookRepairResult {
  leakCase: LeakCaseRow;
  workOrderId: string;
  joined: boolean;
}

/* ----------------------------------------------------- return visits */

export const returnVisitQuerySchema = z.object({ branchId: idSchema.optional() });

export interface ReturnVisitRow {
  workOrderId: string;
  number: number | null;
  branchId: string;
  siteName: string;
  unitId: string | null;
  unitTag: string | null;
  priority: z.infer<typeof prioritySchema>;
  latestAt: string | null;
  createdAt: string;
  complaint: string;
  returnNeeds: z.infer<typeof returnNeedSchema>[];
  returnNotes: string | null;
  origin: { workOrderId: string; number: number | null; closedAt: string | null; techName: string | null } | null;
}

/** Send a return visit to the Roster queue: its priority and the latest date it may be booked. */
export const queueReturnVisitSchema = z.strictObject({
  priority: prioritySchema,
  latestDate: isoDateSchema,
});
export type QueueReturnVisit = z.infer<typeof queueReturnVisitSchema>;

/** A unit to pick in the alarm and agreement forms. */
export interface UnitChoice {
  id: string;
  branchId: string;
  tag: string;
  make: string;
  model: string;
  serial: string;
  refrigerant: string;
  siteId: string;
  siteName: string;
}
