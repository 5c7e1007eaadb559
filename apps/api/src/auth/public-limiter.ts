import type { RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';

/**
 * The limit on a public route whose credential is a link or an address (password reset, invitations, the
 * first owner's setup): `limit` requests per address per 15 minutes, counted apart for each `scope`.
 */
export function publicLimiter(scope: string, limit: number): RequestHandler {
  return rateLimit({
    windowMs: 15 * 60 * 1000,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${scope}`,
    handler: (_req, res) => {
      res.status(429).json({ error: { code: 'too_many_attempts', message: 'Too many attempts. Wait 15 minutes and try again.' } });
    },
  });
}
