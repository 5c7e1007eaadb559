import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, TEST_PASSWORD } from '../../testing/fixtures';
import { alarms, circuits, findings, leakCases, readings, refrigerantEvents, visitEvents, visits, workOrders } from '../../db/schema';
import { makeBookedVisit, NOT_AVAILABLE } from './visits.fixtures';

const NOW = '2026-03-10T15:00:00Z';
/** The units every imperial body states. */
const PSIG_F = { pressure: 'psig', temperature: 'F' } as const;

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let otherTech: Awaited<ReturnType<typeof makeUser>>;
let place: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let circuitIds: string[];
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let tech: Agent, tech2: Agent, manager: Agent, managerB: Agent, owner: Agent, dispatcher: Agent;

beforeAll(async () => {
  t = await createTestApp({ now: NOW });
  f = await makeTwoBranches(t.ctx.db);
  otherTech = await makeUser(t.ctx.db, 'technician', f.a.id);
  place = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { fullChargeLb: 100 } });
  const cs = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, place.unit.id)).orderBy(circuits.number);
  circuitIds = cs.map((c) => c.id);
  const sign = (email: string) => signedInAgent(t.app, email, TEST_PASSWORD);
  [tech, tech2, manager, managerB, owner, dispatcher] = await Promise.all([
    sign(f.inA.technician.email),
    sign(otherTech.email),
    sign(f.inA.manager.email),
    sign(f.inB.manager.email),
    sign(f.owner.email),
    sign(f.inA.dispatcher.email),
  ]);
});
afterAll(() => t.close());

const book = (over: Partial<Parameters<typeof makeBookedVisit>[1]> = {}) =>
  makeBookedVisit(t.ctx.db, {
    branchId: f.a.id,
    siteId: place.site.id,
    unitId: place.unit.id,
    techId: f.inA.technician.id,
    startAt: '2026-03-10T14:00:00Z',
    ...over,
  });

async function onSite(visitId: string) {
  expect((await tech.patch(`/api/visits/${visitId}`).send({ state: 'en_route' })).status).toBe(200);
  expect((await tech.patch(`/api/visits/${visitId}`).send({ state: 'on_site' })).status).toBe(200);
}

describe('GET /api/visits/:id', () => {
  it('lets the assigned technician and the office in scope read it; others get 404', async () => {
    const { visit } = await book();
    const mine = await tech.get(`/api/visits/${visit.id}`);
    expect(mine.status).toBe(200);
    expect(mine.body.canWrite).toBe(true);
    expect(mine.body.units[0].circuits.map((c: { number: number }) => c.number)).toEqual([1, 2]);
    expect(mine.body.branch.sensorTolerancePercent).toBe(3);

    const office = await manager.get(`/api/visits/${visit.id}`);
    expect(office.status).toBe(200);
    expect(office.body.canWrite).toBe(false);
    expect((await owner.get(`/api/visits/${visit.id}`)).status).toBe(200);

    expect((await tech2.get(`/api/visits/${visit.id}`)).status).toBe(404);
    expect((await managerB.get(`/api/visits/${visit.id}`)).status).toBe(404);
    expect((await request(t.app).get(`/api/visits/${visit.id}`)).status).toBe(401);
  });
});

