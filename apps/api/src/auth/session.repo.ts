/** The SQL of a session check: the signed-in person's row and whether this session was signed out. */
import { eq, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { endedSessions, users } from '../db/schema';

/**
 * Asked on every request: built once (a named prepared statement on PostgreSQL). An empty session id (a
 * token from before ids) matches no ended session.
 */
export function prepareSessionUser(db: Db) {
  return db
    .select({
      id: users.id,
      name: users.name,
      email: users.email,
      role: users.role,
      branchId: users.branchId,
      active: users.active,
      sessionVersion: users.sessionVersion,
      ended: sql<boolean>`exists (select 1 from ${endedSessions} where ${endedSessions.sessionId} = ${sql.placeholder('sid')})`,
    })
    .from(users)
    .where(eq(users.id, sql.placeholder('id')))
    .limit(1)
    .prepare('coilpath_session_user');
}
