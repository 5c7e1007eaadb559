import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { auditEvents, bookings, visits, workOrders } from '../../db/schema';

/*
 * Branch A is in America/Chicago (CST = UTC−6 until the spring-forward night of 2027-03-14, then
 * CDT = UTC−5). Test technicians work Monday–Friday 07:00–15:30 local. Monday 2027-03-08:
 * 07:00 CST = 13:00Z, 15:30 CST = 21:30Z.
 */
let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let siteB: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let sam: Awaited<ReturnType<typeof makeUser>>;
let dispatcherA: Awaited<ReturnType<typeof signedInAgent>>;
let dispatcherB: Awaited<ReturnType<typeof signedInAgent>>;
let techA: string;

const job = (over: Omit<Partial<typeof workOrders.$inferInsert>, 'unitId'> = {}) =>
  makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id, unitId: siteA.unit.id, estimatedMinutes: 90, ...over });

async function book(agent: typeof dispatcherA, workOrderId: string, techId: string, startAt: string, extra: Record<string, unknown> = {}) {
  return agent.post('/api/bookings').send({ workOrderId, techId, startAt, ...extra });
}

beforeAll(async () => {
  t = await createTestApp({ now: '2027-03-01T12:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
  techA = f.inA.technician.id;
  sam = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Sam Ortiz', epa608Type: 'I', colorIndex: 3 });
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id);
  siteB = await makeSiteWithUnit(t.ctx.db, f.b.id);
  dispatcherA = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
  dispatcherB = await signedInAgent(t.app, f.inB.dispatcher.email, TEST_PASSWORD);
});
afterAll(() => t.close());

describe('POST /api/bookings', () => {
  it('books an unplaced job: the work order becomes booked and its visit is created in the same step', async () => {
    const w = await job();
    const res = await book(dispatcherA, w.id, techA, '2027-03-08T15:00:00Z');
    expect(res.status).toBe(201);
    const b = res.body.booking;
    expect(b).toMatchObject({
      workOrderId: w.id,
      techId: techA,
      startAt: '2027-03-08T15:00:00.000Z',
      endAt: '2027-03-08T16:30:00.000Z', // start + the 90-minute estimate
      version: 1,
      hoursOverride: false,
      workOrder: { number: w.number, kind: 'service_call', siteName: siteA.site.name, unitTag: siteA.unit.tag },
    });
    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, w.id));
    expect(wo!.state).toBe('booked');
    const [v] = await t.ctx.db.select().from(visits).where(eq(visits.bookingId, b.id));
    expect(v).toMatchObject({ techId: techA, workOrderId: w.id, branchId: f.a.id, enRouteAt: null });
    expect(b.visitId).toBe(v!.id);

    const again = await book(dispatcherA, w.id, techA, '2027-03-09T15:00:00Z');
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('not_unplaced');
  });

  it('refuses a technician without the EPA 608 certification the work needs, saying which', async () => {
    const w = await job({ requiredCertification: 'II' });
    const res = await book(dispatcherA, w.id, sam.id, '2027-03-09T15:00:00Z');
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('certification');
    expect(res.body.error.message).toContain('Sam Ortiz is not certified for this refrigerant work (needs EPA 608 Type II');
    expect(res.body.error.message).toContain('Pick another technician, or override the EPA 608 certification with a reason.');
    expect(res.body.error.details).toMatchObject({ rule: 'certification', rules: ['certification'] });
    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, w.id));
    expect(wo!.state).toBe('unplaced');
    // Universal covers Type II.
    expect((await book(dispatcherA, w.id, techA, '2027-03-09T15:00:00Z')).status).toBe(201);
  });

  it('refuses a booking outside the technician’s hours unless the dispatcher overrides with a reason (recorded)', async () => {
    const w = await job();
    // 15:00–16:30 CST runs past 15:30.
    const late = await book(dispatcherA, w.id, techA, '2027-03-10T21:00:00Z');
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('outside_hours');
    expect(late.body.error.message).toContain('works 07:00–15:30 on Wednesday, March 10');
    expect(late.body.error.message).toContain('runs 15:00–16:30');

    const sunday = await book(dispatcherA, w.id, techA, '2027-03-07T15:00:00Z');
    expect(sunday.status).toBe(409);
    expect(sunday.body.error.message).toContain('does not work on Sunday, March 7');

    const noReason = await book(dispatcherA, w.id, techA, '2027-03-10T21:00:00Z', { overrideHours: true });
    expect(noReason.status).toBe(400);

    const ok = await book(dispatcherA, w.id, techA, '2027-03-10T21:00:00Z', {
      overrideHours: true,
      overrideReason: 'Store closes at 17:00; customer asked',
    });
    expect(ok.status).toBe(201);
    expect(ok.body.booking).toMatchObject({ hoursOverride: true, overrideReason: 'Store closes at 17:00; customer asked' });
    const [row] = await t.ctx.db.select().from(bookings).where(eq(bookings.id, ok.body.booking.id));
    expect(row!.overrideById).toBe(f.inA.dispatcher.id);
    expect(ok.body.booking).toMatchObject({
      overrideRules: ['working_hours'],
      overrideBy: { id: f.inA.dispatcher.id, name: f.inA.dispatcher.name },
    });
    const audit = await t.ctx.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.entityId, ok.body.booking.id), eq(auditEvents.action, 'booking.override')));
    expect(audit).toHaveLength(1);
    expect(audit[0]!.actorId).toBe(f.inA.dispatcher.id);
    expect(audit[0]!.details).toMatchObject({ rules: ['working_hours'], reason: 'Store closes at 17:00; customer asked' });
  });

  it('refuses a booking overlapping another of the same technician, naming it', async () => {
    const first = await job();
    const second = await job();
    expect((await book(dispatcherA, first.id, techA, '2027-03-11T15:00:00Z')).status).toBe(201); // 09:00–10:30 CST
    const clash = await book(dispatcherA, second.id, techA, '2027-03-11T16:00:00Z');
    expect(clash.status).toBe(409);
    expect(clash.body.error.code).toBe('overlap');
    expect(clash.body.error.message).toContain(`already has WO-${first.number}`);
    expect(clash.body.error.message).toContain('from 09:00 to 10:30');
    // Back to back is fine.
    expect((await book(dispatcherA, second.id, techA, '2027-03-11T16:30:00Z')).status).toBe(201);
  });

  it('lets exactly one of two concurrent overlapping bookings of one technician through', async () => {
    const a = await job();
    const b = await job();
    const [r1, r2] = await Promise.all([
      book(dispatcherA, a.id, techA, '2027-03-12T15:00:00Z'),
      book(dispatcherA, b.id, techA, '2027-03-12T15:30:00Z'),
    ]);
    expect([r1.status, r2.status].sort()).toEqual([201, 409]);
    const loser = r1.status === 409 ? r1 : r2;
    expect(loser.body.error.code).toBe('overlap');
    const rows = await t.ctx.db.select().from(bookings).where(eq(bookings.techId, techA));
    const friday = rows.filter((r) => r.startAt.toISOString().startsWith('2027-03-12'));
    expect(friday).toHaveLength(1);
  });

  it('refuses a technician of another branch with 404 and another branch’s work order with 404', async () => {
    const w = await job();
    expect((await book(dispatcherA, w.id, f.inB.technician.id, '2027-03-09T18:00:00Z')).status).toBe(404);
    expect((await book(dispatcherB, w.id, f.inB.technician.id, '2027-03-09T18:00:00Z')).status).toBe(404);
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    const cross = await book(owner, w.id, f.inB.technician.id, '2027-03-09T18:00:00Z');
    expect(cross.status).toBe(409);
    expect(cross.body.error.code).toBe('other_branch');
  });

  it('refuses technicians with 403', async () => {
    const w = await job();
    const tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
    expect((await book(tech, w.id, techA, '2027-03-09T18:00:00Z')).status).toBe(403);
    expect((await tech.get('/api/bookings').query({ from: '2027-03-08T00:00:00Z', to: '2027-03-15T00:00:00Z' })).status).toBe(403);
    expect((await tech.get('/api/roster/load').query({ from: '2027-03-08', to: '2027-03-14' })).status).toBe(403);
    expect((await tech.post('/api/roster/suggest').send({ workOrderId: w.id, day: '2027-03-09' })).status).toBe(403);
    expect((await tech.post('/api/roster/even-out').send({ week: '2027-03-08' })).status).toBe(403);
  });
});