describe('PATCH /api/visits/:id (state buttons)', () => {
  it('records en route then on site as timestamped events and moves the work order', async () => {
    const { visit, workOrder } = await book();
    const a = await tech.patch(`/api/visits/${visit.id}`).send({ state: 'en_route' });
    expect(a.status).toBe(200);
    expect(a.body.status).toBe('en_route');
    expect(a.body.enRouteAt).toBe(new Date(NOW).toISOString());
    const b = await tech.patch(`/api/visits/${visit.id}`).send({ state: 'on_site' });
    expect(b.body.status).toBe('on_site');
    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, workOrder.id));
    expect(wo!.state).toBe('on_site');
    const events = await t.ctx.db.select().from(visitEvents).where(eq(visitEvents.visitId, visit.id));
    expect(events.map((e) => e.state).sort()).toEqual(['en_route', 'on_site']);
    // A retried tap changes nothing; going back is refused.
    expect((await tech.patch(`/api/visits/${visit.id}`).send({ state: 'on_site' })).status).toBe(200);
    expect(await t.ctx.db.select().from(visitEvents).where(eq(visitEvents.visitId, visit.id))).toHaveLength(2);
    const back = await tech.patch(`/api/visits/${visit.id}`).send({ state: 'en_route' });
    expect(back.status).toBe(409);
  });

  it('refuses another technician (404), the office (403) and an unknown state (400)', async () => {
    const { visit } = await book();
    expect((await tech2.patch(`/api/visits/${visit.id}`).send({ state: 'en_route' })).status).toBe(404);
    const m = await manager.patch(`/api/visits/${visit.id}`).send({ state: 'en_route' });
    expect(m.status).toBe(403);
    expect(m.body.error.message).toMatch(/assigned/);
    expect((await managerB.patch(`/api/visits/${visit.id}`).send({ state: 'en_route' })).status).toBe(404);
    expect((await tech.patch(`/api/visits/${visit.id}`).send({ state: 'closed' })).status).toBe(400);
  });
});

describe('POST /api/visits/:id/readings', () => {
  it('stores gauge and controller values and computes saturation, superheat and subcooling', async () => {
    const { visit } = await book({ onSite: true });
    // Check values: tests/reference/data/refrigerant-saturation.json (CoolProp 8.0.0), R-410A
    // 111.5 psig dew 36.93 °F; 349.9 psig bubble 106.66 °F.
    const res = await tech.post(`/api/visits/${visit.id}/readings`).send({
      units: PSIG_F,
      readings: [
        {
          circuitId: circuitIds[0],
          suctionPressure: 111.5,
          suctionPressureController: 118,
          suctionLineTemp: 48.7,
          liquidPressure: 349.9,
          liquidPressureController: 351,
          liquidLineTemp: 96.7,
        },
      ],
    });
    expect(res.status).toBe(200);
    const r = res.body.readings[0];
    expect(r.circuitNumber).toBe(1);
    expect(r.refrigerant).toBe('R-410A');
    expect(r.suctionSaturationTemp).toBeCloseTo(36.9, 0);
    expect(r.superheat).toBeCloseTo(11.8, 0);
    expect(r.liquidSaturationTemp).toBeCloseTo(106.7, 0);
    expect(r.subcooling).toBeCloseTo(10.0, 0);
    expect(r.suctionPressureController).toBe(118);
    expect(r.units).toEqual(PSIG_F);
  });

  it('replaces the visit’s earlier entry for the same circuit (a retried save never doubles)', async () => {
    const { visit } = await book({ onSite: true });
    const body = { units: PSIG_F, readings: [{ circuitId: circuitIds[1], suctionPressure: 111.5, suctionLineTemp: 50 }] };
    await tech.post(`/api/visits/${visit.id}/readings`).send(body);
    await tech.post(`/api/visits/${visit.id}/readings`).send({ units: PSIG_F, readings: [{ ...body.readings[0], suctionLineTemp: 52 }] });
    const rows = await t.ctx.db.select().from(readings).where(eq(readings.visitId, visit.id));
    expect(rows).toHaveLength(1);
    expect(rows[0]!.suctionLineTemp).toBe(52);
  });

  it('refuses a circuit of another unit (400), bad numbers (400), another tech (404) and the office (403)', async () => {
    const { visit } = await book({ onSite: true });
    const elsewhere = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const [foreign] = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, elsewhere.unit.id));
    expect(
      (
        await tech
          .post(`/api/visits/${visit.id}/readings`)
          .send({ units: PSIG_F, readings: [{ circuitId: foreign!.id, suctionPressure: 100 }] })
      ).status,
    ).toBe(400);
    const bad = await tech
      .post(`/api/visits/${visit.id}/readings`)
      .send({ units: PSIG_F, readings: [{ circuitId: circuitIds[0], suctionPressure: 'high' }] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.fields[0].path).toBe('readings.0.suctionPressure');
    const ok = { units: PSIG_F, readings: [{ circuitId: circuitIds[0], suctionPressure: 100 }] };
    expect((await tech2.post(`/api/visits/${visit.id}/readings`).send(ok)).status).toBe(404);
    expect((await dispatcher.post(`/api/visits/${visit.id}/readings`).send(ok)).status).toBe(403);
  });
});

