/**
 * `GET /api/events`: who hears what (a technician only their own day, a dispatcher the Roster and visits of
 * their branch, managers also alarms and leak cases), the replay after `Last-Event-ID`, the keep-alive, and
 * events crossing from one API process to another on the same database.
 */
import { createServer, get, type ClientRequest, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { sql } from 'drizzle-orm';
import type { Express } from 'express';
import type { LiveEvent } from '@coilpath/contract';
import { createApp } from '../../app';
import type { AppContext } from '../../context';
import { openDatabase, type Database } from '../../db/client';
import { liveEvents } from '../../db/schema';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { pruneLiveEvents } from './events.service';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let siteB: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let otherTechA: Awaited<ReturnType<typeof makeUser>>;
const servers: Server[] = [];
const streams: Stream[] = [];

/** Listens on a free port of the loopback; answers the base URL. */
async function serve(app: Express): Promise<string> {
  const server = createServer(app);
  servers.push(server);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
}

async function cookieOf(app: Express, email: string): Promise<string> {
  const res = await request(app).post('/api/auth/sign-in').send({ email, password: TEST_PASSWORD });
  expect(res.status).toBe(200);
  return (res.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ');
}

interface Stream {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  events: (LiveEvent & { sseId: string; sseEvent: string })[];
  comments: string[];
  /** The last `id:` received (an event's, or the mark sent at the start): what a browser sends back on reconnecting. */
  lastId: string | undefined;
  ended: boolean;
  /** Resolves once `condition` holds (checked at every chunk received), rejects after `timeoutMs`. */
  until(condition: () => boolean, what: string, timeoutMs?: number): Promise<void>;
  close(): void;
}

/**
 * A Server-Sent Events client over plain HTTP (the format of the HTML standard, §9.2): blocks separated by a
 * blank line, `id:`/`event:`/`data:` fields, `:` comments. Resolves once the server says it is listening.
 */
async function connect(base: string, cookie: string, lastEventId?: string): Promise<Stream> {
  const waiters = new Set<() => void>();
  const s: Stream = {
    status: 0,
    headers: {},
    events: [],
    comments: [],
    lastId: undefined,
    ended: false,
    until(condition, what, timeoutMs = 5000) {
      if (condition()) return Promise.resolve();
      return new Promise((resolve, reject) => {
        const check = () => {
          if (!condition()) return;
          clearTimeout(timer);
          waiters.delete(check);
          resolve();
        };
        const timer = setTimeout(() => {
          waiters.delete(check);
          reject(new Error(`timed out waiting for ${what}; events: ${JSON.stringify(s.events.map((e) => [e.sseEvent, e.id]))}`));
        }, timeoutMs);
        waiters.add(check);
      });
    },
    close: () => req.destroy(),
  };
  let buffer = '';
  const req: ClientRequest = get(
    `${base}/api/events`,
    { headers: { Cookie: cookie, Accept: 'text/event-stream', ...(lastEventId !== undefined ? { 'Last-Event-ID': lastEventId } : {}) } },
    (res) => {
      s.status = res.statusCode ?? 0;
      s.headers = res.headers;
      res.setEncoding('utf8');
      res.on('data', (chunk: string) => {
        buffer += chunk;
        let end: number;
        while ((end = buffer.indexOf('\n\n')) >= 0) {
          const block = buffer.slice(0, end);
          buffer = buffer.slice(end + 2);
          const fields: Record<string, string> = {};
          for (const line of block.split('\n')) {
            if (line.startsWith(':')) s.comments.push(line.slice(1).trim());
            else {
              const colon = line.indexOf(':');
              fields[line.slice(0, colon)] = line.slice(colon + 1).trimStart();
            }
          }
          if (fields.id !== undefined) s.lastId = fields.id;
          if (fields.data !== undefined)
            s.events.push({ ...(JSON.parse(fields.data) as LiveEvent), sseId: fields.id ?? '', sseEvent: fields.event ?? 'message' });
        }
        waiters.forEach((w) => w());
      });
      res.on('end', () => {
        s.ended = true;
        waiters.forEach((w) => w());
      });
    },
  );
  req.on('error', () => undefined);
  streams.push(s);
  await s.until(() => s.comments.includes('connected') || s.status >= 400, 'the stream to open');
  return s;
}

let base: string;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  t = await createTestApp({ now: '2027-03-01T12:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id);
  siteB = await makeSiteWithUnit(t.ctx.db, f.b.id);
  otherTechA = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Noor Haddad' });
  base = await serve(t.app);
  const people = {
    techA: f.inA.technician,
    otherTechA,
    techB: f.inB.technician,
    dispatcherA: f.inA.dispatcher,
    dispatcherB: f.inB.dispatcher,
    managerA: f.inA.manager,
    owner: f.owner,
  };
  for (const [k, u] of Object.entries(people)) cookies[k] = await cookieOf(t.app, u.email);
});

afterAll(async () => {
  streams.forEach((s) => s.close());
  await Promise.all(servers.map((s) => new Promise((resolve) => s.close(resolve))));
  await t?.close();
});

/** Books a new work order of branch A on `techId` through the API, as dispatcher A; answers the booking. */
async function bookInA(techId: string, startAt: string) {
  const w = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id, unitId: siteA.unit.id, estimatedMinutes: 60 });
  const res = await request(t.app).post('/api/bookings').set('Cookie', cookies.dispatcherA!).send({ workOrderId: w.id, techId, startAt });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.booking as { id: string; visitId: string; techId: string };
}

