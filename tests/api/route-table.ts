/**
 * THE table of every API route: who may call it and what each caller gets, for records of the
 * caller's own branch and of another branch. `authorization-matrix.test.ts` checks every row (and
 * fails when the app has a route this table lacks, or the other way round); `bad-input.test.ts`
 * throws malformed bodies, queries and ids at every row that takes input.
 *
 * Adding a route: add a row here with
 *   - `expect`: use `open(...)`, `signedIn(...)` or `roles([...], status, { scoped })` — or spell it
 *     out per caller (`{ own, other }` where the branch matters: another branch's record answers 404);
 *   - `request(f, side, caller)`: a minimal valid request (path with real ids, body, query) aimed
 *     at `side` (the caller's own branch, or Bravo for "other"); `f` has the db and the people;
 *   - `body` / `query`: the route's zod schemas from `@coilpath/contract`, for the bad-input test
 *     (and `textFields` naming body fields that are free text and come back verbatim).
 */
import type { z } from 'zod';
import { signInSchema, type Role } from '@coilpath/contract';
import { z as zod } from 'zod';
import { mailOutbox } from '../../apps/api/src/db/schema';
import { TEST_PASSWORD } from '../../apps/api/src/testing/fixtures';
import type { Caller, MatrixFixture, Side } from './matrix-fixture';

export type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
/** One status, or the statuses for the caller's own branch and another branch. */
export type Outcome = number | { own: number; other: number };

export interface RequestSpec {
  /** The concrete path, e.g. `/api/sites/<uuid>`. */
  path: string;
  body?: unknown;
  query?: Record<string, string>;
}

export interface RouteRow {
  method: Method;
  /** Express path pattern as mounted, e.g. `/api/outbox/:id/attachments/:index`. */
  path: string;
  expect: Record<Caller, Outcome>;
  /** A minimal valid request; the default is the pattern itself with no body. */
  request?: (f: MatrixFixture, side: Side, caller: Caller) => RequestSpec | Promise<RequestSpec>;
  /** The body's zod schema (bad-input test). */
  body?: z.ZodType;
  /** The query's zod schema (bad-input test). */
  query?: z.ZodType;
  /** Body fields holding free text: SQL and HTML in them must be stored and returned verbatim. */
  textFields?: string[];
  /** Skip the bad-input test for this row, saying why. */
  noBadInput?: string;
}

const allRoles: readonly Role[] = ['owner', 'branch_manager', 'dispatcher', 'technician'];

/** Everyone, signed in or not, gets `status`. */
export function open(status: number): Record<Caller, Outcome> {
  return { anonymous: status, owner: status, branch_manager: status, dispatcher: status, technician: status };
}

/** Any signed-in person gets `status`; no session gets 401. */
export function signedIn(status: number): Record<Caller, Outcome> {
  return { ...open(status), anonymous: 401 };
}

/**
 * Only `allowed` roles get `status` (others 403, no session 401). `scoped`: the route is about one
 * branch's records, so a non-owner aiming at another branch gets 404; the owner sees every branch.
 */
export function roles(allowed: readonly Role[], status: number, opts: { scoped?: boolean } = {}): Record<Caller, Outcome> {
  const out: Record<Caller, Outcome> = { anonymous: 401, owner: 403, branch_manager: 403, dispatcher: 403, technician: 403 };
  for (const r of allowed) out[r] = opts.scoped && r !== 'owner' ? { own: status, other: 404 } : status;
  return out;
}

export { allRoles };

export const routeTable: RouteRow[] = [
  // ── health, config, auth ────────────────────────────────────────────────────────────────
  { method: 'GET', path: '/api/health', expect: open(200) },
  { method: 'GET', path: '/api/config', expect: open(200) },
  {
    method: 'POST',
    path: '/api/auth/sign-in',
    expect: open(200),
    body: signInSchema,
    request: (f) => ({ path: '/api/auth/sign-in', body: { email: f.inA.technician.email, password: TEST_PASSWORD } }),
  },
  { method: 'POST', path: '/api/auth/sign-out', expect: open(204) },
  { method: 'GET', path: '/api/auth/me', expect: signedIn(200) },

  // ── branches ────────────────────────────────────────────────────────────────────────────
  { method: 'GET', path: '/api/branches', expect: signedIn(200) },

  // ── outbox (owner) ──────────────────────────────────────────────────────────────────────
  {
    method: 'GET',
    path: '/api/outbox',
    expect: roles(['owner'], 200),
    query: zod.object({ limit: zod.coerce.number().int().min(1).max(500).default(100) }),
    request: () => ({ path: '/api/outbox', query: { limit: '10' } }),
  },
  {
    method: 'GET',
    path: '/api/outbox/:id/attachments/:index',
    expect: roles(['owner'], 200),
    request: async (f) => {
      const storageKey = await f.ctx.storage.put(Buffer.from('report'), { contentType: 'text/plain' });
      const [m] = await f.db
        .insert(mailOutbox)
        .values({
          from: 'a@test.example',
          to: 'b@test.example',
          subject: 'Report',
          attachments: [{ filename: 'report.txt', contentType: 'text/plain', size: 6, storageKey }],
        })
        .returning();
      return { path: `/api/outbox/${m!.id}/attachments/0` };
    },
  },

  // ── modules landing next: add their rows here (Sites/Team, Roster, My Day/Visit, Watchlist/
  //    Agreements, Fix Quality). Example of a branch-scoped record route:
  // {
  //   method: 'PATCH', path: '/api/sites/:id',
  //   expect: roles(['owner', 'branch_manager', 'dispatcher'], 200, { scoped: true }),
  //   body: siteUpdateSchema, textFields: ['name', 'accessNotes'],
  //   request: (_f, side) => ({ path: `/api/sites/${side.site.id}`, body: { name: 'Renamed' } }),
  // },
];
