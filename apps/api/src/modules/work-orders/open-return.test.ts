/**
 * One open return visit per unit: a leak case's repair visit and a close-out's return share one
 * truck roll, the database refuses a second open return on a unit, and racing requests make exactly one.
 * On PGlite the transactions of parallel requests take turns; the PostgreSQL pass of `.ci/run`
 * (`DATABASE_URL`) runs the same races for real, where the unique index decides.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, notInArray } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { bookings, leakCases, visits, workOrders } from '../../db/schema';
import { makeBookedVisit, NOT_AVAILABLE } from '../visits/visits.fixtures';
import { OPEN_RETURN_INDEX } from '../../db/schema';

/** 2026-12-15 09:00 in Chicago (branch A, UTC−6 in December). */
const NOW = '2026-12-15T15:00:00.000Z';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let mgr: Agent, tech: Agent, disp: Agent;

beforeAll(async () => {
  t = await createTestApp({ now: NOW });
  f = await makeTwoBranches(t.ctx.db);
  const sign = (email: string) => signedInAgent(t.app, email, TEST_PASSWORD);
  [mgr, tech, disp] = await Promise.all([sign(f.inA.manager.email), sign(f.inA.technician.email), sign(f.inA.dispatcher.email)]);
});
afterAll(() => t.close());

/** A unit of branch A (40 lb: the leak rules apply, EPA 608 Type II). */
const newUnit = () => makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { fullChargeLb: 40 } });
type Place = Awaited<ReturnType<typeof newUnit>>;

/** A visit of branch A's technician on the unit, already on site (as the Visit screen's buttons leave it). */
async function onSiteVisit(p: Place, workOrder: Partial<typeof workOrders.$inferInsert> = {}) {
  const b = await makeBookedVisit(t.ctx.db, {
    branchId: f.a.id,
    siteId: p.site.id,
    unitId: p.unit.id,
    techId: f.inA.technician.id,
    startAt: '2026-12-15T14:00:00Z',
    workOrder: { state: 'on_site', ...workOrder },
  });
  await t.ctx.db
    .update(visits)
    .set({ enRouteAt: new Date('2026-12-15T13:40:00Z'), onSiteAt: new Date('2026-12-15T14:05:00Z') })
    .where(eq(visits.id, b.visit.id));
  return b;
}

/** An open leak case on the unit, repair due on `repairDueDate`. */
async function leakCase(p: Place, repairDueDate = '2026-12-20') {
  const [c] = await t.ctx.db
    .insert(leakCases)
    .values({
      branchId: f.a.id,
      unitId: p.unit.id,
      openedOn: '2026-11-20',
      rule: '40 CFR 84.106',
      method: 'annualizing',
      thresholdPercent: 10,
      leakRatePercent: 36.5,
      repairDueDate,
    })
    .returning();
  return c!;
}

const closeNeedingReturn = (visitId: string, returnNeeds: string[], returnNotes?: string) =>
  tech
    .post(`/api/visits/${visitId}/close`)
    .send({ signature: NOT_AVAILABLE, outcome: 'needs_return', returnNeeds, ...(returnNotes ? { returnNotes } : {}) });

/** The unit's return visits that are still open. */
const openReturns = (p: Place) =>
  t.ctx.db
    .select()
    .from(workOrders)
    .where(
      and(eq(workOrders.unitId, p.unit.id), eq(workOrders.kind, 'return_visit'), notInArray(workOrders.state, ['closed', 'cancelled'])),
    );
const returnsOf = (p: Place) =>
  t.ctx.db
    .select()
    .from(workOrders)
    .where(and(eq(workOrders.unitId, p.unit.id), eq(workOrders.kind, 'return_visit')));
const caseRow = async (id: string) => (await t.ctx.db.select().from(leakCases).where(eq(leakCases.id, id)))[0]!;

/** The end of 2026-12-20 in Chicago (CST, UTC−6): the repair deadline as a latest booking. */
const DUE_1220 = '2026-12-21T05:59:00.000Z';

