import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import iconv from 'iconv-lite';
import { and, count, eq } from 'drizzle-orm';
import { leakRepairObligation } from '@coilpath/calc';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { alarms, branches, findings, jobRuns, leakCases, visits, workOrders } from '../../db/schema';
import type { Clock } from '../../lib/clock';
import { runDigest } from './watchlist.jobs';

/** A clock the tests move: 2026-12-15 09:00 in Chicago (15:00 UTC). */
let nowIso = '2026-12-15T15:00:00.000Z';
const clock: Clock = { now: () => new Date(nowIso) };
const DAY = 86_400_000;
const ago = (ms: number) => new Date(Date.parse(nowIso) - ms).toISOString();

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let unitA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
const agent = (u: { email: string }) => signedInAgent(t.app, u.email, TEST_PASSWORD);

beforeAll(async () => {
  t = await createTestApp({ clock });
  f = await makeTwoBranches(t.ctx.db);
  unitA = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { serial: 'WL-A-1', fullChargeLb: 40 } });
  await makeSiteWithUnit(t.ctx.db, f.b.id, { unit: { serial: 'WL-B-1' } });
});
afterAll(() => t.close());

describe('roles and branches', () => {
  it('technicians get 403 on every Watchlist route; dispatchers may only post alarms', async () => {
    const tech = await agent(f.inA.technician);
    for (const path of ['/api/alarms', '/api/watchlist/repeat-alarms', '/api/watchlist/return-visits', '/api/leak-cases']) {
      expect((await tech.get(path)).status, path).toBe(403);
    }
    const body = { unitId: unitA.unit.id, circuit: 1, code: 'LP1', raisedAt: ago(DAY), source: 'form' };
    expect((await tech.post('/api/alarms').send(body)).status).toBe(403);
    const disp = await agent(f.inA.dispatcher);
    expect((await disp.get('/api/leak-cases')).status).toBe(403);
    const res = await disp.post('/api/alarms').send(body);
    expect(res.status).toBe(201);
    expect(res.body.alarm).toMatchObject({ unitTag: unitA.unit.tag, code: 'LP1', source: 'form', circuit: 1 });
    await t.ctx.db.delete(alarms).where(eq(alarms.id, res.body.alarm.id));
  });

  it("another branch's unit, case or return visit answers 404", async () => {
    const mgrB = await agent(f.inB.manager);
    const res = await mgrB.post('/api/alarms').send({ unitId: unitA.unit.id, circuit: null, code: 'X', raisedAt: ago(DAY) });
    expect(res.status).toBe(404);
    expect((await mgrB.get('/api/leak-cases').query({ branchId: f.a.id })).status).toBe(404);
  });

  it('refuses an alarm on a circuit the unit lacks, or dated in the future', async () => {
    const mgr = await agent(f.inA.manager);
    const noCircuit = await mgr.post('/api/alarms').send({ unitId: unitA.unit.id, circuit: 3, code: 'X', raisedAt: ago(DAY) });
    expect(noCircuit.status).toBe(422);
    expect(noCircuit.body.error.message).toContain('circuit 3');
    const future = await mgr
      .post('/api/alarms')
      .send({ unitId: unitA.unit.id, circuit: 1, code: 'X', raisedAt: new Date(Date.parse(nowIso) + DAY).toISOString() });
    expect(future.status).toBe(422);
  });
});

