import { z } from 'zod';
import { idSchema, isoDateSchema, limits } from './common';
import { causeCodeLabels, type CauseCode } from './vocabulary';
import { causeCodeSchema, warrantyClaimStatusSchema, workOrderKindSchema, workOrderStateSchema } from './vocabulary-schemas';
import type { ModelAlertRef } from './work-orders';

/**
 * Fix Quality (docs/DESIGN.md §3): first-time fix, callbacks, causes, factory-defect costs and model alerts.
 *
 * Definitions (the same as `fixQuality` in @coilpath/calc, shown on screen in plain words):
 * - a job is a `service_call` work order; its first visit is its earliest closed visit;
 * - eligible: jobs whose first visit was not declined;
 * - first-time fixed: eligible, first visit resolved, and no follow-up (return visit or callback linked by
 *   `originWorkOrderId`) opened within the branch's callback window after the first visit closed;
 * - callback rate: jobs with a callback opened within the window ÷ eligible jobs whose first visit was resolved;
 * - return visits per service call: return-visit work orders linked to eligible jobs ÷ eligible jobs;
 * - days to resolve: from the job being opened to the close of the last visit of the job and its follow-ups,
 *   for eligible jobs whose last visit closed resolved.
 * - pending (maturity): a job whose window has not run out as of "now" (a follow-up opened at the window's
 *   last instant still counts) cannot be called a first-time fix yet; it counts as pending and in no other
 *   figure until the window closes.
 * The period holds the jobs whose first visit closed between `from` 00:00 and `to` 24:00 UTC; months are UTC months.
 */
export const fixQualityTables = [
  'byBranch',
  'byTechnician',
  'byMonth',
  'byModel',
  'byCause',
  'byOrigin',
  'factoryDefects',
  'modelAlerts',
] as const;
export const fixQualityTableSchema = z.enum(fixQualityTables);
export type FixQualityTable = z.infer<typeof fixQualityTableSchema>;
export const fixQualityTableLabels: Record<FixQualityTable, string> = {
  byBranch: 'By branch',
  byTechnician: 'By technician',
  byMonth: 'By month',
  byModel: 'By make and model',
  byCause: 'By cause',
  byOrigin: 'By cause origin',
  factoryDefects: 'Factory-defect cases',
  modelAlerts: 'Model alerts: units not yet checked',
};

/** The longest period one report covers (with its previous period, six years of jobs). */
export const fixQualityMaxDays = 3 * 366;

export const fixQualityQuerySchema = z
  .object({
    from: isoDateSchema,
    to: isoDateSchema,
    branchId: idSchema.optional(),
  })
  .refine((q) => q.from <= q.to, { message: 'The period must end on or after its first day', path: ['to'] })
  .refine((q) => (Date.parse(q.to) - Date.parse(q.from)) / 86_400_000 < fixQualityMaxDays, {
    message: 'Choose a period of three years or less',
    path: ['from'],
  });
export type FixQualityQuery = z.infer<typeof fixQualityQuerySchema>;

export const fixQualityCsvQuerySchema = z
  .object({ from: isoDateSchema, to: isoDateSchema, branchId: idSchema.optional(), table: fixQualityTableSchema })
  .refine((q) => q.from <= q.to, { message: 'The period must end on or after its first day', path: ['to'] });
export type FixQualityCsvQuery = z.infer<typeof fixQualityCsvQuerySchema>;

/** The figures of one group of jobs. Rates are 0..1, null when their denominator is zero. */
export const fixQualityFiguresSchema = z.object({
  eligible: z.number().int(),
  firstTimeFixed: z.number().int(),
  firstTimeFixRate: z.number().nullable(),
  /** Eligible jobs resolved on the first visit (the callback-rate denominator). */
  resolvedFirstVisits: z.number().int(),
  callbacks: z.number().int(),
  callbackRate: z.number().nullable(),
  returnVisits: z.number().int(),
  returnVisitsPerServiceCall: z.number().nullable(),
  /** Jobs counted in `avgDaysToResolve`. */
  resolvedJobs: z.number().int(),
  avgDaysToResolve: z.number().nullable(),
  /**
   * Service calls (not declined) whose callback window has not yet run out as of the report's "now": a
   * callback may still come, so they are counted here only, in no other figure, until their window closes.
   */
  pending: z.number().int(),
});
export type FixQualityFigures = z.infer<typeof fixQualityFiguresSchema>;

export const fixQualityGroupSchema = fixQualityFiguresSchema.extend({
  key: z.string(),
  label: z.string(),
});
export type FixQualityGroup = z.infer<typeof fixQualityGroupSchema>;

