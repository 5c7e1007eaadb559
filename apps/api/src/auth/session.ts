import { SignJWT, jwtVerify } from 'jose';

export const SESSION_COOKIE = 'coilpath_session';

export interface SessionClaims {
  sub: string;
  /** The user's session version when signed; raised to sign every session out. */
  sv: number;
}

export async function signSession(secret: Uint8Array, claims: SessionClaims, hours: number, now: Date): Promise<string> {
  const iat = Math.floor(now.getTime() / 1000);
  return new SignJWT({ sv: claims.sv })
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
    if (typeof payload.sub !== 'string' || typeof payload.sv !== 'number') return null;
    return { sub: payload.sub, sv: payload.sv };
  } catch {
    return null;
  }
}