describe('POST /api/visits/:id/findings', () => {
  it('records cause, origin and reported vs actual circuit; a retried save with the same id is not doubled', async () => {
    const { visit } = await book({ onSite: true });
    const id = '7d3f0d6e-2b1c-4c55-9a7e-3f1f6f0c2a11';
    const body = {
      id,
      causeCode: 'wiring_fault',
      origin: 'factory_defect',
      alarmCode: 'LP1',
      reportedCircuit: 1,
      actualCircuit: 2,
      notes: 'Transducer leads swapped at the board',
    };
    const a = await tech.post(`/api/visits/${visit.id}/findings`).send(body);
    expect(a.status).toBe(201);
    expect(a.body.finding).toMatchObject({ id, unitId: place.unit.id, reportedCircuit: 1, actualCircuit: 2 });
    const again = await tech.post(`/api/visits/${visit.id}/findings`).send(body);
    expect(again.status).toBe(200);
    expect(await t.ctx.db.select().from(findings).where(eq(findings.visitId, visit.id))).toHaveLength(1);
  });

  it('refuses an unknown cause code (400) and another technician (404)', async () => {
    const { visit } = await book({ onSite: true });
    expect((await tech.post(`/api/visits/${visit.id}/findings`).send({ causeCode: 'gremlins', origin: 'wear' })).status).toBe(400);
    expect((await tech2.post(`/api/visits/${visit.id}/findings`).send({ causeCode: 'airflow', origin: 'wear' })).status).toBe(404);
  });
});

