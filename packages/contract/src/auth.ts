import { z } from 'zod';
import { emailSchema, idSchema, limits, oneLine } from './common';
import { linkTokenSchema, newPasswordSchema } from './team';
import { roleSchema } from './vocabulary-schemas';

export const signInSchema = z.strictObject({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password').max(limits.password.max),
});
export type SignIn = z.infer<typeof signInSchema>;

export const sessionUserSchema = z.object({
  id: idSchema,
  name: z.string(),
  email: z.string(),
  role: roleSchema,
  branchId: idSchema.nullable(),
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

export const signInResponseSchema = z.object({ user: sessionUserSchema });

/** `POST /api/auth/sign-out-everywhere`: every session of `email` (this one too) ended at `endedAt`. */
export const signOutEverywhereAnswerSchema = z.object({ email: z.string(), endedAt: z.string() });
export type SignOutEverywhereAnswer = z.infer<typeof signOutEverywhereAnswerSchema>;

export const healthSchema = z.object({ ok: z.literal(true), database: z.enum(['pglite', 'postgres']) });
export type Health = z.infer<typeof healthSchema>;

export const publicConfigSchema = z.object({
  demo: z.boolean(),
  demoPassword: z.string().nullable(),
});
export type PublicConfig = z.infer<typeof publicConfigSchema>;

/** `POST /api/setup`: the first owner of a new Coilpath, from the one-time link printed at the first start. */
export const ownerSetupSchema = z
  .object({
    token: linkTokenSchema,
    name: oneLine(limits.name, 'Enter your name'),
    email: emailSchema,
    password: newPasswordSchema,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ', path: ['confirm'] });
export type OwnerSetup = z.input<typeof ownerSetupSchema>;
