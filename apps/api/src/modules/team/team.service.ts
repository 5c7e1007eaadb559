import { and, count, desc, eq, isNull, ne, sql } from 'drizzle-orm';
import type { z } from 'zod';
import {
  roleLabels,
  type InvitationPreview,
  type InvitationRow,
  type Page,
  type SessionUser,
  type UserProfile,
  type UserRow,
  type usersQuerySchema,
} from '@coilpath/contract';
import { composeMail, mail, mailTime } from '../../mail/compose';
import type { AppContext } from '../../context';
import type { Tx } from '../../db/client';
import { branches, invitations, users } from '../../db/schema';
import { assertBranch, enforce, mayDeactivate } from '../../auth/policy';
import { hashPassword } from '../../auth/password';
import { assertPasswordAllowed } from '../../auth/password-rules';
import { signSession } from '../../auth/session';
import { hashLinkToken, linkErrors, newLinkToken, signLinkToken, verifyLinkToken } from '../../auth/link-tokens';
import { conflict, HttpError, notFound } from '../../lib/errors';
import { listBranch, orderFor, pageWindow, searchAny } from '../sites/list-query';
import { actAs } from '../events/actor';

export const INVITATION_HOURS = 72;
/** Technician colours on the Roster (tailwind `tech-0` … `tech-7`). */
export const TECH_COLOURS = 8;

type UsersQuery = z.output<typeof usersQuerySchema>;
const iso = (d: Date | null) => (d ? d.toISOString() : null);

// ---------------------------------------------------------------------------------------------
// People
// ---------------------------------------------------------------------------------------------

const userColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  role: users.role,
  branchId: users.branchId,
  branchName: branches.name,
  phone: users.phone,
  skills: users.skills,
  epa608Type: users.epa608Type,
  epa608Number: users.epa608Number,
  workingHours: users.workingHours,
  startAddress: users.startAddress,
  startLat: users.startLat,
  startLon: users.startLon,
  colorIndex: users.colorIndex,
  active: users.active,
  deactivatedAt: users.deactivatedAt,
  lastSignInAt: users.lastSignInAt,
};
type UserSelect = { [K in keyof typeof userColumns]: unknown } & { deactivatedAt: Date | null; lastSignInAt: Date | null };
const toUserRow = (r: UserSelect): UserRow => ({
  ...(r as unknown as UserRow),
  deactivatedAt: iso(r.deactivatedAt),
  lastSignInAt: iso(r.lastSignInAt),
});

/**
 * People of a branch. The owner lists anyone; branch managers and dispatchers read their own
 * branch (the Roster needs its technicians) and never see owners' details beyond the list.
 */
export async function listUsers(ctx: AppContext, user: SessionUser, q: UsersQuery): Promise<Page<UserRow>> {
  const branchId = listBranch(user, q.branchId);
  const where = and(
    branchId ? eq(users.branchId, branchId) : undefined,
    q.role ? eq(users.role, q.role) : undefined,
    q.status === 'active' ? eq(users.active, true) : q.status === 'inactive' ? eq(users.active, false) : undefined,
    searchAny(q.q, [users.name, users.email]),
  );
  const order = orderFor(
    q.sort,
    q.dir,
    { name: users.name, email: users.email, role: users.role, branchName: branches.name, lastSignInAt: users.lastSignInAt },
    'name',
    users.id,
  );
  const { limit, offset } = pageWindow(q.page, q.pageSize);
  const [rows, [total]] = await Promise.all([
    ctx.db
      .select(userColumns)
      .from(users)
      .leftJoin(branches, eq(branches.id, users.branchId))
      .where(where)
      .orderBy(...order)
      .limit(limit)
      .offset(offset),
    ctx.db.select({ n: count() }).from(users).where(where),
  ]);
  return { rows: rows.map(toUserRow), total: total?.n ?? 0, page: q.page, pageSize: q.pageSize };
}

export async function getUser(db: Tx, user: SessionUser, id: string): Promise<UserRow> {
  const [row] = await db
    .select(userColumns)
    .from(users)
    .leftJoin(branches, eq(branches.id, users.branchId))
    .where(eq(users.id, id))
    .limit(1);
  if (!row) throw notFound('person');
  if (user.role !== 'owner') assertBranch(user, row.branchId, 'person');
  return toUserRow(row);
}

async function assertActiveBranch(db: Tx, branchId: string | null) {
  if (!branchId) return;
  const [b] = await db.select({ archivedAt: branches.archivedAt, name: branches.name }).from(branches).where(eq(branches.id, branchId));
  if (!b) throw notFound('branch');
  if (b.archivedAt) throw conflict('branch_archived', `${b.name} is archived; choose an active branch.`);
}