describe('PATCH /api/bookings/:id', () => {
  it('moves and reassigns with the current version; the visit follows the technician', async () => {
    const w = await job();
    const created = (await book(dispatcherA, w.id, techA, '2027-03-15T14:00:00Z')).body.booking; // Mon 09:00 CDT
    const moved = await dispatcherA.patch(`/api/bookings/${created.id}`).send({ version: 1, startAt: '2027-03-15T15:00:00Z' });
    expect(moved.status).toBe(200);
    expect(moved.body.booking).toMatchObject({ version: 2, startAt: '2027-03-15T15:00:00.000Z', endAt: '2027-03-15T16:30:00.000Z' });

    const other = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Kim Lee' });
    const reassigned = await dispatcherA.patch(`/api/bookings/${created.id}`).send({ version: 2, techId: other.id });
    expect(reassigned.status).toBe(200);
    expect(reassigned.body.booking).toMatchObject({ version: 3, techId: other.id });
    const [v] = await t.ctx.db.select().from(visits).where(eq(visits.bookingId, created.id));
    expect(v!.techId).toBe(other.id);

    const resized = await dispatcherA.patch(`/api/bookings/${created.id}`).send({ version: 3, endAt: '2027-03-15T17:00:00Z' });
    expect(resized.body.booking).toMatchObject({ version: 4, endAt: '2027-03-15T17:00:00.000Z' });
  });

  it('answers a stale version with 409 and the current booking', async () => {
    const w = await job();
    const created = (await book(dispatcherA, w.id, techA, '2027-03-16T14:00:00Z')).body.booking;
    await dispatcherA.patch(`/api/bookings/${created.id}`).send({ version: 1, startAt: '2027-03-16T15:00:00Z' });
    const stale = await dispatcherA.patch(`/api/bookings/${created.id}`).send({ version: 1, startAt: '2027-03-16T18:00:00Z' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale_version');
    expect(stale.body.error.message).toMatch(/moved by someone else/);
    expect(stale.body.error.details.current).toMatchObject({ id: created.id, version: 2, startAt: '2027-03-16T15:00:00.000Z' });
  });

  it('of two concurrent moves based on one version, exactly one wins and nothing is lost', async () => {
    const w = await job();
    const created = (await book(dispatcherA, w.id, techA, '2027-03-17T14:00:00Z')).body.booking;
    const other = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
    const [r1, r2] = await Promise.all([
      dispatcherA.patch(`/api/bookings/${created.id}`).send({ version: 1, startAt: '2027-03-17T15:00:00Z' }),
      other.patch(`/api/bookings/${created.id}`).send({ version: 1, startAt: '2027-03-17T18:00:00Z' }),
    ]);
    expect([r1.status, r2.status].sort()).toEqual([200, 409]);
    const winner = r1.status === 200 ? r1 : r2;
    const loser = r1.status === 200 ? r2 : r1;
    expect(loser.body.error.code).toBe('stale_version');
    expect(loser.body.error.details.current).toEqual(winner.body.booking);
    const [row] = await t.ctx.db.select().from(bookings).where(eq(bookings.id, created.id));
    expect(row!.version).toBe(2);
    expect(row!.startAt.toISOString()).toBe(winner.body.booking.startAt);
  });

  it('applies the rules to a move and leaves the booking as it was when refused', async () => {
    const a = await job();
    const b = await job();
    await book(dispatcherA, a.id, techA, '2027-03-18T14:00:00Z'); // 09:00–10:30 CDT
    const mine = (await book(dispatcherA, b.id, techA, '2027-03-18T17:00:00Z')).body.booking;
    const onto = await dispatcherA.patch(`/api/bookings/${mine.id}`).send({ version: 1, startAt: '2027-03-18T14:30:00Z' });
    expect(onto.status).toBe(409);
    expect(onto.body.error.code).toBe('overlap');
    const toSam = await (async () => {
      const w = await job({ requiredCertification: 'III' });
      const bk = (await book(dispatcherA, w.id, techA, '2027-03-18T19:00:00Z')).body.booking;
      return dispatcherA.patch(`/api/bookings/${bk.id}`).send({ version: 1, techId: sam.id });
    })();
    expect(toSam.status).toBe(409);
    expect(toSam.body.error.code).toBe('certification');
    const [row] = await t.ctx.db.select().from(bookings).where(eq(bookings.id, mine.id));
    expect(row!.version).toBe(1);
    expect(row!.startAt.toISOString()).toBe('2027-03-18T17:00:00.000Z');
  });

  it('answers another branch’s dispatcher with 404', async () => {
    const w = await job();
    const created = (await book(dispatcherA, w.id, techA, '2027-03-19T14:00:00Z')).body.booking;
    expect((await dispatcherB.patch(`/api/bookings/${created.id}`).send({ version: 1, startAt: '2027-03-19T15:00:00Z' })).status).toBe(404);
    expect((await dispatcherB.delete(`/api/bookings/${created.id}`)).status).toBe(404);
    expect(
      (await dispatcherB.get('/api/bookings').query({ branchId: f.a.id, from: '2027-03-15T00:00:00Z', to: '2027-03-22T00:00:00Z' })).status,
    ).toBe(404);
  });
});

describe('DELETE /api/bookings/:id', () => {
  it('unbooks: deletes the untouched visit and puts the work order back in the queue', async () => {
    const w = await job();
    const created = (await book(dispatcherA, w.id, techA, '2027-03-22T14:00:00Z')).body.booking;
    const res = await dispatcherA.delete(`/api/bookings/${created.id}`);
    expect(res.status).toBe(204);
    expect(await t.ctx.db.select().from(bookings).where(eq(bookings.id, created.id))).toHaveLength(0);
    expect(await t.ctx.db.select().from(visits).where(eq(visits.workOrderId, w.id))).toHaveLength(0);
    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, w.id));
    expect(wo!.state).toBe('unplaced');
  });

  it('refuses to unbook or move once the technician has set off', async () => {
    const w = await job();
    const created = (await book(dispatcherA, w.id, techA, '2027-03-23T14:00:00Z')).body.booking;
    await t.ctx.db
      .update(visits)
      .set({ enRouteAt: new Date('2027-03-23T13:40:00Z') })
      .where(eq(visits.bookingId, created.id));
    const del = await dispatcherA.delete(`/api/bookings/${created.id}`);
    expect(del.status).toBe(409);
    expect(del.body.error.code).toBe('visit_started');
    const move = await dispatcherA.patch(`/api/bookings/${created.id}`).send({ version: 1, startAt: '2027-03-23T15:00:00Z' });
    expect(move.status).toBe(409);
    expect(await t.ctx.db.select().from(bookings).where(eq(bookings.id, created.id))).toHaveLength(1);
  });
});

