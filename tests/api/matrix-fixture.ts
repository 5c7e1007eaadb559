/**
 * The fixture the authorization matrix and the bad-input test share: two branches (Alpha = the
 * callers' own, Bravo = another branch) with one user per role each and an owner, and per branch a
 * `Side` of records (customer, site, unit with two circuits, work order). Sessions are minted
 * directly (no argon2 per call).
 */
import type { IncomingMessage } from 'node:http';
import type { Express } from 'express';
import request from 'supertest';
import { eq, sql } from 'drizzle-orm';
import type { Role } from '@coilpath/contract';
import type { AppContext } from '../../apps/api/src/context';
import type { Db } from '../../apps/api/src/db/client';
import { bookings, users, visits } from '../../apps/api/src/db/schema';
import { SESSION_COOKIE, signSession } from '../../apps/api/src/auth/session';
import type { RequestSpec, RouteRow } from './route-table';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder } from '../../apps/api/src/testing/fixtures';

export type Caller = 'anonymous' | Role;
export const callers: readonly Caller[] = ['anonymous', 'owner', 'branch_manager', 'dispatcher', 'technician'];

export type People = Awaited<ReturnType<typeof makeTwoBranches>>;
type Branch = People['a'];
type User = People['owner'];

/** Records of one branch that a request can point at. Extend as modules land (bookings, visits, agreements…). */
export interface Side {
  branch: Branch;
  customer: Awaited<ReturnType<typeof makeSiteWithUnit>>['customer'];
  site: Awaited<ReturnType<typeof makeSiteWithUnit>>['site'];
  unit: Awaited<ReturnType<typeof makeSiteWithUnit>>['unit'];
  workOrder: Awaited<ReturnType<typeof makeWorkOrder>>;
  /** The technician of this branch (bookings, visits). */
  technician: User;
  /** A second work order, booked for `technician` on the next weekday at 15:00Z, with its open visit (on site). */
  booked: {
    workOrder: Awaited<ReturnType<typeof makeWorkOrder>>;
    booking: typeof bookings.$inferSelect;
    visit: typeof visits.$inferSelect;
  };
}

/** The next Monday–Friday (UTC) after today, at `hourUtc`:00Z. */
export function nextWeekday(now: Date, hourUtc = 15): Date {
  const d = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate() + 1, hourUtc));
  while (d.getUTCDay() === 0 || d.getUTCDay() === 6) d.setUTCDate(d.getUTCDate() + 1);
  return d;
}

export interface MatrixFixture extends People {
  ctx: AppContext;
  db: Db;
  /** The user a caller signs in as (the owner, or the role's user in Alpha); null for anonymous. */
  userFor(caller: Caller): User | null;
  /** Fresh records in Alpha (own) and Bravo (other). */
  makeSides(): Promise<{ own: Side; other: Side }>;
}

export async function makeMatrixFixture(ctx: AppContext): Promise<MatrixFixture> {
  const db = ctx.db;
  const people = await makeTwoBranches(db);
  const makeSide = async (branch: Branch, technician: User): Promise<Side> => {
    const { customer, site, unit } = await makeSiteWithUnit(db, branch.id);
    const workOrder = await makeWorkOrder(db, { branchId: branch.id, siteId: site.id, unitId: unit.id });
    const bookedOrder = await makeWorkOrder(db, { branchId: branch.id, siteId: site.id, unitId: unit.id, state: 'booked' });
    const startAt = nextWeekday(ctx.clock.now());
    const [booking] = await db
      .insert(bookings)
      .values({
        branchId: branch.id,
        workOrderId: bookedOrder.id,
        techId: technician.id,
        startAt,
        endAt: new Date(startAt.getTime() + 3600_000),
      })
      .returning();
    const now = ctx.clock.now();
    const [visit] = await db
      .insert(visits)
      .values({
        branchId: branch.id,
        workOrderId: bookedOrder.id,
        bookingId: booking!.id,
        techId: technician.id,
        enRouteAt: now,
        onSiteAt: now,
      })
      .returning();
    return { branch, customer, site, unit, workOrder, technician, booked: { workOrder: bookedOrder, booking: booking!, visit: visit! } };
  };
  return {
    ...people,
    ctx,
    db,
    userFor(caller) {
      if (caller === 'anonymous') return null;
      if (caller === 'owner') return people.owner;
      return { branch_manager: people.inA.manager, dispatcher: people.inA.dispatcher, technician: people.inA.technician }[caller];
    },
    async makeSides() {
      return {
        own: await makeSide(people.a, people.inA.technician),
        other: await makeSide(people.b, people.inB.technician),
      };
    },
  };
}