describe('a leak repair and a close-out share one return visit', () => {
  it('booking the repair while a close-out’s return is open joins it: the case links to it, it gains the leak search, the certification and the earlier deadline', async () => {
    const p = await newUnit();
    const { visit, workOrder } = await onSiteVisit(p, { priority: 'normal' });
    const closed = await closeNeedingReturn(visit.id, ['parts'], 'Contactor on order');
    expect(closed.status).toBe(200);
    const ret = closed.body.returnWorkOrder;
    expect(ret).toMatchObject({ state: 'unplaced', joined: false });
    // The office queued it for a later date than the repair will need.
    expect((await mgr.patch(`/api/watchlist/return-visits/${ret.id}`).send({ priority: 'normal', latestDate: '2026-12-30' })).status).toBe(
      200,
    );

    const c = await leakCase(p, '2026-12-20');
    const res = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({ priority: 'high', notes: 'Bring nitrogen' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ workOrderId: ret.id, joined: true });
    expect(res.body.leakCase.repairWorkOrder).toMatchObject({ id: ret.id, number: ret.number, state: 'unplaced', visitId: null });

    const all = await returnsOf(p);
    expect(all).toHaveLength(1);
    expect(all[0]).toMatchObject({
      id: ret.id,
      originWorkOrderId: workOrder.id,
      leakCaseId: c.id,
      returnNeeds: ['parts', 'leak_search'],
      requiredCertification: 'II',
      priority: 'high',
      estimatedMinutes: 180,
    });
    expect(all[0]!.latestAt!.toISOString()).toBe(DUE_1220);
    expect(all[0]!.complaint).toMatch(/^Contactor on order Leak repair on /);
    expect(all[0]!.complaint).toContain('Bring nitrogen');
    expect((await caseRow(c.id)).repairWorkOrderId).toBe(ret.id);

    // The close-out's own deadline stands when it is the earlier one.
    const q = await newUnit();
    const v2 = await onSiteVisit(q);
    const r2 = (await closeNeedingReturn(v2.visit.id, ['parts'])).body.returnWorkOrder;
    expect((await mgr.patch(`/api/watchlist/return-visits/${r2.id}`).send({ priority: 'high', latestDate: '2026-12-17' })).status).toBe(
      200,
    );
    const c2 = await leakCase(q, '2026-12-20');
    expect((await mgr.post(`/api/leak-cases/${c2.id}/repair-visit`).send({ priority: 'low' })).body).toMatchObject({
      workOrderId: r2.id,
      joined: true,
    });
    const [kept] = await openReturns(q);
    expect(kept!.latestAt!.toISOString()).toBe('2026-12-18T05:59:00.000Z');
    expect(kept!.priority).toBe('high');
  });

  it('a second repair-visit while the repair visit is open answers 409 open_return_exists with details.workOrderId; once it is cancelled a new one may be booked', async () => {
    const p = await newUnit();
    const c = await leakCase(p);
    const first = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({});
    expect(first.status).toBe(201);
    expect(first.body.joined).toBe(false);
    const woId = first.body.workOrderId;

    const again = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('open_return_exists');
    expect(again.body.error.details).toMatchObject({ workOrderId: woId, state: 'unplaced', unitId: p.unit.id, visitId: null });
    expect(await returnsOf(p)).toHaveLength(1);

    // Booked (as the Roster books: a booking and its visit): the 409 names the visit, where the screen's "Open" link goes.
    const [bk] = await t.ctx.db
      .insert(bookings)
      .values({
        branchId: f.a.id,
        workOrderId: woId,
        techId: f.inA.technician.id,
        startAt: new Date('2026-12-16T15:00:00Z'),
        endAt: new Date('2026-12-16T18:00:00Z'),
      })
      .returning();
    const [v] = await t.ctx.db
      .insert(visits)
      .values({ branchId: f.a.id, workOrderId: woId, bookingId: bk!.id, techId: f.inA.technician.id })
      .returning();
    await t.ctx.db.update(workOrders).set({ state: 'booked' }).where(eq(workOrders.id, woId));
    const booked = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({});
    expect(booked.status).toBe(409);
    expect(booked.body.error.details).toMatchObject({ workOrderId: woId, state: 'booked', visitId: v!.id });
    const listed = await mgr.get('/api/leak-cases');
    expect(listed.body.leakCases.find((x: { id: string }) => x.id === c.id).repairWorkOrder).toMatchObject({
      id: woId,
      state: 'booked',
      visitId: v!.id,
    });

    // Unbooked and cancelled: the case needs a repair visit again, and gets a new one.
    expect((await disp.delete(`/api/bookings/${bk!.id}`)).status).toBe(204);
    expect((await mgr.patch(`/api/work-orders/${woId}`).send({ state: 'cancelled' })).status).toBe(200);
    const rebooked = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({});
    expect(rebooked.status).toBe(201);
    expect(rebooked.body.workOrderId).not.toBe(woId);
    expect((await caseRow(c.id)).repairWorkOrderId).toBe(rebooked.body.workOrderId);
    expect(await openReturns(p)).toHaveLength(1);
  });

  it('closing a visit as needing a return on a unit with an open leak case links the new return to the case', async () => {
    const p = await newUnit();
    const c = await leakCase(p, '2026-12-20');
    const { visit, workOrder } = await onSiteVisit(p);
    const res = await closeNeedingReturn(visit.id, ['leak_search']);
    expect(res.status).toBe(200);
    expect(res.body.returnWorkOrder).toMatchObject({ state: 'unplaced', joined: false });
    const retId = res.body.returnWorkOrder.id;
    const [ret] = await returnsOf(p);
    expect(ret).toMatchObject({
      id: retId,
      originWorkOrderId: workOrder.id,
      leakCaseId: c.id,
      requiredCertification: 'II',
      returnNeeds: ['leak_search'],
    });
    expect(ret!.latestAt!.toISOString()).toBe(DUE_1220);
    expect((await caseRow(c.id)).repairWorkOrderId).toBe(retId);

    // The Watchlist shows it as the case's repair visit, and booking the repair again is refused naming it.
    const listed = await mgr.get('/api/leak-cases');
    expect(listed.body.leakCases.find((x: { id: string }) => x.id === c.id).repairWorkOrder).toMatchObject({
      id: retId,
      state: 'unplaced',
    });
    const again = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({});
    expect(again.status).toBe(409);
    expect(again.body.error).toMatchObject({ code: 'open_return_exists', details: { workOrderId: retId } });
    expect(await returnsOf(p)).toHaveLength(1);
  });

  it('a close-out on a unit whose return visit is open adds its needs to that one', async () => {
    const p = await newUnit();
    const first = await onSiteVisit(p, { priority: 'low', estimatedMinutes: 60 });
    const r1 = (await closeNeedingReturn(first.visit.id, ['parts'])).body.returnWorkOrder;
    const second = await onSiteVisit(p, { priority: 'high', estimatedMinutes: 120, requiredSkill: 'rooftop' });
    const res = await closeNeedingReturn(second.visit.id, ['parts', 'second_tech'], 'Two techs for the compressor swap');
    expect(res.status).toBe(200);
    expect(res.body.returnWorkOrder).toMatchObject({ id: r1.id, joined: true });
    const all = await returnsOf(p);
    expect(all).toHaveLength(1);
    expect(all[0]).toMatchObject({
      originWorkOrderId: first.workOrder.id,
      returnNeeds: ['parts', 'second_tech'],
      priority: 'high',
      estimatedMinutes: 120,
      requiredSkill: 'rooftop',
    });
    expect(all[0]!.complaint).toContain(`From WO-${second.workOrder.number}: Two techs for the compressor swap`);
    // Both work orders closed as needing the return.
    for (const id of [first.workOrder.id, second.workOrder.id]) {
      const [w] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, id));
      expect(w).toMatchObject({ state: 'closed', outcome: 'needs_return' });
    }
  });

  it('a return visit made by hand for a unit with an open one answers 409 open_return_exists', async () => {
    const p = await newUnit();
    const v = await onSiteVisit(p);
    const r = (await closeNeedingReturn(v.visit.id, ['parts'])).body.returnWorkOrder;
    const res = await disp.post('/api/work-orders').send({
      siteId: p.site.id,
      unitId: p.unit.id,
      kind: 'return_visit',
      originWorkOrderId: v.workOrder.id,
      complaint: 'Back with the part',
    });
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'open_return_exists', details: { workOrderId: r.id } });
    // Other kinds of work on the unit are not affected.
    expect(
      (await disp.post('/api/work-orders').send({ siteId: p.site.id, unitId: p.unit.id, kind: 'service_call', complaint: 'Noisy fan' }))
        .status,
    ).toBe(201);
  });
});

