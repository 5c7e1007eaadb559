import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { leakCases, workOrders } from '../../db/schema';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let siteA2: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let siteB: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let dispatcherA: Awaited<ReturnType<typeof signedInAgent>>;
let dispatcherB: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  t = await createTestApp({ now: '2027-03-01T12:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id);
  siteA2 = await makeSiteWithUnit(t.ctx.db, f.a.id);
  siteB = await makeSiteWithUnit(t.ctx.db, f.b.id);
  dispatcherA = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
  dispatcherB = await signedInAgent(t.app, f.inB.dispatcher.email, TEST_PASSWORD);
});
afterAll(() => t.close());

describe('POST /api/work-orders', () => {
  it('creates an unplaced work order in the site’s branch, with site and unit joined in', async () => {
    const res = await dispatcherA.post('/api/work-orders').send({
      siteId: siteA.site.id,
      unitId: siteA.unit.id,
      kind: 'service_call',
      priority: 'high',
      complaint: 'Store is warm; unit short-cycling',
      requiredCertification: 'II',
      estimatedMinutes: 90,
      requestedFrom: '2027-03-08T14:00:00Z',
      requestedTo: '2027-03-09T00:00:00Z',
    });
    expect(res.status).toBe(201);
    const w = res.body.workOrder;
    expect(w).toMatchObject({
      branchId: f.a.id,
      state: 'unplaced',
      kind: 'service_call',
      priority: 'high',
      siteName: siteA.site.name,
      unitTag: siteA.unit.tag,
      unitMake: 'Testmake',
      unitModel: 'TM-10',
      requiredCertification: 'II',
      estimatedMinutes: 90,
      requestedFrom: '2027-03-08T14:00:00.000Z',
      booking: null,
      originNumber: null,
    });
    expect(w.number).toBeGreaterThanOrEqual(10001);
  });

  it('requires a return visit to name its origin, and joins the origin number and the leak-repair deadline', async () => {
    const missing = await dispatcherA
      .post('/api/work-orders')
      .send({ siteId: siteA.site.id, kind: 'return_visit', complaint: 'Braze the leak' });
    expect(missing.status).toBe(400);
    expect(missing.body.error.details.fields.map((x: { path: string }) => x.path)).toContain('originWorkOrderId');

    const origin = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id, unitId: siteA.unit.id, state: 'closed' });
    const [lc] = await t.ctx.db
      .insert(leakCases)
      .values({
        branchId: f.a.id,
        unitId: siteA.unit.id,
        openedOn: '2027-02-10',
        rule: 'test',
        method: 'annualizing',
        thresholdPercent: 10,
        leakRatePercent: 25,
        repairDueDate: '2027-03-12',
      })
      .returning();
    const res = await dispatcherA.post('/api/work-orders').send({
      siteId: siteA.site.id,
      unitId: siteA.unit.id,
      kind: 'return_visit',
      complaint: 'Braze the leak on circuit 1',
      originWorkOrderId: origin.id,
      leakCaseId: lc!.id,
    });
    expect(res.status).toBe(201);
    expect(res.body.workOrder.originNumber).toBe(origin.number);
    expect(res.body.workOrder.leakRepairDueDate).toBe('2027-03-12');
  });

  it('refuses a unit of another site and an origin at another site', async () => {
    const unitElsewhere = await dispatcherA
      .post('/api/work-orders')
      .send({ siteId: siteA.site.id, unitId: siteA2.unit.id, kind: 'service_call', complaint: 'x' });
    expect(unitElsewhere.status).toBe(400);
    expect(unitElsewhere.body.error.message).toMatch(/not at this site/);
    const other = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA2.site.id });
    const originElsewhere = await dispatcherA
      .post('/api/work-orders')
      .send({ siteId: siteA.site.id, kind: 'callback', complaint: 'Warm again', originWorkOrderId: other.id });
    expect(originElsewhere.status).toBe(400);
  });

  it('answers another branch’s site with 404 and refuses technicians with 403', async () => {
    const res = await dispatcherB.post('/api/work-orders').send({ siteId: siteA.site.id, kind: 'service_call', complaint: 'x' });
    expect(res.status).toBe(404);
    const tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
    expect((await tech.post('/api/work-orders').send({ siteId: siteA.site.id, kind: 'service_call', complaint: 'x' })).status).toBe(403);
    expect((await tech.get('/api/work-orders')).status).toBe(403);
  });
});

describe('GET /api/work-orders', () => {
  it('lists the branch’s work orders by state, never another branch’s', async () => {
    const mineUnplaced = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id });
    const mineBooked = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id, state: 'booked' });
    const theirs = await makeWorkOrder(t.ctx.db, { branchId: f.b.id, siteId: siteB.site.id });
    const res = await dispatcherA.get('/api/work-orders').query({ state: 'unplaced' });
    expect(res.status).toBe(200);
    const ids = res.body.workOrders.map((w: { id: string }) => w.id);
    expect(ids).toContain(mineUnplaced.id);
    expect(ids).not.toContain(mineBooked.id);
    expect(ids).not.toContain(theirs.id);
    expect(res.body.workOrders.every((w: { state: string; branchId: string }) => w.state === 'unplaced' && w.branchId === f.a.id)).toBe(
      true,
    );

    const both = await dispatcherA.get('/api/work-orders').query({ state: 'unplaced,booked' });
    expect(both.body.workOrders.map((w: { id: string }) => w.id)).toEqual(expect.arrayContaining([mineUnplaced.id, mineBooked.id]));
  });

  it('answers a request for another branch with 404; the owner may choose any branch', async () => {
    expect((await dispatcherA.get('/api/work-orders').query({ branchId: f.b.id })).status).toBe(404);
    const owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
    const res = await owner.get('/api/work-orders').query({ branchId: f.b.id });
    expect(res.status).toBe(200);
    expect(res.body.workOrders.length).toBeGreaterThan(0);
    expect(res.body.workOrders.every((w: { branchId: string }) => w.branchId === f.b.id)).toBe(true);
  });

  it('rejects an unknown state with 400', async () => {
    const res = await dispatcherA.get('/api/work-orders').query({ state: 'parked' });
    expect(res.status).toBe(400);
  });
});

describe('PATCH /api/work-orders/:id', () => {
  it('changes priority and estimate, and cancels only unplaced work', async () => {
    const w = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id });
    const res = await dispatcherA.patch(`/api/work-orders/${w.id}`).send({ priority: 'emergency', estimatedMinutes: 120 });
    expect(res.status).toBe(200);
    expect(res.body.workOrder).toMatchObject({ priority: 'emergency', estimatedMinutes: 120 });
    const cancel = await dispatcherA.patch(`/api/work-orders/${w.id}`).send({ state: 'cancelled' });
    expect(cancel.status).toBe(200);
    const [row] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, w.id));
    expect(row!.state).toBe('cancelled');
    expect(row!.closedAt?.toISOString()).toBe('2027-03-01T12:00:00.000Z');

    const booked = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id, state: 'booked' });
    const refused = await dispatcherA.patch(`/api/work-orders/${booked.id}`).send({ state: 'cancelled' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/unbook it/);
  });

  it('refuses another state than cancelled, and another branch’s work order with 404', async () => {
    const w = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id });
    expect((await dispatcherA.patch(`/api/work-orders/${w.id}`).send({ state: 'booked' })).status).toBe(400);
    expect((await dispatcherB.patch(`/api/work-orders/${w.id}`).send({ priority: 'low' })).status).toBe(404);
  });
});
