/** Answers of `/api/alarms`, `/api/watchlist` and `/api/leak-cases` (the Watchlist). */
import { z } from 'zod';
import type {
  AlarmImportResult,
  AlarmRow,
  BookRepairResult,
  LeakCaseRow,
  RepeatAlarmResponse,
  ReturnVisitRow,
  UnitChoice,
} from '../watchlist';
import type { Agree, AllAgree } from './agree';
import {
  causeCodeSchema,
  causeOriginSchema,
  leakCaseStatusSchema,
  leakObligationStateSchema,
  prioritySchema,
  returnNeedSchema,
  visitOutcomeSchema,
  workOrderKindSchema,
  workOrderStateSchema,
} from '../vocabulary-schemas';

export const alarmRowSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  unitId: z.string(),
  unitTag: z.string(),
  unitSerial: z.string(),
  siteName: z.string(),
  circuit: z.number().nullable(),
  code: z.string(),
  description: z.string().nullable(),
  raisedAt: z.string(),
  clearedAt: z.string().nullable(),
  source: z.union([z.literal('form'), z.literal('csv'), z.literal('api'), z.literal('controller')]),
});

export const alarmImportErrorSchema = z.object({
  row: z.number(),
  field: z.string().nullable(),
  message: z.string(),
});

export const alarmImportRowSchema = z.object({
  row: z.number(),
  unitId: z.string(),
  unitTag: z.string(),
  serial: z.string(),
  circuit: z.number().nullable(),
  code: z.string(),
  raisedAt: z.string(),
  duplicate: z.boolean(),
});

export const alarmImportResultSchema = z.object({
  mode: z.union([z.literal('dry_run'), z.literal('commit')]),
  encoding: z.string(),
  total: z.number(),
  rows: z.array(alarmImportRowSchema),
  errors: z.array(alarmImportErrorSchema),
  written: z.number(),
  skipped: z.number(),
});

export const repeatAlarmUnitSchema = z.object({
  unitId: z.string(),
  branchId: z.string(),
  unitTag: z.string(),
  make: z.string(),
  model: z.string(),
  serial: z.string(),
  siteId: z.string(),
  siteName: z.string(),
  code: z.string(),
  count: z.number(),
  first: z.string(),
  last: z.string(),
  circuits: z.array(z.union([z.string(), z.number()])),
  circuitMismatch: z.boolean(),
  visits: z.array(
    z.object({
      workOrderId: z.string(),
      number: z.number().nullable(),
      kind: workOrderKindSchema,
      state: workOrderStateSchema,
      closedAt: z.string().nullable(),
      outcome: visitOutcomeSchema.nullable(),
      techName: z.string().nullable(),
    }),
  ),
  findings: z.array(
    z.object({
      id: z.string(),
      causeCode: causeCodeSchema,
      origin: causeOriginSchema,
      alarmCode: z.string().nullable(),
      reportedCircuit: z.number().nullable(),
      actualCircuit: z.number().nullable(),
      notes: z.string().nullable(),
      createdAt: z.string(),
    }),
  ),
});

export const repeatAlarmResponseSchema = z.object({
  asOf: z.string(),
  rules: z.array(
    z.object({
      branchId: z.string(),
      minCount: z.number(),
      windowDays: z.number(),
    }),
  ),
  units: z.array(repeatAlarmUnitSchema),
});

export const deadlineStateSchema = z.union([z.literal('overdue'), z.literal('due_soon'), z.literal('ok'), z.literal('met')]);

export const leakDeadlineSchema = z.object({
  what: z.union([
    z.literal('repair'),
    z.literal('initial_verification'),
    z.literal('follow_up_verification'),
    z.literal('retrofit_retire_plan'),
    z.literal('retrofit_retire_complete'),
  ]),
  due: z.string(),
  daysLeft: z.number(),
  state: deadlineStateSchema,
  source: z.string(),
});

export const verificationTestRowSchema = z.object({
  id: z.string(),
  kind: z.union([z.literal('initial'), z.literal('follow_up')]),
  testedOn: z.string(),
  passed: z.boolean(),
  notes: z.string().nullable(),
});

export const unitChoiceSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  tag: z.string(),
  make: z.string(),
  model: z.string(),
  serial: z.string(),
  refrigerant: z.string(),
  siteId: z.string(),
  siteName: z.string(),
});

export const leakCaseRowSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  unitId: z.string(),
  unitTag: z.string(),
  siteName: z.string(),
  make: z.string(),
  model: z.string(),
  refrigerant: z.string(),
  fullChargeLb: z.number(),
  rule: z.string(),
  method: z.enum(['annualizing', 'rolling-average']),
  thresholdPercent: z.number(),
  leakRatePercent: z.number(),
  openedOn: z.string(),
  repairDueDate: z.string(),
  repairedOn: z.string().nullable(),
  chronic: z.boolean(),
  status: leakCaseStatusSchema,
  obligationState: leakObligationStateSchema.nullable(),
  planKind: z.enum(['retrofit', 'retire']).nullable(),
  planDueDate: z.string().nullable(),
  notes: z.string().nullable(),
  repairWorkOrder: z
    .object({ id: z.string(), number: z.number().nullable(), state: workOrderStateSchema, visitId: z.string().nullable() })
    .nullable(),
  tests: z.array(verificationTestRowSchema),
  deadlines: z.array(leakDeadlineSchema),
  next: leakDeadlineSchema.nullable(),
  requiredCertification: z.enum(['I', 'II', 'III', 'universal']),
  today: z.string(),
});

export const bookRepairResultSchema = z.object({ leakCase: leakCaseRowSchema, workOrderId: z.string(), joined: z.boolean() });

export const returnVisitRowSchema = z.object({
  workOrderId: z.string(),
  number: z.number().nullable(),
  branchId: z.string(),
  siteName: z.string(),
  unitId: z.string().nullable(),
  unitTag: z.string().nullable(),
  priority: prioritySchema,
  latestAt: z.string().nullable(),
  createdAt: z.string(),
  complaint: z.string(),
  returnNeeds: z.array(returnNeedSchema),
  returnNotes: z.string().nullable(),
  origin: z
    .object({ workOrderId: z.string(), number: z.number().nullable(), closedAt: z.string().nullable(), techName: z.string().nullable() })
    .nullable(),
});

export const alarmListAnswerSchema = z.object({ alarms: z.array(alarmRowSchema) });
export const alarmAnswerSchema = z.object({ alarm: alarmRowSchema });
export const unitChoicesAnswerSchema = z.object({ units: z.array(unitChoiceSchema) });
export const returnVisitListAnswerSchema = z.object({ returnVisits: z.array(returnVisitRowSchema) });
export const returnVisitAnswerSchema = z.object({ returnVisit: returnVisitRowSchema });
export const leakCaseListAnswerSchema = z.object({ leakCases: z.array(leakCaseRowSchema) });
export const leakCaseAnswerSchema = z.object({ leakCase: leakCaseRowSchema });

export type WatchlistChecks = AllAgree<
  [
    Agree<AlarmRow, typeof alarmRowSchema>,
    Agree<AlarmImportResult, typeof alarmImportResultSchema>,
    Agree<RepeatAlarmResponse, typeof repeatAlarmResponseSchema>,
    Agree<LeakCaseRow, typeof leakCaseRowSchema>,
    Agree<BookRepairResult, typeof bookRepairResultSchema>,
    Agree<ReturnVisitRow, typeof returnVisitRowSchema>,
    Agree<UnitChoice, typeof unitChoiceSchema>,
  ]
>;
