import express, { type NextFunction, type Request, type Response } from 'express';
import cookieParser from 'cookie-parser';
import compression from 'compression';
import helmet from 'helmet';
import { ZodError } from 'zod';
import type { AppContext } from './context';
import { authenticate, requireAuth } from './auth/middleware';
import { noStoreWhenSignedIn, sameOriginOnly } from './auth/same-origin';
import { fileMissing, HttpError } from './lib/errors';
import { requestIdInErrors } from './lib/errors';
import { createLogger, requestLogger } from './lib/logger';
import { StoredFileMissing } from './storage/storage';
import { badText } from './lib/unstorable-text';
import { ingestRoutes } from './modules/alarm-sources/alarm-sources.routes';
import { apiRoutes } from './routes';
import { serveWebApp } from './web-static';

/** Methods that change data: their bodies must be JSON (multipart only where a route says so). */
const mutating = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

function requireJsonBodies(req: Request, _res: Response, next: NextFunction) {
  if (!mutating.has(req.method)) return next();
  const length = Number(req.headers['content-length'] ?? 0);
  const chunked = req.headers['transfer-encoding'] !== undefined;
  if (length === 0 && !chunked) return next();
  if (req.is('application/json') || req.is('multipart/form-data')) return next();
  next(new HttpError(415, 'unsupported_media_type', 'Send the request body as JSON (Content-Type: application/json).'));
}

/**
 * Routes whose body carries a file's contents and whose own parser refuses a binary file with a
 * precise answer (`not_csv`): the text check leaves them alone.
 */
const fileContentRoutes = new Set(['/api/units/import']);

/** Refuse text the database cannot hold up front (400) rather than fail in the database (500). */
function refuseUnstorableText(req: Request, _res: Response, next: NextFunction) {
  if (fileContentRoutes.has(req.originalUrl.split('?')[0]!)) return next();
  if (badText(req.body) || badText(req.query)) {
    return next(
      new HttpError(400, 'invalid', 'Text may not contain the NUL character (U+0000) or unpaired surrogates (not valid Unicode).'),
    );
  }
  next();
}

/**
 * Builds the Express app around injected dependencies. It does not listen: `server.ts` does, and
 * tests drive it with supertest.
 */
export function createApp(ctx: AppContext): express.Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  // One JSON log line per request (id, user, status, duration; secrets redacted), the id in `X-Request-Id`
  // and in every error body. Without `ctx.logger` (tests) nothing is logged.
  app.use(requestLogger(ctx.logger ?? createLogger({ level: 'silent' })));
  app.use(requestIdInErrors);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'img-src': ["'self'", 'data:', 'blob:'],
          'upgrade-insecure-requests': ctx.config.secureCookies ? [] : null,
        },
      },
      strictTransportSecurity: ctx.config.secureCookies,
    }),
  );
  // Brotli or gzip (by Accept-Encoding) for text answers over 1 kB: API JSON, CSV, iCalendar, the web app's
  // HTML, scripts and styles. Photos and PDFs are already compressed and pass through as they are.
  app.use(compression());
  // When COILPATH_NOW set the clock, the web app reckons "today" by the server's clock (see apps/web/src/lib/now.ts).
  app.use('/api', (_req, res, next) => {
    if (ctx.config.clockOverridden) res.setHeader('X-Coilpath-Now', ctx.clock.now().toISOString());
    next();
  });
  app.use('/api', sameOriginOnly(ctx));
  app.use('/api', requireJsonBodies);
  // Machine-to-machine (lib/machine-routes.ts): signed alarms read their exact bytes with their own raw
  // parser, before the JSON parser and without the session cookie (authenticate is mounted after).
  app.use('/api/ingest', ingestRoutes(ctx));
  // CSV imports carry a whole file: up to 6 MB of units (8 MB as base64), 900 kB of alarms (1.2 MB as
  // base64); every other body stays small.
  app.use('/api/units/import', express.json({ limit: '9mb' }));
  app.use('/api/alarms/import', express.json({ limit: '2mb' }));
  app.use('/api', express.json({ limit: '1mb' }));
  app.use('/api', refuseUnstorableText);
  app.use('/api', cookieParser());
  app.use('/api', authenticate(ctx));
  app.use('/api', noStoreWhenSignedIn);

  app.use('/api', apiRoutes(ctx));
  app.use('/api', (_req, _res, next) => next(new HttpError(404, 'not_found', 'No such API route.')));

  serveWebApp(app, ctx.config.webDist);

  app.use(errorHandler);
  return app;
}

export { requireAuth };

function errorHandler(err: unknown, req: Request, res: Response, _next: NextFunction) {
  const send = (status: number, code: string, message: string, details?: unknown) =>
    res.status(status).json({ error: details === undefined ? { code, message } : { code, message, details } });

  if (err instanceof HttpError) {
    // readStoredFile's 410: the key is for the administrator's log, not the answer.
    if (err.cause instanceof StoredFileMissing) req.log.warn({ storageKey: err.cause.key }, `a stored file is missing: ${err.message}`);
    return send(err.status, err.code, err.message, err.details);
  }
  // A route that read a stored file without readStoredFile: still 410, never 500.
  if (err instanceof StoredFileMissing) {
    req.log.warn({ storageKey: err.key }, 'a stored file is missing');
    const gone = fileMissing('record');
    return send(gone.status, gone.code, gone.message);
  }
  if (err instanceof ZodError) {
    const fields = err.issues.map((i) => ({ path: i.path.join('.') || '(body)', message: i.message }));
    const names = [...new Set(fields.map((f) => f.path))].join(', ');
    return send(400, 'invalid', `Check these fields: ${names}.`, { fields });
  }
  const e = err as { type?: string; status?: number; code?: string; message?: string; field?: string };
  if (e?.type === 'entity.parse.failed') return send(400, 'malformed_json', 'The request body is not valid JSON.');
  if (e?.type === 'entity.too.large' || e?.code === 'LIMIT_FILE_SIZE')
    return send(413, 'too_large', e.code === 'LIMIT_FILE_SIZE' ? 'The file is larger than the limit.' : 'The request body is too large.');
  if (e?.code?.startsWith?.('LIMIT_')) return send(400, 'bad_upload', e.message ?? 'The upload was refused.');
  if (typeof e?.status === 'number' && e.status >= 400 && e.status < 500) return send(e.status, 'bad_request', e.message ?? 'Bad request.');
  // Logged with the request's line (pino-http reads `res.err`), at level error.
  res.err = err instanceof Error ? err : new Error(String(err));
  return send(500, 'internal', 'Something went wrong on the server. The change was not saved; try again.');
}
