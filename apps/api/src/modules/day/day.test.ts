import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import ICAL from 'ical.js';
import { eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, TEST_PASSWORD } from '../../testing/fixtures';
import { sql } from 'drizzle-orm';
import { sites, units, users, workOrders } from '../../db/schema';
import { makeBookedVisit } from '../visits/visits.fixtures';
import { nextWorkingDate } from './day.service';

// 23:00 on 10 March in Chicago (CDT, UTC−5) is already 11 March in UTC.
const NOW = '2026-03-11T04:00:00Z';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let tech: Agent, manager: Agent;
const ids: Record<string, string> = {};

beforeAll(async () => {
  t = await createTestApp({ now: NOW });
  f = await makeTwoBranches(t.ctx.db);
  const db = t.ctx.db;
  const techId = f.inA.technician.id; // starts at 41.88, -87.63; works 07:00–15:30
  const near = await makeSiteWithUnit(db, f.a.id);
  await db
    .update(sites)
    .set({ lat: 41.89, lon: -87.64, accessNotes: 'Roof hatch key at the front desk' })
    .where(eq(sites.id, near.site.id));
  const far = await makeSiteWithUnit(db, f.a.id);
  await db.update(sites).set({ lat: 42.05, lon: -87.9 }).where(eq(sites.id, far.site.id));
  const wide = await makeSiteWithUnit(db, f.a.id);
  await db.update(sites).set({ lat: 41.8, lon: -87.6 }).where(eq(sites.id, wide.site.id));
  await db.insert(units).values({
    branchId: f.a.id,
    siteId: wide.site.id,
    tag: 'WIC-1',
    kind: 'walk_in_cooler',
    make: 'Testmake',
    model: 'W1',
    serial: 'W-1',
    refrigerant: 'R-448A',
    fullChargeLb: 30,
    applianceCategory: 'commercial_refrigeration',
  });

  // The far site has a fixed 08:00 appointment; the near one a fixed 13:00: windows decide the order.
  const a = await makeBookedVisit(db, {
    branchId: f.a.id,
    siteId: near.site.id,
    unitId: near.unit.id,
    techId,
    startAt: '2026-03-10T18:00:00Z',
    fixed: true,
    minutes: 60,
  });
  const b = await makeBookedVisit(db, {
    branchId: f.a.id,
    siteId: far.site.id,
    unitId: far.unit.id,
    techId,
    startAt: '2026-03-10T13:00:00Z',
    fixed: true,
    minutes: 60,
  });
  const c = await makeBookedVisit(db, {
    branchId: f.a.id,
    siteId: wide.site.id,
    unitId: null,
    techId,
    startAt: '2026-03-10T15:30:00Z',
    minutes: 90,
    workOrder: { kind: 'planned_maintenance' },
  });
  ids.near = a.visit.id;
  ids.nearWorkOrder = a.workOrder.id;
  ids.nearSite = near.site.id;
  ids.far = b.visit.id;
  ids.wide = c.visit.id;
  // Not on the day: a cancelled job, tomorrow's job, another technician's job.
  const x = await makeBookedVisit(db, {
    branchId: f.a.id,
    siteId: near.site.id,
    unitId: near.unit.id,
    techId,
    startAt: '2026-03-10T16:00:00Z',
  });
  await db.update(workOrders).set({ state: 'cancelled' }).where(eq(workOrders.id, x.workOrder.id));
  await makeBookedVisit(db, { branchId: f.a.id, siteId: near.site.id, unitId: near.unit.id, techId, startAt: '2026-03-11T14:00:00Z' });
  const other = await makeUser(db, 'technician', f.a.id);
  await makeBookedVisit(db, {
    branchId: f.a.id,
    siteId: near.site.id,
    unitId: near.unit.id,
    techId: other.id,
    startAt: '2026-03-10T14:00:00Z',
  });

  tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
  manager = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
});
afterAll(() => t.close());

