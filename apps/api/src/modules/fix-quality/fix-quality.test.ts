import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import Papa from 'papaparse';
import { and, eq } from 'drizzle-orm';
import { addDays, zonedDate, zonedInstant } from '@coilpath/calc';
import type { CauseCode, CauseOrigin, FixQualityReport, ModelAlert, VisitOutcome, WorkOrderKind } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, TEST_PASSWORD } from '../../testing/fixtures';
import { branches, findings, refrigerantEvents, sites, units, users, visits, workOrders } from '../../db/schema';
import { pdfFontNames, readPdf } from '../../testing/pdf-text';

/**
 * A hand-built fixture whose figures are worked out by hand below. Period: 1–31 March 2026 (UTC dates);
 * the previous period of equal length (31 days) is 29 January – 28 February 2026.
 *
 * Branch A (callback window 30 days, labour $90/h, refrigerant $50/lb); branch B (window 14 days,
 * labour $120/h, refrigerant $40/lb). Units: U1 Testmake TM-10 at S1 (A), U2 Acme AX-1 at S2 (A),
 * U3 Testmake TM-10 at S3 (B). Technicians TA1, TA2 (A) and TB1 (B).
 *
 * Service calls ("jobs"), first visit = earliest closed visit:
 *  J1  A U1 TA1 opened 03-01 08:00, visit closed 03-02 10:00 resolved (airflow/wear). No follow-up.
 *  J2  A U1 TA1 opened 03-03 08:00, closed 03-03 12:00 resolved (sensor_fault/prior_service);
 *      callback opened 03-20 09:00 (17 d, inside 30), its visit (TA2) closed 03-21 12:00 resolved,
 *      finding wiring_fault/factory_defect, 90 labour minutes, 2.5 lb added.
 *  J3  A U2 TA1 opened 03-05 08:00, closed 03-05 16:00 needs_return (refrigerant_leak/wear);
 *      return visit opened 03-06 08:00, its visit closed 03-08 16:00 resolved,
 *      finding component_failure/factory_defect, 60 labour minutes.
 *  J4  A U2 TA2 opened 03-10 08:00, closed 03-10 12:00 declined. Not eligible.
 *  J5  A U2 TA2 opened 03-12 08:00, closed 03-12 12:00 resolved; callback opened 04-20 12:00
 *      (39 d, outside 30), no visit yet.
 *  J6  B U3 TB1 opened 03-15 08:00, closed 03-15 12:00 resolved (settings/external); callback opened
 *      03-25 12:00 (10 d, inside 14), its visit on site 03-26 10:00 closed 12:00 resolved,
 *      finding wiring_fault/factory_defect, no labour minutes recorded (on site → close = 120 min); a return
 *      visit booked off that callback (origin = the callback) took 30 labour minutes.
 *  J7  B U3 TB1 opened 03-16 08:00, closed 03-16 12:00 resolved; callback opened 04-05 12:00
 *      (20 d: outside B's 14-day window although inside 30), no visit.
 *  J10 A U1 TA2 opened 03-31 20:00, closed 03-31 23:30 resolved (last half hour of the period).
 *  J11 A U1 TA2 opened 03-31 22:00, closed 04-01 00:10 resolved: after the period, not counted.
 *  PM  A U1 planned maintenance closed 03-10: not a service call, not counted.
 *  J8  A U1 TA1 opened 02-10 08:00, closed 02-10 12:00 resolved.               (previous period)
 *  J9  A U1 TA1 opened 02-20 08:00, closed 02-20 12:00 resolved, callback 02-25. (previous period)
 */

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
const ids: Record<string, string> = {};
const owner = () => signedInAgent(t.app, f.owner.email, TEST_PASSWORD);
const Q = '/api/reports/fix-quality?from=2026-03-01&to=2026-03-31';

async function workOrder(v: {
  branchId: string;
  siteId: string;
  unitId: string;
  kind: WorkOrderKind;
  openedAt: string;
  originWorkOrderId?: string;
  purpose?: string;
  state?: 'unplaced' | 'closed' | 'cancelled';
}) {
  const [w] = await t.ctx.db
    .insert(workOrders)
    .values({
      branchId: v.branchId,
      siteId: v.siteId,
      unitId: v.unitId,
      kind: v.kind,
      state: v.state ?? 'closed',
      createdAt: new Date(v.openedAt),
      originWorkOrderId: v.originWorkOrderId,
      purpose: v.purpose,
    })
    .returning();
  return w!;
}

async function visit(v: {
  branchId: string;
  workOrderId: string;
  techId: string;
  closedAt: string;
  outcome: VisitOutcome;
  onSiteAt?: string;
  labourMinutes?: number;
  finding?: { unitId: string; causeCode: CauseCode; origin: CauseOrigin };
}) {
  const [row] = await t.ctx.db
    .insert(visits)
    .values({
      branchId: v.branchId,
      workOrderId: v.workOrderId,
      techId: v.techId,
      onSiteAt: v.onSiteAt ? new Date(v.onSiteAt) : null,
      closedAt: new Date(v.closedAt),
      outcome: v.outcome,
      labourMinutes: v.labourMinutes ?? null,
    })
    .returning();
  if (v.finding) await t.ctx.db.insert(findings).values({ visitId: row!.id, ...v.finding });
  return row!;
}

/** A service call with its first visit (and optional finding). */
async function job(
  name: string,
  v: {
    branchId: string;
    siteId: string;
    unitId: string;
    techId: string;
    openedAt: string;
    closedAt: string;
    outcome: VisitOutcome;
    finding?: [CauseCode, CauseOrigin];
  },
) {
  const w = await workOrder({ ...v, kind: 'service_call' });
  ids[name] = w.id;
  await visit({
    branchId: v.branchId,
    workOrderId: w.id,
    techId: v.techId,
    closedAt: v.closedAt,
    outcome: v.outcome,
    ...(v.finding ? { finding: { unitId: v.unitId, causeCode: v.finding[0], origin: v.finding[1] } } : {}),
  });
  return w;
}

let fx: {
  ta1: { id: string };
  ta2: { id: string };
  tb1: { id: string };
  u1: Awaited<ReturnType<typeof makeSiteWithUnit>>;
  u2: Awaited<ReturnType<typeof makeSiteWithUnit>>;
  u3: Awaited<ReturnType<typeof makeSiteWithUnit>>;
};

