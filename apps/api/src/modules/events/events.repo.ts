/** Every query of the live events (`live_events`, written by the triggers of migration 0016). */
import { and, asc, eq, gt, inArray, isNull, or, sql } from 'drizzle-orm';
import type { LiveEventKind } from '@coilpath/contract';
import type { Db, Tx } from '../../db/client';
import { endedSessions, liveEvents, users } from '../../db/schema';

export type LiveEventRecord = typeof liveEvents.$inferSelect;

export async function findEvent(db: Db, id: number): Promise<LiveEventRecord | undefined> {
  const [row] = await db.select().from(liveEvents).where(eq(liveEvents.id, id)).limit(1);
  return row;
}

/**
 * The rows after `afterId` a person may see, oldest first, at most `limit`: of `scope.branches` (null: every
 * branch), of `scope.kinds`, addressed to no one or to `scope.userId` (`mayHear` in events.service.ts says the same).
 */
export async function eventsAfter(
  db: Db,
  afterId: number,
  scope: { branches: string[] | null; kinds: readonly LiveEventKind[]; userId: string },
  limit: number,
): Promise<LiveEventRecord[]> {
  if (scope.branches?.length === 0 || scope.kinds.length === 0) return [];
  const where = and(
    gt(liveEvents.id, afterId),
    inArray(liveEvents.kind, [...scope.kinds]),
    or(isNull(liveEvents.userId), eq(liveEvents.userId, scope.userId)),
    scope.branches ? inArray(liveEvents.branchId, scope.branches) : undefined,
  );
  return db.select().from(liveEvents).where(where).orderBy(asc(liveEvents.id)).limit(limit);
}

/** The newest id (0 when none): where a screen that sends no `Last-Event-ID` starts. */
export async function lastEventId(db: Db): Promise<number> {
  const [row] = await db.select({ id: sql<number>`coalesce(max(${liveEvents.id}), 0)::bigint` }).from(liveEvents);
  return Number(row?.id ?? 0);
}

/**
 * Removes rows written before `olderThan` ago by the database's own clock (rows are stamped with the
 * database's `now()`, which an overridden application clock does not move). Answers how many.
 */
export async function pruneEvents(db: Db, olderThan: string): Promise<number> {
  const gone = await db
    .delete(liveEvents)
    .where(sql`${liveEvents.at} < now() - ${olderThan}::interval`)
    .returning({ id: liveEvents.id });
  return gone.length;
}

/** What decides whether a session still holds: the person's row and whether the session was signed out. */
export async function sessionState(db: Db, userId: string, sessionId: string | null) {
  const [row] = await db
    .select({
      active: users.active,
      sessionVersion: users.sessionVersion,
      role: users.role,
      branchId: users.branchId,
      ended: sql<boolean>`exists (select 1 from ${endedSessions} where ${endedSessions.sessionId} = ${sessionId ?? ''})`,
    })
    .from(users)
    .where(eq(users.id, userId))
    .limit(1);
  return row;
}

/** Sets the transaction-local `coilpath.actor` the live-event triggers read (migration 0016); see `actAs` in actor.ts. */
export async function setActor(tx: Tx, userId: string): Promise<void> {
  await tx.execute(sql`select set_config('coilpath.actor', ${userId}, true)`);
}
