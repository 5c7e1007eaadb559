/** Every query of the team: people, their colours on the Roster, invitations. */
import { and, count, desc, eq, isNull, ne, sql } from 'drizzle-orm';
import type { z } from 'zod';
import type { usersQuerySchema } from '@coilpath/contract';
import type { Tx } from '../../db/client';
import { branches, invitations, users } from '../../db/schema';
import { orderFor, pageWindow, searchAny } from '../sites/list-query';

type UsersQuery = z.output<typeof usersQuerySchema>;
export type InvitationRecord = typeof invitations.$inferSelect;

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
export type UserSelect = { [K in keyof typeof userColumns]: unknown } & { deactivatedAt: Date | null; lastSignInAt: Date | null };

/** A page of people of the branch (undefined: every branch) and their total. */
export async function userPage(db: Tx, branchId: string | undefined, q: UsersQuery) {
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
    db
      .select(userColumns)
      .from(users)
      .leftJoin(branches, eq(branches.id, users.branchId))
      .where(where)
      .orderBy(...order)
      .limit(limit)
      .offset(offset),
    db.select({ n: count() }).from(users).where(where),
  ]);
  return { rows, total: total?.n ?? 0 };
}

export async function findUser(db: Tx, id: string) {
  const [row] = await db
    .select(userColumns)
    .from(users)
    .leftJoin(branches, eq(branches.id, users.branchId))
    .where(eq(users.id, id))
    .limit(1);
  return row;
}

export async function findBranch(db: Tx, id: string) {
  const [b] = await db
    .select({ archivedAt: branches.archivedAt, name: branches.name, timeZone: branches.timeZone })
    .from(branches)
    .where(eq(branches.id, id));
  return b;
}

/** How many of the branch's active technicians (but `exceptUserId`) have each Roster colour. */
export function colourUse(db: Tx, branchId: string, exceptUserId?: string) {
  return db
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
}

/** How many active owners there are besides `userId`. */
export async function otherActiveOwners(db: Tx, userId: string): Promise<number> {
  const [o] = await db
    .select({ n: count() })
    .from(users)
    .where(and(eq(users.role, 'owner'), eq(users.active, true), ne(users.id, userId)));
  return o?.n ?? 0;
}

/** Updates a person; `endSessions` raises their session version, so their sessions end. */
export async function updateUser(db: Tx, id: string, set: Partial<typeof users.$inferInsert>, endSessions = false): Promise<void> {
  await db
    .update(users)
    .set({ ...set, ...(endSessions ? { sessionVersion: sql`${users.sessionVersion} + 1` } : {}) })
    .where(eq(users.id, id));
}

export async function userIdByEmail(db: Tx, email: string) {
  const [taken] = await db.select({ id: users.id }).from(users).where(eq(users.email, email)).limit(1);
  return taken;
}

export async function insertUser(db: Tx, values: typeof users.$inferInsert) {
  const [u] = await db.insert(users).values(values).returning();
  return u!;
}

// Invitations

/** The latest 200 invitations, with their branch's and inviter's names. */
export function invitationRows(db: Tx) {
  const inviter = sql<string | null>`(select ${users.name} from ${users} where ${users.id} = ${invitations.invitedById})`;
  return db
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
}

/** Revokes every open invitation for the address. */
export async function revokeOpenInvitations(db: Tx, email: string, now: Date): Promise<void> {
  await db
    .update(invitations)
    .set({ revokedAt: now })
    .where(and(eq(invitations.email, email), isNull(invitations.usedAt), isNull(invitations.revokedAt)));
}

export async function insertInvitation(db: Tx, values: typeof invitations.$inferInsert): Promise<string> {
  const [row] = await db.insert(invitations).values(values).returning({ id: invitations.id });
  return row!.id;
}

export async function findInvitation(db: Tx, id: string): Promise<InvitationRecord | undefined> {
  const [inv] = await db.select().from(invitations).where(eq(invitations.id, id));
  return inv;
}

export async function invitationByTokenHash(db: Tx, tokenHash: string): Promise<InvitationRecord | undefined> {
  const [inv] = await db.select().from(invitations).where(eq(invitations.tokenHash, tokenHash)).limit(1);
  return inv;
}

export async function updateInvitation(db: Tx, id: string, set: Partial<typeof invitations.$inferInsert>): Promise<void> {
  await db.update(invitations).set(set).where(eq(invitations.id, id));
}

/** Marks the invitation used unless it already is; false when someone else did first. */
export async function claimInvitation(db: Tx, id: string, now: Date): Promise<boolean> {
  const claimed = await db
    .update(invitations)
    .set({ usedAt: now })
    .where(and(eq(invitations.id, id), isNull(invitations.usedAt)))
    .returning({ id: invitations.id });
  return claimed.length > 0;
}