describe('repeat-alarm units', () => {
  it('counts exactly N alarms in exactly M days, and not when the first is 1 ms older (branch rule N=3, M=10)', async () => {
    await t.ctx.db.update(branches).set({ repeatAlarmCount: 3, repeatAlarmDays: 10 }).where(eq(branches.id, f.a.id));
    const edge = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const outside = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const fewer = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const row = (unitId: string, at: string, circuit = 1) => ({
      branchId: f.a.id,
      unitId,
      circuit,
      code: 'HP2',
      raisedAt: new Date(at),
      source: 'api' as const,
    });
    await t.ctx.db.insert(alarms).values([
      row(edge.unit.id, ago(10 * DAY)), // exactly M days before now
      row(edge.unit.id, ago(5 * DAY), 2),
      row(edge.unit.id, nowIso),
      row(outside.unit.id, ago(10 * DAY + 1)), // 1 ms outside the window
      row(outside.unit.id, ago(5 * DAY)),
      row(outside.unit.id, ago(DAY)),
      row(fewer.unit.id, ago(3 * DAY)), // only N − 1
      row(fewer.unit.id, ago(2 * DAY)),
    ]);
    // A visit on the edge unit whose finding put the fault on circuit 2 while the controller said 1.
    const wo = await makeWorkOrder(t.ctx.db, {
      branchId: f.a.id,
      siteId: edge.site.id,
      unitId: edge.unit.id,
      createdAt: new Date(ago(4 * DAY)),
      state: 'closed',
    });
    const [v] = await t.ctx.db
      .insert(visits)
      .values({ branchId: f.a.id, workOrderId: wo.id, techId: f.inA.technician.id, closedAt: new Date(ago(4 * DAY)), outcome: 'resolved' })
      .returning();
    await t.ctx.db.insert(findings).values({
      visitId: v!.id,
      unitId: edge.unit.id,
      causeCode: 'wiring_fault',
      origin: 'factory_defect',
      alarmCode: 'HP2',
      reportedCircuit: 1,
      actualCircuit: 2,
      createdAt: new Date(ago(4 * DAY)),
    });

    const mgr = await agent(f.inA.manager);
    const res = await mgr.get('/api/watchlist/repeat-alarms');
    expect(res.status).toBe(200);
    expect(res.body.rules).toEqual([{ branchId: f.a.id, minCount: 3, windowDays: 10 }]);
    const found = res.body.units.map((u: { unitId: string }) => u.unitId);
    expect(found).toContain(edge.unit.id);
    expect(found).not.toContain(outside.unit.id);
    expect(found).not.toContain(fewer.unit.id);
    const e = res.body.units.find((u: { unitId: string }) => u.unitId === edge.unit.id);
    expect(e).toMatchObject({ code: 'HP2', count: 3, circuits: [1, 2], circuitMismatch: true, siteName: edge.site.name });
    expect(e.visits).toEqual([expect.objectContaining({ workOrderId: wo.id, outcome: 'resolved', techName: f.inA.technician.name })]);
    expect(e.findings[0]).toMatchObject({ causeCode: 'wiring_fault', reportedCircuit: 1, actualCircuit: 2 });

    // Branch B's manager sees none of branch A's units.
    const b = await (await agent(f.inB.manager)).get('/api/watchlist/repeat-alarms');
    expect(b.body.units).toEqual([]);
    await t.ctx.db.update(branches).set({ repeatAlarmCount: 2, repeatAlarmDays: 30 }).where(eq(branches.id, f.a.id));
  });
});

async function makeCase(over: Partial<typeof leakCases.$inferInsert> = {}) {
  const [c] = await t.ctx.db
    .insert(leakCases)
    .values({
      branchId: f.a.id,
      unitId: unitA.unit.id,
      openedOn: '2026-11-20',
      rule: '40 CFR 84.106',
      method: 'annualizing',
      thresholdPercent: 10,
      leakRatePercent: 36.5,
      repairDueDate: '2026-12-20',
      ...over,
    })
    .returning();
  return c!;
}