beforeAll(async () => {
  t = await createTestApp({ now: '2026-07-01T12:00:00Z' });
  const db = t.ctx.db;
  f = await makeTwoBranches(db);
  await db
    .update(branches)
    .set({ callbackWindowDays: 30, labourRateCents: 9000, refrigerantPriceCentsPerLb: 5000 })
    .where(eq(branches.id, f.a.id));
  await db
    .update(branches)
    .set({ callbackWindowDays: 14, labourRateCents: 12000, refrigerantPriceCentsPerLb: 4000 })
    .where(eq(branches.id, f.b.id));
  const A = f.a.id;
  const B = f.b.id;
  fx = {
    ta1: f.inA.technician,
    ta2: await makeUser(db, 'technician', A),
    tb1: f.inB.technician,
    u1: await makeSiteWithUnit(db, A, { unit: { make: 'Testmake', model: 'TM-10' } }),
    u2: await makeSiteWithUnit(db, A, { unit: { make: 'Acme', model: 'AX-1' } }),
    u3: await makeSiteWithUnit(db, B, { unit: { make: 'Testmake', model: 'TM-10' } }),
  };
  const { ta1, ta2, tb1, u1, u2, u3 } = fx;
  const at = (u: typeof u1) => ({ siteId: u.site.id, unitId: u.unit.id });

  await job('J1', {
    branchId: A,
    ...at(u1),
    techId: ta1.id,
    openedAt: '2026-03-01T08:00:00Z',
    closedAt: '2026-03-02T10:00:00Z',
    outcome: 'resolved',
    finding: ['airflow', 'wear'],
  });

  const j2 = await job('J2', {
    branchId: A,
    ...at(u1),
    techId: ta1.id,
    openedAt: '2026-03-03T08:00:00Z',
    closedAt: '2026-03-03T12:00:00Z',
    outcome: 'resolved',
    finding: ['sensor_fault', 'prior_service'],
  });
  const j2cb = await workOrder({ branchId: A, ...at(u1), kind: 'callback', openedAt: '2026-03-20T09:00:00Z', originWorkOrderId: j2.id });
  ids.J2cb = j2cb.id;
  const j2cbVisit = await visit({
    branchId: A,
    workOrderId: j2cb.id,
    techId: ta2.id,
    closedAt: '2026-03-21T12:00:00Z',
    outcome: 'resolved',
    labourMinutes: 90,
    finding: { unitId: u1.unit.id, causeCode: 'wiring_fault', origin: 'factory_defect' },
  });
  await db.insert(refrigerantEvents).values({
    unitId: u1.unit.id,
    visitId: j2cbVisit.id,
    date: '2026-03-21',
    refrigerant: 'R-410A',
    poundsAdded: 2.5,
    reason: 'leak_top_off',
  });

  const j3 = await job('J3', {
    branchId: A,
    ...at(u2),
    techId: ta1.id,
    openedAt: '2026-03-05T08:00:00Z',
    closedAt: '2026-03-05T16:00:00Z',
    outcome: 'needs_return',
    finding: ['refrigerant_leak', 'wear'],
  });
  const j3rv = await workOrder({
    branchId: A,
    ...at(u2),
    kind: 'return_visit',
    openedAt: '2026-03-06T08:00:00Z',
    originWorkOrderId: j3.id,
  });
  ids.J3rv = j3rv.id;
  await visit({
    branchId: A,
    workOrderId: j3rv.id,
    techId: ta1.id,
    closedAt: '2026-03-08T16:00:00Z',
    outcome: 'resolved',
    labourMinutes: 60,
    finding: { unitId: u2.unit.id, causeCode: 'component_failure', origin: 'factory_defect' },
  });

  await job('J4', {
    branchId: A,
    ...at(u2),
    techId: ta2.id,
    openedAt: '2026-03-10T08:00:00Z',
    closedAt: '2026-03-10T12:00:00Z',
    outcome: 'declined',
  });

  const j5 = await job('J5', {
    branchId: A,
    ...at(u2),
    techId: ta2.id,
    openedAt: '2026-03-12T08:00:00Z',
    closedAt: '2026-03-12T12:00:00Z',
    outcome: 'resolved',
  });
  await workOrder({
    branchId: A,
    ...at(u2),
    kind: 'callback',
    openedAt: '2026-04-20T12:00:00Z',
    originWorkOrderId: j5.id,
    state: 'unplaced',
  });

  const j6 = await job('J6', {
    branchId: B,
    ...at(u3),
    techId: tb1.id,
    openedAt: '2026-03-15T08:00:00Z',
    closedAt: '2026-03-15T12:00:00Z',
    outcome: 'resolved',
    finding: ['settings', 'external'],
  });
  const j6cb = await workOrder({ branchId: B, ...at(u3), kind: 'callback', openedAt: '2026-03-25T12:00:00Z', originWorkOrderId: j6.id });
  ids.J6cb = j6cb.id;
  await visit({
    branchId: B,
    workOrderId: j6cb.id,
    techId: tb1.id,
    onSiteAt: '2026-03-26T10:00:00Z',
    closedAt: '2026-03-26T12:00:00Z',
    outcome: 'resolved',
    finding: { unitId: u3.unit.id, causeCode: 'wiring_fault', origin: 'factory_defect' },
  });

  // A return visit booked off J6's callback (origin = the callback, so not a follow-up of J6 itself): 30 labour minutes.
  const j6rv = await workOrder({
    branchId: B,
    ...at(u3),
    kind: 'return_visit',
    openedAt: '2026-03-27T08:00:00Z',
    originWorkOrderId: j6cb.id,
  });
  await visit({
    branchId: B,
    workOrderId: j6rv.id,
    techId: tb1.id,
    closedAt: '2026-03-28T12:00:00Z',
    outcome: 'resolved',
    labourMinutes: 30,
  });

  const j7 = await job('J7', {
    branchId: B,
    ...at(u3),
    techId: tb1.id,
    openedAt: '2026-03-16T08:00:00Z',
    closedAt: '2026-03-16T12:00:00Z',
    outcome: 'resolved',
  });
  await workOrder({
    branchId: B,
    ...at(u3),
    kind: 'callback',
    openedAt: '2026-04-05T12:00:00Z',
    originWorkOrderId: j7.id,
    state: 'unplaced',
  });

  await job('J10', {
    branchId: A,
    ...at(u1),
    techId: ta2.id,
    openedAt: '2026-03-31T20:00:00Z',
    closedAt: '2026-03-31T23:30:00Z',
    outcome: 'resolved',
  });
  await job('J11', {
    branchId: A,
    ...at(u1),
    techId: ta2.id,
    openedAt: '2026-03-31T22:00:00Z',
    closedAt: '2026-04-01T00:10:00Z',
    outcome: 'resolved',
  });
  const pm = await workOrder({ branchId: A, ...at(u1), kind: 'planned_maintenance', openedAt: '2026-03-01T00:00:00Z' });
  await visit({ branchId: A, workOrderId: pm.id, techId: ta1.id, closedAt: '2026-03-10T12:00:00Z', outcome: 'resolved' });

  await job('J8', {
    branchId: A,
    ...at(u1),
    techId: ta1.id,
    openedAt: '2026-02-10T08:00:00Z',
    closedAt: '2026-02-10T12:00:00Z',
    outcome: 'resolved',
  });
  const j9 = await job('J9', {
    branchId: A,
    ...at(u1),
    techId: ta1.id,
    openedAt: '2026-02-20T08:00:00Z',
    closedAt: '2026-02-20T12:00:00Z',
    outcome: 'resolved',
  });
  await workOrder({
    branchId: A,
    ...at(u1),
    kind: 'callback',
    openedAt: '2026-02-25T08:00:00Z',
    originWorkOrderId: j9.id,
    state: 'unplaced',
  });
});
afterAll(() => t.close());

