/**
 * Every route made with `endpoint()` declares what it answers (`response`: a schema from
 * `@coilpath/contract/responses`, `'empty'` or `'file'`); outside production `endpoint()` then checks each
 * answer against it, so the API suite is the check that routes answer what their schemas say.
 * `stillUndeclared` is the shrinking list of routes that have no schema yet: remove a row when you add one.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { endpointDeclaration, type EndpointHandler } from '../../apps/api/src/lib/endpoint';
import { createTestApp, type TestApp } from '../../apps/api/src/testing/harness';
import { listRouteHandlers } from './list-routes';

const stillUndeclared: string[] = [
  'DELETE /api/customers/:id',
  'DELETE /api/invitations/:id',
  'DELETE /api/sites/:id',
  'DELETE /api/units/:id',
  'GET /api/agreements',
  'GET /api/agreements/:id',
  'GET /api/agreements/pm-completion',
  'GET /api/alarm-sources',
  'GET /api/branches',
  'GET /api/branches/:id',
  'GET /api/customers',
  'GET /api/customers/:id',
  'GET /api/invitations',
  'GET /api/outbox',
  'GET /api/outbox/:id/attachments/:index',
  'GET /api/reports/fix-quality',
  'GET /api/reports/fix-quality.csv',
  'GET /api/reports/fix-quality.pdf',
  'GET /api/reports/fix-quality/factory-defects',
  'GET /api/reports/fix-quality/model-alerts',
  'GET /api/sites',
  'GET /api/sites/:id',
  'GET /api/units',
  'GET /api/units/:id',
  'GET /api/users',
  'GET /api/users/:id',
  'PATCH /api/agreements/:id',
  'PATCH /api/alarm-sources/:id',
  'PATCH /api/branches/:id',
  'PATCH /api/customers/:id',
  'PATCH /api/sites/:id',
  'PATCH /api/users/:id',
  'PATCH /api/warranty-claims/:workOrderId',
  'POST /api/agreements',
  'POST /api/agreements/:id/plan',
  'POST /api/agreements/:id/plan/apply',
  'POST /api/alarm-sources',
  'POST /api/alarm-sources/:id/rotate',
  'POST /api/alarm-sources/deliveries/:id/map',
  'POST /api/branches',
  'POST /api/customers',
  'POST /api/customers/:id/archive',
  'POST /api/customers/:id/unarchive',
  'POST /api/invitations',
  'POST /api/invitations/:id/resend',
  'POST /api/reports/fix-quality/model-alerts/inspections',
  'POST /api/sites',
  'POST /api/sites/:id/archive',
  'POST /api/sites/:id/unarchive',
  'POST /api/units',
  'POST /api/units/:id/archive',
  'POST /api/units/:id/unarchive',
  'POST /api/units/import',
  'POST /api/users/:id/deactivate',
  'POST /api/users/:id/reactivate',
  'PUT /api/units/:id',
];

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(() => t?.close());

describe('response declarations', () => {
  it('every endpoint() route declares its answer (but those still listed in stillUndeclared)', () => {
    const endpoints = listRouteHandlers(t.app).flatMap((r) => {
      const made = r.handlers.find((h): h is EndpointHandler => typeof h === 'function' && endpointDeclaration in h);
      return made ? [{ key: `${r.method} ${r.path}`, response: made[endpointDeclaration]!.response }] : [];
    });
    expect(endpoints.length).toBeGreaterThan(90);
    const undeclared = endpoints.filter((e) => e.response === undefined).map((e) => e.key);
    expect(
      undeclared.filter((k) => !stillUndeclared.includes(k)),
      'routes without `response` in endpoint()',
    ).toEqual([]);
    expect(
      stillUndeclared.filter((k) => !undeclared.includes(k)),
      'rows of stillUndeclared that now declare (remove them)',
    ).toEqual([]);
  });
});
