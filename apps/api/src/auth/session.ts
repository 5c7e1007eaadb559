import { randomUUID } from 'node:crypto';
import { SignJWT, jwtVerify } from 'jose';

export const SESSION_COOKIE = 'coilpath_session';

export interface SessionClaims {
  sub: string;
  /** The user's session version when signed; raised to sign every session out. */
  sv: number;
  /**
   * This session's own id, so signing out can end it alone (`ended_sessions`). Null for a token signed before
   * sessions had ids.
   */
  sid: string | null;
  /** When the token expires. */
  exp: Date;
}

/** Signs a session token; each gets a new session id unless one is given. */
export async function signSession(
  secret: Uint8Array,
  claims: { sub: string; sv: number; sid?: string },
  hours: number,
  now: Date,
): Promise<string> {
  const iat = Math.floor(now.getTime() / 1000);
  return new SignJWT({ sv: claims.sv, sid: claims.sid ?? randomUUID() })
    .setProtectedHeader({ alg: 'HS256' })
    .setSubject(claims.sub)
    .setIssuedAt(iat)
    .setExpirationTime(iat + Math.round(hours * 3600))
    .setIssuer('coilpath')
    .sign(secret);
}

export async function verifySession(secret: Uint8Array, token: string, now: Date): Promise<SessionClaims | null> {
  try {
    const { payload } = await jwtVerify(token, secret, {
      algorithms: ['HS256'],
      issuer: 'coilpath',
      currentDate: now,
    });
    if (typeof payload.sub !== 'string' || typeof payload.sv !== 'number' || typeof payload.exp !== 'number') return null;
    const sid = typeof payload.sid === 'string' && payload.sid ? payload.sid : null;
    return { sub: payload.sub, sv: payload.sv, sid, exp: new Date(payload.exp * 1000) };
  } catch {
    return null;
  }
}
