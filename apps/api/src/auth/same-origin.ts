import type { NextFunction, Request, Response } from 'express';
import type { AppContext } from '../context';
import { HttpError } from '../lib/errors';
import { isMachineRoute } from '../lib/machine-routes';

const stateChanging = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/** Why a state-changing request is refused as cross-origin, or null when it may go on. */
export function crossOriginProblem(
  headers: { origin?: string | undefined; host?: string | undefined; secFetchSite?: string | undefined },
  publicUrl: string,
): string | null {
  if (headers.origin !== undefined) {
    let origin: URL;
    try {
      origin = new URL(headers.origin);
    } catch {
      return `the request comes from an unknown origin (${headers.origin})`;
    }
    if (headers.host && origin.host.toLowerCase() === headers.host.toLowerCase()) return null;
    try {
      if (origin.origin === new URL(publicUrl).origin) return null;
    } catch {
      /* a malformed PUBLIC_URL matches nothing */
    }
    return `the request comes from another site (${origin.origin})`;
  }
  // Without Origin, a browser's Fetch Metadata says where the request comes from; `none` is the person's own act.
  const site = headers.secFetchSite?.toLowerCase();
  if (site && site !== 'same-origin' && site !== 'none') return `the request comes from another site (Sec-Fetch-Site: ${site})`;
  // Neither header: not a browser (curl, scripts, tests), which carries no one's cookie by accident.
  return null;
}

/**
 * State-changing requests (POST, PUT, PATCH, DELETE under `/api`, whatever their body) must come from
 * Coilpath's own pages: `Origin` (or, without it, `Sec-Fetch-Site`) must be this server (the request's host)
 * or `PUBLIC_URL`. Others answer 403 `cross_origin`. The machine-to-machine routes of `lib/machine-routes.ts`
 * (signed by their caller, never carrying a cookie) are exempt: each is listed there deliberately.
 */
export function sameOriginOnly(ctx: AppContext) {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (!stateChanging.has(req.method)) return next();
    const path = req.originalUrl.split('?')[0]!;
    if (isMachineRoute(req.method, path)) return next();
    const problem = crossOriginProblem(
      { origin: req.get('origin'), host: req.get('host'), secFetchSite: req.get('sec-fetch-site') },
      ctx.config.publicUrl,
    );
    if (!problem) return next();
    next(new HttpError(403, 'cross_origin', `Refused: ${problem}. Changes are accepted only from Coilpath's own pages.`));
  };
}

/**
 * Answers to a signed-in person are not kept by the browser or any cache in between (`no-store`), so nothing
 * of theirs can be read back from a shared computer's cache after sign-out. A route that sends a file may set
 * its own `Cache-Control`.
 */
export function noStoreWhenSignedIn(req: Request, res: Response, next: NextFunction) {
  if (req.user) res.setHeader('Cache-Control', 'no-store');
  next();
}