describe('POST /api/units/:id/refrigerant-events', () => {
  it('refuses negative pounds (400) and an entry with no pounds (400)', async () => {
    await book();
    const neg = await tech
      .post(`/api/units/${place.unit.id}/refrigerant-events`)
      .send({ refrigerant: 'R-410A', poundsAdded: -2, reason: 'leak_top_off' });
    expect(neg.status).toBe(400);
    expect(neg.body.error.details.fields.map((x: { path: string }) => x.path)).toContain('poundsAdded');
    const none = await tech.post(`/api/units/${place.unit.id}/refrigerant-events`).send({ refrigerant: 'R-410A', reason: 'leak_top_off' });
    expect(none.status).toBe(400);
  });

  it('opens a leak case with its repair due date when the leak rate passes the threshold, once', async () => {
    // A 100 lb R-410A comfort-cooling unit of its own, so earlier tests' entries do not count.
    const leaky = await makeSiteWithUnit(t.ctx.db, f.a.id, {
      unit: { fullChargeLb: 100, refrigerant: 'R-410A', applianceCategory: 'comfort_cooling' },
    });
    const { visit } = await book({ siteId: leaky.site.id, unitId: leaky.unit.id, onSite: true });
    const post = (body: object) =>
      tech
        .post(`/api/units/${leaky.unit.id}/refrigerant-events`)
        .send({ refrigerant: 'R-410A', reason: 'leak_top_off', visitId: visit.id, ...body });

    // First addition: annualizing over 365 days (40 CFR 82.152 "leak rate"): 2/100 × 365/365 = 2 % — under 10 %.
    const first = await post({ poundsAdded: 2, date: '2026-02-01', cylinderLot: 'LOT-1' });
    expect(first.status).toBe(201);
    expect(first.body.leakCheck.leakRatePercent).toBeCloseTo(2, 5);
    expect(first.body.leakCaseOpened).toBe(false);

    // 37 days later 3 lb: 3/100 × 365/37 × 100 = 29.59 % > 10 %, the comfort-cooling threshold of
    // 40 CFR 84.106(c)(2) (HFCs, 15 lb or more, from 2026-01-01); repair due 30 days after the addition (84.106(d)).
    const second = await post({ poundsAdded: 3, date: '2026-03-10' });
    expect(second.status).toBe(201);
    expect(second.body.leakCheck).toMatchObject({ rule: '40 CFR 84.106', thresholdPercent: 10, exceeds: true });
    expect(second.body.leakCheck.leakRatePercent).toBeCloseTo((3 / 100) * (365 / 37) * 100, 1);
    expect(second.body.leakCaseOpened).toBe(true);
    expect(second.body.leakCase).toMatchObject({ repairDueDate: '2026-04-09', status: 'open', thresholdPercent: 10 });
    const cases = await t.ctx.db.select().from(leakCases).where(eq(leakCases.unitId, leaky.unit.id));
    expect(cases).toHaveLength(1);
    expect(cases[0]!.triggeringEventId).toBe(second.body.event.id);
    expect(cases[0]!.branchId).toBe(f.a.id);

    // Another addition while the case is open does not open a second one.
    const third = await post({ poundsAdded: 4, date: '2026-03-10' });
    expect(third.body.leakCaseOpened).toBe(false);
    expect(third.body.leakCase.id).toBe(cases[0]!.id);
    expect(await t.ctx.db.select().from(leakCases).where(eq(leakCases.unitId, leaky.unit.id))).toHaveLength(1);
  });

  it('does not count an installation charge toward the leak rate, as the unit’s refrigerant record does not', async () => {
    // 40 CFR 82.157(b) / 84.106(b): no leak rate is calculated at an addition made at installation.
    // Counted, 80 lb on a 100 lb comfort-cooling unit would read 80 % > 10 % and open a leak case.
    const fresh = await makeSiteWithUnit(t.ctx.db, f.a.id, {
      unit: { fullChargeLb: 100, refrigerant: 'R-410A', applianceCategory: 'comfort_cooling' },
    });
    const { visit } = await book({ siteId: fresh.site.id, unitId: fresh.unit.id, onSite: true });
    const post = (body: object) =>
      tech.post(`/api/units/${fresh.unit.id}/refrigerant-events`).send({ refrigerant: 'R-410A', visitId: visit.id, ...body });
    const charge = await post({ poundsAdded: 80, reason: 'initial_charge', date: '2026-02-01' });
    expect(charge.status).toBe(201);
    expect(charge.body.leakCheck).toMatchObject({ exceeds: false, leakRatePercent: 0 });
    expect(charge.body.leakCaseOpened).toBe(false);
    // A later 2 lb top-up counts: 2/100 × 365/37 × 100 = 19.73 % (annualizing, 40 CFR 82.152; the interval
    // runs from the last addition, exempt or not) — over 10 %, so this one opens the case.
    const top = await post({ poundsAdded: 2, reason: 'leak_top_off', date: '2026-03-10' });
    expect(top.body.leakCheck.leakRatePercent).toBeCloseTo((2 / 100) * (365 / 37) * 100, 1);
    expect(top.body.leakCaseOpened).toBe(true);
    const record = await manager.get(`/api/units/${fresh.unit.id}/refrigerant-record`);
    expect(record.status).toBe(200);
    // The check at entry and the record agree: the same rate, one obligation, from the top-up.
    expect(record.body.leakRatePercent).toBeCloseTo(top.body.leakCheck.leakRatePercent, 1);
    expect(record.body.obligations.map((o: { triggeredOn: string }) => o.triggeredOn)).toEqual(['2026-03-10']);
  });

  it('records the circuit on a unit with several, refuses one the unit does not have, and shows it in the record', async () => {
    const { visit } = await book({ onSite: true });
    const post = (body: object) =>
      tech
        .post(`/api/units/${place.unit.id}/refrigerant-events`)
        .send({ refrigerant: 'R-410A', reason: 'leak_top_off', visitId: visit.id, poundsAdded: 0.5, ...body });
    const circuits = circuitIds.length;
    expect(circuits).toBeGreaterThan(1);
    const wrong = await post({ circuit: circuits + 3 });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.message).toBe(
      `This unit has no circuit ${circuits + 3}: it has circuits ${Array.from({ length: circuits - 1 }, (_, i) => i + 1).join(', ')} and ${circuits}.`,
    );
    expect(wrong.body.error.details.fields.map((x: { path: string }) => x.path)).toEqual(['circuit']);
    const ok = await post({ circuit: 2 });
    expect(ok.status).toBe(201);
    expect(ok.body.event.circuit).toBe(2);
    const stored = await t.ctx.db.select().from(refrigerantEvents).where(eq(refrigerantEvents.id, ok.body.event.id));
    expect(stored[0]!.circuit).toBe(2);
    const record = await manager.get(`/api/units/${place.unit.id}/refrigerant-record`);
    expect(record.body.events.find((e: { sourceId: string }) => e.sourceId === ok.body.event.id)).toMatchObject({
      circuit: 2,
      kind: 'addition',
    });
  });

  it('is idempotent with a client id, and refuses units off the technician’s assignments (404) and the office (403)', async () => {
    const { visit } = await book({ onSite: true });
    const id = '0b6f8a7c-7d65-4a2e-9f1e-5a4b3c2d1e0f';
    const body = { id, refrigerant: 'R-410A', poundsRecovered: 1.5, reason: 'recovery', visitId: visit.id };
    expect((await tech.post(`/api/units/${place.unit.id}/refrigerant-events`).send(body)).status).toBe(201);
    expect((await tech.post(`/api/units/${place.unit.id}/refrigerant-events`).send(body)).status).toBe(200);
    expect(await t.ctx.db.select().from(refrigerantEvents).where(eq(refrigerantEvents.id, id))).toHaveLength(1);

    const lonely = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const plain = { refrigerant: 'R-410A', poundsAdded: 1, reason: 'leak_top_off' };
    expect((await tech.post(`/api/units/${lonely.unit.id}/refrigerant-events`).send(plain)).status).toBe(404);
    expect((await manager.post(`/api/units/${place.unit.id}/refrigerant-events`).send(plain)).status).toBe(403);
    expect((await managerB.post(`/api/units/${place.unit.id}/refrigerant-events`).send(plain)).status).toBe(404);
    expect((await tech.post(`/api/units/${place.unit.id}/refrigerant-events`).send({ ...plain, refrigerant: 'R-12' })).status).toBe(400);
  });
});