describe('the database keeps the rule', () => {
  it(`refuses a second open return visit on a unit (${OPEN_RETURN_INDEX}); closed, cancelled and other units' are fine`, async () => {
    const p = await newUnit();
    const q = await newUnit();
    const origin = await makeWorkOrder(t.ctx.db, {
      branchId: f.a.id,
      siteId: p.site.id,
      unitId: p.unit.id,
      state: 'closed',
      outcome: 'needs_return',
    });
    const ret = (state: 'unplaced' | 'booked' | 'closed' | 'cancelled', unit = p) =>
      makeWorkOrder(t.ctx.db, {
        branchId: f.a.id,
        siteId: unit.site.id,
        unitId: unit.unit.id,
        kind: 'return_visit',
        originWorkOrderId: origin.id,
        state,
      });
    await ret('closed');
    await ret('cancelled');
    const open = await ret('unplaced');
    await expect(ret('booked')).rejects.toMatchObject({ cause: { code: '23505', constraint: OPEN_RETURN_INDEX } });
    await expect(ret('unplaced')).rejects.toThrow();
    await ret('unplaced', q);
    // A site-wide return visit (no unit) is not a unit's.
    await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: p.site.id, kind: 'return_visit', originWorkOrderId: origin.id });
    await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: p.site.id, kind: 'return_visit', originWorkOrderId: origin.id });
    // Re-opening a finished one next to an open one is refused too.
    const [cancelled] = await t.ctx.db
      .select()
      .from(workOrders)
      .where(and(eq(workOrders.unitId, p.unit.id), eq(workOrders.state, 'cancelled')));
    await expect(t.ctx.db.update(workOrders).set({ state: 'unplaced' }).where(eq(workOrders.id, cancelled!.id))).rejects.toThrow();
    expect((await openReturns(p)).map((w) => w.id)).toEqual([open.id]);
  });
});

