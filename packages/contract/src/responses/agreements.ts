/** Answers of `/api/agreements` (service agreements, their plan, PM completion), tied to `../agreements`. */
import { z } from 'zod';
import {
  agreementStatusSchema,
  recurrencePresets,
  type AgreementDetail,
  type AgreementRow,
  type PlanApplyResult,
  type PlanPreview,
  type PmCompletionResponse,
} from '../agreements';
import { workOrderStateSchema } from '../vocabulary-schemas';
import type { Agree, AllAgree } from './agree';

export const recurrenceAnswerSchema = z.object({
  preset: z.enum(recurrencePresets),
  startMonth: z.number(),
  dayOfMonth: z.number(),
  springMonth: z.number(),
  autumnMonth: z.number(),
});

export const agreementRowSchema = z.object({
  id: z.string(),
  branchId: z.string(),
  siteId: z.string(),
  siteName: z.string(),
  customerName: z.string(),
  name: z.string(),
  rrule: z.string(),
  recurrence: recurrenceAnswerSchema.nullable(),
  seasonNotes: z.string().nullable(),
  termStart: z.string(),
  termEnd: z.string(),
  slaHours: z.number(),
  priceCents: z.number(),
  visitMinutes: z.number(),
  tasks: z.array(z.string()),
  status: agreementStatusSchema,
  units: z.array(z.object({ id: z.string(), tag: z.string(), make: z.string(), model: z.string() })),
  plannedCount: z.number(),
  nextPlannedDate: z.string().nullable(),
});

export const plannedVisitRowSchema = z.object({
  workOrderId: z.string(),
  number: z.number().nullable(),
  plannedDate: z.string().nullable(),
  state: workOrderStateSchema,
  closedAt: z.string().nullable(),
});

export const agreementDetailSchema = agreementRowSchema.extend({ visits: z.array(plannedVisitRowSchema) });
export const agreementListAnswerSchema = z.object({ agreements: z.array(agreementRowSchema) });
export const agreementAnswerSchema = z.object({ agreement: agreementDetailSchema });

const planActionSchema = z.enum(['new', 'keep', 'move', 'locked', 'cancel']);
export const planPreviewSchema = z.object({
  agreementId: z.string(),
  visits: z.array(
    z.object({
      ruleDate: z.string(),
      plannedDate: z.string(),
      moved: z.string().nullable(),
      action: planActionSchema,
      workOrderId: z.string().nullable(),
      state: workOrderStateSchema.nullable(),
    }),
  ),
  counts: z.object({ new: z.number(), keep: z.number(), move: z.number(), locked: z.number(), cancel: z.number() }),
  dropped: z.array(z.object({ ruleDate: z.string(), reason: z.string() })),
});
export const planApplyResultSchema = planPreviewSchema.extend({ applied: z.literal(true) });

const pmCountsShape = { due: z.number(), onTime: z.number(), late: z.number(), missed: z.number(), open: z.number() };
export const pmCompletionResponseSchema = z.object({
  from: z.string(),
  graceDays: z.number(),
  branches: z.array(z.object({ branchId: z.string(), branchName: z.string(), ...pmCountsShape })),
  agreements: z.array(
    z.object({ agreementId: z.string(), branchId: z.string(), name: z.string(), siteName: z.string(), ...pmCountsShape }),
  ),
  renewals: z.array(
    z.object({
      agreementId: z.string(),
      branchId: z.string(),
      name: z.string(),
      siteName: z.string(),
      customerName: z.string(),
      termEnd: z.string(),
      daysLeft: z.number(),
      priceCents: z.number(),
    }),
  ),
});

export type AgreementsChecks = AllAgree<
  [
    Agree<AgreementRow, typeof agreementRowSchema>,
    Agree<AgreementDetail, typeof agreementDetailSchema>,
    Agree<PlanPreview, typeof planPreviewSchema>,
    Agree<PlanApplyResult, typeof planApplyResultSchema>,
    Agree<PmCompletionResponse, typeof pmCompletionResponseSchema>,
  ]
>;