describe('recording only on site', () => {
  const reading = { units: PSIG_F, readings: [{ circuitId: '', suctionPressure: 111.5, suctionLineTemp: 48.7 }] };
  const record = (visitId: string) => ({
    readings: () =>
      tech.post(`/api/visits/${visitId}/readings`).send({ ...reading, readings: [{ ...reading.readings[0], circuitId: circuitIds[0] }] }),
    finding: () => tech.post(`/api/visits/${visitId}/findings`).send({ causeCode: 'airflow', origin: 'wear' }),
    refrigerant: () =>
      tech
        .post(`/api/units/${place.unit.id}/refrigerant-events`)
        .send({ refrigerant: 'R-410A', poundsAdded: 1, reason: 'leak_top_off', visitId }),
  });

  it('refuses readings, findings and refrigerant on a booked visit (409 naming the state), and records nothing', async () => {
    const { visit } = await book();
    for (const [what, send] of Object.entries(record(visit.id))) {
      const res = await send();
      expect(res.status, what).toBe(409);
      expect(res.body.error.code, what).toBe('not_on_site');
      expect(res.body.error.message, what).toMatch(/^This visit is booked, not started\. .*mark yourself on site/);
      expect(res.body.error.details, what).toEqual({ state: 'booked' });
    }
    expect(await t.ctx.db.select().from(readings).where(eq(readings.visitId, visit.id))).toHaveLength(0);
    expect(await t.ctx.db.select().from(findings).where(eq(findings.visitId, visit.id))).toHaveLength(0);
    expect(await t.ctx.db.select().from(refrigerantEvents).where(eq(refrigerantEvents.visitId, visit.id))).toHaveLength(0);
    const detail = await tech.get(`/api/visits/${visit.id}`);
    expect(detail.body).toMatchObject({
      canWrite: true,
      canRecord: false,
      recordRefusal: expect.stringMatching(/^This visit is booked, not started\./),
    });
  });

  it('refuses them en route, and takes them once on site', async () => {
    const { visit } = await book();
    expect((await tech.patch(`/api/visits/${visit.id}`).send({ state: 'en_route' })).status).toBe(200);
    for (const [what, send] of Object.entries(record(visit.id))) {
      const res = await send();
      expect(res.status, what).toBe(409);
      expect(res.body.error.message, what).toMatch(/^This visit is en route, not on site yet\./);
      expect(res.body.error.details, what).toEqual({ state: 'en_route' });
    }
    expect((await tech.patch(`/api/visits/${visit.id}`).send({ state: 'on_site' })).status).toBe(200);
    const r = record(visit.id);
    expect((await r.readings()).status).toBe(200);
    expect((await r.finding()).status).toBe(201);
    expect((await r.refrigerant()).status).toBe(201);
    const detail = await tech.get(`/api/visits/${visit.id}`);
    expect(detail.body).toMatchObject({ status: 'on_site', canRecord: true, recordRefusal: null });
    // The office reads the visit; it never records, so no refusal is addressed to it.
    expect((await manager.get(`/api/visits/${visit.id}`)).body).toMatchObject({ canWrite: false, canRecord: false, recordRefusal: null });
  });

  it('refuses them once the visit is closed (409 visit_closed)', async () => {
    const { visit } = await book({ onSite: true });
    expect((await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' })).status).toBe(200);
    for (const [what, send] of Object.entries(record(visit.id))) {
      const res = await send();
      expect(res.status, what).toBe(409);
      expect(res.body.error.code, what).toBe('visit_closed');
    }
  });
});

describe('POST /api/visits/:id/close', () => {
  it('needs what the return visit needs (400) and the technician on site (409)', async () => {
    const { visit } = await book();
    expect((await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'needs_return' })).status).toBe(400);
    const early = await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe('not_on_site');
  });

  it('closes as needing a return: linked unplaced return visit, summary e-mail with the PDF', async () => {
    const { visit, workOrder } = await book({ workOrder: { requiredCertification: 'II', requiredSkill: 'rooftop' } });
    await onSite(visit.id);
    await tech
      .post(`/api/visits/${visit.id}/readings`)
      .send({ units: PSIG_F, readings: [{ circuitId: circuitIds[0], suctionPressure: 111.5, suctionLineTemp: 48.7 }] });
    await tech
      .post(`/api/visits/${visit.id}/findings`)
      .send({ causeCode: 'refrigerant_leak', origin: 'wear', notes: 'Oil at the service valve' });
    t.mailer.sent.length = 0;

    const res = await tech.post(`/api/visits/${visit.id}/close`).send({
      signature: NOT_AVAILABLE,
      outcome: 'needs_return',
      returnNeeds: ['leak_search', 'parts'],
      returnNotes: 'Leak search on circuit 1; bring a core',
      labourMinutes: 75,
    });
    expect(res.status).toBe(200);
    expect(res.body.visit.status).toBe('closed');
    expect(res.body.visit.canWrite).toBe(false);
    expect(res.body.summary).toEqual({ sent: true, to: place.site.contactEmail, error: null });

    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, workOrder.id));
    expect(wo).toMatchObject({ state: 'closed', outcome: 'needs_return' });
    const [ret] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.originWorkOrderId, workOrder.id));
    expect(ret).toMatchObject({
      id: res.body.returnWorkOrder.id,
      kind: 'return_visit',
      state: 'unplaced',
      branchId: f.a.id,
      siteId: place.site.id,
      unitId: place.unit.id,
      requiredCertification: 'II',
      requiredSkill: 'rooftop',
      complaint: 'Leak search on circuit 1; bring a core',
      returnNeeds: ['leak_search', 'parts'],
    });

    expect(t.mailer.sent).toHaveLength(1);
    const mail = t.mailer.sent[0]!;
    expect(mail.to).toBe(place.site.contactEmail);
    expect(mail.text).toMatch(/superheat 11\.8 °F/);
    expect(mail.text).toContain('Refrigerant leak (origin: Wear)');
    expect(mail.attachments?.[0]?.contentType).toBe('application/pdf');
    expect(mail.attachments![0]!.content.subarray(0, 5).toString()).toBe('%PDF-');
    const [v] = await t.ctx.db.select().from(visits).where(eq(visits.id, visit.id));
    expect(v!.summarySentAt).not.toBeNull();

    // Closed: no more work, no second close.
    expect((await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' })).status).toBe(409);
    expect((await tech.post(`/api/visits/${visit.id}/findings`).send({ causeCode: 'airflow', origin: 'wear' })).status).toBe(409);
  });

  it('keeps the close when the mailer fails and says so', async () => {
    const { visit, workOrder } = await book();
    await onSite(visit.id);
    const mailer = t.ctx.mailer;
    t.ctx.mailer = { send: () => Promise.reject(new Error('SMTP down')) };
    try {
      const res = await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
      expect(res.status).toBe(200);
      expect(res.body.summary.sent).toBe(false);
      expect(res.body.summary.error).toMatch(/visit is closed/);
    } finally {
      t.ctx.mailer = mailer;
    }
    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, workOrder.id));
    expect(wo!.state).toBe('closed');
    const [v] = await t.ctx.db.select().from(visits).where(eq(visits.id, visit.id));
    expect(v!.closedAt).not.toBeNull();
    expect(v!.summarySentAt).toBeNull();
    // Sent again from the screen once the mail server is back.
    const again = await tech.post(`/api/visits/${visit.id}/summary`);
    expect(again.body.summary.sent).toBe(true);
  });
});

