/**
 * `endpoint()` checks every answer against its declared response schema outside production (the API tests
 * are then the check that routes answer what `@coilpath/contract/responses` says), and not in production.
 */
import express, { type NextFunction, type Request, type Response } from 'express';
import request from 'supertest';
import { afterEach, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { endpoint, endpointDeclaration, type EndpointHandler } from './endpoint';
import { HttpError } from './errors';
import { prepareJson } from './prepared-json';

const answerSchema = z.object({ count: z.number(), at: z.iso.datetime() });

function appWith(handler: EndpointHandler) {
  const app = express();
  app.use((req, _res, next) => {
    req.user = { id: 'u' } as Request['user'];
    next();
  });
  app.get('/things/:id', handler);
  app.use((err: unknown, _req: Request, res: Response, _next: NextFunction) => {
    if (err instanceof HttpError) res.status(err.status).json({ error: { code: err.code, message: err.message } });
    else res.status(500).json({ error: { code: 'internal', message: String(err) } });
  });
  return app;
}

const before = process.env.NODE_ENV;
afterEach(() => {
  process.env.NODE_ENV = before;
});

describe('endpoint() response checks', () => {
  it('sends an answer that matches its schema as it is (a Date as its ISO text)', async () => {
    const at = new Date('2026-12-02T14:00:00Z');
    const res = await request(appWith(endpoint({ response: answerSchema }, () => ({ count: 2, at: at.toISOString() })))).get('/things/1');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ count: 2, at: '2026-12-02T14:00:00.000Z' });
  });

  it('answers 500 response_mismatch naming the route and the fields when the answer breaks its schema', async () => {
    const res = await request(appWith(endpoint({ response: answerSchema }, () => ({ count: 'two', at: 'noon' }) as never))).get(
      '/things/1',
    );
    expect(res.status).toBe(500);
    expect(res.body.error.code).toBe('response_mismatch');
    expect(res.body.error.message).toContain('GET /things/:id');
    expect(res.body.error.message).toMatch(/count: .*at: /);
  });

  it('checks a PreparedJson answer by its text', async () => {
    const good = await request(
      appWith(endpoint({ response: answerSchema }, () => prepareJson({ count: 1, at: '2026-12-02T14:00:00Z' }))),
    ).get('/things/1');
    expect(good.status).toBe(200);
    expect(good.headers.etag).toBeTruthy();
    const bad = await request(appWith(endpoint({ response: answerSchema }, () => prepareJson({ count: 1 })))).get('/things/1');
    expect(bad.status).toBe(500);
    expect(bad.body.error.code).toBe('response_mismatch');
  });

  it("refuses a body from a route declared 'empty', and no body from a route declared with a schema", async () => {
    const body = await request(appWith(endpoint({ response: 'empty' }, () => ({ surprise: true }) as never))).get('/things/1');
    expect(body.status).toBe(500);
    expect(body.body.error.message).toContain('declared empty');
    const none = await request(appWith(endpoint({ response: answerSchema }, () => undefined as never))).get('/things/1');
    expect(none.status).toBe(500);
    expect(none.body.error.message).toContain('answered nothing');
    const fine = await request(appWith(endpoint({ response: 'empty' }, () => undefined))).get('/things/1');
    expect(fine.status).toBe(204);
  });

  it('does not parse in production: the answer goes out unchecked', async () => {
    process.env.NODE_ENV = 'production';
    const res = await request(appWith(endpoint({ response: answerSchema }, () => ({ count: 'two' }) as never))).get('/things/1');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ count: 'two' });
  });

  it('marks its handler with the declaration', () => {
    expect(endpoint({ response: 'file' }, () => undefined)[endpointDeclaration]).toEqual({ response: 'file' });
    expect(endpoint({ response: 'empty' }, () => undefined)[endpointDeclaration]).toEqual({ response: 'empty' });
    // @ts-expect-error `response` is required: a route cannot leave its answer undeclared.
    endpoint({}, () => undefined);
  });
});

describe('endpoint() checks JSON a handler sends itself', () => {
  it('answers 500 when res.json() sends what the schema does not allow, and passes what it allows', async () => {
    const bad = await request(appWith(endpoint({ response: answerSchema }, ({ res }) => void res.status(201).json({ count: 1 })))).get(
      '/things/1',
    );
    expect(bad.status).toBe(500);
    expect(bad.body.error.code).toBe('response_mismatch');
    const good = await request(
      appWith(endpoint({ response: answerSchema }, ({ res }) => void res.status(201).json({ count: 1, at: '2026-12-02T14:00:00Z' }))),
    ).get('/things/1');
    expect(good.status).toBe(201);
  });
});
