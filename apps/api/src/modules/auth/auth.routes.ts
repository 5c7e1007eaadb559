import { Router, type Response } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { signInSchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { SESSION_COOKIE } from '../../auth/session';
import { unauthorized } from '../../lib/errors';
import { signIn } from './auth.service';

export function setSessionCookie(ctx: AppContext, res: Response, token: string) {
  res.cookie(SESSION_COOKIE, token, {
    httpOnly: true,
    sameSite: 'lax',
    secure: ctx.config.secureCookies,
    path: '/',
    maxAge: ctx.config.sessionHours * 3600 * 1000,
  });
}

export function authRoutes(ctx: AppContext): Router {
  const r = Router();
  const limiter = rateLimit({
    windowMs: 15 * 60 * 1000,
    limit: ctx.config.signInLimit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String((req.body as { email?: unknown })?.email ?? '').toLowerCase()}`,
    handler: (_req, res) => {
      res.status(429).json({
        error: { code: 'too_many_attempts', message: 'Too many sign-in attempts. Wait 15 minutes and try again.' },
      });
    },
  });

  r.post('/sign-in', limiter, async (req, res) => {
    const input = signInSchema.parse(req.body ?? {});
    const { user, token } = await signIn(ctx, input);
    setSessionCookie(ctx, res, token);
    res.json({ user });
  });

  r.post('/sign-out', (_req, res) => {
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  r.get('/me', (req, res) => {
    if (!req.user) throw unauthorized();
    res.json({ user: req.user });
  });
  return r;
}
