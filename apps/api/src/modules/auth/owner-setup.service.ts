import type { SessionUser } from '@coilpath/contract';
import type { AppContext } from '../../context';
import type { Db } from '../../db/client';
import * as repo from './auth.repo';
import { hashPassword } from '../../auth/password';
import { assertPasswordAllowed } from '../../auth/password-rules';
import { signSession } from '../../auth/session';
import { hashLinkToken, linkErrors, newLinkToken, signLinkToken, verifyLinkToken } from '../../auth/link-tokens';
import { HttpError } from '../../lib/errors';

/** The key in `app_meta` of the pending setup link (its token's SHA-256 and expiry). */
const SETUP_KEY = 'owner_setup';
export const SETUP_HOURS = 24;
const SETUP = 'setup';
const again = 'Restart the server to print a new setup link.';

interface PendingSetup {
  tokenHash: string;
  expiresAt: string;
}

const hasUsers = repo.hasUsers;

/**
 * On a start without demo data: when the database has nobody yet, makes a one-time link for the first owner
 * (valid `SETUP_HOURS`; each start makes a new one and the older stops working) and returns it to be printed.
 * Null once anyone has an account.
 */
export async function issueOwnerSetup(ctx: Pick<AppContext, 'db' | 'secret' | 'clock' | 'config'>): Promise<string | null> {
  if (await hasUsers(ctx.db)) return null;
  const { token, hash } = newLinkToken();
  const value: PendingSetup = { tokenHash: hash, expiresAt: new Date(ctx.clock.now().getTime() + SETUP_HOURS * 3600_000).toISOString() };
  await repo.putMeta(ctx.db, SETUP_KEY, value, ctx.clock.now());
  return `${ctx.config.publicUrl.replace(/\/$/, '')}/setup?token=${encodeURIComponent(signLinkToken(ctx.secret, 'owner-setup', token))}`;
}

const setupDone = () => new HttpError(410, 'setup_done', 'This Coilpath already has its owner. Sign in with your e-mail and password.');

async function openSetup(ctx: AppContext, db: Pick<Db, 'select'>, signed: string, lock = false): Promise<void> {
  const token = verifyLinkToken(ctx.secret, 'owner-setup', signed);
  if (!token) throw linkErrors.invalid(SETUP);
  const row = await repo.readMeta(db, SETUP_KEY, lock);
  if (await hasUsers(db)) throw setupDone();
  const pending = row?.value as PendingSetup | undefined;
  if (!pending || pending.tokenHash !== hashLinkToken(token)) throw linkErrors.invalid(SETUP);
  if (new Date(pending.expiresAt) <= ctx.clock.now()) throw linkErrors.expired(SETUP, again);
}

/** `POST /api/setup/check`: whether the link can still set up the first owner. */
export async function checkOwnerSetup(ctx: AppContext, signed: string): Promise<{ ok: true }> {
  await openSetup(ctx, ctx.db, signed);
  return { ok: true };
}

/**
 * Creates the first owner from the setup link, once: the link is spent in the same transaction, and a
 * database that has anybody already answers 410.
 */
export async function completeOwnerSetup(
  ctx: AppContext,
  input: { token: string; name: string; email: string; password: string },
): Promise<{ user: SessionUser; token: string }> {
  await openSetup(ctx, ctx.db, input.token);
  await assertPasswordAllowed(input.password, { email: input.email, name: input.name });
  const passwordHash = await hashPassword(input.password);
  const now = ctx.clock.now();
  const u = await ctx.db.transaction(async (tx) => {
    await openSetup(ctx, tx, input.token, true);
    const created = await repo.insertUser(tx, {
      email: input.email,
      name: input.name,
      role: 'owner',
      branchId: null,
      passwordHash,
      lastSignInAt: now,
    });
    await repo.deleteMeta(tx, SETUP_KEY);
    await repo.insertAudit(tx, { actorId: created.id, action: 'owner.setup', entity: 'user', entityId: created.id, details: {}, at: now });
    return created;
  });
  const token = await signSession(ctx.secret, { sub: u.id, sv: u.sessionVersion }, ctx.config.sessionHours, now);
  return { user: { id: u.id, name: u.name, email: u.email, role: u.role, branchId: u.branchId }, token };
}