/** The Roster colour used least by the branch's active technicians (lowest index on a tie). */
export async function leastUsedColour(db: Tx, branchId: string | null, exceptUserId?: string): Promise<number> {
  if (!branchId) return 0;
  const rows = await db
    .select({ colorIndex: users.colorIndex, n: count() })
    .from(users)
    .where(
      and(
        eq(users.branchId, branchId),
        eq(users.role, 'technician'),
        eq(users.active, true),
        exceptUserId ? ne(users.id, exceptUserId) : undefined,
      ),
    )
    .groupBy(users.colorIndex);
  const used = new Map(rows.map((r) => [r.colorIndex, r.n]));
  let best = 0;
  for (let i = 1; i < TECH_COLOURS; i++) if ((used.get(i) ?? 0) < (used.get(best) ?? 0)) best = i;
  return best;
}

/** Coilpath always keeps one active owner; the last one can be neither demoted nor deactivated. */
async function refuseLastOwner(db: Tx, target: { id: string; role: string; active: boolean }) {
  if (target.role !== 'owner' || !target.active) return;
  const [o] = await db
    .select({ n: count() })
    .from(users)
    .where(and(eq(users.role, 'owner'), eq(users.active, true), ne(users.id, target.id)));
  if ((o?.n ?? 0) === 0) {
    throw conflict('last_owner', 'This is the last active owner. Make someone else an owner first, so Coilpath always has one.');
  }
}

function profileColumns(p: UserProfile) {
  return {
    name: p.name,
    role: p.role,
    branchId: p.branchId,
    phone: p.phone,
    skills: p.skills,
    epa608Type: p.epa608Type,
    epa608Number: p.epa608Type === 'none' ? null : p.epa608Number,
    workingHours: p.workingHours,
    startAddress: p.startAddress,
    startLat: p.startLat,
    startLon: p.startLon,
  };
}

export async function updateUser(ctx: AppContext, actor: SessionUser, id: string, profile: UserProfile): Promise<UserRow> {
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, actor.id);
    const current = await getUser(tx, actor, id);
    if (current.role === 'owner' && profile.role !== 'owner') await refuseLastOwner(tx, current);
    await assertActiveBranch(tx, profile.branchId);
    const moved = profile.branchId !== current.branchId || (profile.role === 'technician' && current.role !== 'technician');
    const colorIndex = moved && profile.role === 'technician' ? await leastUsedColour(tx, profile.branchId, id) : current.colorIndex;
    // A change of role or branch changes what the person may see: their sessions end.
    const roleOrBranchChanged = profile.role !== current.role || profile.branchId !== current.branchId;
    await tx
      .update(users)
      .set({
        ...profileColumns(profile),
        colorIndex,
        ...(roleOrBranchChanged ? { sessionVersion: sql`${users.sessionVersion} + 1` } : {}),
      })
      .where(eq(users.id, id));
    return getUser(tx, actor, id);
  });
}

/** Deactivation signs the person out everywhere and keeps every record they made. */
export async function setUserActive(ctx: AppContext, actor: SessionUser, id: string, active: boolean): Promise<UserRow> {
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, actor.id);
    const current = await getUser(tx, actor, id);
    if (!active) {
      enforce(mayDeactivate(actor, current.id));
      await refuseLastOwner(tx, current);
      await tx
        .update(users)
        .set({ active: false, deactivatedAt: ctx.clock.now(), sessionVersion: sql`${users.sessionVersion} + 1` })
        .where(eq(users.id, id));
    } else if (!current.active) {
      const colorIndex = current.role === 'technician' ? await leastUsedColour(tx, current.branchId, id) : current.colorIndex;
      await tx.update(users).set({ active: true, deactivatedAt: null, colorIndex }).where(eq(users.id, id));
    }
    return getUser(tx, actor, id);
  });
}

// ---------------------------------------------------------------------------------------------
// Invitations
// ---------------------------------------------------------------------------------------------

function invitationStatus(i: { usedAt: Date | null; revokedAt: Date | null; expiresAt: Date }, now: Date): InvitationRow['status'] {
  if (i.usedAt) return 'used';
  if (i.revokedAt) return 'revoked';
  return i.expiresAt <= now ? 'expired' : 'pending';
}