describe('GET /api/visits/current', () => {
  it('answers the visit on site, else en route, else the next booked one', async () => {
    const solo = await makeUser(t.ctx.db, 'technician', f.a.id);
    const a = await signedInAgent(t.app, solo.email, TEST_PASSWORD);
    expect((await a.get('/api/visits/current')).body).toEqual({ visitId: null, reason: null });
    const later = await book({ techId: solo.id, startAt: '2026-03-10T20:00:00Z' });
    const sooner = await book({ techId: solo.id, startAt: '2026-03-10T16:00:00Z' });
    expect((await a.get('/api/visits/current')).body).toEqual({ visitId: sooner.visit.id, reason: 'next_booked' });
    await a.patch(`/api/visits/${later.visit.id}`).send({ state: 'en_route' });
    expect((await a.get('/api/visits/current')).body).toEqual({ visitId: later.visit.id, reason: 'en_route' });
    await a.patch(`/api/visits/${sooner.visit.id}`).send({ state: 'on_site' });
    expect((await a.get('/api/visits/current')).body).toEqual({ visitId: sooner.visit.id, reason: 'on_site' });
    expect((await manager.get('/api/visits/current')).status).toBe(403);
  });
});

describe('GET /api/units/:id/briefing', () => {
  it('gives last findings, last readings per circuit, the open leak case, refrigerant this year and repeat alarms', async () => {
    const u = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { fullChargeLb: 40 } });
    const first = await book({ siteId: u.site.id, unitId: u.unit.id, startAt: '2026-03-09T14:00:00Z' });
    const cs = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, u.unit.id)).orderBy(circuits.number);
    await onSite(first.visit.id);
    await tech.post(`/api/visits/${first.visit.id}/readings`).send({
      units: PSIG_F,
      readings: [
        { circuitId: cs[0]!.id, suctionPressure: 111.5, suctionLineTemp: 48.7 },
        { circuitId: cs[1]!.id, suctionPressure: 111.5, suctionLineTemp: 50.7 },
      ],
    });
    await tech
      .post(`/api/visits/${first.visit.id}/findings`)
      .send({ causeCode: 'sensor_fault', origin: 'wear', reportedCircuit: 1, actualCircuit: 1 });
    await tech
      .post(`/api/units/${u.unit.id}/refrigerant-events`)
      .send({ refrigerant: 'R-410A', poundsAdded: 2.5, reason: 'leak_top_off', date: '2026-03-09' });
    await tech.post(`/api/visits/${first.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
    await t.ctx.db.insert(alarms).values([
      { branchId: f.a.id, unitId: u.unit.id, circuit: 1, code: 'LP1', raisedAt: new Date('2026-03-01T10:00:00Z'), source: 'controller' },
      { branchId: f.a.id, unitId: u.unit.id, circuit: 1, code: 'LP1', raisedAt: new Date('2026-03-08T10:00:00Z'), source: 'controller' },
      { branchId: f.a.id, unitId: u.unit.id, circuit: 2, code: 'HP2', raisedAt: new Date('2026-03-08T10:00:00Z'), source: 'controller' },
      // Outside the 30-day window.
      { branchId: f.a.id, unitId: u.unit.id, circuit: 2, code: 'HP2', raisedAt: new Date('2026-01-08T10:00:00Z'), source: 'controller' },
    ]);
    const res = await tech.get(`/api/units/${u.unit.id}/briefing`);
    expect(res.status).toBe(200);
    const b = res.body;
    expect(b.unit).toMatchObject({ id: u.unit.id, tag: u.unit.tag, siteName: u.site.name });
    expect(b.lastVisit).toMatchObject({ visitId: first.visit.id, outcome: 'resolved' });
    expect(b.lastVisit.findings.map((x: { causeCode: string }) => x.causeCode)).toEqual(['sensor_fault']);
    expect(b.lastReadings.map((r: { circuitNumber: number; superheat: number }) => [r.circuitNumber, r.superheat])).toEqual([
      [1, expect.closeTo(11.8, 0)],
      [2, expect.closeTo(13.8, 0)],
    ]);
    expect(b.refrigerantThisYear).toMatchObject({ year: '2026', poundsAdded: 2.5, fullChargeLb: 40, percentOfFullCharge: 6.3 });
    expect(b.repeatAlarms).toEqual([{ code: 'LP1', circuit: 1, count: 2, lastRaisedAt: '2026-03-08T10:00:00.000Z' }]);
    expect(b.openLeakCase).toBeNull();

    expect((await manager.get(`/api/units/${u.unit.id}/briefing`)).status).toBe(200);
    expect((await managerB.get(`/api/units/${u.unit.id}/briefing`)).status).toBe(404);
    expect((await tech2.get(`/api/units/${u.unit.id}/briefing`)).status).toBe(404);
  });

  it('shows the open leak case', async () => {
    const [c] = await t.ctx.db.select().from(leakCases).limit(1);
    expect(c).toBeDefined();
    const res = await tech.get(`/api/units/${c!.unitId}/briefing`);
    expect(res.status).toBe(200);
    expect(res.body.openLeakCase).toMatchObject({ id: c!.id, repairDueDate: c!.repairDueDate });
  });
});

describe('data stays whole', () => {
  it('leaves no reading behind a refused request (the same circuit twice)', async () => {
    const { visit } = await book({ onSite: true });
    const before = await t.ctx.db.select().from(readings).where(eq(readings.visitId, visit.id));
    await tech.post(`/api/visits/${visit.id}/readings`).send({
      units: PSIG_F,
      readings: [
        { circuitId: circuitIds[0], suctionPressure: 100 },
        { circuitId: circuitIds[0], suctionPressure: 101 },
      ],
    });
    const after = await t.ctx.db.select().from(readings).where(eq(readings.visitId, visit.id));
    expect(after).toHaveLength(before.length);
  });
});
