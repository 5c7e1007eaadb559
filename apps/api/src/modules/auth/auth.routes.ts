import { Router } from 'express';
import { ipKeyGenerator } from 'express-rate-limit';
import { publicLimiter } from '../../auth/public-limiter';
import {
  forgotPasswordAnswer,
  forgotPasswordSchema,
  linkCheckSchema,
  ownerSetupSchema,
  resetPasswordSchema,
  signInSchema,
} from '@coilpath/contract';
import type { AppContext } from '../../context';
import { clearSessionCookie, setSessionCookie } from '../../auth/cookies';
import { HttpError, unauthorized } from '../../lib/errors';
import { createSignInGuard, signInLimitsFrom, signInRefusalMessage } from '../../auth/sign-in-limits';
import { signIn, signOut, signOutEverywhere } from './auth.service';
import { checkOwnerSetup, completeOwnerSetup } from './owner-setup.service';
import { checkPasswordReset, requestPasswordReset, resetPassword } from './password-reset.service';

export function authRoutes(ctx: AppContext): Router {
  const r = Router();
  // Failed sign-ins per address and account, per account and per address (sign-in-limits.ts).
  const guard = createSignInGuard(ctx.clock, signInLimitsFrom(ctx.config.signInLimit, ctx.config.signInLimits));
  r.post('/sign-in', async (req, res) => {
    const input = signInSchema.parse(req.body ?? {});
    const address = ipKeyGenerator(req.ip ?? '');
    const refusal = guard.check(address, input.email);
    if (refusal) {
      res.setHeader('Retry-After', String(refusal.retryAfterSeconds));
      throw new HttpError(429, 'too_many_attempts', signInRefusalMessage(refusal), {
        retryAfterSeconds: refusal.retryAfterSeconds,
        scope: refusal.scope,
      });
    }
    try {
      const { user, token } = await signIn(ctx, input);
      guard.succeeded(address, input.email);
      setSessionCookie(ctx, res, token);
      res.json({ user });
    } catch (e) {
      if (e instanceof HttpError && e.status === 401) guard.failed(address, input.email);
      throw e;
    }
  });

  // Password reset: public and rate limited; the answer never says whether the address exists.
  const resetLimiter = publicLimiter('reset', ctx.config.signInLimit);
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
    clearSessionCookie(res);
    res.status(204).end();
  });

  r.post('/sign-out-everywhere', async (req, res) => {
    if (!req.user) throw unauthorized();
    const answer = await signOutEverywhere(ctx, req.user);
    clearSessionCookie(res);
    res.json(answer);
  });

  r.get('/me', (req, res) => {
    if (!req.user) throw unauthorized();
    res.json({ user: req.user });
  });
  return r;
}

/**
 * `/api/setup` — the first owner of a Coilpath started without demo data, from the one-time link the server
 * printed (public: the signed token is the credential; rate limited per address).
 */
export function setupRoutes(ctx: AppContext): Router {
  const r = Router();
  const limiter = publicLimiter('setup', Math.max(ctx.config.signInLimit, 10));
  r.post('/check', limiter, async (req, res) => {
    const { token } = linkCheckSchema.parse(req.body ?? {});
    res.json(await checkOwnerSetup(ctx, token));
  });
  r.post('/', limiter, async (req, res) => {
    const input = ownerSetupSchema.parse(req.body ?? {});
    const { user, token } = await completeOwnerSetup(ctx, input);
    setSessionCookie(ctx, res, token);
    res.status(201).json({ user });
  });
  return r;
}
