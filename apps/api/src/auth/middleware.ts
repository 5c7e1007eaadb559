import type { NextFunction, Request, Response } from 'express';
import { eq, sql } from 'drizzle-orm';
import type { Role, SessionUser } from '@coilpath/contract';
import type { AppContext } from '../context';
import { endedSessions, users } from '../db/schema';
import { forbidden, notFound, unauthorized } from '../lib/errors';
import { SESSION_COOKIE, verifySession } from './session';

/**
 * Reads the session cookie; sets `req.user` (and `req.session`) when the token is valid, the user is active,
 * the token's session version is the user's, and the session was not signed out (`ended_sessions`).
 */
export function authenticate(ctx: AppContext) {
  // Asked on every request: built once (a named prepared statement on PostgreSQL). An empty session id (a
  // token from before ids) matches no ended session.
  const sessionUser = ctx.db
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
  type Row = Awaited<ReturnType<typeof sessionUser.execute>>[number] | undefined;
  // On PGlite the database tells this (its only) process when a user row changes or one of their sessions is
  // signed out, so rows are kept between requests — per user and session — and dropped at that notice; on
  // PostgreSQL every request asks.
  const known = new Map<string, Map<string, Row>>();
  let kept = 0;
  let changes = 0; // notices heard: a row read while one arrives is used once but not kept
  ctx.database.local?.onUserChange((id) => {
    changes++;
    kept -= known.get(id)?.size ?? 0;
    known.delete(id);
  });
  const readUser = async (id: string, sid: string): Promise<Row> => {
    if (!ctx.database.local) return (await sessionUser.execute({ id, sid }))[0];
    const sessions = known.get(id);
    if (sessions?.has(sid)) return sessions.get(sid);
    const before = changes;
    const [row] = await sessionUser.execute({ id, sid });
    if (changes === before) {
      if (kept >= 1000) {
        known.clear();
        kept = 0;
      }
      const m = known.get(id) ?? new Map<string, Row>();
      known.set(id, m);
      m.set(sid, row);
      kept++;
    }
    return row;
  };
  return async (req: Request, _res: Response, next: NextFunction) => {
    const token: unknown = req.cookies?.[SESSION_COOKIE];
    if (typeof token === 'string' && token) {
      const claims = await verifySession(ctx.secret, token, ctx.clock.now());
      if (claims) {
        const u = await readUser(claims.sub, claims.sid ?? '');
        if (u && u.active && u.sessionVersion === claims.sv && !u.ended) {
          req.user = { id: u.id, name: u.name, email: u.email, role: u.role, branchId: u.branchId };
          req.session = { id: claims.sid, expiresAt: claims.exp };
        }
      }
    }
    next();
  };
}

export function requireAuth(req: Request, _res: Response, next: NextFunction) {
  if (!req.user) throw unauthorized();
  next();
}

const roleNames: Record<Role, string> = {
  owner: 'owners',
  branch_manager: 'branch managers',
  dispatcher: 'dispatchers',
  technician: 'technicians',
};

/** 401 without a session, 403 when the role may not use the route. */
export function requireRole(...allowed: Role[]) {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (!req.user) throw unauthorized();
    if (!allowed.includes(req.user.role)) {
      throw forbidden(`Only ${allowed.map((r) => roleNames[r]).join(', ')} may do this.`);
    }
    next();
  };
}

/**
 * The branches a user may see: `null` = every branch (owner). A request for another branch's data is
 * answered 404, never 403, so it does not reveal that the record exists.
 */
export function branchScope(user: SessionUser): string[] | null {
  if (user.role === 'owner') return null;
  return user.branchId ? [user.branchId] : [];
}

/** Resolves the branch a list request is about; refuses another branch with 404. */
export function resolveBranch(user: SessionUser, requested: string | undefined): string | undefined {
  if (user.role === 'owner') return requested;
  if (requested && requested !== user.branchId) throw notFound('branch');
  return user.branchId ?? undefined;
}

/** Throws 404 when a record's branch is outside the user's scope. */
export function assertBranch(user: SessionUser, branchId: string | null | undefined, what = 'record'): void {
  if (user.role === 'owner') return;
  if (!branchId || branchId !== user.branchId) throw notFound(what);
}
