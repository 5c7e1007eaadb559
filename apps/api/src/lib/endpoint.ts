import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { z } from 'zod';
import type { SessionUser } from '@coilpath/contract';
import { unauthorized } from './errors';
import { PreparedJson } from './prepared-json';

interface Schemas {
  body?: z.ZodType;
  query?: z.ZodType;
  params?: z.ZodType;
}

type Out<S, K extends keyof Schemas> = S extends { [P in K]: z.ZodType } ? z.infer<S[K]> : undefined;

export interface Input<S extends Schemas> {
  body: Out<S, 'body'>;
  query: Out<S, 'query'>;
  params: Out<S, 'params'>;
  user: SessionUser;
  req: Request;
  res: Response;
}

/**
 * A thin, typed route handler: parses body, query and params with the contract's zod schemas
 * (a failure becomes a 400 naming the fields), requires a signed-in user, calls the service, and
 * answers JSON with the given status. Returning `undefined` answers 204; a `PreparedJson` is sent as
 * serialized, with its entity tag (304 when the client holds it).
 */
export function endpoint<S extends Schemas>(
  schemas: S & { status?: number },
  handler: (input: Input<S>) => Promise<unknown> | unknown,
): RequestHandler {
  return async (req: Request, res: Response, _next: NextFunction) => {
    const user = req.user;
    if (!user) throw unauthorized();
    const body = schemas.body ? schemas.body.parse(req.body ?? {}) : undefined;
    const query = schemas.query ? schemas.query.parse(req.query) : undefined;
    const params = schemas.params ? schemas.params.parse(req.params) : undefined;
    const result = await handler({ body, query, params, user, req, res } as Input<S>);
    if (res.headersSent) return;
    if (result === undefined) res.status(204).end();
    else if (result instanceof PreparedJson) res.status(schemas.status ?? 200).set('ETag', result.etag).type('json').send(result.text);
    else res.status(schemas.status ?? 200).json(result);
  };
}

export const idParams = z.object({ id: z.uuid({ message: 'Not a valid id' }) });
