import { randomUUID } from 'node:crypto';
import type { IncomingMessage, ServerResponse } from 'node:http';
import type { Request } from 'express';
import { pino, stdSerializers, type DestinationStream, type Logger, type LevelWithSilent } from 'pino';
import { pinoHttp, type HttpLogger } from 'pino-http';

export type { Logger };

/**
 * Where a secret could sit in anything logged, replaced by `[redacted]`: request and response headers (a
 * logged request carries only method, address and agent, but an error or a `log.info({ req })` might carry
 * more), and any field named like a password or token one or two levels down.
 */
export const redactPaths = [
  'req.headers.cookie',
  'req.headers.authorization',
  'req.headers["x-api-key"]',
  'res.headers["set-cookie"]',
  'headers.cookie',
  'headers.authorization',
  'headers["set-cookie"]',
  ...['password', 'newPassword', 'currentPassword', 'token', 'secret', 'cookie', 'authorization'].flatMap((k) => [k, `*.${k}`, `*.*.${k}`]),
];

/** Query parameters whose values are credentials (the e-mailed reset and invitation links). */
const secretParams = /([?&](?:token|password|secret|code|key)=)[^&#]*/gi;

/**
 * A request's address as logged: credential query parameters (`/reset-password?token=…`,
 * `/accept-invitation?token=…`) and the technician's calendar feed token (`/api/calendar/<token>.ics`) are
 * replaced by `[redacted]`.
 */
export function scrubUrl(url: string): string {
  return url.replace(secretParams, '$1[redacted]').replace(/^(\/api\/calendar\/)[^/?#]+(\.ics)/, '$1[redacted]$2');
}

/**
 * A database error as logged: drizzle's "Failed query" errors carry the statement's parameters (a password
 * hash, an e-mail address, a token); the statement is kept, its parameters are not.
 */
function serializeError(err: Error) {
  // Called with the error itself (the logger) or with it already serialized (pino-http wraps serializers).
  type Serialized = ReturnType<typeof stdSerializers.err> & { params?: unknown };
  const out = (err instanceof Error ? stdSerializers.err(err) : { ...(err as object) }) as Serialized;
  if ('params' in out) {
    delete out.params;
    out.message = out.message.replace(/\nparams: [\s\S]*$/, '\nparams: [redacted]');
    if (typeof out.stack === 'string') out.stack = out.stack.replace(/\nparams: [\s\S]*?(\n {4}at |$)/, '\nparams: [redacted]$1');
  }
  return out;
}

/**
 * The process's logger: one JSON object a line on stdout (or on `destination`, as tests do), secrets redacted.
 * `LOG_LEVEL` sets the level (`info` by default; `silent` logs nothing).
 */
export function createLogger(opts: { level?: LevelWithSilent; destination?: DestinationStream } = {}): Logger {
  const options = {
    level: opts.level ?? 'info',
    timestamp: pino.stdTimeFunctions.isoTime,
    redact: { paths: redactPaths, censor: '[redacted]' },
    serializers: { err: serializeError },
  };
  // Without a destination: stdout, written synchronously (no line lost when the process exits).
  return opts.destination ? pino(options, opts.destination) : pino(options);
}

/** A request id from a proxy in front (`X-Request-Id`) is kept when it looks like one; otherwise a new UUID. */
const requestIdShape = /^[A-Za-z0-9._:-]{8,128}$/;

/**
 * One log line per request when its answer is finished: `requestId` (also sent as `X-Request-Id`), `userId`
 * when signed in, `status`, `durationMs`, method and address (credentials scrubbed). Answers of 500 and up are
 * logged at `error` with the error; others at `info`.
 */
export function requestLogger(logger: Logger): HttpLogger<IncomingMessage, ServerResponse> {
  return pinoHttp({
    logger,
    genReqId(req, res) {
      const incoming = req.headers['x-request-id'];
      const id = typeof incoming === 'string' && requestIdShape.test(incoming) ? incoming : randomUUID();
      res.setHeader('X-Request-Id', id);
      return id;
    },
    customAttributeKeys: { reqId: 'requestId', responseTime: 'durationMs' },
    quietReqLogger: true,
    serializers: {
      err: serializeError,
      req: (req: { method: string; url: string; remoteAddress?: string; headers: Record<string, unknown> }) => ({
        method: req.method,
        url: scrubUrl(req.url),
        remoteAddress: req.remoteAddress,
        userAgent: req.headers['user-agent'],
      }),
      res: (res: { statusCode: number; headers: Record<string, unknown> }) => ({
        statusCode: res.statusCode,
        contentLength: res.headers['content-length'],
      }),
    },
    customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : 'info'),
    customProps: (req) => {
      const user = (req as Request).user;
      return user ? { userId: user.id } : {};
    },
    customSuccessObject: (_req, res, val: object) => ({ ...val, status: res.statusCode }),
    customErrorObject: (_req, res, _err, val: object) => ({ ...val, status: res.statusCode }),
    customSuccessMessage: (req, res) => `${req.method} ${scrubUrl((req as Request).originalUrl ?? req.url ?? '')} ${res.statusCode}`,
    customErrorMessage: (req, res) => `${req.method} ${scrubUrl((req as Request).originalUrl ?? req.url ?? '')} ${res.statusCode}`,
  });
}