describe('GET /api/day', () => {
  it('defaults to today in the branch’s time zone and lists the day’s stops with site, access notes and units', async () => {
    const res = await tech.get('/api/day');
    expect(res.status).toBe(200);
    expect(res.body.date).toBe('2026-03-10');
    expect(res.body.timeZone).toBe('America/Chicago');
    expect(res.body.stops.map((s: { visitId: string }) => s.visitId).sort()).toEqual([ids.near, ids.far, ids.wide].sort());
    const near = res.body.stops.find((s: { visitId: string }) => s.visitId === ids.near);
    expect(near.site.accessNotes).toBe('Roof hatch key at the front desk');
    expect(near.units).toHaveLength(1);
    expect(near.status).toBe('booked');
    const wide = res.body.stops.find((s: { visitId: string }) => s.visitId === ids.wide);
    expect(wide.units.map((u: { tag: string }) => u.tag).sort()).toHaveLength(2); // site-wide job: every unit at the site
    expect(res.body.calendarFeed).toEqual({ active: false, url: null });
  });

  it('orders the route with appointment windows respected and gives arrival estimates and drive minutes', async () => {
    const res = await tech.get('/api/day?date=2026-03-10');
    const route = res.body.route;
    // Working hours start 07:00 local = 12:00Z.
    expect(route.dayStart).toBe('2026-03-10T12:00:00.000Z');
    expect(route.order).toHaveLength(3);
    expect(route.order.indexOf(ids.far)).toBeLessThan(route.order.indexOf(ids.near));
    expect(route.lateStops).toEqual([]);
    const far = route.arrivals.find((a: { id: string }) => a.id === ids.far);
    // The 08:00 window opens 60 minutes after the day starts: the technician waits for it or is on time.
    expect(far.arrive + far.waitMinutes).toBeGreaterThanOrEqual(60);
    expect(Math.abs(new Date(far.arriveAt).getTime() - (new Date(route.dayStart).getTime() + far.arrive * 60_000))).toBeLessThan(1);
    const legs = route.arrivals.reduce((s: number, a: { legMinutes: number }) => s + a.legMinutes, 0);
    // Each leg is the arrival minus the previous departure; the legs add up to the route's drive minutes.
    expect(legs).toBeCloseTo(route.driveMinutes, 6);
    expect(route.driveMinutes).toBeGreaterThan(0);
  });

  it('names the next working day: the technician’s next weekday with hours, Monday to Friday without any', async () => {
    // 2026-03-13 is a Friday and 2026-03-16 the Monday after (the Gregorian calendar, e.g. `cal 3 2026`).
    expect((await tech.get('/api/day?date=2026-03-13')).body.nextWorkingDate).toBe('2026-03-16');
    expect((await tech.get('/api/day?date=2026-03-10')).body.nextWorkingDate).toBe('2026-03-11');
    expect(nextWorkingDate('2026-03-13', null)).toBe('2026-03-16');
    const hours = { sun: null, mon: null, tue: null, wed: null, thu: null, fri: null, sat: { start: '08:00', end: '12:00' } };
    expect(nextWorkingDate('2026-03-10', hours)).toBe('2026-03-14');
  });

  it('answers an empty day honestly and refuses a bad date', async () => {
    const res = await tech.get('/api/day?date=2026-03-14');
    expect(res.status).toBe(200);
    expect(res.body.stops).toEqual([]);
    expect(res.body.route.order).toEqual([]);
    expect((await tech.get('/api/day?date=2026-02-30')).status).toBe(400);
  });

  it('is for technicians only', async () => {
    expect((await manager.get('/api/day')).status).toBe(403);
    expect((await request(t.app).get('/api/day')).status).toBe(401);
  });
});

describe('GET /api/day, kept while the roster revision stands', () => {
  const nearName = async () =>
    ((await tech.get('/api/day?date=2026-03-10')).body.stops as { visitId: string; site: { name: string } }[]).find(
      (s) => s.visitId === ids.near,
    )!.site.name;

  it('is reused until a change the day is made of commits, and then answers afresh', async () => {
    const before = await nearName();
    // A rename that raises no revision (the trigger switched off for the moment) is not seen: the day was kept.
    await t.ctx.db.execute(sql`ALTER TABLE sites DISABLE TRIGGER roster_revision`);
    try {
      await t.ctx.db.update(sites).set({ name: 'Renamed quietly' }).where(eq(sites.id, ids.nearSite!));
    } finally {
      await t.ctx.db.execute(sql`ALTER TABLE sites ENABLE TRIGGER roster_revision`);
    }
    expect(await nearName()).toBe(before);
    // A change that raises the revision (the same site, renamed again) is seen at once.
    await t.ctx.db.update(sites).set({ name: 'Renamed openly' }).where(eq(sites.id, ids.nearSite!));
    expect(await nearName()).toBe('Renamed openly');
    // The technician's own change of state on a stop is seen at once.
    expect((await tech.patch(`/api/visits/${ids.near}`).send({ state: 'en_route' })).status).toBe(200);
    const day = (await tech.get('/api/day?date=2026-03-10')).body as { stops: { visitId: string; status: string }[] };
    expect(day.stops.find((s) => s.visitId === ids.near)!.status).toBe('en_route');
  });

  it('words the start address and the calendar feed as they are now, though neither raises the revision', async () => {
    await tech.get('/api/day?date=2026-03-10');
    await t.ctx.db.update(users).set({ startAddress: '12 Depot Lane' }).where(eq(users.id, f.inA.technician.id));
    const res = await tech.get('/api/day?date=2026-03-10');
    expect(res.body.route.start.label).toBe('12 Depot Lane');
    expect(res.body.calendarFeed.active).toBe(false);
    expect((await tech.post('/api/calendar/token')).status).toBe(201);
    expect((await tech.get('/api/day?date=2026-03-10')).body.calendarFeed.active).toBe(true);
    expect((await tech.delete('/api/calendar/token')).status).toBe(204);
  });
});

