import type { SessionUser, SignIn, SignOutEverywhereAnswer } from '@coilpath/contract';
import type { AppContext } from '../../context';
import * as repo from './auth.repo';
import { verifyPassword } from '../../auth/password';
import { signSession } from '../../auth/session';
import { unauthorized } from '../../lib/errors';

/** Checks e-mail and password; the same answer, in about the same time, for an unknown e-mail. */
export async function signIn(ctx: AppContext, input: SignIn): Promise<{ user: SessionUser; token: string }> {
  const u = await repo.userByEmail(ctx.db, input.email);
  const ok = await verifyPassword(u?.active ? u.passwordHash : null, input.password);
  if (!u || !u.active || !ok) throw unauthorized('The e-mail or password is not right.');
  await repo.setLastSignIn(ctx.db, u.id, ctx.clock.now());
  const token = await signSession(ctx.secret, { sub: u.id, sv: u.sessionVersion }, ctx.config.sessionHours, ctx.clock.now());
  return { user: { id: u.id, name: u.name, email: u.email, role: u.role, branchId: u.branchId }, token };
}

/** Ended sessions are kept this long past their token's expiry, so a process whose clock runs behind still refuses them. */
const keepEndedMs = 60 * 60 * 1000;

/**
 * Ends this session on the server: its id is recorded in `ended_sessions` (until its token would have
 * expired), so the cookie is refused from the next request on, on every process. A token from before
 * sessions had ids can only be ended with all of the user's sessions (the session version).
 */
export async function signOut(ctx: AppContext, user: SessionUser, session: { id: string | null; expiresAt: Date }): Promise<void> {
  const now = ctx.clock.now();
  if (!session.id) {
    await repo.raiseSessionVersion(ctx.db, user.id);
    return;
  }
  await repo.endSession(
    ctx.db,
    { sessionId: session.id, userId: user.id, expiresAt: session.expiresAt, endedAt: now },
    new Date(now.getTime() - keepEndedMs),
  );
}

/** Ends every session of the user, this one included, on every device: the session version is raised. */
export async function signOutEverywhere(ctx: AppContext, user: SessionUser): Promise<SignOutEverywhereAnswer> {
  const now = ctx.clock.now();
  await ctx.db.transaction(async (tx) => {
    await repo.raiseSessionVersion(tx, user.id);
    // The raised version refuses them all: the user's single ended sessions need no row any more.
    await repo.forgetEndedSessionsOf(tx, user.id);
  });
  return { email: user.email, endedAt: now.toISOString() };
}