const group = (r: FixQualityReport, table: 'byBranch' | 'byTechnician' | 'byMonth' | 'byModel' | 'byCause' | 'byOrigin', key: string) => {
  const g = r[table].find((x) => x.key === key);
  if (!g) throw new Error(`no ${table} group ${key}: ${r[table].map((x) => x.key).join(', ')}`);
  return g;
};

describe('GET /api/reports/fix-quality', () => {
  it('computes the headline figures of the hand-built fixture', async () => {
    const res = await (await owner()).get(Q);
    expect(res.status).toBe(200);
    const r = res.body as FixQualityReport;
    // Jobs whose first visit closed in March: J1 J2 J3 J4 J5 J6 J7 J10 (J11 closed 1 April, PM is not a service call).
    // Eligible = all but J4 (declined) = 7.
    expect(r.eligible).toBe(7);
    // Resolved on the first visit: J1 J2 J5 J6 J7 J10 = 6 (J3 needed a return).
    expect(r.resolvedFirstVisits).toBe(6);
    // First-time fixed: J1; J5 (its callback came after 39 d > 30); J7 (20 d > B's 14); J10 = 4. 4 / 7.
    expect(r.firstTimeFixed).toBe(4);
    expect(r.firstTimeFixRate).toBeCloseTo(4 / 7, 10);
    // Callbacks inside the window: J2 (17 d ≤ 30) and J6 (10 d ≤ 14) = 2; over 6 resolved first visits.
    expect(r.callbacks).toBe(2);
    expect(r.callbackRate).toBeCloseTo(2 / 6, 10);
    // Return visits: J3's one, over 7 eligible (J4 is declined and not counted).
    expect(r.returnVisits).toBe(1);
    expect(r.returnVisitsPerServiceCall).toBeCloseTo(1 / 7, 10);
    // Days from opened to the last visit of the chain closing resolved:
    //  J1 26 h = 26/24; J2 03-03 08:00 → 03-21 12:00 = 18 d 4 h = 18 + 4/24; J3 → 03-08 16:00 = 3 d 8 h = 3 + 8/24;
    //  J5 4 h (its callback has no visit); J6 → 03-26 12:00 = 11 d 4 h = 11 + 4/24; J7 4 h; J10 3.5 h.
    const days = [26 / 24, 18 + 4 / 24, 3 + 8 / 24, 4 / 24, 11 + 4 / 24, 4 / 24, 3.5 / 24];
    expect(r.resolvedJobs).toBe(7);
    expect(r.avgDaysToResolve).toBeCloseTo(days.reduce((a, b) => a + b, 0) / 7, 8);
    // The callback windows of the branches shown.
    expect(r.windowDays).toEqual([14, 30]);
  });

  it('compares with the previous period of equal length', async () => {
    const r = (await (await owner()).get(Q)).body as FixQualityReport;
    expect(r.previousPeriod).toEqual({ from: '2026-01-29', to: '2026-02-28' });
    // Previous: J8 (fixed) and J9 (callback after 5 d) → eligible 2, fixed 1, callbacks 1 of 2 resolved.
    expect(r.previous.eligible).toBe(2);
    expect(r.previous.firstTimeFixRate).toBeCloseTo(1 / 2, 10);
    expect(r.previous.callbackRate).toBeCloseTo(1 / 2, 10);
    expect(r.previous.returnVisitsPerServiceCall).toBe(0);
    expect(r.previous.avgDaysToResolve).toBeCloseTo(4 / 24, 8);
    expect(r.change.firstTimeFixRate).toBeCloseTo(4 / 7 - 1 / 2, 10);
    expect(r.change.callbackRate).toBeCloseTo(2 / 6 - 1 / 2, 10);
    expect(r.change.eligible).toBe(5);
  });

  it('breaks the figures down by branch, technician, month, model, cause and origin', async () => {
    const r = (await (await owner()).get(Q)).body as FixQualityReport;
    // Branch A: J1 J2 J3 J5 J10 eligible (J4 declined); fixed J1 J5 J10; callback J2 of resolved J1 J2 J5 J10.
    const a = group(r, 'byBranch', f.a.id);
    expect([a.eligible, a.firstTimeFixed, a.callbacks, a.resolvedFirstVisits, a.returnVisits]).toEqual([5, 3, 1, 4, 1]);
    expect(a.firstTimeFixRate).toBeCloseTo(3 / 5, 10);
    expect(a.callbackRate).toBeCloseTo(1 / 4, 10);
    // Branch B: J6 J7; fixed J7; callback J6.
    const b = group(r, 'byBranch', f.b.id);
    expect([b.eligible, b.firstTimeFixed, b.callbacks]).toEqual([2, 1, 1]);
    expect(b.label).toBe('Bravo');
    // Technician of the first visit: TA1 J1 J2 J3 → fixed J1 (1/3), callback J2 of resolved J1 J2 (1/2).
    const ta1 = group(r, 'byTechnician', fx.ta1.id);
    expect([ta1.eligible, ta1.firstTimeFixed, ta1.callbacks, ta1.resolvedFirstVisits]).toEqual([3, 1, 1, 2]);
    // TA2 J4 (declined) J5 J10 → eligible 2, both fixed; J2's callback visit by TA2 does not count for TA2.
    const ta2 = group(r, 'byTechnician', fx.ta2.id);
    expect([ta2.eligible, ta2.firstTimeFixed, ta2.callbacks]).toEqual([2, 2, 0]);
    expect(ta2.firstTimeFixRate).toBe(1);
    expect(r.byTechnician).toHaveLength(3);
    // Month (UTC) of the first visit's close: all in 2026-03 (J10 closed 23:30 UTC on the 31st).
    expect(r.byMonth.map((m) => m.key)).toEqual(['2026-03']);
    expect(r.byMonth[0]!.eligible).toBe(7);
    // Make and model: TM-10 J1 J2 J10 J6 J7 → fixed J1 J10 J7 = 3 of 5; AX-1 J3 J5 (J4 declined) → fixed J5 = 1 of 2.
    const tm = group(r, 'byModel', 'Testmake|TM-10');
    expect([tm.eligible, tm.firstTimeFixed, tm.label]).toEqual([5, 3, 'Testmake TM-10']);
    const ax = group(r, 'byModel', 'Acme|AX-1');
    expect([ax.eligible, ax.firstTimeFixed]).toEqual([2, 1]);
    // Cause and origin of the first visit's finding.
    expect([group(r, 'byCause', 'sensor_fault').eligible, group(r, 'byCause', 'sensor_fault').callbacks]).toEqual([1, 1]);
    expect(group(r, 'byCause', 'settings').callbacks).toBe(1);
    // No finding on J5, J7, J10 (and declined J4): 3 eligible, all fixed.
    const none = group(r, 'byCause', '(none recorded)');
    expect([none.eligible, none.firstTimeFixed]).toEqual([3, 3]);
    // Origin wear: J1 (fixed) and J3 (return) → 1 of 2.
    const wear = group(r, 'byOrigin', 'wear');
    expect([wear.eligible, wear.firstTimeFixed]).toEqual([2, 1]);
  });

  it('answers nulls when nothing is eligible', async () => {
    const r = (await (await owner()).get('/api/reports/fix-quality?from=2025-06-01&to=2025-06-30')).body as FixQualityReport;
    expect(r.eligible).toBe(0);
    expect(r.firstTimeFixRate).toBeNull();
    expect(r.callbackRate).toBeNull();
    expect(r.avgDaysToResolve).toBeNull();
    expect(r.byMonth.map((m) => m.key)).toEqual(['2025-06']);
  });

  it('limits a branch manager to the own branch', async () => {
    const m = await signedInAgent(t.app, f.inB.manager.email, TEST_PASSWORD);
    const r = (await m.get(Q)).body as FixQualityReport;
    expect(r.branchId).toBe(f.b.id);
    expect(r.eligible).toBe(2);
    expect(r.byBranch.map((g) => g.key)).toEqual([f.b.id]);
    expect((await m.get(`${Q}&branchId=${f.a.id}`)).status).toBe(404);
  });

  it('lets the owner pick one branch', async () => {
    const r = (await (await owner()).get(`${Q}&branchId=${f.a.id}`)).body as FixQualityReport;
    expect(r.eligible).toBe(5);
    expect(r.windowDays).toEqual([30]);
  });

  it('refuses technicians and dispatchers (403), strangers (401) and bad periods (400)', async () => {
    const tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
    expect((await tech.get(Q)).status).toBe(403);
    expect((await tech.get('/api/reports/fix-quality/model-alerts')).status).toBe(403);
    const disp = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
    expect((await disp.get(Q)).status).toBe(403);
    expect((await request(t.app).get(Q)).status).toBe(401);
    const bad = await (await owner()).get('/api/reports/fix-quality?from=2026-03-31&to=2026-03-01');
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.fields[0].path).toBe('to');
  });
});

