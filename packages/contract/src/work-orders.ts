import { z } from 'zod';
import { idSchema, instantSchema, pickedIdSchema, isoDateSchema, limits, optionalOneLine } from './common';
import type { WorkOrderState } from './vocabulary';
import { causeCodeSchema, prioritySchema, workOrderKindSchema, workOrderStateSchema } from './vocabulary-schemas';

/** The model alert an inspection work order checks for. */
export const modelAlertRefSchema = z.object({ title: z.string(), make: z.string(), model: z.string(), causeCode: causeCodeSchema });
export type ModelAlertRef = z.infer<typeof modelAlertRefSchema>;

/** EPA 608 types a job's refrigerant work can require ('universal' = needs a Universal certificate). */
export const requiredCertificationSchema = z.enum(['I', 'II', 'III', 'universal']);
export type RequiredCertification = z.infer<typeof requiredCertificationSchema>;

/** Kinds that repeat earlier work and must name the work order they come from. */
export const kindsWithOrigin = ['return_visit', 'callback'] as const;

const workOrderFields = {
  priority: prioritySchema,
  complaint: z.string().trim().max(limits.longText),
  requestedFrom: instantSchema.nullable().optional(),
  requestedTo: instantSchema.nullable().optional(),
  slaDueAt: instantSchema.nullable().optional(),
  latestAt: instantSchema.nullable().optional(),
  requiredSkill: optionalOneLine(60),
  requiredCertification: requiredCertificationSchema.nullable().optional(),
  estimatedMinutes: z.coerce
    .number({ message: 'Enter the estimated minutes' })
    .int('Use whole minutes')
    .min(15, 'A job takes at least 15 minutes')
    .max(16 * 60, 'A job takes at most 16 hours; split longer work'),
};

function windowInOrder(v: { requestedFrom?: string | null | undefined; requestedTo?: string | null | undefined }) {
  return !v.requestedFrom || !v.requestedTo || Date.parse(v.requestedFrom) < Date.parse(v.requestedTo);
}

/** A new work order (the Roster's "New work order" form and Watchlist's return visits). */
export const workOrderCreateSchema = z
  .strictObject({
    siteId: pickedIdSchema('a site'),
    unitId: pickedIdSchema('a unit').nullable().optional(),
    kind: workOrderKindSchema,
    ...workOrderFields,
    priority: prioritySchema.default('normal'),
    complaint: z.string().trim().min(1, 'Say what the customer reports or what the visit is for').max(limits.longText),
    estimatedMinutes: workOrderFields.estimatedMinutes.default(60),
    originWorkOrderId: idSchema.nullable().optional(),
    leakCaseId: idSchema.nullable().optional(),
  })
  .refine(windowInOrder, { message: 'The requested window must end after it starts', path: ['requestedTo'] })
  .refine((v) => !(kindsWithOrigin as readonly string[]).includes(v.kind) || !!v.originWorkOrderId, {
    message: 'A return visit or callback names the work order it comes from',
    path: ['originWorkOrderId'],
  });
export type WorkOrderCreate = z.input<typeof workOrderCreateSchema>;

/** Changes to a work order; the state may only become `cancelled` here (booking changes it otherwise). */
export const workOrderUpdateSchema = z
  .strictObject({
    ...workOrderFields,
    state: z.literal('cancelled', { message: 'A work order can only be cancelled here; book or unbook it on the Roster' }),
  })
  .partial()
  .refine(windowInOrder, { message: 'The requested window must end after it starts', path: ['requestedTo'] });
export type WorkOrderUpdate = z.input<typeof workOrderUpdateSchema>;

const stateList = z
  .string()
  .transform((s) =>
    s
      .split(',')
      .map((x) => x.trim())
      .filter(Boolean),
  )
  .pipe(z.array(workOrderStateSchema).min(1));

export const workOrderListQuerySchema = z.object({
  branchId: idSchema.optional(),
  /** One state or a comma-separated list, e.g. `unplaced` or `booked,en_route`. */
  state: stateList.optional(),
  kind: workOrderKindSchema.optional(),
  unitId: idSchema.optional(),
  siteId: idSchema.optional(),
  /** Created at or after / before these instants. */
  from: instantSchema.optional(),
  to: instantSchema.optional(),
  limit: z.coerce.number().int().min(1).max(2000).default(500),
});
export type WorkOrderListQuery = z.input<typeof workOrderListQuerySchema>;

/** A work order as lists show it: site, unit, origin and leak deadline joined in. */
export const workOrderSchema = z.object({
  id: idSchema,
  number: z.number().int(),
  branchId: idSchema,
  siteId: idSchema,
  siteName: z.string(),
  siteAddress: z.string(),
  siteLat: z.number(),
  siteLon: z.number(),
  unitId: idSchema.nullable(),
  unitTag: z.string().nullable(),
  unitMake: z.string().nullable(),
  unitModel: z.string().nullable(),
  unitRefrigerant: z.string().nullable(),
  kind: workOrderKindSchema,
  state: workOrderStateSchema,
  priority: prioritySchema,
  complaint: z.string(),
  requestedFrom: z.string().nullable(),
  requestedTo: z.string().nullable(),
  slaDueAt: z.string().nullable(),
  latestAt: z.string().nullable(),
  plannedDate: z.string().nullable(),
  requiredSkill: z.string().nullable(),
  requiredCertification: requiredCertificationSchema.nullable(),
  estimatedMinutes: z.number().int(),
  originWorkOrderId: idSchema.nullable(),
  originNumber: z.number().int().nullable(),
  leakCaseId: idSchema.nullable(),
  leakRepairDueDate: isoDateSchema.nullable(),
  /** An inspection created from a model alert: the alert it checks for (title and cause); null for other work. */
  modelAlert: modelAlertRefSchema.nullable(),
  /** The current booking, when booked. */
  booking: z.object({ id: idSchema, techId: idSchema, startAt: z.string(), endAt: z.string(), version: z.number().int() }).nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type WorkOrder = z.infer<typeof workOrderSchema>;

export const workOrderListSchema = z.object({ workOrders: z.array(workOrderSchema) });

/** Human-facing number, e.g. WO-10234. */
export const workOrderLabel = (n: number | null | undefined) => (n === null || n === undefined ? 'WO-?' : `WO-${n}`);

/** States a booking can be moved or unbooked in. */
export const movableStates: readonly WorkOrderState[] = ['booked'];

/**
 * `details` of a 409 `open_return_exists`: a unit has at most one open return visit (not closed, not cancelled),
 * and this is it. A screen offers to open it: its latest visit (`/visits/:visitId`) when it has one, else the
 * unit's file (`/units/:unitId`), which lists the unit's work orders.
 */
export const openReturnDetailsSchema = z.object({
  workOrderId: idSchema,
  number: z.number().int().nullable(),
  state: workOrderStateSchema,
  unitId: idSchema.nullable(),
  visitId: idSchema.nullable(),
});
export type OpenReturnDetails = z.infer<typeof openReturnDetailsSchema>;
