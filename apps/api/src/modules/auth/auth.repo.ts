/** Every query of signing in and out, the first owner's setup and password resets. */
import { and, count, eq, gt, isNull, lt, sql } from 'drizzle-orm';
import type { Db, Tx } from '../../db/client';
import { appMeta, auditEvents, branches, endedSessions, passwordResets, users } from '../../db/schema';

type Q = Db | Tx;
export type UserRecord = typeof users.$inferSelect;

export async function userByEmail(db: Q, email: string): Promise<UserRecord | undefined> {
  const [u] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  return u;
}

export async function setLastSignIn(db: Q, userId: string, at: Date): Promise<void> {
  await db.update(users).set({ lastSignInAt: at }).where(eq(users.id, userId));
}

/** Raises the user's session version: every session of theirs ends. */
export async function raiseSessionVersion(db: Q, userId: string): Promise<void> {
  await db
    .update(users)
    .set({ sessionVersion: sql`${users.sessionVersion} + 1` })
    .where(eq(users.id, userId));
}

/** Records an ended session, and forgets those ended before `forgetBefore`. */
export async function endSession(db: Q, values: typeof endedSessions.$inferInsert, forgetBefore: Date): Promise<void> {
  await db.insert(endedSessions).values(values).onConflictDoNothing();
  await db.delete(endedSessions).where(lt(endedSessions.expiresAt, forgetBefore));
}

export async function forgetEndedSessionsOf(db: Q, userId: string): Promise<void> {
  await db.delete(endedSessions).where(eq(endedSessions.userId, userId));
}

// The first owner's setup

export async function hasUsers(db: Pick<Db, 'select'>): Promise<boolean> {
  const [r] = await db.select({ n: count() }).from(users);
  return (r?.n ?? 0) > 0;
}

export async function putMeta(db: Q, key: string, value: unknown, at: Date): Promise<void> {
  await db
    .insert(appMeta)
    .values({ key, value, updatedAt: at })
    .onConflictDoUpdate({ target: appMeta.key, set: { value, updatedAt: at } });
}

export async function readMeta(db: Pick<Db, 'select'>, key: string, lock = false) {
  const q = db.select().from(appMeta).where(eq(appMeta.key, key));
  const [row] = lock ? await q.for('update') : await q;
  return row;
}

export async function deleteMeta(db: Q, key: string): Promise<void> {
  await db.delete(appMeta).where(eq(appMeta.key, key));
}

export async function insertUser(db: Q, values: typeof users.$inferInsert): Promise<UserRecord> {
  const [created] = await db.insert(users).values(values).returning();
  return created!;
}

export async function insertAudit(db: Q, values: typeof auditEvents.$inferInsert): Promise<void> {
  await db.insert(auditEvents).values(values);
}

// Password resets

/** The account of an address, with its branch's time zone. */
export async function resetAccount(db: Q, email: string) {
  const [u] = await db
    .select({ id: users.id, name: users.name, active: users.active, timeZone: branches.timeZone })
    .from(users)
    .leftJoin(branches, eq(branches.id, users.branchId))
    .where(eq(users.email, email))
    .limit(1);
  return u;
}

export async function lockUser(db: Tx, userId: string): Promise<void> {
  await db.select({ id: users.id }).from(users).where(eq(users.id, userId)).for('update');
}

export async function resetsSince(db: Q, userId: string, since: Date): Promise<number> {
  const [recent] = await db
    .select({ n: count() })
    .from(passwordResets)
    .where(and(eq(passwordResets.userId, userId), gt(passwordResets.createdAt, since)));
  return recent?.n ?? 0;
}

/** Spends the user's unused links, and adds a new one. */
export async function replaceReset(db: Q, values: typeof passwordResets.$inferInsert & { createdAt: Date }): Promise<void> {
  await db
    .update(passwordResets)
    .set({ usedAt: values.createdAt })
    .where(and(eq(passwordResets.userId, values.userId), isNull(passwordResets.usedAt)));
  await db.insert(passwordResets).values(values);
}

export async function resetByTokenHash(db: Q, tokenHash: string) {
  const [r] = await db
    .select({
      id: passwordResets.id,
      userId: passwordResets.userId,
      usedAt: passwordResets.usedAt,
      expiresAt: passwordResets.expiresAt,
      email: users.email,
      name: users.name,
      active: users.active,
    })
    .from(passwordResets)
    .innerJoin(users, eq(users.id, passwordResets.userId))
    .where(eq(passwordResets.tokenHash, tokenHash))
    .limit(1);
  return r;
}

/** Marks the link used unless it already is; false when it was. */
export async function spendReset(db: Q, id: string, at: Date): Promise<boolean> {
  const spent = await db
    .update(passwordResets)
    .set({ usedAt: at })
    .where(and(eq(passwordResets.id, id), isNull(passwordResets.usedAt)))
    .returning({ id: passwordResets.id });
  return spent.length > 0;
}

/** Sets the new password and raises the session version. */
export async function setPassword(db: Q, userId: string, passwordHash: string, at: Date): Promise<UserRecord> {
  const [updated] = await db
    .update(users)
    .set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1`, lastSignInAt: at })
    .where(eq(users.id, userId))
    .returning();
  return updated!;
}