describe('GET /api/bookings and /api/roster/technicians', () => {
  it('lists the branch’s bookings in a range with what the calendar shows', async () => {
    const res = await dispatcherA.get('/api/bookings').query({ from: '2027-03-08T00:00:00Z', to: '2027-03-13T00:00:00Z' });
    expect(res.status).toBe(200);
    expect(res.body.bookings.length).toBeGreaterThan(0);
    for (const b of res.body.bookings) {
      expect(b.branchId).toBe(f.a.id);
      expect(b.startAt < '2027-03-13T00:00:00Z' && b.endAt > '2027-03-08T00:00:00Z').toBe(true);
      expect(b.workOrder.siteName).toBe(siteA.site.name);
    }
  });

  it('lists the branch’s technicians with colour, hours and certification; the owner must choose a branch', async () => {
    const res = await dispatcherA.get('/api/roster/technicians');
    expect(res.status).toBe(200);
    expect(res.body.timeZone).toBe('America/Chicago');
    const s = res.body.technicians.find((x: { id: string }) => x.id === sam.id);
    expect(s).toMatchObject({ name: 'Sam Ortiz', colorIndex: 3, epa608Type: 'I' });
    expect(s.workingHours.mon).toEqual({ start: '07:00', end: '15:30' });
    expect(res.body.technicians.some((x: { id: string }) => x.id === f.inB.technician.id)).toBe(false);
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    expect((await owner.get('/api/roster/technicians')).status).toBe(400);
    expect((await owner.get('/api/roster/technicians').query({ branchId: f.b.id })).status).toBe(200);
  });
});

