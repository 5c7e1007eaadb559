/** The session cookie: set when someone signs in (or accepts an invitation, resets a password, sets up the first owner), cleared at sign-out. */
import type { Request, Response } from 'express';
import type { AppContext } from '../context';
import { SESSION_COOKIE } from './session';

export function setSessionCookie(ctx: AppContext, res: Response, token: string) {
  res.cookie(SESSION_COOKIE, token, {
    httpOnly: true,
    sameSite: 'lax',
    secure: ctx.config.secureCookies,
    path: '/',
    maxAge: ctx.config.sessionHours * 3600 * 1000,
  });
}

export function clearSessionCookie(res: Response) {
  res.clearCookie(SESSION_COOKIE, { path: '/' });
}

/** The session token the request carries, if any. */
export function sessionCookieOf(req: Request): string | undefined {
  const token: unknown = req.cookies?.[SESSION_COOKIE];
  return typeof token === 'string' && token ? token : undefined;
}
