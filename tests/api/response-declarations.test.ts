/**
 * Every route made with `endpoint()` declares what it answers (`response`: a schema from
 * `@coilpath/contract/responses`, `'empty'` or `'file'`); outside production `endpoint()` then checks each
 * answer against it, so the API suite is the check that routes answer what their schemas say.
 * `endpoint()`'s type requires `response`; this test catches a declaration lost at run time (a cast, a spread).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { endpointDeclaration, type EndpointHandler } from '../../apps/api/src/lib/endpoint';
import { createTestApp, type TestApp } from '../../apps/api/src/testing/harness';
import { listRouteHandlers } from './list-routes';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(() => t?.close());

describe('response declarations', () => {
  it('every endpoint() route declares its answer: a zod schema, empty (204) or a file', () => {
    const endpoints = listRouteHandlers(t.app).flatMap((r) => {
      const made = r.handlers.find((h): h is EndpointHandler => typeof h === 'function' && endpointDeclaration in h);
      return made ? [{ key: `${r.method} ${r.path}`, response: made[endpointDeclaration]?.response as unknown }] : [];
    });
    expect(endpoints.length).toBeGreaterThan(90);
    const undeclared = endpoints
      .filter((e) => !(e.response instanceof z.ZodType || e.response === 'empty' || e.response === 'file'))
      .map((e) => e.key);
    expect(undeclared, 'routes without a valid `response` in endpoint()').toEqual([]);
  });
});
