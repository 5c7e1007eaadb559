import { Router, type Response } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { forgotPasswordAnswer, forgotPasswordSchema, linkCheckSchema, resetPasswordSchema, signInSchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { SESSION_COOKIE } from '../../auth/session';
import { unauthorized } from '../../lib/errors';
import { signIn, signOut, signOutEverywhere } from './auth.service';
import { checkPasswordReset, requestPasswordReset, resetPassword } from './password-reset.service';

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

  // Password reset: public and rate limited; the answer never says whether the address exists.
  const resetLimiter = rateLimit({
    windowMs: 15 * 60 * 1000,
    limit: ctx.config.signInLimit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|reset`,
    handler: (_req, res) => {
      res.status(429).json({ error: { code: 'too_many_attempts', message: 'Too many attempts. Wait 15 minutes and try again.' } });
    },
  });
  r.post('/forgot-password', resetLimiter, async (req, res) => {
    const { email } = forgotPasswordSchema.parse(req.body ?? {});
    // Answered first; the lookup and the e-mail are a job (the answer must not tell who has an account).
    res.status(202).json({ message: forgotPasswordAnswer });
    requestPasswordReset(ctx, email);
  });
  r.post('/reset-password/check', resetLimiter, async (req, res) => {
    const { token } = linkCheckSchema.parse(req.body ?? {});
    res.json(await checkPasswordReset(ctx, token));
  });
  r.post('/reset-password', resetLimiter, async (req, res) => {
    const input = resetPasswordSchema.parse(req.body ?? {});
    const { user, token } = await resetPassword(ctx, input.token, input.password);
    setSessionCookie(ctx, res, token);
    res.json({ user });
  });

  // Open to anyone (a stale cookie can always be dropped); a live session is ended on the server too.
  r.post('/sign-out', async (req, res) => {
    if (req.user && req.session) await signOut(ctx, req.user, req.session);
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  r.post('/sign-out-everywhere', async (req, res) => {
    if (!req.user) throw unauthorized();
    const answer = await signOutEverywhere(ctx, req.user);
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.json(answer);
  });

  r.get('/me', (req, res) => {
    if (!req.user) throw unauthorized();
    res.json({ user: req.user });
  });
  return r;
}
