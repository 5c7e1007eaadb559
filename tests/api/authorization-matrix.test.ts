/**
 * The authorization matrix: every route of the app × every caller (no session, owner, branch
 * manager, dispatcher, technician) × the caller's own branch and another branch, against the one
 * table in `route-table.ts`. A route missing from the table (or a row for a route that no longer
 * exists) fails the first test.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiErrorSchema } from '@coilpath/contract';
import { createTestApp, type TestApp } from '../../apps/api/src/testing/harness';
import { listRoutes } from './list-routes';
import { callers, callRoute, makeMatrixFixture, type MatrixFixture, type Side } from './matrix-fixture';
import { routeTable } from './route-table';

let t: TestApp;
let f: MatrixFixture;

beforeAll(async () => {
  t = await createTestApp();
  f = await makeMatrixFixture(t.ctx);
});
afterAll(() => t?.close());

const key = (r: { method: string; path: string }) => `${r.method} ${r.path}`;

describe('the route table', () => {
  it('has exactly one row for every route the app serves', () => {
    const served = listRoutes(t.app).map(key);
    const rows = routeTable.map(key);
    const duplicates = rows.filter((k, i) => rows.indexOf(k) !== i);
    expect(duplicates, 'rows listed twice in tests/api/route-table.ts').toEqual([]);
    expect(
      served.filter((k) => !rows.includes(k)),
      'routes missing from tests/api/route-table.ts',
    ).toEqual([]);
    expect(
      rows.filter((k) => !served.includes(k)),
      'rows in tests/api/route-table.ts for routes that do not exist',
    ).toEqual([]);
  });
});

describe('authorization matrix', () => {
  for (const row of routeTable) {
    it(`${row.method} ${row.path}`, async () => {
      const got: string[] = [];
      const want: string[] = [];
      // Reading routes share one set of records; writing routes get fresh ones for every call.
      let shared: { own: Side; other: Side } | undefined;
      const sides = async () => (row.method === 'GET' ? (shared ??= await f.makeSides()) : f.makeSides());
      for (const caller of callers) {
        const outcome = row.expect[caller];
        const cases =
          typeof outcome === 'number'
            ? ([['own', outcome]] as const)
            : ([
                ['own', outcome.own],
                ['other', outcome.other],
              ] as const);
        for (const [which, status] of cases) {
          const s = await sides();
          const res = await callRoute(t.app, f, row, caller, which === 'own' ? s.own : s.other);
          const label = `${caller}/${which}`;
          want.push(`${label} → ${status}`);
          got.push(`${label} → ${res.status}`);
          if (res.status >= 400) {
            const shape = apiErrorSchema.safeParse(res.body);
            if (!shape.success) got.push(`${label}: error body is not { error: { code, message } }: ${JSON.stringify(res.body)}`);
          }
        }
      }
      expect(got).toEqual(want);
    });
  }
});
