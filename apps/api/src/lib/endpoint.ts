import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { z } from 'zod';
import type { SessionUser } from '@coilpath/contract';
import { HttpError, unauthorized } from './errors';
import { PreparedJson } from './prepared-json';

interface Schemas {
  body?: z.ZodType;
  query?: z.ZodType;
  params?: z.ZodType;
}

/**
 * What a route answers, declared on every `endpoint()`:
 * - a zod schema from `@coilpath/contract/responses`: the JSON answer (also a `PreparedJson`'s text);
 * - `'empty'`: 204, no body;
 * - `'file'`: the handler sends a file, an export (CSV, PDF, image, iCalendar) or a stream itself.
 */
export type ResponseDeclaration = z.ZodType | 'empty' | 'file';

type Out<S, K extends keyof Schemas> = S extends { [P in K]: z.ZodType } ? z.infer<S[K]> : undefined;

export interface Input<S extends Schemas> {
  body: Out<S, 'body'>;
  query: Out<S, 'query'>;
  params: Out<S, 'params'>;
  user: SessionUser;
  req: Request;
  res: Response;
}

/** The handler's answer: what the schema takes in (or a `PreparedJson` of it; nothing when it sent the answer itself), nothing for 204, anything for a file. */
type Answer<R> = R extends z.ZodType ? z.input<R> | PreparedJson | void : R extends 'empty' ? void : unknown;

/** Marks a handler made by `endpoint()` with its declaration, for the test that every route declares its answer. */
export const endpointDeclaration = Symbol('coilpath.endpoint');
export type EndpointHandler = RequestHandler & { [endpointDeclaration]?: { response: ResponseDeclaration } };

/** Outside production (development, tests, the browser journeys) every answer is checked against its schema. */
const checksAnswers = () => process.env.NODE_ENV !== 'production';

/** An answer that does not match its declared schema: a bug in the route or the contract, never the caller's fault. */
export class ResponseMismatch extends HttpError {
  constructor(route: string, issues: readonly z.core.$ZodIssue[] | string) {
    const said = typeof issues === 'string' ? issues : issues.map((i) => `${i.path.join('.') || '(answer)'}: ${i.message}`).join('; ');
    super(
      500,
      'response_mismatch',
      `${route} answered something its response schema does not allow: ${said}`,
      typeof issues === 'string' ? undefined : { issues },
    );
    this.name = 'ResponseMismatch';
  }
}

function checkAnswer(req: Request, response: ResponseDeclaration, result: unknown) {
  if (response === 'file') return;
  const route = `${req.method} ${req.baseUrl}${typeof req.route?.path === 'string' ? req.route.path : ''}`;
  if (response === 'empty') {
    if (result !== undefined) throw new ResponseMismatch(route, 'declared empty (204) but answered a body');
    return;
  }
  if (result === undefined) throw new ResponseMismatch(route, 'declared a JSON answer but answered nothing (204)');
  // What the client receives: the JSON text parsed back (dates become strings, undefined members vanish).
  const sent: unknown = JSON.parse(result instanceof PreparedJson ? result.text : JSON.stringify(result));
  const parsed = response.safeParse(sent);
  if (!parsed.success) {
    const err = new ResponseMismatch(route, parsed.error.issues);
    req.log?.error({ route, issues: parsed.error.issues }, err.message);
    throw err;
  }
}

/**
 * A thin, typed route handler: parses body, query and params with the contract's zod schemas
 * (a failure becomes a 400 naming the fields), requires a signed-in user, calls the service, and
 * answers JSON with the given status. Returning `undefined` answers 204; a `PreparedJson` is sent as
 * serialized, with its entity tag (304 when the client holds it).
 *
 * `response` (required, so no route can leave its answer undeclared) declares the answer (`ResponseDeclaration`). Outside production the answer is parsed with
 * its schema and a mismatch answers 500 `response_mismatch` naming the route and the zod issues (logged
 * too), so every API test checks that its routes answer what their schemas say; production skips it.
 */
export function endpoint<S extends Schemas, R extends ResponseDeclaration>(
  schemas: S & { status?: number; response: R },
  handler: (input: Input<S>) => Promise<Answer<R>> | Answer<R>,
): EndpointHandler {
  const response: ResponseDeclaration = schemas.response;
  const handle: EndpointHandler = async (req: Request, res: Response, _next: NextFunction) => {
    const user = req.user;
    if (!user) throw unauthorized();
    const body = schemas.body ? schemas.body.parse(req.body ?? {}) : undefined;
    const query = schemas.query ? schemas.query.parse(req.query) : undefined;
    const params = schemas.params ? schemas.params.parse(req.params) : undefined;
    const checking = checksAnswers();
    if (checking && typeof response !== 'string') {
      // A handler that sends its JSON itself (a status it chooses) is checked on the way out too; errors are not.
      const json = res.json.bind(res);
      res.json = (sent?: unknown) => {
        if (res.statusCode < 400) checkAnswer(req, response, sent);
        return json(sent);
      };
    }
    const result = await handler({ body, query, params, user, req, res } as Input<S>);
    if (res.headersSent) return;
    if (checking) checkAnswer(req, response, result);
    if (result === undefined) res.status(204).end();
    else if (result instanceof PreparedJson)
      res
        .status(schemas.status ?? 200)
        .set('ETag', result.etag)
        .type('json')
        .send(result.text);
    else res.status(schemas.status ?? 200).json(result);
  };
  handle[endpointDeclaration] = { response };
  return handle;
}

export const idParams = z.object({ id: z.uuid({ message: 'Not a valid id' }) });
