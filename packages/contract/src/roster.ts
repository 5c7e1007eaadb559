import { z } from 'zod';
import { idSchema, instantSchema, isoDateSchema, limits, pickedIdSchema } from './common';
import { epa608TypeSchema, prioritySchema, workingHoursSchema, workOrderKindSchema, workOrderStateSchema } from './vocabulary-schemas';
import { requiredCertificationSchema } from './work-orders';

/** The longest single booking (a job longer than a day is split into several visits). */
export const maxBookingMinutes = 16 * 60;

/**
 * The booking rules a dispatcher or manager may book against with a stated reason (docs/DESIGN.md §3
 * "Override"). Checked by `bookingBreaches` in `@coilpath/calc`, which says what each one is.
 */
export const bookingRules = ['skill', 'certification', 'working_hours', 'due_time'] as const;
export const bookingRuleSchema = z.enum(bookingRules);
export type BookingRule = z.infer<typeof bookingRuleSchema>;
export const bookingRuleLabels: Record<BookingRule, string> = {
  skill: 'required skill',
  certification: 'EPA 608 certification',
  working_hours: 'working hours',
  due_time: 'due time',
};
/** The code of a 409 refusing a booking that breaks one rule (`booking_rules` when it breaks several). */
export const bookingRuleCodes: Record<BookingRule, string> = {
  skill: 'skill',
  certification: 'certification',
  working_hours: 'outside_hours',
  due_time: 'past_due',
};

/** Details of a 409 refusing a booking for its rules: the rules broken and not overridden, each with what is wrong. */
export interface BookingRuleRefusal {
  /** The first of `rules` (kept for clients that read one). */
  rule: BookingRule;
  rules: BookingRule[];
  breaches: { rule: BookingRule; message: string }[];
}

const overrideFields = {
  /**
   * Rules this booking may break on purpose; the one reason covers them all, and is kept with the
   * booking (and who gave it). Only rules the booking really breaks are recorded.
   */
  overrideRules: z.array(bookingRuleSchema).max(bookingRules.length).optional(),
  /** Short for `overrideRules: ['working_hours']` (the first override Coilpath had). */
  overrideHours: z.boolean().optional(),
  overrideReason: z.string().trim().max(limits.shortText).optional(),
};

function spanOk(v: { startAt?: string | undefined; endAt?: string | undefined }) {
  if (!v.startAt || !v.endAt) return true;
  const d = Date.parse(v.endAt) - Date.parse(v.startAt);
  return d > 0 && d <= maxBookingMinutes * 60_000;
}
const spanIssue = { message: 'The booking must end after it starts and last at most 16 hours', path: ['endAt'] };
const reasonOk = (v: {
  overrideHours?: boolean | undefined;
  overrideRules?: BookingRule[] | undefined;
  overrideReason?: string | undefined;
}) => !(v.overrideHours || v.overrideRules?.length) || !!v.overrideReason;
const reasonIssue = { message: 'Say why this booking may break the rule', path: ['overrideReason'] };

/** The rules a create or update request overrides (`overrideRules`, plus working hours for `overrideHours`). */
export function requestedOverrides(v: { overrideHours?: boolean | undefined; overrideRules?: BookingRule[] | undefined }): BookingRule[] {
  const rules = new Set<BookingRule>(v.overrideRules ?? []);
  if (v.overrideHours) rules.add('working_hours');
  return bookingRules.filter((r) => rules.has(r));
}

/** Book an unplaced work order on a technician's calendar. `endAt` defaults to start + the job's estimate. */
export const bookingCreateSchema = z
  .strictObject({
    workOrderId: idSchema,
    techId: pickedIdSchema('a technician'),
    startAt: instantSchema,
    endAt: instantSchema.optional(),
    fixed: z.boolean().optional(),
    ...overrideFields,
  })
  .refine(spanOk, spanIssue)
  .refine(reasonOk, reasonIssue);
export type BookingCreate = z.input<typeof bookingCreateSchema>;

/** Move, resize or reassign a booking; `version` is the version the change is based on. */
export const bookingUpdateSchema = z
  .strictObject({
    version: z.number().int().min(1),
    techId: pickedIdSchema('a technician').optional(),
    startAt: instantSchema.optional(),
    endAt: instantSchema.optional(),
    fixed: z.boolean().optional(),
    ...overrideFields,
  })
  .refine(spanOk, spanIssue)
  .refine(reasonOk, reasonIssue);
