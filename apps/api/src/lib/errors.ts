import type { NextFunction, Request, Response } from 'express';

/**
 * An error that answers with a status and a stable code: `{ error: { code, message, details?, requestId } }`
 * (`requestId` added on the way out by `requestIdInErrors`).
 */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (message: string, details?: unknown) => new HttpError(400, 'bad_request', message, details);
export const unauthorized = (message = 'Sign in to continue.') => new HttpError(401, 'unauthorized', message);
export const forbidden = (message = 'Your role may not do this.') => new HttpError(403, 'forbidden', message);
export const notFound = (what = 'record') => new HttpError(404, 'not_found', `No such ${what}.`);
export const conflict = (code: string, message: string, details?: unknown) => new HttpError(409, code, message, details);
export const unprocessable = (message: string, details?: unknown) => new HttpError(422, 'unprocessable', message, details);

/**
 * A record whose stored file is gone (410: it existed and will not come back by asking again). Said plainly,
 * so whoever sees it knows the record is kept and the bytes must come from a backup.
 */
export const fileMissing = (what: string) =>
  new HttpError(
    410,
    'file_missing',
    `The file of this ${what} is missing from Coilpath's file storage. The record is kept; an administrator can restore the file from a backup.`,
  );

const isErrorBody = (body: unknown): body is { error: Record<string, unknown> } =>
  typeof body === 'object' &&
  body !== null &&
  typeof (body as { error?: unknown }).error === 'object' &&
  (body as { error?: unknown }).error !== null;

/**
 * Every JSON error answer (status 400 and up with an `error` object — from the error handler, a rate limiter or a
 * route) carries the request's id as `error.requestId`, the id of its log line and of `X-Request-Id`, so a
 * person can quote it and an administrator find the line.
 */
export function requestIdInErrors(req: Request, res: Response, next: NextFunction) {
  const json = res.json.bind(res);
  res.json = (body?: unknown) =>
    json(
      res.statusCode >= 400 && isErrorBody(body) && req.id !== undefined
        ? { ...body, error: { ...body.error, requestId: String(req.id) } }
        : body,
    );
  next();
}