describe('factory-defect review and warranty claims', () => {
  it('lists callbacks and return visits with a factory-defect finding, costed at branch rates', async () => {
    const res = await (await owner()).get('/api/reports/fix-quality/factory-defects?from=2026-03-01&to=2026-03-31');
    expect(res.status).toBe(200);
    const cases = res.body.cases as {
      workOrderId: string;
      labourCostCents: number;
      refrigerantCostCents: number;
      costCents: number;
      claim: { status: string };
    }[];
    expect(cases.map((c) => c.workOrderId).sort()).toEqual([ids.J2cb, ids.J3rv, ids.J6cb].sort());
    const j2cb = cases.find((c) => c.workOrderId === ids.J2cb)!;
    // 90 min × $90/h = $135.00; 2.5 lb × $50 = $125.00.
    expect([j2cb.labourCostCents, j2cb.refrigerantCostCents, j2cb.costCents]).toEqual([13_500, 12_500, 26_000]);
    expect(j2cb.claim.status).toBe('to_claim');
    // No labour minutes recorded: on site 10:00 → closed 12:00 = 120 min, plus the 30 min return visit booked off
    // the callback = 150 min = 2.5 h × $120/h = $300.00 (branch B).
    expect(cases.find((c) => c.workOrderId === ids.J6cb)!.costCents).toBe(30_000);
    const tm = (
      res.body.models as {
        key: string;
        cases: number;
        callbacks: number;
        unitsAffected: number;
        sitesAffected: number;
        labourHours: number;
        costCents: number;
      }[]
    ).find((m) => m.key === 'Testmake|TM-10')!;
    // 1.5 h + 2.5 h = 4 h; $260 + $300 = $560.
    expect([tm.cases, tm.callbacks, tm.unitsAffected, tm.sitesAffected, tm.labourHours, tm.costCents]).toEqual([2, 2, 2, 2, 4, 56_000]);
  });

  it('records a claim (owner), refuses a work order without a factory defect and other branches', async () => {
    const o = await owner();
    // Claimed without an amount: the amount defaults to the case's computed cost ($260.00, worked out above).
    const byDefault = await o.patch(`/api/warranty-claims/${ids.J2cb}`).send({ status: 'claimed' });
    expect(byDefault.status).toBe(200);
    expect(byDefault.body.claim.amountCents).toBe(26_000);
    // A different amount is kept and its difference from the cost shown: $250.00 − $260.00 = −$10.00.
    await o.patch(`/api/warranty-claims/${ids.J2cb}`).send({ status: 'claimed', amountCents: 25_000 });
    const diffCase = (await o.get('/api/reports/fix-quality/factory-defects?from=2026-03-01&to=2026-03-31')).body.cases.find(
      (c: { workOrderId: string }) => c.workOrderId === ids.J2cb,
    );
    expect(diffCase.amountDifferenceCents).toBe(-1_000);
    const ok = await o.patch(`/api/warranty-claims/${ids.J2cb}`).send({ status: 'claimed', amountCents: 26_000, reference: 'TM-CLM-1' });
    expect(ok.status).toBe(200);
    expect(ok.body.claim).toMatchObject({ status: 'claimed', amountCents: 26_000, reference: 'TM-CLM-1' });
    // Stamped with the app's clock (this file runs at 2026-07-01 12:00 UTC), not the machine's.
    expect(ok.body.claim.updatedAt).toBe('2026-07-01T12:00:00.000Z');
    const paid = await o.patch(`/api/warranty-claims/${ids.J2cb}`).send({ status: 'paid' });
    expect(paid.body.claim).toMatchObject({ status: 'paid', amountCents: 26_000, reference: 'TM-CLM-1' });
    const review = await o.get('/api/reports/fix-quality/factory-defects?from=2026-03-01&to=2026-03-31');
    const tm = review.body.models.find((m: { key: string }) => m.key === 'Testmake|TM-10');
    expect(tm.paidCents).toBe(26_000);
    expect(tm.toClaimCents).toBe(30_000); // J6's callback, still to claim, at its cost
    expect((await o.patch(`/api/warranty-claims/${ids.J1}`).send({ status: 'claimed', amountCents: 1 })).status).toBe(422);
    const mB = await signedInAgent(t.app, f.inB.manager.email, TEST_PASSWORD);
    expect((await mB.patch(`/api/warranty-claims/${ids.J2cb}`).send({ status: 'denied' })).status).toBe(404);
    expect((await mB.patch(`/api/warranty-claims/${ids.J6cb}`).send({ status: 'denied' })).status).toBe(200);
    const tech = await signedInAgent(t.app, f.inB.technician.email, TEST_PASSWORD);
    expect((await tech.patch(`/api/warranty-claims/${ids.J6cb}`).send({ status: 'to_claim' })).status).toBe(403);
    expect((await o.patch(`/api/warranty-claims/${ids.J6cb}`).send({ status: 'refunded' })).status).toBe(400);
  });
});