export const fixQualityChangeSchema = z.object({
  /** Differences current − previous; rates in fractions (0.05 = 5 percentage points). */
  firstTimeFixRate: z.number().nullable(),
  callbackRate: z.number().nullable(),
  returnVisitsPerServiceCall: z.number().nullable(),
  avgDaysToResolve: z.number().nullable(),
  eligible: z.number().int(),
});
export type FixQualityChange = z.infer<typeof fixQualityChangeSchema>;

export const fixQualityReportSchema = fixQualityFiguresSchema.extend({
  period: z.object({ from: isoDateSchema, to: isoDateSchema }),
  previousPeriod: z.object({ from: isoDateSchema, to: isoDateSchema }),
  branchId: idSchema.nullable(),
  /** Callback window(s) in days of the branches shown (each job uses its own branch's). */
  windowDays: z.array(z.number().int()),
  previous: fixQualityFiguresSchema,
  change: fixQualityChangeSchema,
  byBranch: z.array(fixQualityGroupSchema),
  byTechnician: z.array(fixQualityGroupSchema),
  byMonth: z.array(fixQualityGroupSchema),
  byModel: z.array(fixQualityGroupSchema),
  byCause: z.array(fixQualityGroupSchema),
  byOrigin: z.array(fixQualityGroupSchema),
});
export type FixQualityReport = z.infer<typeof fixQualityReportSchema>;

/** Factory-defect review: one service call, callback or return visit with a factory-defect finding. */
export const warrantyClaimSchema = z.object({
  status: warrantyClaimStatusSchema,
  amountCents: z.number().int().nullable(),
  reference: z.string().nullable(),
  notes: z.string().nullable(),
  updatedAt: z.string().nullable(),
});
export type WarrantyClaim = z.infer<typeof warrantyClaimSchema>;

export const factoryDefectCaseSchema = z.object({
  workOrderId: idSchema,
  number: z.number().int().nullable(),
  kind: workOrderKindSchema,
  branchId: idSchema,
  branchName: z.string(),
  /** The branch's IANA time zone (exports write `openedAt` in it, with its offset). */
  branchTimeZone: z.string(),
  currency: z.string(),
  siteId: idSchema,
  siteName: z.string(),
  unitId: idSchema,
  unitTag: z.string(),
  make: z.string(),
  model: z.string(),
  causeCodes: z.array(causeCodeSchema),
  openedAt: z.string(),
  originWorkOrderId: idSchema.nullable(),
  visits: z.number().int(),
  labourMinutes: z.number(),
  labourCostCents: z.number().int(),
  refrigerantLb: z.number(),
  refrigerantCostCents: z.number().int(),
  costCents: z.number().int(),
  /** The claim's recorded amount minus `costCents` (null while no amount is recorded: the claim defaults to the cost). */
  amountDifferenceCents: z.number().int().nullable(),
  claim: warrantyClaimSchema,
});
export type FactoryDefectCase = z.infer<typeof factoryDefectCaseSchema>;

export const factoryDefectModelSchema = z.object({
  key: z.string(),
  make: z.string(),
  model: z.string(),
  cases: z.number().int(),
  /** Service calls whose own (first) visits found the factory defect. */
  firstVisits: z.number().int(),
  callbacks: z.number().int(),
  returnVisits: z.number().int(),
  unitsAffected: z.number().int(),
  sitesAffected: z.number().int(),
  labourHours: z.number(),
  labourCostCents: z.number().int(),
  refrigerantLb: z.number(),
  refrigerantCostCents: z.number().int(),
  costCents: z.number().int(),
  toClaimCents: z.number().int(),
  claimedCents: z.number().int(),
  paidCents: z.number().int(),
  deniedCents: z.number().int(),
});
export type FactoryDefectModel = z.infer<typeof factoryDefectModelSchema>;

export const factoryDefectReviewSchema = z.object({
  period: z.object({ from: isoDateSchema, to: isoDateSchema }),
  branchId: idSchema.nullable(),
  models: z.array(factoryDefectModelSchema),
  cases: z.array(factoryDefectCaseSchema),
});
export type FactoryDefectReview = z.infer<typeof factoryDefectReviewSchema>;

/** What the owner (or the branch's manager) records about a warranty claim. */
export const warrantyClaimUpdateSchema = z.strictObject({
  status: warrantyClaimStatusSchema,
  amountCents: z.number().int().min(0).max(100_000_000).nullable().optional(),
  reference: z.string().trim().max(limits.shortText).nullable().optional(),
  notes: z.string().trim().max(limits.longText).nullable().optional(),
});
export type WarrantyClaimUpdate = z.infer<typeof warrantyClaimUpdateSchema>;

