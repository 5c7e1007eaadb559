/** Answers of `/api/branches`, `/api/users` and `/api/invitations` (the team), tied to `../team`. */
import { z } from 'zod';
import type { Page } from '../common';
import type { BranchDetail, InvitationRow, UserRow } from '../team';
import { epa608TypeSchema, roleSchema, workingHoursSchema } from '../vocabulary-schemas';
import type { Agree, AllAgree } from './agree';
import { pageSchema } from './sites';

export const branchDetailSchema = z.object({
  id: z.string(),
  name: z.string(),
  code: z.string(),
  timeZone: z.string(),
  baseAddress: z.string(),
  baseLat: z.number(),
  baseLon: z.number(),
  holidays: z.array(z.string()),
  labourRate: z.number(),
  currency: z.string(),
  unitSystem: z.enum(['imperial', 'si']),
  elevationMeters: z.number(),
  sensorTolerancePercent: z.number(),
  sensorToleranceAbsolute: z.number(),
  repeatAlarmCount: z.number(),
  repeatAlarmDays: z.number(),
  callbackWindowDays: z.number(),
  inspectionDueDays: z.number(),
  tradingName: z.string(),
  officeAddress: z.string(),
  officePhone: z.string(),
  licenceNumber: z.string(),
  officeEmail: z.string(),
  archivedAt: z.string().nullable(),
});
export const branchListAnswerSchema = z.object({ branches: z.array(branchDetailSchema) });

export const userRowSchema = z.object({
  id: z.string(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  branchId: z.string().nullable(),
  branchName: z.string().nullable(),
  phone: z.string().nullable(),
  skills: z.array(z.string()),
  epa608Type: epa608TypeSchema,
  epa608Number: z.string().nullable(),
  workingHours: workingHoursSchema.nullable(),
  startAddress: z.string().nullable(),
  startLat: z.number().nullable(),
  startLon: z.number().nullable(),
  colorIndex: z.number(),
  active: z.boolean(),
  deactivatedAt: z.string().nullable(),
  lastSignInAt: z.string().nullable(),
});
export const userPageSchema = pageSchema(userRowSchema);

export const invitationRowSchema = z.object({
  id: z.string(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  branchId: z.string().nullable(),
  branchName: z.string().nullable(),
  status: z.enum(['pending', 'expired', 'used', 'revoked']),
  expiresAt: z.string(),
  createdAt: z.string(),
  invitedByName: z.string().nullable(),
});
export const invitationListAnswerSchema = z.object({ invitations: z.array(invitationRowSchema) });

export type TeamChecks = AllAgree<
  [
    Agree<BranchDetail, typeof branchDetailSchema>,
    Agree<UserRow, typeof userRowSchema>,
    Agree<Page<UserRow>, typeof userPageSchema>,
    Agree<InvitationRow, typeof invitationRowSchema>,
  ]
>;