describe('factory defects found on the first visit', () => {
  it('counts a service call whose first visit found a factory defect, costed on its own visits', async () => {
    // May 2026, branch A ($90/h, $50/lb): FV1 opened 05-04 08:00, its first visit 60 labour minutes, 1.2 lb
    // added, finding component_failure/factory_defect → $90.00 + $60.00 = $150.00. A callback booked off it
    // (05-10, 30 min, no finding) is not part of the case: a service call's follow-ups are cases of their own.
    const A = f.a.id;
    const w = await workOrder({
      branchId: A,
      siteId: fx.u2.site.id,
      unitId: fx.u2.unit.id,
      kind: 'service_call',
      openedAt: '2026-05-04T08:00:00Z',
    });
    const v = await visit({
      branchId: A,
      workOrderId: w.id,
      techId: fx.ta1.id,
      closedAt: '2026-05-04T12:00:00Z',
      outcome: 'resolved',
      labourMinutes: 60,
      finding: { unitId: fx.u2.unit.id, causeCode: 'component_failure', origin: 'factory_defect' },
    });
    await t.ctx.db.insert(refrigerantEvents).values({
      unitId: fx.u2.unit.id,
      visitId: v.id,
      date: '2026-05-04',
      refrigerant: 'R-410A',
      poundsAdded: 1.2,
      poundsRecovered: 0,
      reason: 'leak_top_off',
    });
    const cb = await workOrder({
      branchId: A,
      siteId: fx.u2.site.id,
      unitId: fx.u2.unit.id,
      kind: 'callback',
      openedAt: '2026-05-10T08:00:00Z',
      originWorkOrderId: w.id,
    });
    await visit({
      branchId: A,
      workOrderId: cb.id,
      techId: fx.ta1.id,
      closedAt: '2026-05-10T12:00:00Z',
      outcome: 'resolved',
      labourMinutes: 30,
    });
    const o = await owner();
    const review = (await o.get('/api/reports/fix-quality/factory-defects?from=2026-05-01&to=2026-05-31')).body;
    expect(review.cases.map((c: { workOrderId: string }) => c.workOrderId)).toEqual([w.id]);
    expect(review.cases[0]).toMatchObject({
      kind: 'service_call',
      visits: 1,
      labourCostCents: 9_000,
      refrigerantCostCents: 6_000,
      costCents: 15_000,
      amountDifferenceCents: null,
    });
    expect(review.models[0]).toMatchObject({
      key: 'Acme|AX-1',
      cases: 1,
      firstVisits: 1,
      callbacks: 0,
      returnVisits: 0,
      toClaimCents: 15_000,
    });
    // Claimable: paid without an amount records the computed cost.
    const paid = await o.patch(`/api/warranty-claims/${w.id}`).send({ status: 'paid' });
    expect(paid.status).toBe(200);
    expect(paid.body.claim.amountCents).toBe(15_000);
  });
});

