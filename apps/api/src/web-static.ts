import { existsSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import express, { type Express, type Response } from 'express';

/**
 * How long a browser keeps what it gets from the built web app (`apps/web/dist`):
 * - `assets/…` carry a content hash in their names (Vite), so a name never means other bytes: kept a year
 *   without asking again (`immutable`);
 * - `index.html` (also sent for every screen's address, the SPA fallback) names the current assets, so it is
 *   revalidated on every load (`no-cache`) and a new release is picked up at once;
 * - anything else from `apps/web/public` (the mark, …) keeps an unhashed name: an hour.
 */
export const cacheControl = {
  hashedAsset: 'public, max-age=31536000, immutable',
  index: 'no-cache',
  other: 'public, max-age=3600',
} as const;

const setIndexHeaders = (res: Response) => res.setHeader('Cache-Control', cacheControl.index);

/**
 * Serves the built web app from `dist` when it holds an `index.html`; answers false otherwise (the API alone,
 * as in tests and `npm run dev`). Compression is applied by the app for everything it sends.
 */
export function serveWebApp(app: Express, dist: string | undefined): boolean {
  if (!dist || !existsSync(join(dist, 'index.html'))) return false;
  const root = resolve(dist);
  app.use(
    express.static(root, {
      index: false,
      cacheControl: false,
      setHeaders(res, path) {
        const rel = relative(root, path).split(/[\\/]/);
        if (rel[0] === 'assets') res.setHeader('Cache-Control', cacheControl.hashedAsset);
        else if (rel.join('/') === 'index.html') setIndexHeaders(res);
        else res.setHeader('Cache-Control', cacheControl.other);
      },
    }),
  );
  // A hashed asset that is not there (a page of an older release asking for its chunks) is a 404, never the
  // index page: the browser would otherwise try to run HTML as a script.
  app.use('/assets', (_req, res) => {
    res.setHeader('Cache-Control', 'no-store');
    res.status(404).type('text/plain').send('No such asset.');
  });
  app.get('/{*splat}', (_req, res) => {
    setIndexHeaders(res);
    res.sendFile(join(root, 'index.html'), { cacheControl: false });
  });
  return true;
}