export type BookingUpdate = z.input<typeof bookingUpdateSchema>;

export const bookingListQuerySchema = z
  .object({
    branchId: idSchema.optional(),
    from: instantSchema,
    to: instantSchema,
    techId: idSchema.optional(),
  })
  .refine((q) => Date.parse(q.from) < Date.parse(q.to), { message: '`to` must be after `from`', path: ['to'] })
  .refine((q) => Date.parse(q.to) - Date.parse(q.from) <= 62 * 86_400_000, { message: 'Ask for at most 62 days', path: ['to'] });
export type BookingListQuery = z.input<typeof bookingListQuerySchema>;

/** A booking with what a calendar event shows at a glance. */
export const bookingSchema = z.object({
  id: idSchema,
  branchId: idSchema,
  workOrderId: idSchema,
  techId: idSchema,
  startAt: z.string(),
  endAt: z.string(),
  version: z.number().int(),
  fixed: z.boolean(),
  /** The booking is outside the technician's working hours on purpose (`overrideRules` holds `working_hours`). */
  hoursOverride: z.boolean(),
  /** The booking rules it breaks on purpose, in rule order; empty when none. */
  overrideRules: z.array(bookingRuleSchema),
  /** Why, as the dispatcher or manager said it; null when nothing is overridden. */
  overrideReason: z.string().nullable(),
  /** Who overrode the rules. */
  overrideBy: z.object({ id: idSchema, name: z.string() }).nullable(),
  visitId: idSchema.nullable(),
  workOrder: z.object({
    number: z.number().int(),
    kind: workOrderKindSchema,
    state: workOrderStateSchema,
    priority: prioritySchema,
    complaint: z.string(),
    siteName: z.string(),
    unitTag: z.string().nullable(),
    unitMake: z.string().nullable(),
    unitModel: z.string().nullable(),
    requiredSkill: z.string().nullable(),
    requiredCertification: requiredCertificationSchema.nullable(),
    estimatedMinutes: z.number().int(),
    /** The work order's due time (`workOrderDueAt` in @coilpath/calc): a later start breaks the due-time rule. */
    dueAt: z.string().nullable(),
    leakRepairDueDate: isoDateSchema.nullable(),
  }),
});
export type Booking = z.infer<typeof bookingSchema>;
export const bookingListSchema = z.object({ bookings: z.array(bookingSchema) });

/** Details of a 409 `stale_version`: the booking as it is now. */
export interface StaleVersionDetails {
  current: Booking;
}

export const rosterBranchQuerySchema = z.object({ branchId: idSchema.optional() });

export const technicianSchema = z.object({
  id: idSchema,
  name: z.string(),
  colorIndex: z.number().int(),
  epa608Type: epa608TypeSchema,
  skills: z.array(z.string()),
  workingHours: workingHoursSchema.nullable(),
  startLat: z.number().nullable(),
  startLon: z.number().nullable(),
});
export type Technician = z.infer<typeof technicianSchema>;
export const technicianListSchema = z.object({ timeZone: z.string(), technicians: z.array(technicianSchema) });

export const loadQuerySchema = z
  .object({ branchId: idSchema.optional(), from: isoDateSchema, to: isoDateSchema })
  .refine((q) => q.from <= q.to, { message: '`to` must not be before `from`', path: ['to'] })
  .refine((q) => Date.parse(q.to) - Date.parse(q.from) <= 41 * 86_400_000, { message: 'Ask for at most 6 weeks', path: ['to'] });
export type LoadQuery = z.input<typeof loadQuerySchema>;

export const technicianDayLoadSchema = z.object({
  techId: idSchema,
  day: isoDateSchema,
  bookedMinutes: z.number(),
  capacityMinutes: z.number(),
  ratio: z.number().nullable(),
  overloaded: z.boolean(),
  /** The day is one of the branch's holidays (capacity 0 whatever the working hours say). */
  holiday: z.boolean().optional(),
});
export type TechnicianDayLoad = z.infer<typeof technicianDayLoadSchema>;
export const loadSchema = z.object({ timeZone: z.string(), load: z.array(technicianDayLoadSchema) });

export const suggestSchema = z.strictObject({
  workOrderId: idSchema,
  /** The branch-local day to book on. */
  day: isoDateSchema,
});
export type SuggestRequest = z.input<typeof suggestSchema>;