describe('model alerts', () => {
  /** More TM-10 units, each with a different reason to be (or not be) checked. */
  let more: Record<'u4' | 'u5' | 'u6' | 'u7' | 'u8' | 'u9' | 'u12', string>;
  beforeAll(async () => {
    const db = t.ctx.db;
    const tm = { unit: { make: 'Testmake', model: 'TM-10' } };
    const u4 = await makeSiteWithUnit(db, f.a.id, tm); // never visited: unchecked
    const u5 = await makeSiteWithUnit(db, f.b.id, tm); // wiring fault found 2025-10-01, before the alert: unchecked
    const u6 = await makeSiteWithUnit(db, f.a.id, tm); // inspection work order with the alert's purpose: checked
    const u7 = await makeSiteWithUnit(db, f.b.id, tm); // closed visit 04-10 after the alert, for other work: unchecked
    const u8 = await makeSiteWithUnit(db, f.b.id, tm); // closed visit 03-22, before it was raised (03-26 12:00): unchecked
    const u12 = await makeSiteWithUnit(db, f.a.id, tm); // wiring fault (wear) found 04-12, after the alert: checked
    const u9 = await makeSiteWithUnit(db, f.a.id, tm); // archived: not listed
    await db
      .update(units)
      .set({ archivedAt: new Date('2026-01-01T00:00:00Z') })
      .where(eq(units.id, u9.unit.id));
    const at = (u: typeof u4) => ({ siteId: u.site.id, unitId: u.unit.id });
    const w5 = await workOrder({ branchId: f.b.id, ...at(u5), kind: 'planned_maintenance', openedAt: '2025-10-01T08:00:00Z' });
    await visit({
      branchId: f.b.id,
      workOrderId: w5.id,
      techId: fx.tb1.id,
      closedAt: '2025-10-01T12:00:00Z',
      outcome: 'resolved',
      finding: { unitId: u5.unit.id, causeCode: 'wiring_fault', origin: 'installation' },
    });
    await workOrder({
      branchId: f.a.id,
      ...at(u6),
      kind: 'planned_maintenance',
      openedAt: '2026-04-01T08:00:00Z',
      purpose: 'model-alert:Testmake|TM-10|wiring_fault',
      state: 'unplaced',
    });
    const w7 = await workOrder({ branchId: f.b.id, ...at(u7), kind: 'planned_maintenance', openedAt: '2026-04-10T08:00:00Z' });
    await visit({ branchId: f.b.id, workOrderId: w7.id, techId: fx.tb1.id, closedAt: '2026-04-10T12:00:00Z', outcome: 'resolved' });
    const w8 = await workOrder({ branchId: f.b.id, ...at(u8), kind: 'planned_maintenance', openedAt: '2026-03-22T08:00:00Z' });
    await visit({ branchId: f.b.id, workOrderId: w8.id, techId: fx.tb1.id, closedAt: '2026-03-22T12:00:00Z', outcome: 'resolved' });
    const w12 = await workOrder({ branchId: f.a.id, ...at(u12), kind: 'service_call', openedAt: '2026-04-12T08:00:00Z' });
    await visit({
      branchId: f.a.id,
      workOrderId: w12.id,
      techId: fx.ta1.id,
      closedAt: '2026-04-12T12:00:00Z',
      outcome: 'resolved',
      finding: { unitId: u12.unit.id, causeCode: 'wiring_fault', origin: 'wear' },
    });
    more = { u4: u4.unit.id, u5: u5.unit.id, u6: u6.unit.id, u7: u7.unit.id, u8: u8.unit.id, u9: u9.unit.id, u12: u12.unit.id };
  });

  const alertsOf = async (agent: Awaited<ReturnType<typeof owner>>) => {
    const res = await agent.get('/api/reports/fix-quality/model-alerts');
    expect(res.status).toBe(200);
    return res.body.alerts as ModelAlert[];
  };

  it('raises no alert for a defect seen at one site only', async () => {
    // Acme AX-1 component failure (factory defect) was found on U2 only, at one site.
    const alerts = await alertsOf(await owner());
    expect(alerts.find((a) => a.make === 'Acme')).toBeUndefined();
  });

  it('raises an alert at two sites and lists the other units not yet checked', async () => {
    const alerts = await alertsOf(await owner());
    expect(alerts).toHaveLength(1);
    const a = alerts[0]!;
    // Wiring fault, factory defect, on TM-10 at S1 (U1, branch A) and S3 (U3, branch B).
    expect([a.make, a.model, a.causeCode, a.sites, a.affectedUnits]).toEqual(['Testmake', 'TM-10', 'wiring_fault', 2, 2]);
    // Units of the model (not archived): U1 U3 U4 U5 U6 U7 U8 U12 = 8. Checked for the wiring fault: U1 U3 (the
    // defect was found on them), U6 (inspection from the alert), U12 (wiring fault found after the alert) = 4.
    // Unchecked: U4 (never visited), U5 (its wiring finding predates the alert), U7 (visited after the alert,
    // but for other work), U8 (visited before the alert).
    expect(a.unitsOfModel).toBe(8);
    expect(a.checkedUnits).toBe(4);
    expect(a.unchecked.map((u) => u.unitId).sort()).toEqual([more.u4, more.u5, more.u7, more.u8].sort());
    expect(a.raisedAt).toBe('2026-03-26T12:00:00.000Z');
    expect(a.inspections.map((i) => [i.unitId, i.state])).toEqual([[more.u6, 'unplaced']]);
  });

  it('shows a manager only the own branch’s unchecked units and refuses creating inspections (403)', async () => {
    const mB = await signedInAgent(t.app, f.inB.manager.email, TEST_PASSWORD);
    const [a] = await alertsOf(mB);
    expect(a!.unchecked.map((u) => u.unitId).sort()).toEqual([more.u5, more.u7, more.u8].sort());
    expect(a!.inspections).toEqual([]); // U6's inspection is in branch A
    const res = await mB
      .post('/api/reports/fix-quality/model-alerts/inspections')
      .send({ make: 'Testmake', model: 'TM-10', causeCode: 'wiring_fault' });
    expect(res.status).toBe(403);
  });

  it('refuses an inspection for a unit that is already checked or for a cause without an alert', async () => {
    const o = await owner();
    const checked = await o
      .post('/api/reports/fix-quality/model-alerts/inspections')
      .send({ make: 'Testmake', model: 'TM-10', causeCode: 'wiring_fault', unitIds: [more.u12] });
    expect(checked.status).toBe(422);
    const none = await o
      .post('/api/reports/fix-quality/model-alerts/inspections')
      .send({ make: 'Acme', model: 'AX-1', causeCode: 'component_failure' });
    expect(none.status).toBe(404);
    const rows = await t.ctx.db.select().from(workOrders).where(eq(workOrders.purpose, 'model-alert:Testmake|TM-10|wiring_fault'));
    expect(rows).toHaveLength(1); // only U6's from the fixture
  });

  it('creates one unplaced inspection per unchecked unit in the unit’s own branch, once', async () => {
    const o = await owner();
    const res = await o
      .post('/api/reports/fix-quality/model-alerts/inspections')
      .send({ make: 'Testmake', model: 'TM-10', causeCode: 'wiring_fault' });
    expect(res.status).toBe(201);
    expect(res.body.created).toBe(4);
    const created = await t.ctx.db
      .select()
      .from(workOrders)
      .where(and(eq(workOrders.purpose, 'model-alert:Testmake|TM-10|wiring_fault'), eq(workOrders.createdById, f.owner.id)));
    expect(created.map((w) => w.unitId).sort()).toEqual([more.u4, more.u5, more.u7, more.u8].sort());
    for (const w of created) {
      expect(w.kind).toBe('planned_maintenance');
      expect(w.state).toBe('unplaced');
      // Due 30 days (the branch's default) after the test clock's day, at the end of that day in the branch's zone.
      const [b] = await t.ctx.db.select().from(branches).where(eq(branches.id, w.branchId));
      const day = zonedDate(t.ctx.clock.now(), b!.timeZone);
      expect(w.latestAt?.toISOString()).toBe(new Date(zonedInstant(addDays(day, 30), '23:59', b!.timeZone)).toISOString());
      const [u] = await t.ctx.db.select().from(units).where(eq(units.id, w.unitId!));
      expect(w.branchId).toBe(u!.branchId);
      expect(w.siteId).toBe(u!.siteId);
    }
    const [a] = await alertsOf(o);
    expect(a!.unchecked).toEqual([]);
    expect(a!.inspectionsOpen).toBe(5);
    expect(a!.inspections).toHaveLength(5);
    const listed = await o.get('/api/work-orders').query({ branchId: f.a.id, state: 'unplaced' });
    const inspection = (listed.body.workOrders as { unitId: string; modelAlert: unknown }[]).find((w) => w.unitId === more.u4);
    expect(inspection?.modelAlert).toEqual({
      title: 'Wiring fault on Testmake TM-10',
      make: 'Testmake',
      model: 'TM-10',
      causeCode: 'wiring_fault',
    });
    const again = await o
      .post('/api/reports/fix-quality/model-alerts/inspections')
      .send({ make: 'Testmake', model: 'TM-10', causeCode: 'wiring_fault' });
    expect(again.body.created).toBe(0);
  });

  it('raises the Acme alert once the defect shows up at a second site', async () => {
    const u10 = await makeSiteWithUnit(t.ctx.db, f.b.id, { unit: { make: 'Acme', model: 'AX-1' } });
    const u11 = await makeSiteWithUnit(t.ctx.db, f.b.id, { unit: { make: 'Acme', model: 'AX-1' } });
    const w = await workOrder({
      branchId: f.b.id,
      siteId: u10.site.id,
      unitId: u10.unit.id,
      kind: 'service_call',
      openedAt: '2026-05-01T08:00:00Z',
    });
    await visit({
      branchId: f.b.id,
      workOrderId: w.id,
      techId: fx.tb1.id,
      closedAt: '2026-05-01T12:00:00Z',
      outcome: 'resolved',
      finding: { unitId: u10.unit.id, causeCode: 'component_failure', origin: 'factory_defect' },
    });
    const alerts = await alertsOf(await owner());
    const acme = alerts.find((a) => a.make === 'Acme')!;
    expect(acme.sites).toBe(2);
    expect(acme.unchecked.map((u) => u.unitId)).toEqual([u11.unit.id]);
  });
});

