/**
 * A call's root cause: the finding the technician marks at close-out (required among several findings, the
 * only one by default, none without findings), and Fix Quality's cause, origin and factory-defect review
 * following the mark rather than the first finding typed. Also the close-out's other confirmation: a leak
 * repair closed as resolved with nothing to show for it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import type { Clock } from '../../lib/clock';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import { leakCases, serviceCallFacts, verificationTests, visits, workOrders } from '../../db/schema';
import { makeBookedVisit, NOT_AVAILABLE } from './visits.fixtures';

let now = new Date('2026-03-10T15:00:00Z');
const clock: Clock = { now: () => new Date(now) };
let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let place: Awaited<ReturnType<typeof makeSiteWithUnit>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let tech: Agent, owner: Agent;

beforeAll(async () => {
  t = await createTestApp({ clock });
  f = await makeTwoBranches(t.ctx.db);
  place = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { make: 'Testmake', model: 'RC-1' } });
  [tech, owner] = await Promise.all([
    signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD),
    signedInAgent(t.app, f.owner.email, TEST_PASSWORD),
  ]);
});
afterAll(() => t.close());

async function onSiteVisit() {
  const booked = await makeBookedVisit(t.ctx.db, {
    branchId: f.a.id,
    siteId: place.site.id,
    unitId: place.unit.id,
    techId: f.inA.technician.id,
    startAt: new Date(now.getTime() - 60 * 60_000).toISOString(),
    onSite: true,
  });
  return booked;
}

const addFinding = async (visitId: string, body: Record<string, unknown>) => {
  const res = await tech.post(`/api/visits/${visitId}/findings`).send(body);
  expect(res.status).toBe(201);
  return res.body.finding.id as string;
};

describe('POST /api/visits/:id/close — root cause', () => {
  it('refuses (422) a close-out of a visit with two findings and no root cause, and changes nothing', async () => {
    const { visit, workOrder } = await onSiteVisit();
    await addFinding(visit.id, { causeCode: 'airflow', origin: 'wear' });
    await addFinding(visit.id, { causeCode: 'refrigerant_leak', origin: 'installation' });
    const res = await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('root_cause_required');
    expect(res.body.error.message).toMatch(/2 findings: mark the one that caused the call/);
    const [v] = await t.ctx.db.select().from(visits).where(eq(visits.id, visit.id));
    expect(v).toMatchObject({ closedAt: null, rootCauseFindingId: null });
    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, workOrder.id));
    expect(wo!.state).not.toBe('closed');
  });

  it('refuses (422) a root cause that is not one of the visit’s findings', async () => {
    const a = await onSiteVisit();
    const b = await onSiteVisit();
    const own = await addFinding(a.visit.id, { causeCode: 'airflow', origin: 'wear' });
    const foreign = await addFinding(b.visit.id, { causeCode: 'settings', origin: 'external' });
    const res = await tech
      .post(`/api/visits/${a.visit.id}/close`)
      .send({ signature: NOT_AVAILABLE, outcome: 'resolved', rootCauseFindingId: foreign });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('root_cause_unknown');
    const ok = await tech
      .post(`/api/visits/${a.visit.id}/close`)
      .send({ signature: NOT_AVAILABLE, outcome: 'resolved', rootCauseFindingId: own });
    expect(ok.status).toBe(200);
    expect(ok.body.visit.rootCauseFindingId).toBe(own);
  });

  it('takes the only finding by default, none without findings, and the marked one among several', async () => {
    const one = await onSiteVisit();
    const only = await addFinding(one.visit.id, { causeCode: 'airflow', origin: 'wear' });
    const r1 = await tech.post(`/api/visits/${one.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
    expect(r1.status).toBe(200);
    expect(r1.body.visit.rootCauseFindingId).toBe(only);

    const none = await onSiteVisit();
    const r0 = await tech.post(`/api/visits/${none.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
    expect(r0.status).toBe(200);
    expect(r0.body.visit.rootCauseFindingId).toBeNull();

    const two = await onSiteVisit();
    await addFinding(two.visit.id, { causeCode: 'airflow', origin: 'wear' });
    const second = await addFinding(two.visit.id, { causeCode: 'wiring_fault', origin: 'factory_defect' });
    const r2 = await tech
      .post(`/api/visits/${two.visit.id}/close`)
      .send({ signature: NOT_AVAILABLE, outcome: 'resolved', rootCauseFindingId: second });
    expect(r2.status).toBe(200);
    const [facts] = await t.ctx.db.select().from(serviceCallFacts).where(eq(serviceCallFacts.jobId, two.workOrder.id));
    expect(facts).toMatchObject({ causeCode: 'wiring_fault', origin: 'factory_defect' });
  });
});

describe('POST /api/visits/:id/close — a leak repair closed as resolved', () => {
  async function repairVisit() {
    const booked = await onSiteVisit();
    const [lc] = await t.ctx.db
      .insert(leakCases)
      .values({
        branchId: f.a.id,
        unitId: place.unit.id,
        openedOn: '2026-03-01',
        rule: '40 CFR 82.157',
        method: 'annualizing',
        thresholdPercent: 10,
        leakRatePercent: 25,
        repairDueDate: '2026-03-31',
        repairWorkOrderId: booked.workOrder.id,
      })
      .returning();
    return { ...booked, leakCase: lc! };
  }
  const clearCases = () => t.ctx.db.update(leakCases).set({ status: 'closed' }).where(eq(leakCases.unitId, place.unit.id));

  it('asks for an explicit confirmation without a verification test or refrigerant entry (422), then closes with it', async () => {
    await clearCases();
    const { visit, leakCase } = await repairVisit();
    const detail = await tech.get(`/api/visits/${visit.id}`);
    expect(detail.body.leakRepair).toEqual({ leakCaseId: leakCase.id, repairDueDate: '2026-03-31', verificationTests: 0 });
    const refused = await tech.post(`/api/visits/${visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' });
    expect(refused.status).toBe(422);
    expect(refused.body.error.code).toBe('leak_repair_unverified');
    expect(refused.body.error.message).toMatch(/neither a verification test nor a refrigerant entry/);
    expect((await t.ctx.db.select().from(visits).where(eq(visits.id, visit.id)))[0]!.closedAt).toBeNull();
    // `false` is no confirmation.
    expect(
      (
        await tech
          .post(`/api/visits/${visit.id}/close`)
          .send({ signature: NOT_AVAILABLE, outcome: 'resolved', confirmedWithoutVerification: false })
      ).status,
    ).toBe(422);
    const ok = await tech
      .post(`/api/visits/${visit.id}/close`)
      .send({ signature: NOT_AVAILABLE, outcome: 'resolved', confirmedWithoutVerification: true });
    expect(ok.status).toBe(200);
  });

  it('needs no confirmation with a refrigerant entry, with a verification test, or when the repair is not closed as resolved', async () => {
    await clearCases();
    const a = await repairVisit();
    expect(
      (
        await tech
          .post(`/api/units/${place.unit.id}/refrigerant-events`)
          .send({ visitId: a.visit.id, refrigerant: 'R-410A', poundsAdded: 4, reason: 'repair_recharge' })
      ).status,
    ).toBe(201);
    expect((await tech.post(`/api/visits/${a.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' })).status).toBe(200);
    await clearCases();
    const b = await repairVisit();
    await t.ctx.db.insert(verificationTests).values({ leakCaseId: b.leakCase.id, kind: 'initial', testedOn: '2026-03-10', passed: true });
    expect((await tech.get(`/api/visits/${b.visit.id}`)).body.leakRepair.verificationTests).toBe(1);
    expect((await tech.post(`/api/visits/${b.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' })).status).toBe(200);
    await clearCases();
    const c = await repairVisit();
    expect((await tech.post(`/api/visits/${c.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'declined' })).status).toBe(200);
    await clearCases();
  });
});

describe('Fix Quality follows the marked root cause', () => {
  it('counts each call under its marked cause and origin, and reviews a factory defect only when it is the root cause', async () => {
    // Hand-worked history in a branch of its own (branch B, 30-day window), all closed on 2026-04-06:
    //  J1: findings airflow/wear (typed first) and compressor component_failure/factory_defect; marked: the second.
    //  J2: findings wiring_fault/factory_defect (typed first) and settings/installation; marked: the second.
    //  J3: one finding airflow/wear (the default).
    // Expected in April 2026, once mature (report at 2026-06-03): byCause component_failure 1, settings 1,
    // airflow 1; byOrigin factory_defect 1, installation 1, wear 1 (the first-typed findings would give
    // airflow 2, wiring_fault 1 and wear 2, factory_defect 1). Factory-defect review: J1 only.
    now = new Date('2026-04-06T15:00:00Z');
    const b = f.b;
    const techB = await signedInAgent(t.app, f.inB.technician.email, TEST_PASSWORD);
    const placeB = await makeSiteWithUnit(t.ctx.db, b.id, { unit: { make: 'Testmake', model: 'RC-2' } });
    const visitB = () =>
      makeBookedVisit(t.ctx.db, {
        branchId: b.id,
        siteId: placeB.site.id,
        unitId: placeB.unit.id,
        techId: f.inB.technician.id,
        startAt: '2026-04-06T13:00:00Z',
        onSite: true,
        workOrder: { createdAt: new Date('2026-04-06T12:00:00Z') },
      });
    const find = async (visitId: string, causeCode: string, origin: string) => {
      const res = await techB.post(`/api/visits/${visitId}/findings`).send({ causeCode, origin });
      expect(res.status).toBe(201);
      return res.body.finding.id as string;
    };
    const j1 = await visitB();
    await find(j1.visit.id, 'airflow', 'wear');
    const j1root = await find(j1.visit.id, 'component_failure', 'factory_defect');
    expect(
      (
        await techB
          .post(`/api/visits/${j1.visit.id}/close`)
          .send({ signature: NOT_AVAILABLE, outcome: 'resolved', rootCauseFindingId: j1root })
      ).status,
    ).toBe(200);
    const j2 = await visitB();
    await find(j2.visit.id, 'wiring_fault', 'factory_defect');
    const j2root = await find(j2.visit.id, 'settings', 'installation');
    expect(
      (
        await techB
          .post(`/api/visits/${j2.visit.id}/close`)
          .send({ signature: NOT_AVAILABLE, outcome: 'resolved', rootCauseFindingId: j2root })
      ).status,
    ).toBe(200);
    const j3 = await visitB();
    await find(j3.visit.id, 'airflow', 'wear');
    expect((await techB.post(`/api/visits/${j3.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' })).status).toBe(200);

    now = new Date('2026-06-03T18:00:00Z');
    owner = await signedInAgent(t.app, f.owner.email, TEST_PASSWORD); // a session from March has expired by June
    const res = await owner.get('/api/reports/fix-quality').query({ from: '2026-04-01', to: '2026-04-30', branchId: b.id });
    expect(res.status).toBe(200);
    const counts = (groups: { key: string; eligible: number }[]) => Object.fromEntries(groups.map((g) => [g.key, g.eligible]));
    expect(counts(res.body.byCause)).toEqual({ component_failure: 1, settings: 1, airflow: 1 });
    expect(counts(res.body.byOrigin)).toEqual({ factory_defect: 1, installation: 1, wear: 1 });

    const review = await owner
      .get('/api/reports/fix-quality/factory-defects')
      .query({ from: '2026-04-01', to: '2026-04-30', branchId: b.id });
    expect(review.status).toBe(200);
    expect(review.body.cases.map((c: { workOrderId: string }) => c.workOrderId)).toEqual([j1.workOrder.id]);
    expect(review.body.cases[0].causeCodes).toEqual(['component_failure']);
  });
});
