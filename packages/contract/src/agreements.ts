import { z } from 'zod';
import { idSchema, isoDateSchema, limits, oneLine, pickedIdSchema } from './common';
import { workOrderStateSchema } from './vocabulary-schemas';

/* ------------------------------------------------------------ recurrence */

/** How often an agreement's planned-maintenance visits recur (the form's choices). */
export const recurrencePresets = ['monthly', 'every_2_months', 'quarterly', 'every_6_months', 'yearly', 'spring_autumn'] as const;
export type RecurrencePreset = (typeof recurrencePresets)[number];
export const recurrencePresetLabels: Record<RecurrencePreset, string> = {
  monthly: 'Monthly',
  every_2_months: 'Every 2 months',
  quarterly: 'Every 3 months (quarterly)',
  every_6_months: 'Every 6 months',
  yearly: 'Yearly',
  spring_autumn: 'Spring cooling start-up and autumn heating check',
};

export const recurrenceSchema = z.strictObject({
  preset: z.enum(recurrencePresets),
  /** Month of the first visit of the year (1 = January); ignored for monthly and spring/autumn. */
  startMonth: z.number().int().min(1).max(12).default(1),
  /** Day of the month the visit aims at; 1–28 so every month has it. */
  dayOfMonth: z.number().int().min(1, 'Use a day from 1 to 28').max(28, 'Use a day from 1 to 28').default(15),
  /** Spring/autumn only: the months of the cooling start-up and the heating check. */
  springMonth: z.number().int().min(3).max(6).default(4),
  autumnMonth: z.number().int().min(9).max(11).default(10),
});
export type Recurrence = z.infer<typeof recurrenceSchema>;

const stepMonths: Partial<Record<RecurrencePreset, number>> = { every_2_months: 2, quarterly: 3, every_6_months: 6, yearly: 12 };

/** The RFC 5545 RRULE text for a recurrence: explicit months so the rule does not depend on the term start. */
export function buildAgreementRrule(r: Recurrence): string {
  const day = `BYMONTHDAY=${r.dayOfMonth}`;
  if (r.preset === 'monthly') return `FREQ=MONTHLY;${day}`;
  if (r.preset === 'spring_autumn') return `FREQ=YEARLY;BYMONTH=${r.springMonth},${r.autumnMonth};${day}`;
  const step = stepMonths[r.preset] ?? 12;
  const months: number[] = [];
  for (let m = r.startMonth; months.length < 12 / step; m += step) months.push(((m - 1) % 12) + 1);
  months.sort((a, b) => a - b);
  return `FREQ=YEARLY;BYMONTH=${months.join(',')};${day}`;
}

/** Reads back a rule built by {@link buildAgreementRrule}; null for any other rule. */
export function parseAgreementRrule(rrule: string): Recurrence | null {
  const parts = Object.fromEntries(rrule.split(';').map((p) => p.split('=') as [string, string]));
  const dayOfMonth = Number(parts.BYMONTHDAY);
  if (!Number.isInteger(dayOfMonth) || dayOfMonth < 1 || dayOfMonth > 28) return null;
  const base = { startMonth: 1, dayOfMonth, springMonth: 4, autumnMonth: 10 };
  if (parts.FREQ === 'MONTHLY' && !parts.BYMONTH && !parts.INTERVAL) return { ...base, preset: 'monthly' };
  if (parts.FREQ !== 'YEARLY' || !parts.BYMONTH) return null;
  const months = parts.BYMONTH.split(',').map(Number);
  const byCount: Record<number, RecurrencePreset> = { 6: 'every_2_months', 4: 'quarterly', 2: 'every_6_months', 1: 'yearly' };
  const preset = byCount[months.length];
  if (!preset) return null;
  const candidate: Recurrence = { ...base, preset, startMonth: months[0]! };
  if (buildAgreementRrule(candidate) === rrule) return candidate;
  if (months.length === 2) {
    const sa: Recurrence = { ...base, preset: 'spring_autumn', springMonth: months[0]!, autumnMonth: months[1]! };
    if (buildAgreementRrule(sa) === rrule) return sa;
  }
  return null;
}

/** A readable sentence for a rule, e.g. "Every 3 months (Jan, Apr, Jul, Oct) on the 15th". */
export function describeAgreementRrule(rrule: string): string {
  const r = parseAgreementRrule(rrule);
  const names = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
  if (!r) {
    // Any other rule: a plain reading of FREQ, INTERVAL, BYMONTH and BYMONTHDAY.
    const line =
      rrule
        .split(/\r?\n/)
        .find((l) => /FREQ=/i.test(l))
        ?.replace(/^RRULE:/i, '') ?? rrule;
    const p = Object.fromEntries(line.split(';').map((x) => x.split('=') as [string, string]));
    const unit: Record<string, string> = { DAILY: 'day', WEEKLY: 'week', MONTHLY: 'month', YEARLY: 'year' };
    const u = unit[String(p.FREQ).toUpperCase()];
    if (!u) return rrule;
    const n = Number(p.INTERVAL ?? 1);
    const every = n > 1 ? `Every ${n} ${u}s` : `Every ${u}`;
    const m = p.BYMONTH
      ? ` in ${p.BYMONTH.split(',')
          .map((x) => names[Number(x) - 1] ?? x)
          .join(', ')}`
      : '';
    const d = p.BYMONTHDAY ? `, aiming at day ${p.BYMONTHDAY}` : '';
    return `${every}${m}${d}`;
  }
  const months = /BYMONTH=([\d,]+)/
    .exec(rrule)?.[1]
    ?.split(',')
    .map((m) => names[Number(m) - 1])
    .join(', ');
  const label = r.preset === 'spring_autumn' ? 'Spring start-up and autumn check' : recurrencePresetLabels[r.preset];
  return `${label}${months ? ` (${months})` : ''}, aiming at day ${r.dayOfMonth}`;
}

