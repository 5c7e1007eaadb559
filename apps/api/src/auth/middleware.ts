import type { NextFunction, Request, Response } from 'express';
import type { Role } from '@coilpath/contract';
import type { AppContext } from '../context';
import { unauthorized } from '../lib/errors';
import { enforce, roleMayAct } from './policy';
import { sessionCookieOf } from './cookies';
import { prepareSessionUser } from './session.repo';
import { verifySession } from './session';

/**
 * Reads the session cookie; sets `req.user` (and `req.session`) when the token is valid, the user is active,
 * the token's session version is the user's, and the session was not signed out (`ended_sessions`).
 */
export function authenticate(ctx: AppContext) {
  const sessionUser = prepareSessionUser(ctx.db);
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
    const token = sessionCookieOf(req);
    if (token) {
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

/** 401 without a session, 403 when the role may not use the route (`roleMayAct` in `policy.ts`). */
export function requireRole(...allowed: Role[]) {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (!req.user) throw unauthorized();
    enforce(roleMayAct(req.user, allowed));
    next();
  };
}