const kinds = (s: Stream) => s.events.map((e) => e.kind);
const maxId = async () =>
  Number(
    ((await t.ctx.db.execute(sql`select coalesce(max(id), 0)::int as id from live_events`)) as unknown as { rows: { id: number }[] })
      .rows[0]!.id,
  );

describe('GET /api/events', () => {
  it('answers a stream of text/event-stream, and 401 without a session', async () => {
    const s = await connect(base, cookies.dispatcherA!);
    expect(s.status).toBe(200);
    expect(s.headers['content-type']).toMatch(/^text\/event-stream/);
    expect(s.headers['cache-control']).toContain('no-store');
    s.close();
    const anonymous = await connect(base, '');
    expect(anonymous.status).toBe(401);
  });

  it('sends each person only their branch’s events of their role, and a technician only their own day', async () => {
    const [techA, otherTech, techB, dispatcherA, dispatcherB, managerA, owner] = await Promise.all(
      ['techA', 'otherTechA', 'techB', 'dispatcherA', 'dispatcherB', 'managerA', 'owner'].map((k) => connect(base, cookies[k]!)),
    );
    const roster0 = dispatcherA!.events.length;

    // Dispatcher A books technician A: the Roster's people of A hear `roster` (with who and which booking), A's day changes.
    const booking = await bookInA(f.inA.technician.id, '2027-03-08T15:00:00Z');
    await dispatcherA!.until(
      () => dispatcherA!.events.some((e) => e.kind === 'roster' && e.bookings?.includes(booking.id)),
      'the roster event',
    );
    const rosterEvent = dispatcherA!.events.slice(roster0).find((e) => e.kind === 'roster' && e.bookings?.includes(booking.id))!;
    expect(rosterEvent.branchId).toBe(f.a.id);
    expect(rosterEvent.by).toEqual({ id: f.inA.dispatcher.id, name: f.inA.dispatcher.name });
    expect(rosterEvent.kind === 'roster' && rosterEvent.revision).toBeGreaterThan(0);
    expect(rosterEvent.sseEvent).toBe('roster');
    expect(rosterEvent.sseId).toBe(String(rosterEvent.id));
    await techA!.until(() => kinds(techA!).includes('day'), 'technician A’s day event');
    expect(techA!.events.every((e) => e.kind === 'day' && e.techId === f.inA.technician.id)).toBe(true);
    await managerA!.until(() => kinds(managerA!).includes('roster'), 'the manager’s roster event');
    await owner!.until(() => kinds(owner!).includes('roster'), 'the owner’s roster event');

    // Technician A goes en route: dispatchers of A hear the stop's state, by whom.
    const enRoute = await request(t.app).patch(`/api/visits/${booking.visitId}`).set('Cookie', cookies.techA!).send({ state: 'en_route' });
    expect(enRoute.status, JSON.stringify(enRoute.body)).toBe(200);
    await dispatcherA!.until(() => kinds(dispatcherA!).includes('visit'), 'the visit event');
    const visit = dispatcherA!.events.find((e) => e.kind === 'visit')!;
    expect(visit).toMatchObject({
      kind: 'visit',
      visitId: booking.visitId,
      bookingId: booking.id,
      techId: f.inA.technician.id,
      state: 'en_route',
      by: { id: f.inA.technician.id },
    });

    // A manager records an alarm: the managers and the owner hear it, the dispatcher does not.
    const alarm = await request(t.app)
      .post('/api/alarms')
      .set('Cookie', cookies.managerA!)
      .send({ unitId: siteA.unit.id, code: 'HP-1', raisedAt: '2027-03-01T11:00:00Z' });
    expect(alarm.status, JSON.stringify(alarm.body)).toBe(201);
    await managerA!.until(() => kinds(managerA!).includes('alarm'), 'the manager’s alarm event');
    await owner!.until(() => kinds(owner!).includes('alarm'), 'the owner’s alarm event');

    // Then a change the other technician and branch B do hear: anything meant for them before it has arrived by now.
    const second = await bookInA(otherTechA.id, '2027-03-09T15:00:00Z');
    await otherTech!.until(() => kinds(otherTech!).includes('day'), 'the other technician’s own day event');
    expect(otherTech!.events.map((e) => [e.kind, e.kind === 'day' && e.techId])).toEqual([['day', otherTechA.id]]);
    await dispatcherA!.until(
      () => dispatcherA!.events.some((e) => e.kind === 'roster' && e.bookings?.includes(second.id)),
      'the second roster event',
    );

    const w = await makeWorkOrder(t.ctx.db, { branchId: f.b.id, siteId: siteB.site.id });
    await dispatcherB!.until(() => kinds(dispatcherB!).includes('roster'), 'branch B’s roster event');
    expect(dispatcherB!.events.every((e) => e.branchId === f.b.id && e.kind === 'roster')).toBe(true);
    expect(techB!.events).toEqual([]);
    expect(techA!.events.every((e) => e.kind === 'day' && e.techId === f.inA.technician.id)).toBe(true);
    expect(dispatcherA!.events.filter((e) => e.kind === 'alarm' || e.kind === 'leak-case' || e.kind === 'day')).toEqual([]);
    expect(dispatcherA!.events.every((e) => e.branchId === f.a.id)).toBe(true);
    await owner!.until(() => owner!.events.some((e) => e.branchId === f.b.id), 'the owner hears branch B too');
    expect(w.branchId).toBe(f.b.id);
  });

  it('sends what was missed after Last-Event-ID first, in order, within the person’s scope', async () => {
    const from = await maxId();
    const booking = await bookInA(f.inA.technician.id, '2027-03-10T15:00:00Z');
    const onRoute = await request(t.app).patch(`/api/visits/${booking.visitId}`).set('Cookie', cookies.techA!).send({ state: 'en_route' });
    expect(onRoute.status).toBe(200);
    await makeWorkOrder(t.ctx.db, { branchId: f.b.id, siteId: siteB.site.id });

    const dispatcher = await connect(base, cookies.dispatcherA!, String(from));
    const missed = dispatcher.events.map((e) => e.kind);
    expect(missed).toContain('roster');
    expect(missed).toContain('visit');
    expect(dispatcher.events.every((e) => e.branchId === f.a.id && e.id > from)).toBe(true);
    expect(dispatcher.events.map((e) => e.id)).toEqual([...dispatcher.events.map((e) => e.id)].sort((a, b) => a - b));
    expect(dispatcher.events.find((e) => e.kind === 'roster' && e.bookings?.includes(booking.id))).toBeDefined();

    const tech = await connect(base, cookies.techA!, String(from));
    expect(tech.events.length).toBeGreaterThan(0);
    expect(tech.events.every((e) => e.kind === 'day' && e.techId === f.inA.technician.id)).toBe(true);
    const other = await connect(base, cookies.otherTechA!, String(from));
    expect(other.events).toEqual([]);

    // Without Last-Event-ID: nothing from before, but the newest id, so a reconnect misses nothing.
    const fresh = await connect(base, cookies.dispatcherA!);
    expect(fresh.events).toEqual([]);
    expect(await maxId()).toBeGreaterThan(from);
  });

  it('after the stream drops, reconnecting with the last id it received sends what happened meanwhile', async () => {
    const first = await connect(base, cookies.dispatcherA!);
    expect(first.lastId).toBe(String(await maxId()));
    first.close();
    const booking = await bookInA(f.inA.technician.id, '2027-03-12T15:00:00Z');
    const again = await connect(base, cookies.dispatcherA!, first.lastId);
    const missed = again.events.find((e) => e.kind === 'roster' && e.bookings?.includes(booking.id));
    expect(missed?.by).toEqual({ id: f.inA.dispatcher.id, name: f.inA.dispatcher.name });
    expect(again.events.every((e) => e.id > Number(first.lastId))).toBe(true);
  });

  it('never sends another branch’s alarms or leak cases (with the rows they name) to a manager', async () => {
    const managerB = await connect(base, await cookieOf(t.app, f.inB.manager.email));
    const owner = await connect(base, cookies.owner!);
    const alarm = await request(t.app)
      .post('/api/alarms')
      .set('Cookie', cookies.managerA!)
      .send({ unitId: siteA.unit.id, code: 'LP-4', raisedAt: '2027-03-01T11:30:00Z' });
    expect(alarm.status, JSON.stringify(alarm.body)).toBe(201);
    await owner.until(
      () => owner.events.some((e) => e.kind === 'alarm' && e.branchId === f.a.id && e.units?.includes(siteA.unit.id)),
      'the owner hears A’s alarm and its unit',
    );
    // Then one in B: B's manager hears it, and nothing of A came before it.
    const alarmB = await request(t.app)
      .post('/api/alarms')
      .set('Cookie', cookies.dispatcherB!)
      .send({ unitId: siteB.unit.id, code: 'LP-4', raisedAt: '2027-03-01T11:30:00Z' });
    expect(alarmB.status, JSON.stringify(alarmB.body)).toBe(201);
    await managerB.until(() => managerB.events.some((e) => e.kind === 'alarm'), 'branch B’s alarm');
    expect(managerB.events.every((e) => e.branchId === f.b.id)).toBe(true);
    expect(managerB.events.find((e) => e.kind === 'alarm')).toMatchObject({ units: [siteB.unit.id], by: { id: f.inB.dispatcher.id } });
  });

  it('ends when its session is signed out, not when the person signs in elsewhere', async () => {
    const cookie = await cookieOf(t.app, f.inB.manager.email);
    const s = await connect(base, cookie);
    await cookieOf(t.app, f.inB.manager.email);
    const w = await makeWorkOrder(t.ctx.db, { branchId: f.b.id, siteId: siteB.site.id });
    await s.until(() => kinds(s).includes('roster'), 'an event after the other sign-in');
    expect(s.ended).toBe(false);
    expect(w.branchId).toBe(f.b.id);
    expect((await request(t.app).post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    await s.until(() => s.ended, 'the stream to end');
  });

  it('ends when the person’s role changes or they are deactivated (the screen reconnects with what it may see now)', async () => {
    const person = await makeUser(t.ctx.db, 'dispatcher', f.b.id);
    const a = await connect(base, await cookieOf(t.app, person.email));
    await t.ctx.db.execute(sql`update users set role = 'branch_manager' where id = ${person.id}`);
    await a.until(() => a.ended, 'the stream to end at the role change');
    const cookie = await cookieOf(t.app, person.email);
    const b = await connect(base, cookie);
    expect(b.status).toBe(200);
    await t.ctx.db.execute(sql`update users set active = false where id = ${person.id}`);
    await b.until(() => b.ended, 'the stream to end at the deactivation');
    expect((await connect(base, cookie)).status).toBe(401);
  });

  it('sends a keep-alive comment at the configured interval', async () => {
    const app = createApp({ ...t.ctx, config: { ...t.ctx.config, liveKeepAliveMs: 20 } });
    const s = await connect(await serve(app), cookies.dispatcherA!);
    await s.until(() => s.comments.filter((c) => c === 'keep-alive').length >= 2, 'two keep-alive comments');
    expect(s.events).toEqual([]);
  });

  it('prunes rows older than a day and keeps the rest', async () => {
    const [old] = await t.ctx.db
      .insert(liveEvents)
      .values({ branchId: f.a.id, kind: 'alarm', at: sql`now() - interval '25 hours'` as unknown as Date })
      .returning();
    const [recent] = await t.ctx.db
      .insert(liveEvents)
      .values({ branchId: f.a.id, kind: 'alarm', at: sql`now() - interval '23 hours'` as unknown as Date })
      .returning();
    expect(await pruneLiveEvents(t.ctx)).toBeGreaterThanOrEqual(1);
    const left = (await t.ctx.db.select({ id: liveEvents.id }).from(liveEvents)).map((r) => r.id);
    expect(left).not.toContain(old!.id);
    expect(left).toContain(recent!.id);
  });
});

describe('two API processes on one database', () => {
  // On PostgreSQL (DATABASE_URL set) the second app has its own pool and its own LISTEN connection; on the
  // embedded database one process owns the database, so the second app shares its database object.
  let second: Database | undefined;
  afterAll(() => second?.close());

  it('a change made through one reaches a screen connected to the other', async () => {
    let ctx2: AppContext = { ...t.ctx };
    if (t.ctx.database.kind === 'postgres') {
      const url = (t.ctx.database.pool as unknown as { options: { connectionString: string } }).options.connectionString;
      second = await openDatabase({ databaseUrl: url, migrate: false });
      ctx2 = { ...t.ctx, database: second, db: second.db };
    }
    const other = await serve(createApp(ctx2));
    const there = await connect(other, await cookieOf(createApp(ctx2), f.inA.dispatcher.email));
    const here = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
    const w = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id, unitId: siteA.unit.id, estimatedMinutes: 60 });
    const before = there.events.length;
    const res = await here.post('/api/bookings').send({ workOrderId: w.id, techId: f.inA.technician.id, startAt: '2027-03-11T15:00:00Z' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    await there.until(
      () => there.events.slice(before).some((e) => e.kind === 'roster' && e.bookings?.includes(res.body.booking.id)),
      'the booking made through the other process',
      3000,
    );
  });
});