describe('leak cases', () => {
  it('repair is due 30 days after the triggering addition (calc, 84.106(d) [S]); near and overdue cases stand out', async () => {
    // The obligation for a 40 lb R-410A comfort-cooling unit topped off with 4 lb on 2026-11-20 after 40 days.
    const ob = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 40, refrigerant: 'R-410A' },
      additions: [
        { date: '2026-10-11', pounds: 1 },
        { date: '2026-11-20', pounds: 4 },
      ],
      asOf: '2026-11-20',
    });
    expect(ob).toMatchObject({ rule: '40 CFR 84.106', thresholdPercent: 10, exceeds: true, repairDueDate: '2026-12-20' });
    const near = await makeCase({ repairDueDate: ob.repairDueDate!, leakRatePercent: ob.leakRate });
    const late = await makeCase({ openedOn: '2026-10-20', repairDueDate: '2026-11-19', rule: '40 CFR 82.157' });
    const mgr = await agent(f.inA.manager);
    const res = await mgr.get('/api/leak-cases');
    expect(res.status).toBe(200);
    const byId = new Map(res.body.leakCases.map((c: { id: string }) => [c.id, c]));
    const n = byId.get(near.id) as {
      next: { what: string; due: string; daysLeft: number; state: string; source: string };
      deadlines: { what: string; due: string }[];
      requiredCertification: string;
      today: string;
    };
    expect(n.today).toBe('2026-12-15');
    expect(n.next).toMatchObject({ what: 'repair', due: '2026-12-20', daysLeft: 5, state: 'due_soon' });
    expect(n.next.source).toContain('84.106(d)');
    expect(n.next.source).toContain('[S]');
    // Initial verification within the same window (84.106(e) [S]); no follow-up until an initial test passes.
    expect(n.deadlines.map((d) => [d.what, d.due])).toEqual([
      ['repair', '2026-12-20'],
      ['initial_verification', '2026-12-20'],
    ]);
    expect(n.requiredCertification).toBe('II');
    const l = byId.get(late.id) as { next: { state: string; daysLeft: number; source: string } };
    expect(l.next).toMatchObject({ state: 'overdue', daysLeft: -26 });
    // 82.157's deadlines are from memory in LEAK-RULES.md: the source says [M].
    expect(l.next.source).toContain('82.157(d)');
    expect(l.next.source).toContain('[M]');
    // Most urgent first.
    expect(res.body.leakCases[0].id).toBe(late.id);
    await t.ctx.db.delete(leakCases).where(eq(leakCases.id, late.id));
    await t.ctx.db.delete(leakCases).where(eq(leakCases.id, near.id));
  });

  it('follow-up verification is due 10 days after a passed initial test (82.157(e) [M] / 84.106(e) [S]); closing needs it', async () => {
    const c = await makeCase();
    const mgr = await agent(f.inA.manager);
    const early = await mgr
      .post(`/api/leak-cases/${c.id}/verification-tests`)
      .send({ kind: 'follow_up', testedOn: '2026-12-10', passed: true });
    expect(early.status).toBe(422);
    expect(early.body.error.message).toContain('initial verification test first');
    const close1 = await mgr.patch(`/api/leak-cases/${c.id}`).send({ action: 'close' });
    expect(close1.status).toBe(422);

    const init = await mgr
      .post(`/api/leak-cases/${c.id}/verification-tests`)
      .send({ kind: 'initial', testedOn: '2026-12-08', passed: true });
    expect(init.status).toBe(201);
    expect(init.body.leakCase).toMatchObject({ status: 'repaired', repairedOn: '2026-12-08' });
    const fu = init.body.leakCase.deadlines.find((d: { what: string }) => d.what === 'follow_up_verification');
    expect(fu).toMatchObject({ due: '2026-12-18', daysLeft: 3, state: 'due_soon' });
    expect(init.body.leakCase.deadlines.find((d: { what: string }) => d.what === 'repair').state).toBe('met');

    const future = await mgr
      .post(`/api/leak-cases/${c.id}/verification-tests`)
      .send({ kind: 'follow_up', testedOn: '2026-12-16', passed: true });
    expect(future.status).toBe(422);
    const done = await mgr
      .post(`/api/leak-cases/${c.id}/verification-tests`)
      .send({ kind: 'follow_up', testedOn: '2026-12-15', passed: true });
    expect(done.status).toBe(201);
    expect(done.body.leakCase.next).toBeNull();
    const closed = await mgr.patch(`/api/leak-cases/${c.id}`).send({ action: 'close' });
    expect(closed.status).toBe(200);
    expect(closed.body.leakCase.status).toBe('closed');
    const list = await mgr.get('/api/leak-cases');
    expect(list.body.leakCases.map((x: { id: string }) => x.id)).not.toContain(c.id);
  });

  it('a retrofit plan replaces the repair deadlines and lets the case close', async () => {
    const c = await makeCase();
    const mgr = await agent(f.inA.manager);
    const res = await mgr.patch(`/api/leak-cases/${c.id}`).send({ action: 'plan', planKind: 'retrofit' });
    expect(res.status).toBe(200);
    expect(res.body.leakCase).toMatchObject({ status: 'retrofit_planned', planKind: 'retrofit', planDueDate: '2027-12-15' });
    expect(res.body.leakCase.deadlines.map((d: { what: string }) => d.what)).toEqual(['retrofit_retire_plan', 'retrofit_retire_complete']);
    expect((await mgr.patch(`/api/leak-cases/${c.id}`).send({ action: 'close' })).status).toBe(200);
  });

  it('books the repair as an unplaced return visit once; a second click answers 409 open_return_exists naming it', async () => {
    const c = await makeCase();
    const mgr = await agent(f.inA.manager);
    const res = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({});
    expect(res.status).toBe(201);
    const [wo] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, res.body.workOrderId));
    expect(wo).toMatchObject({
      kind: 'return_visit',
      state: 'unplaced',
      priority: 'high',
      leakCaseId: c.id,
      requiredCertification: 'II',
      unitId: unitA.unit.id,
      branchId: f.a.id,
    });
    // The repair due date is the booking deadline: the end of 2026-12-20 in Chicago (CST, UTC−6).
    expect(wo!.latestAt!.toISOString()).toBe('2026-12-21T05:59:00.000Z');
    expect(res.body.leakCase.repairWorkOrder).toMatchObject({ id: wo!.id, state: 'unplaced' });

    expect(res.body.joined).toBe(false);

    const again = await mgr.post(`/api/leak-cases/${c.id}/repair-visit`).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('open_return_exists');
    expect(again.body.error.details).toEqual({
      workOrderId: wo!.id,
      number: wo!.number,
      state: 'unplaced',
      unitId: unitA.unit.id,
      visitId: null,
    });
    const [{ n }] = (await t.ctx.db.select({ n: count() }).from(workOrders).where(eq(workOrders.leakCaseId, c.id))) as [{ n: number }];
    expect(n).toBe(1);
    expect((await (await agent(f.inB.manager)).post(`/api/leak-cases/${c.id}/repair-visit`).send({})).status).toBe(404);
  });
});

