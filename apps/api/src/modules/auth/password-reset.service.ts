import type { SessionUser } from '@coilpath/contract';
import type { AppContext } from '../../context';
import * as repo from './auth.repo';
import { composeMail, mail, mailTime } from '../../mail/compose';
import { hashPassword } from '../../auth/password';
import { assertPasswordAllowed } from '../../auth/password-rules';
import { signSession } from '../../auth/session';
import { hashLinkToken, linkErrors, newLinkToken, signLinkToken, verifyLinkToken } from '../../auth/link-tokens';

export const RESET_MINUTES = 60;

/** Reset e-mails sent to one account within an hour at most; further requests are dropped (and audited). */
export const RESET_MAILS_PER_HOUR = 3;

/**
 * Asks for a reset link. Answers at once: the lookup, the link and the e-mail are a job done after the answer
 * (`ctx.jobs`), so the answer and its time are the same whether or not the address has an account.
 */
export function requestPasswordReset(ctx: AppContext, email: string): void {
  ctx.jobs.enqueue('password-reset', async () => {
    await sendPasswordReset(ctx, email);
  });
}

/**
 * Sends a single-use reset link when the address belongs to an active account, at most
 * `RESET_MAILS_PER_HOUR` an hour per account (reckoned by `ctx.clock` from the links made): a request past
 * that sends nothing, and is logged and recorded as `password_reset.throttled` in the audit events.
 */
export async function sendPasswordReset(ctx: AppContext, email: string): Promise<'sent' | 'throttled' | 'no_account'> {
  const u = await repo.resetAccount(ctx.db, email);
  if (!u || !u.active) return 'no_account';
  const now = ctx.clock.now();
  const hourAgo = new Date(now.getTime() - 60 * 60_000);
  const { token, hash } = newLinkToken();
  const expiresAt = new Date(now.getTime() + RESET_MINUTES * 60_000);
  const made = await ctx.db.transaction(async (tx) => {
    // The user's row is locked so two processes count and add the links one after the other.
    await repo.lockUser(tx, u.id);
    const sentInLastHour = await repo.resetsSince(tx, u.id, hourAgo);
    if (sentInLastHour >= RESET_MAILS_PER_HOUR) {
      await repo.insertAudit(tx, {
        actorId: null,
        action: 'password_reset.throttled',
        entity: 'user',
        entityId: u.id,
        details: { sentInLastHour, limit: RESET_MAILS_PER_HOUR },
        at: now,
      });
      return false;
    }
    // Only the newest link works.
    await repo.replaceReset(tx, { userId: u.id, tokenHash: hash, expiresAt, createdAt: now });
    return true;
  });
  if (!made) {
    ctx.logger?.warn({ userId: u.id }, `password reset not sent: ${RESET_MAILS_PER_HOUR} links already sent within the hour`);
    return 'throttled';
  }
  const link = `${ctx.config.publicUrl.replace(/\/$/, '')}/reset-password?token=${encodeURIComponent(signLinkToken(ctx.secret, 'password-reset', token))}`;
  const message = composeMail('Choose a new Coilpath password', [
    mail.p(`Hello ${u.name},`),
    mail.p('Someone (we hope you) asked to choose a new password for this Coilpath account.'),
    mail.link(link, 'Choose a new password'),
    mail.p(
      `The link works once and expires in ${RESET_MINUTES} minutes, at ${mailTime(expiresAt, u.timeZone)}. Choosing a new password signs you out on every other device.`,
    ),
    mail.p('If you did not ask for this, ignore this message: your password stays as it is.', true),
  ]);
  // The answer went out long ago; a failure is logged for the operator.
  await ctx.mailer
    .send({ to: email, ...message })
    .catch((err: unknown) => ctx.logger?.error({ err, userId: u.id }, 'password-reset mail failed'));
  return 'sent';
}

const RESET = 'password reset';
const again = 'Ask for a new link from "Forgot your password?" on the sign-in page.';

async function openReset(ctx: AppContext, signed: string) {
  const token = verifyLinkToken(ctx.secret, 'password-reset', signed);
  if (!token) throw linkErrors.invalid(RESET);
  const r = await repo.resetByTokenHash(ctx.db, hashLinkToken(token));
  if (!r || !r.active) throw linkErrors.invalid(RESET);
  if (r.usedAt) throw linkErrors.used(RESET, again);
  if (r.expiresAt <= ctx.clock.now()) throw linkErrors.expired(RESET, again);
  return r;
}

export async function checkPasswordReset(ctx: AppContext, signed: string): Promise<{ email: string }> {
  const r = await openReset(ctx, signed);
  return { email: r.email };
}

/**
 * Sets the new password, spends the link, and raises the session version so every other session
 * ends; the browser that reset gets a fresh session.
 */
export async function resetPassword(ctx: AppContext, signed: string, password: string): Promise<{ user: SessionUser; token: string }> {
  const r = await openReset(ctx, signed);
  await assertPasswordAllowed(password, { email: r.email, name: r.name });
  const passwordHash = await hashPassword(password);
  const now = ctx.clock.now();
  const u = await ctx.db.transaction(async (tx) => {
    if (!(await repo.spendReset(tx, r.id, now))) throw linkErrors.used(RESET, again);
    return repo.setPassword(tx, r.userId, passwordHash, now);
  });
  const token = await signSession(ctx.secret, { sub: u.id, sv: u.sessionVersion }, ctx.config.sessionHours, now);
  return { user: { id: u.id, name: u.name, email: u.email, role: u.role, branchId: u.branchId }, token };
}