export async function listInvitations(ctx: AppContext): Promise<InvitationRow[]> {
  const inviter = sql<string | null>`(select ${users.name} from ${users} where ${users.id} = ${invitations.invitedById})`;
  const rows = await ctx.db
    .select({
      id: invitations.id,
      email: invitations.email,
      name: invitations.name,
      role: invitations.role,
      branchId: invitations.branchId,
      branchName: branches.name,
      expiresAt: invitations.expiresAt,
      usedAt: invitations.usedAt,
      revokedAt: invitations.revokedAt,
      createdAt: invitations.createdAt,
      invitedByName: inviter,
    })
    .from(invitations)
    .leftJoin(branches, eq(branches.id, invitations.branchId))
    .orderBy(desc(invitations.createdAt))
    .limit(200);
  const now = ctx.clock.now();
  return rows.map(({ usedAt, revokedAt, ...r }) => ({
    ...r,
    status: invitationStatus({ usedAt, revokedAt, expiresAt: r.expiresAt }, now),
    expiresAt: r.expiresAt.toISOString(),
    createdAt: r.createdAt.toISOString(),
  }));
}

/**
 * The invitation e-mail (text and HTML). The expiry is written in the invitee's branch time zone; an
 * owner belongs to no branch, so theirs is in UTC, labelled as such.
 */
async function sendInvitationMail(
  ctx: AppContext,
  to: { email: string; name: string; role: UserProfile['role']; branchId: string | null },
  link: string,
  expiresAt: Date,
  inviter: string,
) {
  const [branch] = to.branchId
    ? await ctx.db.select({ name: branches.name, timeZone: branches.timeZone }).from(branches).where(eq(branches.id, to.branchId))
    : [];
  const where = branch ? ` at ${branch.name}` : '';
  const message = composeMail(`${inviter} invited you to Coilpath`, [
    mail.p(`Hello ${to.name},`),
    mail.p(`${inviter} invited you to Coilpath as ${roleLabels[to.role].toLowerCase()}${where}.`),
    mail.link(link, 'Choose your password and sign in'),
    mail.p(`The link works once and expires on ${mailTime(expiresAt, branch?.timeZone)}.`),
    mail.p('If you did not expect this invitation, ignore this message.', true),
  ]);
  await ctx.mailer.send({ to: to.email, ...message });
}

async function issueInvitationToken(ctx: AppContext) {
  const { token, hash } = newLinkToken();
  const link = `${ctx.config.publicUrl.replace(/\/$/, '')}/accept-invitation?token=${encodeURIComponent(signLinkToken(ctx.secret, 'invitation', token))}`;
  return { hash, link, expiresAt: new Date(ctx.clock.now().getTime() + INVITATION_HOURS * 3600_000) };
}

export async function createInvitation(ctx: AppContext, actor: SessionUser, email: string, profile: UserProfile): Promise<InvitationRow> {
  const [taken] = await ctx.db.select({ id: users.id }).from(users).where(eq(users.email, email)).limit(1);
  if (taken) throw conflict('email_taken', `${email} already has a Coilpath account. Edit that person instead.`);
  await assertActiveBranch(ctx.db, profile.branchId);
  const { hash, link, expiresAt } = await issueInvitationToken(ctx);
  const id = await ctx.db.transaction(async (tx) => {
    await actAs(tx, actor.id);
    // A new invitation replaces any earlier open one for the same address.
    await tx
      .update(invitations)
      .set({ revokedAt: ctx.clock.now() })
      .where(and(eq(invitations.email, email), isNull(invitations.usedAt), isNull(invitations.revokedAt)));
    const { name, role, branchId, ...rest } = profileColumns(profile);
    const [row] = await tx
      .insert(invitations)
      .values({ email, name, role, branchId, profile: rest, tokenHash: hash, expiresAt, invitedById: actor.id, createdAt: ctx.clock.now() })
      .returning({ id: invitations.id });
    return row!.id;
  });
  await sendInvitationMail(ctx, { email, name: profile.name, role: profile.role, branchId: profile.branchId }, link, expiresAt, actor.name);
  return (await listInvitations(ctx)).find((i) => i.id === id)!;
}

export async function resendInvitation(ctx: AppContext, actor: SessionUser, id: string): Promise<InvitationRow> {
  const [inv] = await ctx.db.select().from(invitations).where(eq(invitations.id, id));
  if (!inv) throw notFound('invitation');
  if (inv.usedAt) throw conflict('link_used', `${inv.email} already accepted this invitation.`);
  const { hash, link, expiresAt } = await issueInvitationToken(ctx);
  await ctx.db.update(invitations).set({ tokenHash: hash, expiresAt, revokedAt: null }).where(eq(invitations.id, id));
  await sendInvitationMail(ctx, { email: inv.email, name: inv.name, role: inv.role, branchId: inv.branchId }, link, expiresAt, actor.name);
  return (await listInvitations(ctx)).find((i) => i.id === id)!;
}