describe('return visits to book', () => {
  it('lists unplaced return visits from needs_return close-outs, oldest first, and queues one with a priority and latest date', async () => {
    // One open return visit per unit: each on a unit of its own.
    const mk = async (closedDaysAgo: number) => {
      const { site, unit } = await makeSiteWithUnit(t.ctx.db, f.a.id);
      const origin = await makeWorkOrder(t.ctx.db, {
        branchId: f.a.id,
        siteId: site.id,
        unitId: unit.id,
        state: 'closed',
        outcome: 'needs_return',
      });
      await t.ctx.db.insert(visits).values({
        branchId: f.a.id,
        workOrderId: origin.id,
        techId: f.inA.technician.id,
        closedAt: new Date(ago(closedDaysAgo * DAY)),
        outcome: 'needs_return',
        returnNeeds: ['parts'],
        returnNotes: 'Contactor on order',
      });
      return makeWorkOrder(t.ctx.db, {
        branchId: f.a.id,
        siteId: site.id,
        unitId: unit.id,
        kind: 'return_visit',
        originWorkOrderId: origin.id,
      });
    };
    const newer = await mk(1);
    const older = await mk(6);
    const booked = await mk(3);
    await t.ctx.db.update(workOrders).set({ state: 'booked' }).where(eq(workOrders.id, booked.id));

    const mgr = await agent(f.inA.manager);
    const res = await mgr.get('/api/watchlist/return-visits');
    expect(res.status).toBe(200);
    expect(res.body.returnVisits.map((r: { workOrderId: string }) => r.workOrderId)).toEqual([older.id, newer.id]);
    expect(res.body.returnVisits[0]).toMatchObject({
      returnNeeds: ['parts'],
      returnNotes: 'Contactor on order',
      origin: { techName: f.inA.technician.name },
    });

    const past = await mgr.patch(`/api/watchlist/return-visits/${older.id}`).send({ priority: 'high', latestDate: '2026-12-14' });
    expect(past.status).toBe(422);
    const q = await mgr.patch(`/api/watchlist/return-visits/${older.id}`).send({ priority: 'high', latestDate: '2026-12-18' });
    expect(q.status).toBe(200);
    expect(q.body.returnVisit).toMatchObject({ priority: 'high', latestAt: '2026-12-19T05:59:00.000Z' });
    expect((await mgr.patch(`/api/watchlist/return-visits/${booked.id}`).send({ priority: 'high', latestDate: '2026-12-18' })).status).toBe(
      409,
    );
    expect(
      (
        await (
          await agent(f.inB.manager)
        )
          .patch(`/api/watchlist/return-visits/${newer.id}`)
          .send({ priority: 'low', latestDate: '2026-12-18' })
      ).status,
    ).toBe(404);
  });
});