describe('calendar feed', () => {
  it('creates a private feed URL that a phone can read without a session', async () => {
    const made = await tech.post('/api/calendar/token');
    expect(made.status).toBe(201);
    const url = new URL(made.body.url);
    expect(url.pathname).toMatch(/^\/api\/calendar\/[A-Za-z0-9_-]{32}\.ics$/);
    const feed = await request(t.app).get(url.pathname);
    expect(feed.status).toBe(200);
    expect(feed.headers['content-type']).toMatch(/^text\/calendar/);
    const text = feed.text.replace(/\r\n[ \t]/g, '');
    expect(text).toContain('BEGIN:VCALENDAR');
    expect(text.match(/BEGIN:VEVENT/g)).toHaveLength(4); // three today and tomorrow's; not the cancelled one
    // RFC 5545 DATE-TIME in UTC for the 08:00 Chicago appointment.
    expect(text).toContain('DTSTART:20260310T130000Z');
    expect(text).toContain('Roof hatch key at the front desk');
    expect((await tech.get('/api/day')).body.calendarFeed).toEqual({ active: true, url: made.body.url });
  });

  it('folds a description full of multi-byte characters at 75 octets; a calendar parser reads it back as written', async () => {
    const complaint = `Máy nén quá nhiệt — Nguyễn Thị Hương báo lỗi E4 lúc 09:15; Łukasz Żółć: "sprężarka ≥ 2 razy" → ${'ệ€🧊'.repeat(30)}`;
    await t.ctx.db.update(workOrders).set({ complaint }).where(eq(workOrders.id, ids.nearWorkOrder!));
    await t.ctx.db.update(sites).set({ name: 'Żabka Śródmieście, Hà Nội' }).where(eq(sites.id, ids.nearSite!));
    const url = new URL((await tech.post('/api/calendar/token')).body.url);
    const feed = await request(t.app).get(url.pathname).buffer(true);
    expect(feed.status).toBe(200);
    const raw: string = feed.text;
    expect(raw.endsWith('\r\n')).toBe(true);
    const encoder = new TextEncoder();
    for (const line of raw.slice(0, -2).split('\r\n')) {
      expect(line).not.toMatch(/[\r\n]/);
      expect(encoder.encode(line).length, line).toBeLessThanOrEqual(75);
    }
    const cal = new ICAL.Component(ICAL.parse(raw));
    const events = cal.getAllSubcomponents('vevent').map((v) => new ICAL.Event(v));
    const near = events.find((e) => e.description?.startsWith(complaint));
    expect(near, 'the near booking').toBeDefined();
    expect(near!.description).toBe(`${complaint}\nAccess: Roof hatch key at the front desk`);
    expect(near!.summary).toMatch(/^WO-\d+ .+: Żabka Śródmieście, Hà Nội$/);
    expect(near!.startDate.toJSDate().toISOString()).toBe('2026-03-10T18:00:00.000Z');
  });

  it('rotating ends the old URL and revoking ends the feed', async () => {
    const first = new URL((await tech.post('/api/calendar/token')).body.url).pathname;
    const second = new URL((await tech.post('/api/calendar/token')).body.url).pathname;
    expect(second).not.toBe(first);
    expect((await request(t.app).get(first)).status).toBe(404);
    expect((await request(t.app).get(second)).status).toBe(200);
    expect((await tech.delete('/api/calendar/token')).status).toBe(204);
    expect((await request(t.app).get(second)).status).toBe(404);
    expect((await request(t.app).get('/api/calendar/not-a-token.ics')).status).toBe(404);
  });

  it('lets only a signed-in technician manage their own feed', async () => {
    expect((await request(t.app).post('/api/calendar/token')).status).toBe(401);
    expect((await manager.post('/api/calendar/token')).status).toBe(403);
  });
});