describe('exports', () => {
  /** What a spreadsheet import reads: the bytes as UTF-8 (BOM first), lines on CRLF, papaparse. */
  const readCsv = (raw: Buffer) => {
    expect([...raw.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const text = raw.toString('utf8').slice(1);
    expect(text.endsWith('\r\n')).toBe(true);
    expect(text.replace(/"[^"]*"/g, '').match(/(?<!\r)\n/g)).toBeNull();
    return Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true }).data;
  };
  const bytes = (r: request.Test) =>
    r.buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });

  it('exports a table as CSV with its header and one row per group', async () => {
    const res = await (await owner()).get('/api/reports/fix-quality.csv?from=2026-03-01&to=2026-03-31&table=byTechnician');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    expect(res.headers['content-disposition']).toContain('coilpath-fix-quality-byTechnician-2026-03-01-to-2026-03-31.csv');
    const lines = res.text
      .replace(/^\uFEFF/, '')
      .trim()
      .split(/\r\n/);
    expect(lines[0]).toBe(
      'group,service_calls_eligible,first_time_fixed,first_time_fix_rate_pct,resolved_first_visits,callbacks,callback_rate_pct,return_visits,return_visits_per_service_call,jobs_resolved,avg_days_to_resolve,pending_in_callback_window',
    );
    expect(lines).toHaveLength(1 + 3); // TA1, TA2, TB1
  });

  it('writes UTF-8 with a BOM and CRLF, the same figures as the report, names as written', async () => {
    const db = t.ctx.db;
    await db.update(users).set({ name: 'Łukasz Żółć' }).where(eq(users.id, fx.ta1.id));
    await db.update(users).set({ name: 'Nguyễn Thị Hương' }).where(eq(users.id, fx.tb1.id));
    const agent = await owner();
    const report = (await agent.get(Q)).body as FixQualityReport;
    const rows = readCsv(
      (await bytes(agent.get('/api/reports/fix-quality.csv?from=2026-03-01&to=2026-03-31&table=byTechnician'))).body as Buffer,
    );
    expect(rows.map((r) => r.group).sort()).toEqual(report.byTechnician.map((g) => g.label).sort());
    expect(rows.map((r) => r.group)).toEqual(expect.arrayContaining(['Łukasz Żółć', 'Nguyễn Thị Hương']));
    for (const g of report.byTechnician) {
      const r = rows.find((x) => x.group === g.label)!;
      expect(Number(r.service_calls_eligible)).toBe(g.eligible);
      expect(r.first_time_fix_rate_pct).toBe(g.firstTimeFixRate === null ? '' : (g.firstTimeFixRate * 100).toFixed(1));
      expect(r.return_visits_per_service_call).toBe(g.returnVisitsPerServiceCall === null ? '' : g.returnVisitsPerServiceCall.toFixed(2));
    }
  });

  it('exports the factory-defect cases as CSV, opened_at in the branch zone with its offset, formulae neutralised', async () => {
    await t.ctx.db.update(sites).set({ name: '=HYPERLINK("http://x.example","Roof")' }).where(eq(sites.id, fx.u1.site.id));
    const agent = await owner();
    const res = await bytes(agent.get('/api/reports/fix-quality.csv?from=2026-03-01&to=2026-03-31&table=factoryDefects'));
    const raw = res.body as Buffer;
    const lines = raw.toString('utf8').slice(1).trim().split(/\r\n/);
    expect(lines[0]!.startsWith('work_order,kind,branch,site,unit,make,model,causes,opened_at,')).toBe(true);
    expect(lines).toHaveLength(1 + 3);
    const rows = readCsv(raw);
    const review = (await agent.get('/api/reports/fix-quality/factory-defects?from=2026-03-01&to=2026-03-31')).body as {
      cases: { number: number | null; openedAt: string; branchName: string; siteName: string }[];
    };
    for (const c of review.cases) {
      const r = rows.find((x) => x.work_order === `WO-${c.number}`)!;
      const zone = c.branchName === 'Alpha' ? 'America/Chicago' : 'America/Phoenix';
      // The same instant, written in the branch's zone with its offset (CST −06:00 in March before the change, MST −07:00).
      expect(r.opened_at).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}[+-]\d{2}:\d{2}$/);
      expect(new Date(r.opened_at!).toISOString()).toBe(new Date(c.openedAt).toISOString());
      expect(r.opened_at!.slice(-6)).toBe(
        zone === 'America/Phoenix' ? '-07:00' : new Date(c.openedAt) < new Date('2026-03-08T08:00:00Z') ? '-06:00' : '-05:00',
      );
      if (c.siteName.startsWith('=')) expect(r.site).toBe(`'${c.siteName}`);
      // The claim's difference from the computed cost: amount − cost, empty while no amount is recorded.
      const amount = r.claim_amount === '' ? null : Number(r.claim_amount);
      expect(r.claim_difference).toBe(amount === null ? '' : (amount - Number(r.cost)).toFixed(2));
    }
    expect(rows.some((r) => r.site === `'=HYPERLINK("http://x.example","Roof")`)).toBe(true);
    // The claim recorded above (26,000 cents) has its difference written.
    expect(rows.some((r) => r.claim_amount === '260.00' && r.claim_difference !== '')).toBe(true);
  });

  it('refuses an unknown table and a technician', async () => {
    expect((await (await owner()).get('/api/reports/fix-quality.csv?from=2026-03-01&to=2026-03-31&table=secrets')).status).toBe(400);
    const tech = await signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD);
    expect((await tech.get('/api/reports/fix-quality.csv?from=2026-03-01&to=2026-03-31&table=byBranch')).status).toBe(403);
  });

  it('exports the whole period as a tagged PDF in Roboto Flex whose text is the report, names as written', async () => {
    const agent = await owner();
    const res = await bytes(agent.get('/api/reports/fix-quality.pdf?from=2026-03-01&to=2026-03-31'));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const pdf = res.body as Buffer;
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    for (const font of pdfFontNames(pdf)) expect(font).toMatch(/\+RobotoFlex-Regular$/);
    const read = await readPdf(pdf);
    expect(read.title).toBe('Coilpath Fix Quality 2026-03-01 to 2026-03-31');
    expect(read.displayDocTitle).toBe(true);
    expect(read.language).toBe('en-US');
    expect(read.marked).toBe(true);
    expect(read.roles).toEqual(expect.arrayContaining(['Document', 'H1', 'H2', 'Table', 'TR', 'TH', 'TD', 'P']));
    const report = (await agent.get(Q)).body as FixQualityReport;
    const pct = (r: number | null) => (r === null ? '—' : `${(r * 100).toFixed(1)} %`);
    const row = (cells: string[]) => new RegExp(cells.map((c) => c.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')).join('\\s*'));
    // Every technician's row, as the report's JSON has it.
    expect(report.byTechnician.map((g) => g.label)).toEqual(expect.arrayContaining(['Łukasz Żółć', 'Nguyễn Thị Hương']));
    for (const g of report.byTechnician) {
      expect(read.flat).toMatch(row([g.label, String(g.eligible), pct(g.firstTimeFixRate), String(g.callbacks), pct(g.callbackRate)]));
    }
    // The headline's change column keeps its sign: a real minus sign (U+2212) or a plus.
    const d = report.change.firstTimeFixRate;
    if (d !== null) expect(read.flat).toContain(`${d >= 0 ? '+' : '−'}${Math.abs(d * 100).toFixed(1)} pts`);
    expect(read.flat).not.toContain('\uFFFD');
  });
});