describe('GET /api/roster/sites', () => {
  it('lists the branch’s sites with their units for the work-order form', async () => {
    const res = await dispatcherA.get('/api/roster/sites');
    expect(res.status).toBe(200);
    const s = res.body.sites.find((x: { id: string }) => x.id === siteA.site.id);
    expect(s.units).toEqual([{ id: siteA.unit.id, tag: siteA.unit.tag, make: 'Testmake', model: 'TM-10', refrigerant: 'R-410A' }]);
    expect(res.body.sites.some((x: { id: string }) => x.id === siteB.site.id)).toBe(false);
    expect((await dispatcherA.get('/api/roster/sites').query({ branchId: f.b.id })).status).toBe(404);
  });
});

describe('GET /api/roster/load', () => {
  it('reports booked minutes against working minutes per technician and day', async () => {
    const tech = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Load Tester' });
    const w1 = await job({ estimatedMinutes: 240 });
    const w2 = await job({ estimatedMinutes: 300 });
    expect((await book(dispatcherA, w1.id, tech.id, '2027-03-09T13:00:00Z')).status).toBe(201); // 07:00–11:00 CST
    expect(
      (await book(dispatcherA, w2.id, tech.id, '2027-03-09T17:00:00Z', { overrideHours: true, overrideReason: 'Emergency' })).status,
    ).toBe(201); // 11:00–16:00 CST, past 15:30
    const res = await dispatcherA.get('/api/roster/load').query({ from: '2027-03-08', to: '2027-03-14' });
    expect(res.status).toBe(200);
    const mine = res.body.load.filter((l: { techId: string }) => l.techId === tech.id);
    expect(mine).toHaveLength(7);
    const tue = mine.find((l: { day: string }) => l.day === '2027-03-09');
    expect(tue).toMatchObject({ bookedMinutes: 540, capacityMinutes: 510, overloaded: true });
    expect(mine.find((l: { day: string }) => l.day === '2027-03-08')).toMatchObject({
      bookedMinutes: 0,
      capacityMinutes: 510,
      overloaded: false,
    });
    expect(mine.find((l: { day: string }) => l.day === '2027-03-14')).toMatchObject({ capacityMinutes: 0, ratio: null });
  });

  it('counts a booking across the spring-forward night by real elapsed time on each local day', async () => {
    // Sat 2027-03-13 22:00 CST (04:00Z on the 14th) to Sun 03:30 CDT (08:30Z): 4 h 30 min of real time.
    const tech = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Night Shift' });
    const w = await job({ estimatedMinutes: 270, priority: 'emergency' });
    const res = await book(dispatcherA, w.id, tech.id, '2027-03-14T04:00:00Z', {
      overrideHours: true,
      overrideReason: 'Walk-in freezer down overnight',
    });
    expect(res.status).toBe(201);
    expect(res.body.booking.endAt).toBe('2027-03-14T08:30:00.000Z');
    const load = await dispatcherA.get('/api/roster/load').query({ from: '2027-03-13', to: '2027-03-14' });
    const mine = load.body.load.filter((l: { techId: string }) => l.techId === tech.id);
    // Saturday 22:00–24:00 = 120 min; Sunday 00:00 CST–03:30 CDT = 150 min (02:00–03:00 does not exist).
    expect(mine.find((l: { day: string }) => l.day === '2027-03-13').bookedMinutes).toBe(120);
    expect(mine.find((l: { day: string }) => l.day === '2027-03-14').bookedMinutes).toBe(150);
  });
});

