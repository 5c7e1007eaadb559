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
import { assertBranch, enforce, mayDeactivate } from '../../auth/policy';
import { hashPassword } from '../../auth/password';
import { assertPasswordAllowed } from '../../auth/password-rules';
import { signSession } from '../../auth/session';
import { hashLinkToken, linkErrors, newLinkToken, signLinkToken, verifyLinkToken } from '../../auth/link-tokens';
import { conflict, HttpError, notFound } from '../../lib/errors';
import { listBranch } from '../sites/list-query';
import * as repo from './team.repo';
import type { UserSelect } from './team.repo';
import { actAs } from '../events/actor';

export const INVITATION_HOURS = 72;
/** Technician colours on the Roster (tailwind `tech-0` … `tech-7`). */
export const TECH_COLOURS = 8;

type UsersQuery = z.output<typeof usersQuerySchema>;
const iso = (d: Date | null) => (d ? d.toISOString() : null);

// ---------------------------------------------------------------------------------------------
// People
// ---------------------------------------------------------------------------------------------

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
  const { rows, total } = await repo.userPage(ctx.db, branchId, q);
  return { rows: rows.map(toUserRow), total, page: q.page, pageSize: q.pageSize };
}

export async function getUser(db: Tx, user: SessionUser, id: string): Promise<UserRow> {
  const row = await repo.findUser(db, id);
  if (!row) throw notFound('person');
  if (user.role !== 'owner') assertBranch(user, row.branchId, 'person');
  return toUserRow(row);
}

async function assertActiveBranch(db: Tx, branchId: string | null) {
  if (!branchId) return;
  const b = await repo.findBranch(db, branchId);
  if (!b) throw notFound('branch');
  if (b.archivedAt) throw conflict('branch_archived', `${b.name} is archived; choose an active branch.`);
}

/** The Roster colour used least by the branch's active technicians (lowest index on a tie). */
export async function leastUsedColour(db: Tx, branchId: string | null, exceptUserId?: string): Promise<number> {
  if (!branchId) return 0;
  const rows = await repo.colourUse(db, branchId, exceptUserId);
  const used = new Map(rows.map((r) => [r.colorIndex, r.n]));
  let best = 0;
  for (let i = 1; i < TECH_COLOURS; i++) if ((used.get(i) ?? 0) < (used.get(best) ?? 0)) best = i;
  return best;
}