/**
 * Model alerts: the same cause code with origin `factory_defect` found on one make and model at two or
 * more sites; raised when the second site's finding was recorded. A unit of that model counts as checked
 * for the alert only by what happened on it for that cause: it is one of the units the defect was found on,
 * it has a finding with that cause code (any origin) recorded since the alert was raised, or it has an
 * inspection work order created from the alert (any state but cancelled). A visit for something else does
 * not check it.
 */
export const modelAlertPurpose = (make: string, model: string, causeCode: string) => `model-alert:${make}|${model}|${causeCode}`;

/** The alert an inspection work order was created from, read back from its purpose; null for other work. */
export function parseModelAlertPurpose(purpose: string | null | undefined): { make: string; model: string; causeCode: CauseCode } | null {
  if (!purpose?.startsWith('model-alert:')) return null;
  const parts = purpose.slice('model-alert:'.length).split('|');
  if (parts.length !== 3) return null;
  const [make, model, cause] = parts as [string, string, string];
  const parsed = causeCodeSchema.safeParse(cause);
  return parsed.success ? { make, model, causeCode: parsed.data } : null;
}

/** "Wiring fault on Quellmark QRX-20": how an alert is named on every screen. */
export const modelAlertTitle = (a: { make: string; model: string; causeCode: CauseCode }) =>
  `${causeCodeLabels[a.causeCode]} on ${a.make} ${a.model}`;

export const modelAlertUnitSchema = z.object({
  unitId: idSchema,
  tag: z.string(),
  serial: z.string(),
  branchId: idSchema,
  branchName: z.string(),
  siteId: idSchema,
  siteName: z.string(),
  installDate: z.string().nullable(),
  warrantyEnd: z.string().nullable(),
});
export type ModelAlertUnit = z.infer<typeof modelAlertUnitSchema>;

export const modelAlertSchema = z.object({
  key: z.string(),
  make: z.string(),
  model: z.string(),
  causeCode: causeCodeSchema,
  purpose: z.string(),
  sites: z.number().int(),
  affectedUnits: z.number().int(),
  findings: z.number().int(),
  firstFoundAt: z.string(),
  lastFoundAt: z.string(),
  unitsOfModel: z.number().int(),
  checkedUnits: z.number().int(),
  inspectionsOpen: z.number().int(),
  /** When the alert was raised: the second site's factory-defect finding. */
  raisedAt: z.string(),
  /** Inspection work orders created from the alert, with their state (a manager sees the own branch's). */
  inspections: z.array(
    z.object({
      workOrderId: idSchema,
      number: z.number().int().nullable(),
      state: workOrderStateSchema,
      dueAt: z.string().nullable(),
      unitId: idSchema,
      unitTag: z.string(),
      siteName: z.string(),
      branchName: z.string(),
    }),
  ),
  /** Units of the model not yet checked (a manager sees those of the own branch only). */
  unchecked: z.array(modelAlertUnitSchema),
});
export type ModelAlert = z.infer<typeof modelAlertSchema>;

export const modelAlertsSchema = z.object({ alerts: z.array(modelAlertSchema) });
export type ModelAlerts = z.infer<typeof modelAlertsSchema>;

export const createInspectionsSchema = z.strictObject({
  make: z.string().trim().min(1).max(limits.shortText),
  model: z.string().trim().min(1).max(limits.shortText),
  causeCode: causeCodeSchema,
  /** Only these units (each must be an unchecked unit of the alert); omitted = every unchecked unit. */
  unitIds: z.array(idSchema).max(2000).optional(),
});
export type CreateInspections = z.infer<typeof createInspectionsSchema>;

export const createInspectionsResultSchema = z.object({
  created: z.number().int(),
  workOrders: z.array(z.object({ id: idSchema, number: z.number().int().nullable(), branchId: idSchema, unitId: idSchema })),
  branches: z.array(z.object({ branchId: idSchema, branchName: z.string(), created: z.number().int() })),
});
export type CreateInspectionsResult = z.infer<typeof createInspectionsResultSchema>;

/** The alert reference a work order's answer carries, from its purpose (null for work not created from an alert). */
export function modelAlertRef(purpose: string | null | undefined): ModelAlertRef | null {
  const a = parseModelAlertPurpose(purpose);
  return a ? { ...a, title: modelAlertTitle(a) } : null;
}