export async function revokeInvitation(ctx: AppContext, id: string): Promise<InvitationRow> {
  const [inv] = await ctx.db.select().from(invitations).where(eq(invitations.id, id));
  if (!inv) throw notFound('invitation');
  if (inv.usedAt) throw conflict('link_used', `${inv.email} already accepted this invitation; deactivate the person instead.`);
  await ctx.db.update(invitations).set({ revokedAt: ctx.clock.now() }).where(eq(invitations.id, id));
  return (await listInvitations(ctx)).find((i) => i.id === id)!;
}

// ---- public: the invited person's side ------------------------------------------------------

async function openInvitation(ctx: AppContext, db: Tx, signed: string) {
  const token = verifyLinkToken(ctx.secret, 'invitation', signed);
  if (!token) throw linkErrors.invalid('invitation');
  const [inv] = await db
    .select()
    .from(invitations)
    .where(eq(invitations.tokenHash, hashLinkToken(token)))
    .limit(1);
  if (!inv) throw linkErrors.invalid('invitation');
  if (inv.usedAt) throw linkErrors.used('invitation', 'Sign in with your e-mail and password.');
  if (inv.revokedAt) throw new HttpError(410, 'link_revoked', 'This invitation was withdrawn. Ask the owner for a new one.');
  if (inv.expiresAt <= ctx.clock.now())
    throw linkErrors.expired('invitation', 'Invitations last 72 hours; ask the owner to send a new one.');
  return inv;
}

export async function previewInvitation(ctx: AppContext, signed: string): Promise<InvitationPreview> {
  const inv = await openInvitation(ctx, ctx.db, signed);
  const [b] = inv.branchId ? await ctx.db.select({ name: branches.name }).from(branches).where(eq(branches.id, inv.branchId)) : [];
  return { email: inv.email, name: inv.name, role: inv.role, branchName: b?.name ?? null, expiresAt: inv.expiresAt.toISOString() };
}

/** Creates the account from the invitation (single use, even when two tabs race) and signs in. */
export async function acceptInvitation(ctx: AppContext, input: { token: string; name: string; password: string }) {
  const invited = await openInvitation(ctx, ctx.db, input.token);
  await assertPasswordAllowed(input.password, { email: invited.email, name: input.name });
  const passwordHash = await hashPassword(input.password);
  const created = await ctx.db.transaction(async (tx) => {
    const inv = await openInvitation(ctx, tx, input.token);
    const claimed = await tx
      .update(invitations)
      .set({ usedAt: ctx.clock.now() })
      .where(and(eq(invitations.id, inv.id), isNull(invitations.usedAt)))
      .returning({ id: invitations.id });
    if (claimed.length === 0) throw linkErrors.used('invitation', 'Sign in with your e-mail and password.');
    const [taken] = await tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email)).limit(1);
    if (taken) throw conflict('email_taken', `${inv.email} already has a Coilpath account. Sign in, or use "Forgot your password?".`);
    const p = inv.profile as Partial<ReturnType<typeof profileColumns>>;
    const colorIndex = inv.role === 'technician' ? await leastUsedColour(tx, inv.branchId) : 0;
    const [u] = await tx
      .insert(users)
      .values({
        email: inv.email,
        name: input.name,
        role: inv.role,
        branchId: inv.role === 'owner' ? null : inv.branchId,
        passwordHash,
        phone: p.phone ?? null,
        skills: p.skills ?? [],
        epa608Type: p.epa608Type ?? 'none',
        epa608Number: p.epa608Number ?? null,
        workingHours: p.workingHours ?? null,
        startAddress: p.startAddress ?? null,
        startLat: p.startLat ?? null,
        startLon: p.startLon ?? null,
        colorIndex,
        lastSignInAt: ctx.clock.now(),
      })
      .returning();
    // The new person's first change is their own arrival on the Roster.
    await actAs(tx, u!.id);
    return u!;
  });
  const token = await signSession(ctx.secret, { sub: created.id, sv: created.sessionVersion }, ctx.config.sessionHours, ctx.clock.now());
  const user: SessionUser = { id: created.id, name: created.name, email: created.email, role: created.role, branchId: created.branchId };
  return { user, token };
}