describe('alarm CSV import', () => {
  const csvCount = async () =>
    ((await t.ctx.db.select({ n: count() }).from(alarms).where(eq(alarms.source, 'csv'))) as [{ n: number }])[0].n;

  it('a malformed file: every error listed, nothing written', async () => {
    const mgr = await agent(f.inA.manager);
    const noHeader = await mgr.post('/api/alarms/import').send({ csv: 'serial,code\nWL-A-1,LP1\n', mode: 'commit' });
    expect(noHeader.status).toBe(422);
    expect(noHeader.body.error.details.errors[0]).toMatchObject({ row: 0 });
    expect(noHeader.body.error.details.errors[0].message).toContain('circuit, raised_at');

    const ragged = 'unit_serial,circuit,code,raised_at\nWL-A-1,1,LP1,2026-12-01T10:00:00Z,extra\n"WL-A-1,1,LP1,2026-12-02T10:00:00Z\n';
    const dry = await mgr.post('/api/alarms/import').send({ csv: ragged, mode: 'dry_run' });
    expect(dry.status).toBe(200);
    expect(dry.body.errors.length).toBeGreaterThanOrEqual(2);
    expect(dry.body.errors.map((e: { row: number }) => e.row)).toContain(1);
    const commit = await mgr.post('/api/alarms/import').send({ csv: ragged, mode: 'commit' });
    expect(commit.status).toBe(422);
    expect(await csvCount()).toBe(0);
  });

  it('reads a legacy Windows-1252 file sent as bytes, refuses one it cannot read, never stores U+FFFD', async () => {
    const mgr = await agent(f.inA.manager);
    const text =
      'unit_serial,circuit,code,raised_at\r\nWL-A-1,1,DRUCK-HÖCHST,2026-12-05T10:00:00Z\r\nWL-A-1,2,PRESSÃO-ALTA,2026-12-05T11:00:00Z\r\n';
    const file = iconv.encode(text, 'windows-1252').toString('base64');
    const dry = await mgr.post('/api/alarms/import').send({ file, mode: 'dry_run' });
    expect(dry.status).toBe(200);
    expect(dry.body).toMatchObject({ encoding: 'windows-1252', errors: [] });
    expect(dry.body.rows.map((r: { code: string }) => r.code)).toEqual(['DRUCK-HÖCHST', 'PRESSÃO-ALTA']);
    const commit = await mgr.post('/api/alarms/import').send({ file, mode: 'commit' });
    expect(commit.status).toBe(200);
    const stored = await t.ctx.db.select({ code: alarms.code }).from(alarms).where(eq(alarms.source, 'csv'));
    expect(stored.map((a) => a.code).sort()).toEqual(['DRUCK-HÖCHST', 'PRESSÃO-ALTA']);
    // The same file read as UTF-8 by a client: replacement characters, refused.
    const mangled = new TextDecoder('utf-8').decode(iconv.encode(text.replace('05T1', '06T1'), 'windows-1252'));
    const refused = await mgr.post('/api/alarms/import').send({ csv: mangled, mode: 'commit' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe('not_utf8');
    expect(await csvCount()).toBe(2);
    for (const a of await t.ctx.db.select({ code: alarms.code }).from(alarms)) expect(a.code).not.toContain('\uFFFD');
    await t.ctx.db.delete(alarms).where(eq(alarms.source, 'csv'));
  });

  it('one bad row among good ones: the preview names it with its row; commit writes nothing; a clean file then imports once', async () => {
    const mgr = await agent(f.inA.manager);
    const good = ['WL-A-1,1,LP1,2026-12-01T10:00:00Z', 'WL-A-1,2,LP1,2026-12-03 08:30', 'WL-A-1,,HP2,2026-12-04T10:00:00-06:00'];
    const bad = 'WL-A-1,7,LP1,2026-12-02T10:00:00Z';
    const csv = ['Unit Serial,Circuit,Code,Raised At', good[0], good[1], bad, good[2], 'NOPE-9,1,LP1,2026-12-02T10:00:00Z'].join('\n');
    const dry = await mgr.post('/api/alarms/import').send({ csv });
    expect(dry.status).toBe(200);
    expect(dry.body.mode).toBe('dry_run');
    expect(dry.body.total).toBe(5);
    expect(dry.body.rows.map((r: { row: number }) => r.row)).toEqual([1, 2, 4]);
    expect(dry.body.errors).toEqual([
      { row: 3, field: 'circuit', message: `Unit ${unitA.unit.tag} has no circuit 7.` },
      { row: 5, field: 'unit_serial', message: `No unit with serial "NOPE-9" in ${f.a.name}.` },
    ]);
    // The local time is read in the branch's zone (Chicago, UTC−6 in December).
    expect(dry.body.rows[1].raisedAt).toBe('2026-12-03T14:30:00.000Z');
    const commit = await mgr.post('/api/alarms/import').send({ csv, mode: 'commit' });
    expect(commit.status).toBe(422);
    expect(commit.body.error.code).toBe('import_refused');
    expect(await csvCount()).toBe(0);

    const clean = ['unit_serial,circuit,code,raised_at', ...good].join('\n');
    const ok = await mgr.post('/api/alarms/import').send({ csv: clean, mode: 'commit' });
    expect(ok.status).toBe(200);
    expect(ok.body.written).toBe(3);
    expect(await csvCount()).toBe(3);
    const again = await mgr.post('/api/alarms/import').send({ csv: clean, mode: 'commit' });
    expect(again.body).toMatchObject({ written: 0, skipped: 3 });
    expect(await csvCount()).toBe(3);
    // Another branch's serials are not found from branch B.
    const fromB = await (await agent(f.inB.manager)).post('/api/alarms/import').send({ csv: clean });
    expect(fromB.body.errors).toHaveLength(3);
    await t.ctx.db.delete(alarms).where(and(eq(alarms.source, 'csv'), eq(alarms.unitId, unitA.unit.id)));
  });
});

describe('daily digest', () => {
  it('is sent once per branch and local day at the digest hour, and again the next day', async () => {
    await makeCase({ repairDueDate: '2026-12-20' });
    t.mailer.sent.length = 0;
    const at = (iso: string) => {
      nowIso = iso;
      return runDigest(t.ctx);
    };
    // 06:30 in Chicago: before the branch's digest hour (7).
    const early = await at('2026-12-15T12:30:00.000Z');
    expect(early.find((r) => r.branchId === f.a.id)?.status).toBe('not_due');
    expect(t.mailer.sent).toHaveLength(0);

    const first = await at('2026-12-15T13:05:00.000Z');
    expect(first.find((r) => r.branchId === f.a.id)).toMatchObject({
      status: 'sent',
      recipients: [f.inA.manager.email],
      runKey: `digest:${f.a.id}:2026-12-15`,
    });
    expect(t.mailer.sent).toHaveLength(1);
    expect(t.mailer.sent[0]!.to).toBe(f.inA.manager.email);
    expect(t.mailer.sent[0]!.text).toContain(unitA.unit.tag);
    expect(t.mailer.sent[0]!.text).toContain('repair due in 5 days (Sun 20 Dec 2026)');

    // Later the same day, and from a "second process" (a fresh call): nothing more is sent.
    const again = await at('2026-12-15T20:00:00.000Z');
    expect(again.find((r) => r.branchId === f.a.id)?.status).toBe('already_ran');
    await at('2026-12-16T03:00:00.000Z'); // 21:00 on the 15th in Chicago
    expect(t.mailer.sent).toHaveLength(1);
    const rows = await t.ctx.db
      .select()
      .from(jobRuns)
      .where(eq(jobRuns.runKey, `digest:${f.a.id}:2026-12-15`));
    expect(rows).toHaveLength(1);

    await at('2026-12-16T13:05:00.000Z');
    expect(t.mailer.sent).toHaveLength(2);
    expect(t.mailer.sent[1]!.text).toContain('due in 4 days');
    nowIso = '2026-12-15T15:00:00.000Z';
  });

  it('releases the day when the mail cannot be sent, so the next tick retries', async () => {
    const original = t.ctx.mailer;
    t.ctx.mailer = { send: async () => Promise.reject(new Error('smtp down')) };
    nowIso = '2026-12-17T13:05:00.000Z';
    await expect(runDigest(t.ctx)).rejects.toThrow('smtp down');
    expect(
      await t.ctx.db
        .select()
        .from(jobRuns)
        .where(eq(jobRuns.runKey, `digest:${f.a.id}:2026-12-17`)),
    ).toHaveLength(0);
    t.ctx.mailer = original;
    const sentBefore = t.mailer.sent.length;
    await runDigest(t.ctx);
    expect(t.mailer.sent.length).toBe(sentBefore + 1);
    nowIso = '2026-12-15T15:00:00.000Z';
  });
});