describe('POST /api/roster/suggest', () => {
  it('ranks technicians with reasons and excludes one without the certification', async () => {
    const w = await job({ requiredCertification: 'II', estimatedMinutes: 60 });
    const res = await dispatcherA.post('/api/roster/suggest').send({ workOrderId: w.id, day: '2027-03-24' });
    expect(res.status).toBe(200);
    const c = res.body.candidates as { techId: string; eligible: boolean; reasons: string[]; proposedStart: string | null }[];
    const samC = c.find((x) => x.techId === sam.id)!;
    expect(samC.eligible).toBe(false);
    expect(samC.reasons.join(' ')).toMatch(/Type I does not cover the Type II/);
    const best = c[0]!;
    expect(best.eligible).toBe(true);
    expect(best.proposedStart).not.toBeNull();
    // One click books the proposal.
    const booked = await book(dispatcherA, w.id, best.techId, best.proposedStart!);
    expect(booked.status).toBe(201);
  });

  it('answers another branch’s work order with 404', async () => {
    const w = await job();
    expect((await dispatcherB.post('/api/roster/suggest').send({ workOrderId: w.id, day: '2027-03-24' })).status).toBe(404);
  });
});

describe('POST /api/roster/even-out', () => {
  it('proposes bookings for the week’s unplaced work, and applying them books all or none', async () => {
    // A branch of its own, so the queue holds only this test's work.
    const branch = await (await import('../../testing/fixtures')).makeBranch(t.ctx.db, { timeZone: 'America/Chicago' });
    const site = await makeSiteWithUnit(t.ctx.db, branch.id);
    const t1 = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Ana' });
    const t2 = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Ben' });
    const disp = await makeUser(t.ctx.db, 'dispatcher', branch.id);
    const agent = await signedInAgent(t.app, disp.email, TEST_PASSWORD);
    const jobs = await Promise.all(
      [1, 2, 3, 4].map(() => makeWorkOrder(t.ctx.db, { branchId: branch.id, siteId: site.site.id, estimatedMinutes: 120 })),
    );
    const preview = await agent.post('/api/roster/even-out').send({ week: '2027-03-10' });
    expect(preview.status).toBe(200);
    expect(preview.body.week).toEqual({ from: '2027-03-08', to: '2027-03-14' });
    expect(preview.body.proposals).toHaveLength(4);
    const load = preview.body.load as { techId: string; beforeMinutes: number; afterMinutes: number }[];
    expect(load.map((l) => l.techId).sort()).toEqual([t1.id, t2.id].sort());
    expect(load.reduce((s, l) => s + l.afterMinutes - l.beforeMinutes, 0)).toBe(480);
    expect(preview.body.driveMinutes.after).toBeGreaterThan(preview.body.driveMinutes.before);

    // A proposal that no longer fits (someone booked the slot meanwhile) refuses the whole set.
    const [p1, p2] = preview.body.proposals as { workOrderId: string; techId: string; startAt: string; endAt: string }[];
    const intruder = await makeWorkOrder(t.ctx.db, { branchId: branch.id, siteId: site.site.id, estimatedMinutes: 120 });
    expect((await book(agent, intruder.id, p2!.techId, p2!.startAt)).status).toBe(201);
    const pick = (p: { workOrderId: string; techId: string; startAt: string; endAt: string }) => ({
      workOrderId: p.workOrderId,
      techId: p.techId,
      startAt: p.startAt,
      endAt: p.endAt,
    });
    const refused = await agent.post('/api/roster/even-out/apply').send({ proposals: [pick(p1!), pick(p2!)] });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain('Nothing was changed');
    const [still] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, p1!.workOrderId));
    expect(still!.state).toBe('unplaced');

    const applied = await agent.post('/api/roster/even-out/apply').send({ proposals: [pick(p1!)] });
    expect(applied.status).toBe(200);
    expect(applied.body.bookings).toHaveLength(1);
    expect(jobs.map((j) => j.id)).toContain(applied.body.bookings[0].workOrderId);
  });
});

