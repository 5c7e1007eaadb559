import { z } from 'zod';
import {
  emailSchema,
  idSchema,
  isoDateSchema,
  latitudeSchema,
  limits,
  longitudeSchema,
  oneLine,
  optionalOneLine,
  pageQuerySchema,
} from './common';
import { elevationMetersSchema } from './measure-schemas';
import type { Epa608Type, Role } from './vocabulary';
import { epa608TypeSchema, roleSchema, workingHoursSchema, type WorkingHours } from './vocabulary-schemas';

/** True for an IANA time-zone name this runtime knows (e.g. `America/Denver`). */
export function isIanaTimeZone(name: string): boolean {
  if (!/^[A-Za-z_]+(\/[A-Za-z0-9_+-]+)*$/.test(name) && name !== 'UTC') return false;
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

export const timeZoneSchema = z
  .string()
  .trim()
  .min(1, 'Choose the time zone')
  .refine(isIanaTimeZone, 'Use an IANA time-zone name such as America/Denver');

/** Optional one-line text: blank becomes `null`. */
const optionalText = optionalOneLine;

// ---------------------------------------------------------------------------------------------
// Branches
// ---------------------------------------------------------------------------------------------

export const branchInputSchema = z.object({
  name: oneLine(limits.name, 'Enter the branch name'),
  /** Short code shown in lists, e.g. DEN. */
  code: z
    .string()
    .trim()
    .min(2, 'Two to eight letters or digits')
    .max(8, 'Two to eight letters or digits')
    .regex(/^[A-Za-z0-9]+$/, 'Letters and digits only')
    .transform((c) => c.toUpperCase()),
  timeZone: timeZoneSchema,
  baseAddress: oneLine(limits.shortText).default(''),
  baseLat: z.coerce.number({ message: 'Enter the latitude in degrees' }).pipe(latitudeSchema),
  baseLon: z.coerce.number({ message: 'Enter the longitude in degrees' }).pipe(longitudeSchema),
  /** Branch holidays (no planned work), `YYYY-MM-DD` in the branch's calendar. */
  holidays: z
    .array(isoDateSchema)
    .max(100)
    .default([])
    .transform((ds) => [...new Set(ds)].sort()),
  /** Labour rate per hour, in the branch's currency (e.g. 95.50). */
  labourRate: z.coerce.number({ message: 'Enter the hourly rate' }).min(0).max(100_000),
  currency: z
    .string()
    .regex(/^[A-Z]{3}$/, 'Use a three-letter currency code such as USD')
    .default('USD'),
  unitSystem: z.enum(['imperial', 'si']).default('imperial'),
  /** Elevation of the branch's area, metres above sea level (gauges read against the air there). */
  elevationMeters: elevationMetersSchema.default(0),
  /** Sensor check: largest acceptable difference between controller and reference gauge. */
  sensorTolerancePercent: z.coerce.number().min(0, 'Cannot be negative').max(50, 'At most 50 %'),
  sensorToleranceAbsolute: z.coerce.number().min(0, 'Cannot be negative').max(100, 'At most 100 psi'),
  /** Repeat alarm: the same code N times … */
  repeatAlarmCount: z.coerce.number().int('Whole number').min(2, 'At least 2').max(20),
  /** … within M days. */
  repeatAlarmDays: z.coerce.number().int('Whole number').min(1, 'At least 1 day').max(365),
  /** A return call within this many days of a visit closed as fixed counts as a callback. */
  callbackWindowDays: z.coerce.number().int('Whole number').min(1, 'At least 1 day').max(365),
  /** Inspections created from a model alert are due this many days later (the database default is 30). */
  inspectionDueDays: z.coerce.number().int('Whole number').min(1, 'At least 1 day').max(365).optional(),
  /** The contractor as the customer's service summary names it (blank: the branch's name). Left out: unchanged (stored default ''). */
  tradingName: oneLine(limits.name).optional(),
  /** The office's postal address, phone and contractor's licence number, printed on every service summary. */
  officeAddress: oneLine(limits.shortText).optional(),
  officePhone: oneLine(40).optional(),
  licenceNumber: oneLine(60).optional(),
  /** The office's e-mail: the Reply-To of every service summary (blank: replies go to the sending address). */
  officeEmail: z.union([z.literal(''), emailSchema]).optional(),
});
export type BranchInput = z.input<typeof branchInputSchema>;
export type BranchValues = z.output<typeof branchInputSchema>;
export const branchPatchSchema = branchInputSchema.partial();

export interface BranchDetail {
  id: string;
  name: string;
  code: string;
  timeZone: string;
  baseAddress: string;
  baseLat: number;
  baseLon: number;
  holidays: string[];
  labourRate: number;
  currency: string;
  unitSystem: 'imperial' | 'si';
  elevationMeters: number;
  sensorTolerancePercent: number;
  sensorToleranceAbsolute: number;
  repeatAlarmCount: number;
  repeatAlarmDays: number;
  callbackWindowDays: number;
  inspectionDueDays: number;
  tradingName: string;
  officeAddress: string;
  officePhone: string;
  licenceNumber: string;
  officeEmail: string;
  archivedAt: string | null;
}

// ---------------------------------------------------------------------------------------------
// People
// ---------------------------------------------------------------------------------------------

/** Skills a technician can carry (the Roster matches work's required skill against these). */
export const skillSuggestions = [
  'rooftop units',
  'split systems',
  'chillers',
  'refrigeration',
  'boilers',
  'controls',
  'brazing',
  'leak search',
  'ice machines',
] as const;

/** A person's working profile, shared by the invitation and the edit form. */
export const userProfileSchema = z
  .object({
    name: oneLine(limits.name, 'Enter the name'),
    role: roleSchema,
    /** Owners belong to no branch (they see all); everyone else needs one. */
    branchId: idSchema.nullish().transform((v) => v ?? null),
    phone: optionalText(40),
    skills: z
      .array(oneLine(40, 'Enter the skill'))
      .max(20)
      .default([])
      .transform((xs) => [...new Set(xs.map((x) => x.toLowerCase()))]),
    epa608Type: epa608TypeSchema.default('none'),
    epa608Number: optionalText(40),
    workingHours: workingHoursSchema.nullish().transform((v) => v ?? null),
    startAddress: optionalText(limits.shortText),
    startLat: z
      .number()
      .pipe(latitudeSchema)
      .nullish()
      .transform((v) => v ?? null),
    startLon: z
      .number()
      .pipe(longitudeSchema)
      .nullish()
      .transform((v) => v ?? null),
  })
  .superRefine((p, ctx) => {
    if (p.role === 'owner' && p.branchId)
      ctx.addIssue({ code: 'custom', path: ['branchId'], message: 'Owners see every branch; leave the branch empty' });
    if (p.role !== 'owner' && !p.branchId) ctx.addIssue({ code: 'custom', path: ['branchId'], message: 'Choose the branch' });
    if (p.epa608Type !== 'none' && !p.epa608Number)
      ctx.addIssue({ code: 'custom', path: ['epa608Number'], message: 'Enter the certification number' });
    if ((p.startLat === null) !== (p.startLon === null))
      ctx.addIssue({ code: 'custom', path: ['startLon'], message: 'Give both latitude and longitude, or neither' });
  });
export type UserProfileInput = z.input<typeof userProfileSchema>;
export type UserProfile = z.output<typeof userProfileSchema>;

export const invitationInputSchema = z.object({ email: emailSchema, profile: userProfileSchema });
export type InvitationInput = z.input<typeof invitationInputSchema>;

export const usersQuerySchema = pageQuerySchema.extend({
  branchId: idSchema.optional(),
  role: roleSchema.optional(),
  status: z.enum(['active', 'inactive', 'all']).default('active'),
  pageSize: z.coerce.number().int().min(1).max(500).default(100),
});
export const userSortKeys = ['name', 'email', 'role', 'branchName', 'lastSignInAt'] as const;

export interface UserRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  branchId: string | null;
  branchName: string | null;
  phone: string | null;
  skills: string[];
  epa608Type: Epa608Type;
  epa608Number: string | null;
  workingHours: WorkingHours | null;
  startAddress: string | null;
  startLat: number | null;
  startLon: number | null;
  colorIndex: number;
  active: boolean;
  deactivatedAt: string | null;
  lastSignInAt: string | null;
}