describe('races: ten requests at once make one return visit', () => {
  it('ten parallel repair-visit requests for one case: one work order, nine 409 open_return_exists naming it', async () => {
    const p = await newUnit();
    const c = await leakCase(p);
    const answers = await Promise.all(
      Array.from({ length: 10 }, () => mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({ priority: 'high' })),
    );
    const statuses = answers.map((a) => a.status).sort();
    expect(statuses).toEqual([201, 409, 409, 409, 409, 409, 409, 409, 409, 409]);
    const created = answers.find((a) => a.status === 201)!.body.workOrderId;
    for (const a of answers.filter((x) => x.status === 409)) {
      expect(a.body.error.code).toBe('open_return_exists');
      expect(a.body.error.details.workOrderId).toBe(created);
    }
    const all = await returnsOf(p);
    expect(all.map((w) => w.id)).toEqual([created]);
    expect((await caseRow(c.id)).repairWorkOrderId).toBe(created);
  });

  it('ten leak cases of one unit booked at once: one work order, every case linked to it', async () => {
    const p = await newUnit();
    const cases = await Promise.all(Array.from({ length: 10 }, (_, i) => leakCase(p, `2026-12-${String(20 + (i % 5)).padStart(2, '0')}`)));
    const answers = await Promise.all(cases.map((c) => mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({})));
    expect(answers.map((a) => a.status)).toEqual(Array(10).fill(201));
    const all = await returnsOf(p);
    expect(all).toHaveLength(1);
    expect(answers.filter((a) => a.body.joined === false)).toHaveLength(1);
    for (const a of answers) expect(a.body.workOrderId).toBe(all[0]!.id);
    for (const c of cases) expect((await caseRow(c.id)).repairWorkOrderId).toBe(all[0]!.id);
    // The earliest of the ten deadlines stands.
    expect(all[0]!.latestAt!.toISOString()).toBe(DUE_1220);
  });

  it('ten visits on one unit closed as needing a return at once: one return visit with every need', async () => {
    const p = await newUnit();
    const c = await leakCase(p);
    const needs = ['parts', 'leak_search', 'manufacturer', 'second_tech'] as const;
    const vs = [];
    for (let i = 0; i < 10; i++) vs.push(await onSiteVisit(p));
    const answers = await Promise.all(vs.map((v, i) => closeNeedingReturn(v.visit.id, [needs[i % needs.length]!])));
    expect(answers.map((a) => a.status)).toEqual(Array(10).fill(200));
    const all = await returnsOf(p);
    expect(all).toHaveLength(1);
    expect(answers.filter((a) => a.body.returnWorkOrder.joined === false)).toHaveLength(1);
    for (const a of answers) expect(a.body.returnWorkOrder.id).toBe(all[0]!.id);
    expect([...all[0]!.returnNeeds].sort()).toEqual([...needs].sort());
    expect(all[0]!.leakCaseId).toBe(c.id);
    expect((await caseRow(c.id)).repairWorkOrderId).toBe(all[0]!.id);
    // Every visit closed; nothing half-done.
    const closed = await t.ctx.db
      .select()
      .from(visits)
      .where(and(eq(visits.outcome, 'needs_return'), eq(visits.branchId, f.a.id)));
    for (const v of vs) expect(closed.map((x) => x.id)).toContain(v.visit.id);
  });

  it('a repair booking and a close-out racing on one unit end with one return visit, the case linked to it', async () => {
    const p = await newUnit();
    const c = await leakCase(p);
    const vs = [];
    for (let i = 0; i < 5; i++) vs.push(await onSiteVisit(p));
    const answers = await Promise.all([
      ...vs.map((v) => closeNeedingReturn(v.visit.id, ['parts'])),
      ...Array.from({ length: 5 }, () => mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({})),
    ]);
    for (const a of answers) expect([200, 201, 409]).toContain(a.status);
    const all = await returnsOf(p);
    expect(all).toHaveLength(1);
    for (const a of answers.filter((x) => x.status === 409))
      expect(a.body.error).toMatchObject({ code: 'open_return_exists', details: { workOrderId: all[0]!.id } });
    expect((await caseRow(c.id)).repairWorkOrderId).toBe(all[0]!.id);
  });
});
