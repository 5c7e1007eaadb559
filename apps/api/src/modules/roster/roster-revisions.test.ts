/**
 * The Roster's cached week reads: roster_revisions (migration 0004) rises at commit for every change the
 * Roster shows, and a read is reused only while its branch's revision stands — also across API processes.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { createApp } from '../../app';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { sites, units, users, workOrders } from '../../db/schema';
import { createRevisionCache, rosterRevision } from '../../lib/revision-cache';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;

beforeAll(async () => {
  t = await createTestApp({ now: '2027-03-01T12:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id);
});
afterAll(() => t.close());

const revisions = async () => ({ a: await rosterRevision(t.ctx.db, f.a.id), b: await rosterRevision(t.ctx.db, f.b.id) });

describe('roster_revisions', () => {
  it('rises once per committed transaction that changes the branch’s roster, and only for that branch', async () => {
    const before = await revisions();
    await t.ctx.db.transaction(async (tx) => {
      await makeWorkOrder(tx, { branchId: f.a.id, siteId: siteA.site.id });
      await makeWorkOrder(tx, { branchId: f.a.id, siteId: siteA.site.id });
      await tx.update(sites).set({ name: 'Renamed in the same transaction' }).where(eq(sites.id, siteA.site.id));
    });
    expect(await revisions()).toEqual({ a: before.a + 1, b: before.b });

    await t.ctx.db.update(units).set({ tag: 'RTU-9' }).where(eq(units.id, siteA.unit.id));
    expect((await revisions()).a).toBe(before.a + 2);
  });

  it('does not rise for a rolled-back change or a technician’s sign-in, and rises when their working hours change', async () => {
    const before = await revisions();
    await expect(
      t.ctx.db.transaction(async (tx) => {
        await makeWorkOrder(tx, { branchId: f.a.id, siteId: siteA.site.id });
        throw new Error('changed my mind');
      }),
    ).rejects.toThrow('changed my mind');
    await t.ctx.db
      .update(users)
      .set({ lastSignInAt: new Date('2027-03-01T12:00:00Z') })
      .where(eq(users.id, f.inA.technician.id));
    expect(await revisions()).toEqual(before);

    await t.ctx.db.update(users).set({ workingHours: null }).where(eq(users.id, f.inA.technician.id));
    expect(await revisions()).toEqual({ a: before.a + 1, b: before.b });
  });

  it('rises for both branches when a work order moves between them', async () => {
    const w = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id });
    const before = await revisions();
    await t.ctx.db.update(workOrders).set({ branchId: f.b.id }).where(eq(workOrders.id, w.id));
    expect(await revisions()).toEqual({ a: before.a + 1, b: before.b + 1 });
  });
});

describe.runIf(!process.env.DATABASE_URL)('the embedded database’s change notices (migration 0006)', () => {
  it('raise the in-memory revision by the time the commit returns, and not for a rollback', async () => {
    const local = t.ctx.database.local!;
    const before = local.rosterRevision(f.a.id);
    await t.ctx.db.update(sites).set({ name: 'Noticed at once' }).where(eq(sites.id, siteA.site.id));
    expect(local.rosterRevision(f.a.id)).toBe(before + 1);
    await t.ctx.db.transaction(async (tx) => {
      await tx.update(sites).set({ name: 'First' }).where(eq(sites.id, siteA.site.id));
      await tx.update(units).set({ tag: 'RTU-8' }).where(eq(units.id, siteA.unit.id));
    });
    expect(local.rosterRevision(f.a.id)).toBe(before + 2);
    await expect(
      t.ctx.db.transaction(async (tx) => {
        await tx.update(sites).set({ name: 'Never' }).where(eq(sites.id, siteA.site.id));
        throw new Error('rolled back');
      }),
    ).rejects.toThrow('rolled back');
    expect(local.rosterRevision(f.a.id)).toBe(before + 2);
  });
});

describe('createRevisionCache', () => {
  it('computes once per revision, shares a computation asked for at once, and recomputes after a change', async () => {
    const cache = createRevisionCache(2);
    let computed = 0;
    const compute = async () => ({ n: ++computed });
    const first = await cache.read(t.ctx.database, f.a.id, 'week 1', compute);
    expect(await cache.read(t.ctx.database, f.a.id, 'week 1', compute)).toBe(first);
    expect(computed).toBe(1);

    await t.ctx.db.update(sites).set({ name: 'Renamed again' }).where(eq(sites.id, siteA.site.id));
    const [x, y] = await Promise.all([
      cache.read(t.ctx.database, f.a.id, 'week 1', compute),
      cache.read(t.ctx.database, f.a.id, 'week 1', compute),
    ]);
    expect(x).toBe(y);
    expect(x).toEqual({ n: 2 });
    expect(computed).toBe(2);

    // Another branch's change leaves branch A's entry standing.
    await t.ctx.db.update(sites).set({ name: 'Elsewhere' }).where(eq(sites.branchId, f.b.id));
    expect(await cache.read(t.ctx.database, f.a.id, 'week 1', compute)).toBe(x);

    // At most two entries: the least recently used goes.
    await cache.read(t.ctx.database, f.a.id, 'week 2', compute);
    await cache.read(t.ctx.database, f.a.id, 'week 3', compute);
    expect(cache.size).toBe(2);
    expect(computed).toBe(4);
    await cache.read(t.ctx.database, f.a.id, 'week 1', compute);
    expect(computed).toBe(5);
  });

  it('keeps nothing when the computation fails', async () => {
    const cache = createRevisionCache();
    await expect(cache.read(t.ctx.database, f.a.id, 'bad', () => Promise.reject(new Error('no such week')))).rejects.toThrow(
      'no such week',
    );
    expect(cache.size).toBe(0);
    expect(await cache.read(t.ctx.database, f.a.id, 'bad', async () => 'fine now')).toBe('fine now');
  });
});

describe('the Roster week across two API processes on one database', () => {
  it('shows each process the other’s bookings and renames on its next read', async () => {
    // A second API process: its own routers and caches, the same database.
    const other = createApp({ ...t.ctx });
    const site = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const tech = await makeUser(t.ctx.db, 'technician', f.a.id);
    const w = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: site.site.id, unitId: site.unit.id, estimatedMinutes: 60 });
    const here = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
    const there = await signedInAgent(other, f.inA.dispatcher.email, TEST_PASSWORD);
    const week = { from: '2027-03-08T06:00:00.000Z', to: '2027-03-15T05:00:00.000Z' };
    const loadWeek = { from: '2027-03-08', to: '2027-03-14' };
    const techMonday = (res: { body: { load: { techId: string; day: string; bookedMinutes: number }[] } }) =>
      res.body.load.find((l) => l.techId === tech.id && l.day === '2027-03-08')?.bookedMinutes;

    const ids = async () =>
      ((await there.get('/api/bookings').query(week)).body.bookings as { workOrderId: string }[]).map((b) => b.workOrderId);
    expect(await ids()).not.toContain(w.id);
    expect(techMonday(await there.get('/api/roster/load').query(loadWeek))).toBe(0);

    const booked = await here.post('/api/bookings').send({ workOrderId: w.id, techId: tech.id, startAt: '2027-03-08T15:00:00Z' });
    expect(booked.status).toBe(201);
    expect(await ids()).toContain(w.id);
    expect(techMonday(await there.get('/api/roster/load').query(loadWeek))).toBe(60);

    // A client holding the week it was sent gets 304 until the week changes.
    const held = await there.get('/api/bookings').query(week);
    expect(held.headers['content-type']).toMatch(/^application\/json/);
    expect((await there.get('/api/bookings').query(week).set('If-None-Match', held.headers.etag!)).status).toBe(304);
    expect((await here.get('/api/bookings').query(week).set('If-None-Match', held.headers.etag!)).status).toBe(304);

    // A change written by neither API (another process, a migration, an administrator's SQL) shows too.
    await t.ctx.db.update(sites).set({ name: 'Harbour Point Annex' }).where(eq(sites.id, site.site.id));
    const after = (await there.get('/api/bookings').query(week)).body.bookings as {
      workOrderId: string;
      workOrder: { siteName: string };
    }[];
    expect(after.find((b) => b.workOrderId === w.id)?.workOrder.siteName).toBe('Harbour Point Annex');
    expect((await there.get('/api/bookings').query(week).set('If-None-Match', held.headers.etag!)).status).toBe(200);

    expect((await here.delete(`/api/bookings/${booked.body.booking.id}`)).status).toBe(204);
    expect(await ids()).not.toContain(w.id);
    expect(techMonday(await there.get('/api/roster/load').query(loadWeek))).toBe(0);
  });
});