/* ------------------------------------------------------------ agreements */

export const agreementStatuses = ['active', 'ended', 'cancelled'] as const;
export const agreementStatusSchema = z.enum(agreementStatuses);
export type AgreementStatus = z.infer<typeof agreementStatusSchema>;

const agreementFields = {
  siteId: pickedIdSchema('a site'),
  name: oneLine(limits.name, 'Name the agreement'),
  unitIds: z.array(idSchema).min(1, 'Pick at least one covered unit').max(200),
  recurrence: recurrenceSchema,
  seasonNotes: z.string().trim().max(limits.longText).optional(),
  termStart: isoDateSchema,
  termEnd: isoDateSchema,
  slaHours: z.number().int('Whole hours').min(1, 'At least 1 hour').max(720, 'At most 720 hours'),
  priceCents: z.number().int().min(0, 'The price cannot be negative').max(100_000_000),
  visitMinutes: z.number().int().min(15, 'At least 15 minutes').max(1440, 'At most a day'),
  tasks: z.array(z.string().trim().min(1).max(limits.shortText)).max(40).default([]),
};

const termOrder = <T extends { termStart?: string | undefined; termEnd?: string | undefined }>(v: T) =>
  !v.termStart || !v.termEnd || v.termStart < v.termEnd;
const termMessage = { message: 'The term must end after it starts', path: ['termEnd'] };
const termLength = <T extends { termStart?: string | undefined; termEnd?: string | undefined }>(v: T) =>
  !v.termStart || !v.termEnd || Number(v.termEnd.slice(0, 4)) - Number(v.termStart.slice(0, 4)) <= 10;
const termLengthMessage = { message: 'A term is at most 10 years', path: ['termEnd'] };

export const agreementInputSchema = z.strictObject(agreementFields).refine(termOrder, termMessage).refine(termLength, termLengthMessage);
export type AgreementInput = z.input<typeof agreementInputSchema>;

export const agreementPatchSchema = z
  .strictObject({ ...agreementFields, status: agreementStatusSchema })
  .partial()
  .omit({ siteId: true })
  .refine(termOrder, termMessage)
  .refine(termLength, termLengthMessage);
export type AgreementPatch = z.input<typeof agreementPatchSchema>;

export const agreementListQuerySchema = z.object({
  branchId: idSchema.optional(),
  status: z.enum(['active', 'ended', 'cancelled', 'all']).default('all'),
});

export interface AgreementRow {
  id: string;
  branchId: string;
  siteId: string;
  siteName: string;
  customerName: string;
  name: string;
  rrule: string;
  recurrence: Recurrence | null;
  seasonNotes: string | null;
  termStart: string;
  termEnd: string;
  slaHours: number;
  priceCents: number;
  visitMinutes: number;
  tasks: string[];
  status: AgreementStatus;
  units: { id: string; tag: string; make: string; model: string }[];
  plannedCount: number;
  nextPlannedDate: string | null;
}

export interface PlannedVisitRow {
  workOrderId: string;
  number: number | null;
  plannedDate: string | null;
  state: z.infer<typeof workOrderStateSchema>;
  closedAt: string | null;
}

export interface AgreementDetail extends AgreementRow {
  visits: PlannedVisitRow[];
}

/* --------------------------------------------------------------- visit plan */

export interface PlanVisit {
  /** The date the recurrence rule gives (the visit's identity across regenerations). */
  ruleDate: string;
  /** The working day it is planned on after moving off weekends/holidays and levelling. */
  plannedDate: string;
  /** Why plannedDate differs from ruleDate, when it does. */
  moved: string | null;
  /** new: will be created; keep: exists, unchanged; move: exists unplaced, date changes;
   *  locked: booked, in progress or done — never touched; cancel: no longer in the plan, unplaced, will be cancelled. */
  action: 'new' | 'keep' | 'move' | 'locked' | 'cancel';
  workOrderId: string | null;
  state: z.infer<typeof workOrderStateSchema> | null;
}

export interface PlanPreview {
  agreementId: string;
  visits: PlanVisit[];
  counts: Record<PlanVisit['action'], number>;
  /** Contracted visits (rule dates from today on) the term has no free working day for, each with the reason. */
  dropped: { ruleDate: string; reason: string }[];
}

export interface PlanApplyResult extends PlanPreview {
  applied: true;
}

/* ----------------------------------------------------------- PM completion */

/** A planned visit closed within this many days after its planned date is on time; later is late; never closed after it is missed. */
export const PM_GRACE_DAYS = 7;

export const pmCompletionQuerySchema = z.object({
  branchId: idSchema.optional(),
  /** Only planned dates on or after this date (default: 12 months back). */
  from: isoDateSchema.optional(),
});

export interface PmCounts {
  due: number;
  onTime: number;
  late: number;
  missed: number;
  /** Due but still inside the grace days. */
  open: number;
}

export interface PmCompletionResponse {
  from: string;
  graceDays: number;
  branches: ({ branchId: string; branchName: string } & PmCounts)[];
  agreements: ({ agreementId: string; branchId: string; name: string; siteName: string } & PmCounts)[];
  renewals: {
    agreementId: string;
    branchId: string;
    name: string;
    siteName: string;
    customerName: string;
    termEnd: string;
    daysLeft: number;
    priceCents: number;
  }[];
}