/**
 * A `Cookie` header carrying a valid new session of the user, at the user's current session version (a row
 * such as sign-out-everywhere raises it; each call is a session of its own, so signing one out ends no other).
 */
export async function sessionCookie(ctx: AppContext, user: { id: string }): Promise<string> {
  const [u] = await ctx.db.select({ sv: users.sessionVersion }).from(users).where(eq(users.id, user.id));
  const token = await signSession(ctx.secret, { sub: user.id, sv: u!.sv }, ctx.config.sessionHours, ctx.clock.now());
  return `${SESSION_COOKIE}=${token}`;
}

/** The statement `rowCounts` runs on a database, built once from its tables (a test run never changes the schema). */
const rowCountStatements = new WeakMap<Db, Promise<string>>();

async function rowCountStatement(db: Db): Promise<string> {
  const tables = (await db.execute(
    sql`SELECT table_name AS t FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY 1`,
  )) as unknown as { rows: { t: string }[] };
  const parts = tables.rows.map((r) => `(SELECT count(*) FROM public."${r.t}")::int AS "${r.t}"`);
  return `SELECT ${parts.join(', ')}`;
}

/** Row counts of every table in the public schema, read in one statement. */
export async function rowCounts(db: Db): Promise<Record<string, number>> {
  let statement = rowCountStatements.get(db);
  if (!statement) rowCountStatements.set(db, (statement = rowCountStatement(db)));
  const res = (await db.execute(sql.raw(await statement))) as unknown as { rows: Record<string, number>[] };
  return res.rows[0] ?? {};
}

/** The row's minimal valid request as `caller` against `side` (may insert the records it needs). */
export async function requestFor(f: MatrixFixture, row: RouteRow, caller: Caller, side: Side): Promise<RequestSpec> {
  return row.request ? await row.request(f, side, caller) : { path: row.path };
}

/** Sends a request to a row's route as `caller`; `rawBody` is sent as it is, as JSON. */
export async function sendRequest(
  app: Express,
  f: MatrixFixture,
  row: RouteRow,
  caller: Caller,
  spec: RequestSpec & { rawBody?: string },
): Promise<{ status: number; body: unknown }> {
  const user = f.userFor(caller);
  let req = request(app)[row.method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete'](spec.path);
  if (user) req = req.set('Cookie', await sessionCookie(f.ctx, user));
  if (spec.query) req = req.query(spec.query);
  if (spec.headers) req = req.set(spec.headers);
  if (row.stream) {
    // An open stream: read up to its first bytes, then hang up (an error answer ends by itself).
    req = req.buffer(true).parse((response, done) => {
      const res = response as unknown as IncomingMessage;
      let text = '';
      let finished = false;
      const finish = () => {
        if (finished) return;
        finished = true;
        done(null, (res.statusCode ?? 0) >= 400 ? safeJson(text) : text);
      };
      res.setEncoding('utf8');
      res.once('data', (chunk: string) => {
        text += chunk;
        finish();
        res.destroy();
      });
      res.once('end', finish);
    });
  }
  let res;
  if (spec.files) {
    for (const [k, v] of Object.entries((spec.body ?? {}) as Record<string, unknown>))
      req = req.field(k, typeof v === 'string' ? v : JSON.stringify(v));
    for (const file of spec.files) req = req.attach(file.field, file.content, { filename: file.name, contentType: file.contentType });
    res = await req;
  } else if (spec.rawBody !== undefined) res = await req.set('Content-Type', 'application/json').send(spec.rawBody);
  else if (spec.body !== undefined) res = await req.send(spec.body as object);
  else res = await req;
  return { status: res.status, body: res.body };
}

/** Calls a row's route as `caller` against `side` with the row's minimal valid request. */
export async function callRoute(app: Express, f: MatrixFixture, row: RouteRow, caller: Caller, side: Side) {
  return sendRequest(app, f, row, caller, await requestFor(f, row, caller, side));
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return text;
  }
}
