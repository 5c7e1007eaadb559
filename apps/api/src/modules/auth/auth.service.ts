import { eq } from 'drizzle-orm';
import type { SessionUser, SignIn } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { users } from '../../db/schema';
import { verifyPassword } from '../../auth/password';
import { signSession } from '../../auth/session';
import { unauthorized } from '../../lib/errors';

/** Checks e-mail and password; the same answer, in about the same time, for an unknown e-mail. */
export async function signIn(ctx: AppContext, input: SignIn): Promise<{ user: SessionUser; token: string }> {
  const [u] = await ctx.db.select().from(users).where(eq(users.email, input.email)).limit(1);
  const ok = await verifyPassword(u?.active ? u.passwordHash : null, input.password);
  if (!u || !u.active || !ok) throw unauthorized('The e-mail or password is not right.');
  await ctx.db.update(users).set({ lastSignInAt: ctx.clock.now() }).where(eq(users.id, u.id));
  const token = await signSession(ctx.secret, { sub: u.id, sv: u.sessionVersion }, ctx.config.sessionHours, ctx.clock.now());
  return { user: { id: u.id, name: u.name, email: u.email, role: u.role, branchId: u.branchId }, token };
}