describe('even out moves booked work', () => {
  it('proposes moving booked, not started, not fixed jobs to even the load, within their rules; applies them with a version check', async () => {
    const { makeBranch } = await import('../../testing/fixtures');
    const branch = await makeBranch(t.ctx.db, { timeZone: 'America/Chicago' });
    const site = await makeSiteWithUnit(t.ctx.db, branch.id);
    const cal = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Cal', skills: ['chillers'] });
    await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Dee', skills: [] });
    const disp = await makeUser(t.ctx.db, 'dispatcher', branch.id);
    const agent = await signedInAgent(t.app, disp.email, TEST_PASSWORD);
    // Wednesday 10 March 2027 (CST): Cal has four 2-hour jobs from 07:00, Dee nothing all week.
    const starts = ['13:00', '15:00', '17:00', '19:00'].map((hm) => `2027-03-10T${hm}:00Z`);
    const jobs = await Promise.all(
      starts.map(() => makeWorkOrder(t.ctx.db, { branchId: branch.id, siteId: site.site.id, estimatedMinutes: 120 })),
    );
    // The first needs a skill only Cal has; the second is fixed; the third is due by 13:00 CST that day.
    await t.ctx.db.update(workOrders).set({ requiredSkill: 'chillers' }).where(eq(workOrders.id, jobs[0]!.id));
    await t.ctx.db
      .update(workOrders)
      .set({ latestAt: new Date('2027-03-10T19:00:00Z') })
      .where(eq(workOrders.id, jobs[2]!.id));
    const booked: { id: string; version: number; workOrderId: string }[] = [];
    for (const [i, w] of jobs.entries()) {
      const res = await book(agent, w.id, cal.id, starts[i]!, i === 1 ? { fixed: true } : {});
      expect(res.status).toBe(201);
      booked.push(res.body.booking);
    }

    const preview = await agent.post('/api/roster/even-out').send({ week: '2027-03-10' });
    expect(preview.status).toBe(200);
    type Move = {
      bookingId: string;
      version: number;
      workOrderId: string;
      dueAt: string | null;
      from: { techId: string };
      to: { techId: string; startAt: string; endAt: string };
    };
    const moves = preview.body.moves as Move[];
    expect(moves.length).toBeGreaterThan(0);
    // Never the fixed one; the chillers job never to Dee; nothing ends after its due time.
    expect(moves.map((m) => m.bookingId)).not.toContain(booked[1]!.id);
    expect(moves.find((m) => m.bookingId === booked[0]!.id)?.to.techId ?? cal.id).toBe(cal.id);
    for (const m of moves) if (m.dueAt) expect(Date.parse(m.to.endAt)).toBeLessThanOrEqual(Date.parse(m.dueAt));
    // Sorted by due time, those without one last.
    const dues = moves.map((m) => m.dueAt ?? '\uffff');
    expect([...dues].sort()).toEqual(dues);
    expect(preview.body.spread.after).toBeLessThan(preview.body.spread.before);

    // A stale version (someone moved it meanwhile) refuses the whole set and changes nothing.
    const accept = (m: Move, version = m.version) => ({
      bookingId: m.bookingId,
      version,
      techId: m.to.techId,
      startAt: m.to.startAt,
      endAt: m.to.endAt,
    });
    const stale = await agent
      .post('/api/roster/even-out/apply')
      .send({ moves: moves.map((m, i) => accept(m, i === moves.length - 1 ? m.version + 5 : m.version)) });
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toContain('Nothing was changed');
    const unchanged = await t.ctx.db.select().from(bookings).where(eq(bookings.techId, cal.id));
    expect(unchanged).toHaveLength(4);

    const applied = await agent.post('/api/roster/even-out/apply').send({ moves: moves.map((m) => accept(m)) });
    expect(applied.status).toBe(200);
    for (const m of moves) {
      const [b] = await t.ctx.db.select().from(bookings).where(eq(bookings.id, m.bookingId));
      expect([b!.techId, b!.startAt.toISOString()]).toEqual([m.to.techId, new Date(m.to.startAt).toISOString()]);
    }
    // Nothing to apply is a clear 400.
    const empty = await agent.post('/api/roster/even-out/apply').send({});
    expect(empty.status).toBe(400);
  });
});