describe('maturity: calls still inside their callback window', () => {
  /**
   * "Now" is 2026-07-01 12:00 UTC (this file's clock). Period June 2026. Branch A's window is 30 days, B's 14;
   * a call is mature once now is past first close + window × 24 h (a callback opened at that instant still
   * counts, so a window ending exactly now is still open):
   *  MA1 A closed 06-01 11:59:59 resolved → window ends 07-01 11:59:59, a second before now: mature, fixed.
   *  MA2 A closed 06-01 12:00:00 resolved → window ends exactly now: pending.
   *  MA3 A closed 06-20 12:00 resolved, callback 06-25 → window ends 07-20: pending (not yet a callback figure).
   *  MA4 A closed 06-10 declined → neither counted nor pending.
   *  MB1 B closed 06-16 12:00 resolved → window ends 06-30 12:00: mature, fixed.
   *  MB2 B closed 06-17 12:00:01 resolved → window ends 07-01 12:00:01: pending.
   * Eligible 2 (MA1, MB1), both fixed the first time; pending 3.
   */
  const JUNE = '/api/reports/fix-quality?from=2026-06-01&to=2026-06-30';
  beforeAll(async () => {
    const A = { branchId: f.a.id, siteId: fx.u1.site.id, unitId: fx.u1.unit.id, techId: fx.ta1.id };
    const B = { branchId: f.b.id, siteId: fx.u3.site.id, unitId: fx.u3.unit.id, techId: fx.tb1.id };
    await job('MA1', { ...A, openedAt: '2026-06-01T08:00:00Z', closedAt: '2026-06-01T11:59:59Z', outcome: 'resolved' });
    await job('MA2', { ...A, openedAt: '2026-06-01T08:00:00Z', closedAt: '2026-06-01T12:00:00Z', outcome: 'resolved' });
    const ma3 = await job('MA3', { ...A, openedAt: '2026-06-20T08:00:00Z', closedAt: '2026-06-20T12:00:00Z', outcome: 'resolved' });
    await workOrder({ ...A, kind: 'callback', openedAt: '2026-06-25T09:00:00Z', originWorkOrderId: ma3.id, state: 'unplaced' });
    await job('MA4', { ...A, openedAt: '2026-06-10T08:00:00Z', closedAt: '2026-06-10T12:00:00Z', outcome: 'declined' });
    await job('MB1', { ...B, openedAt: '2026-06-16T08:00:00Z', closedAt: '2026-06-16T12:00:00Z', outcome: 'resolved' });
    await job('MB2', { ...B, openedAt: '2026-06-17T08:00:00Z', closedAt: '2026-06-17T12:00:01Z', outcome: 'resolved' });
  });

  it('counts a call as pending until its own branch’s window has run out, and in no rate', async () => {
    const r = (await (await owner()).get(JUNE)).body as FixQualityReport;
    expect(r.pending).toBe(3);
    expect(r.eligible).toBe(2);
    expect(r.firstTimeFixed).toBe(2);
    expect(r.firstTimeFixRate).toBe(1);
    // MA3's callback is not counted while the call is pending.
    expect(r.callbacks).toBe(0);
    expect(group(r, 'byBranch', f.a.id)).toMatchObject({ eligible: 1, pending: 2 });
    expect(group(r, 'byBranch', f.b.id)).toMatchObject({ eligible: 1, pending: 1 });
    expect(group(r, 'byMonth', '2026-06')).toMatchObject({ eligible: 2, pending: 3 });
    // March's calls are long mature: nothing pending there.
    expect(((await (await owner()).get(Q)).body as FixQualityReport).pending).toBe(0);
  });

  it('says in the CSV and the PDF how many calls are pending', async () => {
    const agent = await owner();
    const csv = await agent.get('/api/reports/fix-quality.csv?from=2026-06-01&to=2026-06-30&table=byMonth');
    const rows = Papa.parse<Record<string, string>>(csv.text.replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: true }).data;
    expect(rows.find((x) => x.group === '2026-06')).toMatchObject({ service_calls_eligible: '2', pending_in_callback_window: '3' });
    const pdf = await agent
      .get('/api/reports/fix-quality.pdf?from=2026-06-01&to=2026-06-30')
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    const read = await readPdf(pdf.body as Buffer);
    expect(read.flat).toContain('3 calls are still inside their 14 or 30-day callback window');
  });
});