export interface InvitationRow {
  id: string;
  email: string;
  name: string;
  role: Role;
  branchId: string | null;
  branchName: string | null;
  status: 'pending' | 'expired' | 'used' | 'revoked';
  expiresAt: string;
  createdAt: string;
  invitedByName: string | null;
}

// ---------------------------------------------------------------------------------------------
// Links sent by e-mail: invitation sign-up and password reset (public routes)
// ---------------------------------------------------------------------------------------------

export const newPasswordSchema = z
  .string()
  .min(limits.password.min, `Use at least ${limits.password.min} characters`)
  .max(limits.password.max, `At most ${limits.password.max} characters`);

export const linkTokenSchema = z.string().trim().min(10, 'The link is incomplete').max(400, 'The link is not valid');

export const linkCheckSchema = z.object({ token: linkTokenSchema });

export const acceptInvitationSchema = z
  .object({
    token: linkTokenSchema,
    name: oneLine(limits.name, 'Enter your name'),
    password: newPasswordSchema,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ', path: ['confirm'] });
export type AcceptInvitation = z.input<typeof acceptInvitationSchema>;

export const forgotPasswordSchema = z.object({ email: emailSchema });
export type ForgotPassword = z.input<typeof forgotPasswordSchema>;

export const resetPasswordSchema = z
  .object({ token: linkTokenSchema, password: newPasswordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ', path: ['confirm'] });
export type ResetPassword = z.input<typeof resetPasswordSchema>;

/** What the public invitation page shows before the person signs up. */
export interface InvitationPreview {
  email: string;
  name: string;
  role: Role;
  branchName: string | null;
  expiresAt: string;
}

/** The same answer whether or not the address belongs to someone. */
export const forgotPasswordAnswer =
  'If that address belongs to a Coilpath account, a link to choose a new password is on its way. It works once, within one hour.';