/** Coilpath always keeps one active owner; the last one can be neither demoted nor deactivated. */
async function refuseLastOwner(db: Tx, target: { id: string; role: string; active: boolean }) {
  if (target.role !== 'owner' || !target.active) return;
  if ((await repo.otherActiveOwners(db, target.id)) === 0) {
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
    await repo.updateUser(tx, id, { ...profileColumns(profile), colorIndex }, roleOrBranchChanged);
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
      await repo.updateUser(tx, id, { active: false, deactivatedAt: ctx.clock.now() }, true);
    } else if (!current.active) {
      const colorIndex = current.role === 'technician' ? await leastUsedColour(tx, current.branchId, id) : current.colorIndex;
      await repo.updateUser(tx, id, { active: true, deactivatedAt: null, colorIndex });
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
  const rows = await repo.invitationRows(ctx.db);
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
  const branch = to.branchId ? await repo.findBranch(ctx.db, to.branchId) : undefined;
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
  const taken = await repo.userIdByEmail(ctx.db, email);
  if (taken) throw conflict('email_taken', `${email} already has a Coilpath account. Edit that person instead.`);
  await assertActiveBranch(ctx.db, profile.branchId);
  const { hash, link, expiresAt } = await issueInvitationToken(ctx);
  const id = await ctx.db.transaction(async (tx) => {
    await actAs(tx, actor.id);
    // A new invitation replaces any earlier open one for the same address.
    await repo.revokeOpenInvitations(tx, email, ctx.clock.now());
    const { name, role, branchId, ...rest } = profileColumns(profile);
    return repo.insertInvitation(tx, {
      email,
      name,
      role,
      branchId,
      profile: rest,
      tokenHash: hash,
      expiresAt,
      invitedById: actor.id,
      createdAt: ctx.clock.now(),
    });
  });
  await sendInvitationMail(ctx, { email, name: profile.name, role: profile.role, branchId: profile.branchId }, link, expiresAt, actor.name);
  return (await listInvitations(ctx)).find((i) => i.id === id)!;
}

export async function resendInvitation(ctx: AppContext, actor: SessionUser, id: string): Promise<InvitationRow> {
  const inv = await repo.findInvitation(ctx.db, id);
  if (!inv) throw notFound('invitation');
  if (inv.usedAt) throw conflict('link_used', `${inv.email} already accepted this invitation.`);
  const { hash, link, expiresAt } = await issueInvitationToken(ctx);
  await repo.updateInvitation(ctx.db, id, { tokenHash: hash, expiresAt, revokedAt: null });
  await sendInvitationMail(ctx, { email: inv.email, name: inv.name, role: inv.role, branchId: inv.branchId }, link, expiresAt, actor.name);
  return (await listInvitations(ctx)).find((i) => i.id === id)!;
}

export async function revokeInvitation(ctx: AppContext, id: string): Promise<InvitationRow> {
  const inv = await repo.findInvitation(ctx.db, id);
  if (!inv) throw notFound('invitation');
  if (inv.usedAt) throw conflict('link_used', `${inv.email} already accepted this invitation; deactivate the person instead.`);
  await repo.updateInvitation(ctx.db, id, { revokedAt: ctx.clock.now() });
  return (await listInvitations(ctx)).find((i) => i.id === id)!;
}

// ---- public: the invited person's side ------------------------------------------------------

async function openInvitation(ctx: AppContext, db: Tx, signed: string) {
  const token = verifyLinkToken(ctx.secret, 'invitation', signed);
  if (!token) throw linkErrors.invalid('invitation');
  const inv = await repo.invitationByTokenHash(db, hashLinkToken(token));
  if (!inv) throw linkErrors.invalid('invitation');
  if (inv.usedAt) throw linkErrors.used('invitation', 'Sign in with your e-mail and password.');
  if (inv.revokedAt) throw new HttpError(410, 'link_revoked', 'This invitation was withdrawn. Ask the owner for a new one.');
  if (inv.expiresAt <= ctx.clock.now())
    throw linkErrors.expired('invitation', 'Invitations last 72 hours; ask the owner to send a new one.');
  return inv;
}

export async function previewInvitation(ctx: AppContext, signed: string): Promise<InvitationPreview> {
  const inv = await openInvitation(ctx, ctx.db, signed);
  const b = inv.branchId ? await repo.findBranch(ctx.db, inv.branchId) : undefined;
  return { email: inv.email, name: inv.name, role: inv.role, branchName: b?.name ?? null, expiresAt: inv.expiresAt.toISOString() };
}

/** Creates the account from the invitation (single use, even when two tabs race) and signs in. */
export async function acceptInvitation(ctx: AppContext, input: { token: string; name: string; password: string }) {
  const invited = await openInvitation(ctx, ctx.db, input.token);
  await assertPasswordAllowed(input.password, { email: invited.email, name: input.name });
  const passwordHash = await hashPassword(input.password);
  const created = await ctx.db.transaction(async (tx) => {
    const inv = await openInvitation(ctx, tx, input.token);
    if (!(await repo.claimInvitation(tx, inv.id, ctx.clock.now())))
      throw linkErrors.used('invitation', 'Sign in with your e-mail and password.');
    const taken = await repo.userIdByEmail(tx, inv.email);
    if (taken) throw conflict('email_taken', `${inv.email} already has a Coilpath account. Sign in, or use "Forgot your password?".`);
    const p = inv.profile as Partial<ReturnType<typeof profileColumns>>;
    const colorIndex = inv.role === 'technician' ? await leastUsedColour(tx, inv.branchId) : 0;
    const u = await repo.insertUser(tx, {
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
    });
    // The new person's first change is their own arrival on the Roster.
    await actAs(tx, u!.id);
    return u!;
  });
  const token = await signSession(ctx.secret, { sub: created.id, sv: created.sessionVersion }, ctx.config.sessionHours, ctx.clock.now());
  const user: SessionUser = { id: created.id, name: created.name, email: created.email, role: created.role, branchId: created.branchId };
  return { user, token };
}