export const candidateSchema = z.object({
  techId: idSchema,
  name: z.string(),
  eligible: z.boolean(),
  score: z.number().nullable(),
  reasons: z.array(z.string()),
  /** What keeps the technician from being proposed: a booking rule, 'free_time' (too little) or 'window' (none in the job's time). */
  blockedBy: z.array(z.enum([...bookingRules, 'free_time', 'window'])),
  proposedStart: z.string().nullable(),
  proposedEnd: z.string().nullable(),
  travelMinutes: z.number().nullable(),
  freeMinutes: z.number(),
});
export type Candidate = z.infer<typeof candidateSchema>;
export const suggestResultSchema = z.object({ workOrderId: idSchema, day: isoDateSchema, candidates: z.array(candidateSchema) });
export type SuggestResult = z.infer<typeof suggestResultSchema>;

export const evenOutSchema = z.strictObject({
  branchId: idSchema.optional(),
  /** Any branch-local day of the week to even out; the week runs Monday to Sunday. */
  week: isoDateSchema,
});
export type EvenOutRequest = z.input<typeof evenOutSchema>;

export const proposalSchema = z.strictObject({
  workOrderId: idSchema,
  techId: idSchema,
  startAt: instantSchema,
  endAt: instantSchema,
});
export type Proposal = z.infer<typeof proposalSchema>;

export const evenOutPreviewSchema = z.object({
  week: z.object({ from: isoDateSchema, to: isoDateSchema }),
  proposals: z.array(
    proposalSchema.extend({ number: z.number().int(), siteName: z.string(), travelMinutes: z.number().nullable(), reason: z.string() }),
  ),
  leftUnplaced: z.array(z.object({ workOrderId: idSchema, number: z.number().int(), reason: z.string() })),
  /** Week totals per technician, before and after the proposals. */
  load: z.array(z.object({ techId: idSchema, capacityMinutes: z.number(), beforeMinutes: z.number(), afterMinutes: z.number() })),
  /** Estimated drive minutes of the week, before and after. */
  driveMinutes: z.object({ before: z.number(), after: z.number() }),
  /**
   * Booked jobs (not started, not fixed) moved to another technician or day where that evens the load, never past
   * their due time nor off their required skill or EPA 608 certification; sorted by due time (none last).
   */
  moves: z.array(
    z.object({
      bookingId: idSchema,
      version: z.number().int(),
      workOrderId: idSchema,
      number: z.number().int(),
      siteName: z.string(),
      priority: prioritySchema,
      dueAt: z.string().nullable(),
      from: z.object({ techId: idSchema, startAt: z.string(), endAt: z.string() }),
      to: z.object({ techId: idSchema, startAt: z.string(), endAt: z.string() }),
      travelMinutes: z.number(),
    }),
  ),
  /** Spread of the load ratios (highest − lowest technician-day) as booked, after the proposals alone, and after the moves too. */
  spread: z.object({ before: z.number(), withoutMoves: z.number(), after: z.number() }),
});
export type EvenOutPreview = z.infer<typeof evenOutPreviewSchema>;

/** An accepted move of a booked job, based on the booking's version in the preview. */
export const evenOutMoveSchema = z.strictObject({
  bookingId: idSchema,
  version: z.number().int().min(1),
  techId: idSchema,
  startAt: instantSchema,
  endAt: instantSchema,
});
export type EvenOutMove = z.infer<typeof evenOutMoveSchema>;
export const evenOutApplySchema = z
  .strictObject({
    proposals: z.array(proposalSchema).max(500).default([]),
    moves: z.array(evenOutMoveSchema).max(500).default([]),
  })
  .refine((v) => v.proposals.length + v.moves.length > 0, { message: 'Choose at least one proposal or move', path: ['proposals'] });
export type EvenOutApply = z.input<typeof evenOutApplySchema>;
export const evenOutApplyResultSchema = z.object({ bookings: z.array(bookingSchema) });

/** Sites of the branch with their units, for the work-order form's pickers. */
export const rosterSiteSchema = z.object({
  id: idSchema,
  name: z.string(),
  address: z.string(),
  units: z.array(z.object({ id: idSchema, tag: z.string(), make: z.string(), model: z.string(), refrigerant: z.string() })),
});
export type RosterSite = z.infer<typeof rosterSiteSchema>;
export const rosterSiteListSchema = z.object({ sites: z.array(rosterSiteSchema) });
