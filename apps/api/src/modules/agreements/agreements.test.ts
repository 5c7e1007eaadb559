import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, ne } from 'drizzle-orm';
import type { AgreementInput } from '@coilpath/contract';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { agreements, branches, workOrders } from '../../db/schema';

// Monday 4 January 2027, 09:00 in Chicago.
const NOW = '2027-01-04T15:00:00.000Z';
let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
const agent = (u: { email: string }) => signedInAgent(t.app, u.email, TEST_PASSWORD);

const quarterly = (siteId: string, unitIds: string[], over: Partial<AgreementInput> = {}): AgreementInput => ({
  siteId,
  name: 'Quarterly rooftop PM',
  unitIds,
  recurrence: { preset: 'quarterly', startMonth: 1, dayOfMonth: 15 },
  termStart: '2027-01-01',
  termEnd: '2027-12-31',
  slaHours: 4,
  priceCents: 480_000,
  visitMinutes: 120,
  tasks: ['Change filters', 'Check belts', 'Clean condenser coil'],
  ...over,
});

const pmRows = (agreementId: string) =>
  t.ctx.db
    .select()
    .from(workOrders)
    .where(and(eq(workOrders.agreementId, agreementId), eq(workOrders.kind, 'planned_maintenance')));

beforeAll(async () => {
  t = await createTestApp({ now: NOW });
  f = await makeTwoBranches(t.ctx.db);
  // Thursday 15 April 2027 is a branch holiday.
  await t.ctx.db
    .update(branches)
    .set({ holidays: ['2027-04-15'] })
    .where(eq(branches.id, f.a.id));
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id);
});
afterAll(() => t.close());

describe('agreements: roles, routes and validation', () => {
  it('technicians and dispatchers get 403; another branch gets 404; pm-completion is not read as an id', async () => {
    const tech = await agent(f.inA.technician);
    expect((await tech.get('/api/agreements')).status).toBe(403);
    expect((await (await agent(f.inA.dispatcher)).get('/api/agreements')).status).toBe(403);
    const mgr = await agent(f.inA.manager);
    expect((await mgr.get('/api/agreements/pm-completion')).status).toBe(200);
    expect((await mgr.get('/api/agreements/not-a-uuid')).status).toBe(400);

    const created = await mgr.post('/api/agreements').send(quarterly(siteA.site.id, [siteA.unit.id]));
    expect(created.status).toBe(201);
    expect(created.body.agreement).toMatchObject({
      rrule: 'FREQ=YEARLY;BYMONTH=1,4,7,10;BYMONTHDAY=15',
      branchId: f.a.id,
      units: [{ id: siteA.unit.id }],
    });
    expect(created.body.agreement.recurrence).toMatchObject({ preset: 'quarterly', startMonth: 1, dayOfMonth: 15 });
    const mgrB = await agent(f.inB.manager);
    expect((await mgrB.get(`/api/agreements/${created.body.agreement.id}`)).status).toBe(404);
    expect((await mgrB.post(`/api/agreements/${created.body.agreement.id}/plan/apply`)).status).toBe(404);
    expect((await mgrB.post('/api/agreements').send(quarterly(siteA.site.id, [siteA.unit.id]))).status).toBe(404);
  });

  it('refuses a unit from another site, a term that ends before it starts, and a day past the 28th', async () => {
    const mgr = await agent(f.inA.manager);
    const other = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const wrongUnit = await mgr.post('/api/agreements').send(quarterly(siteA.site.id, [other.unit.id]));
    expect(wrongUnit.status).toBe(422);
    const backwards = await mgr.post('/api/agreements').send(quarterly(siteA.site.id, [siteA.unit.id], { termEnd: '2026-12-31' }));
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.details.fields[0].path).toBe('termEnd');
    const day31 = await mgr
      .post('/api/agreements')
      .send(quarterly(siteA.site.id, [siteA.unit.id], { recurrence: { preset: 'monthly', dayOfMonth: 31 } }));
    expect(day31.status).toBe(400);
  });
});

describe('visit plan', () => {
  it('previews without writing, moves a visit off a branch holiday, and applies', async () => {
    const mgr = await agent(f.inA.manager);
    const a = (await mgr.post('/api/agreements').send(quarterly(siteA.site.id, [siteA.unit.id], { name: 'Holiday check' }))).body.agreement;
    const preview = await mgr.post(`/api/agreements/${a.id}/plan`);
    expect(preview.status).toBe(200);
    expect(preview.body.counts).toEqual({ new: 4, keep: 0, move: 0, locked: 0, cancel: 0 });
    expect(preview.body.visits.map((v: { plannedDate: string }) => v.plannedDate)).toEqual([
      '2027-01-15',
      '2027-04-16',
      '2027-07-15',
      '2027-10-15',
    ]);
    const april = preview.body.visits[1];
    expect(april).toMatchObject({ ruleDate: '2027-04-15', moved: 'Moved off the holiday 15 Apr 2027' });
    expect(await pmRows(a.id)).toHaveLength(0);

    const applied = await mgr.post(`/api/agreements/${a.id}/plan/apply`);
    expect(applied.status).toBe(200);
    const rows = await pmRows(a.id);
    expect(rows).toHaveLength(4);
    expect(rows.every((r) => r.state === 'unplaced' && r.estimatedMinutes === 120 && r.unitId === siteA.unit.id)).toBe(true);
    expect(rows[0]!.complaint).toContain('Change filters');
    const detail = await mgr.get(`/api/agreements/${a.id}`);
    expect(detail.body.agreement.visits).toHaveLength(4);
    expect(detail.body.agreement.nextPlannedDate).toBe('2027-01-15');
  });

  it('regenerating never duplicates a visit nor touches a booked or completed one', async () => {
    const mgr = await agent(f.inA.manager);
    const site = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const a = (await mgr.post('/api/agreements').send(quarterly(site.site.id, [site.unit.id], { name: 'Regenerate me' }))).body.agreement;
    await mgr.post(`/api/agreements/${a.id}/plan/apply`);
    const again = await mgr.post(`/api/agreements/${a.id}/plan/apply`);
    expect(again.body.counts).toEqual({ new: 0, keep: 4, move: 0, locked: 0, cancel: 0 });
    expect(await pmRows(a.id)).toHaveLength(4);

    const rows = await pmRows(a.id);
    const jan = rows.find((r) => r.plannedDate === '2027-01-15')!;
    const jul = rows.find((r) => r.plannedDate === '2027-07-15')!;
    await t.ctx.db
      .update(workOrders)
      .set({ state: 'closed', closedAt: new Date('2027-01-15T20:00:00Z') })
      .where(eq(workOrders.id, jan.id));
    await t.ctx.db.update(workOrders).set({ state: 'booked' }).where(eq(workOrders.id, jul.id));
    const [janBefore] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, jan.id));

    // Monthly now: Jan and Jul are locked, Apr and Oct kept, eight new months.
    await mgr.patch(`/api/agreements/${a.id}`).send({ recurrence: { preset: 'monthly', dayOfMonth: 15 } });
    const monthly = await mgr.post(`/api/agreements/${a.id}/plan/apply`);
    expect(monthly.body.counts).toEqual({ new: 8, keep: 2, move: 0, locked: 2, cancel: 0 });
    let live = (await pmRows(a.id)).filter((r) => r.state !== 'cancelled');
    expect(live).toHaveLength(12);
    expect(new Set(live.map((r) => r.purpose ?? r.plannedDate)).size).toBe(12);
    const [janAfter] = await t.ctx.db.select().from(workOrders).where(eq(workOrders.id, jan.id));
    expect(janAfter).toEqual(janBefore);

    // The term now ends in June: the unplaced visits after it are cancelled, the booked July one stays.
    await mgr.patch(`/api/agreements/${a.id}`).send({ termEnd: '2027-06-30' });
    const shorter = await mgr.post(`/api/agreements/${a.id}/plan/apply`);
    expect(shorter.body.counts).toMatchObject({ cancel: 5, locked: 2, new: 0 });
    live = (await pmRows(a.id)).filter((r) => r.state !== 'cancelled');
    expect(live.map((r) => r.plannedDate).sort()).toEqual([
      '2027-01-15',
      '2027-02-15',
      '2027-03-15',
      '2027-04-16',
      '2027-05-17',
      '2027-06-15',
      '2027-07-15',
    ]);
    expect(live.find((r) => r.id === jul.id)!.state).toBe('booked');

    // Back to a full year: the cancelled months come back as the same work orders, not new ones.
    await mgr.patch(`/api/agreements/${a.id}`).send({ termEnd: '2027-12-31' });
    const back = await mgr.post(`/api/agreements/${a.id}/plan/apply`);
    expect(back.body.counts).toMatchObject({ new: 5, locked: 2 });
    expect(await pmRows(a.id)).toHaveLength(12);
  });

  it('recognises visits written before (no rule date recorded) by their working day, and never duplicates them', async () => {
    const mgr = await agent(f.inA.manager);
    const site = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const a = (
      await mgr.post('/api/agreements').send(
        quarterly(site.site.id, [site.unit.id], {
          name: 'Older visits',
          recurrence: { preset: 'quarterly', startMonth: 1, dayOfMonth: 16 },
        }),
      )
    ).body.agreement;
    // 16 Jan 2027 is a Saturday: the visit was planned on Monday the 18th and is booked; April's (a Friday) is unplaced.
    const pm = (plannedDate: string, state: 'booked' | 'unplaced') =>
      makeWorkOrder(t.ctx.db, {
        branchId: f.a.id,
        siteId: site.site.id,
        kind: 'planned_maintenance',
        agreementId: a.id,
        plannedDate,
        state,
      });
    const jan = await pm('2027-01-18', 'booked');
    const apr = await pm('2027-04-16', 'unplaced');
    const preview = await mgr.post(`/api/agreements/${a.id}/plan`);
    expect(preview.body.counts).toEqual({ new: 2, keep: 1, move: 0, locked: 1, cancel: 0 });
    expect(preview.body.visits.find((v: { workOrderId: string }) => v.workOrderId === jan.id)).toMatchObject({
      action: 'locked',
      ruleDate: '2027-01-16',
    });
    await mgr.post(`/api/agreements/${a.id}/plan/apply`);
    const rows = await pmRows(a.id);
    expect(rows).toHaveLength(4);
    expect(rows.find((r) => r.id === apr.id)!.purpose).toBe('agreement-visit:2027-04-16');
    expect(rows.find((r) => r.id === jan.id)!.purpose).toBeNull();
    expect((await mgr.post(`/api/agreements/${a.id}/plan/apply`)).body.counts).toEqual({ new: 0, keep: 3, move: 0, locked: 1, cancel: 0 });
  });

  it('levels visits across weeks: at most 5 planned visits per technician a week', async () => {
    // Branch B has one technician, so one week takes at most 5 planned visits.
    const mgrB = await agent(f.inB.manager);
    const ids: string[] = [];
    for (let i = 0; i < 6; i++) {
      const s = await makeSiteWithUnit(t.ctx.db, f.b.id);
      const a = (
        await mgrB.post('/api/agreements').send(quarterly(s.site.id, [s.unit.id], { name: `Levelling ${i}`, termEnd: '2027-03-31' }))
      ).body.agreement;
      ids.push(a.id);
    }
    for (const id of ids.slice(0, 5)) await mgrB.post(`/api/agreements/${id}/plan/apply`);
    const sixth = await mgrB.post(`/api/agreements/${ids[5]}/plan`);
    expect(sixth.body.visits).toEqual([
      expect.objectContaining({
        ruleDate: '2027-01-15',
        plannedDate: '2027-01-22',
        action: 'new',
        moved: expect.stringContaining('later week'),
      }),
    ]);
    await mgrB.post(`/api/agreements/${ids[5]}/plan/apply`);
    const all = await t.ctx.db
      .select({ plannedDate: workOrders.plannedDate })
      .from(workOrders)
      .where(and(eq(workOrders.branchId, f.b.id), eq(workOrders.kind, 'planned_maintenance'), ne(workOrders.state, 'cancelled')));
    expect(all.filter((r) => r.plannedDate === '2027-01-15')).toHaveLength(5);
    expect(all.filter((r) => r.plannedDate === '2027-01-22')).toHaveLength(1);
  });
});

describe('PM completion and renewals', () => {
  it('counts due visits done on time, late, missed and still open, per agreement and branch; lists agreements ending within 60 days', async () => {
    const mgr = await agent(f.inA.manager);
    const site = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const a = (
      await mgr
        .post('/api/agreements')
        .send(quarterly(site.site.id, [site.unit.id], { name: 'Ending soon', termStart: '2026-01-01', termEnd: '2027-02-15' }))
    ).body.agreement;
    const pm = (plannedDate: string, over: Omit<Partial<typeof workOrders.$inferInsert>, 'unitId'> = {}) =>
      makeWorkOrder(t.ctx.db, {
        branchId: f.a.id,
        siteId: site.site.id,
        kind: 'planned_maintenance',
        agreementId: a.id,
        plannedDate,
        ...over,
      });
    await pm('2026-12-01', { state: 'closed', closedAt: new Date('2026-12-08T20:00:00Z') }); // 7 days after: on time
    await pm('2026-11-02', { state: 'closed', closedAt: new Date('2026-11-20T20:00:00Z') }); // late
    await pm('2026-10-01'); // never done: missed
    await pm('2027-01-01'); // due 3 days ago: still open
    await pm('2027-02-01'); // not yet due
    await pm('2026-09-01', { state: 'cancelled' }); // not counted

    const res = await mgr.get('/api/agreements/pm-completion');
    expect(res.status).toBe(200);
    expect(res.body.graceDays).toBe(7);
    expect(res.body.agreements.find((x: { agreementId: string }) => x.agreementId === a.id)).toMatchObject({
      due: 4,
      onTime: 1,
      late: 1,
      missed: 1,
      open: 1,
    });
    expect(res.body.branches).toEqual([expect.objectContaining({ branchId: f.a.id, due: 4, onTime: 1, late: 1, missed: 1, open: 1 })]);
    expect(res.body.renewals).toEqual([expect.objectContaining({ agreementId: a.id, termEnd: '2027-02-15', daysLeft: 42 })]);

    const owner = await agent(f.owner);
    const all = await owner.get('/api/agreements/pm-completion');
    expect(all.body.branches.map((b: { branchId: string }) => b.branchId).sort()).toEqual([f.a.id, f.b.id].sort());
  });
});

describe('visit plan keeps what was contracted', () => {
  it('a weekly Saturday-and-Sunday rule keeps every visit (next free working day), and says when the term has no room', async () => {
    const mgr = await agent(f.inA.manager);
    const a = (
      await mgr
        .post('/api/agreements')
        .send(quarterly(siteA.site.id, [siteA.unit.id], { name: 'Weekend rule', termStart: '2027-01-04', termEnd: '2027-01-31' }))
    ).body.agreement;
    // A rule from an import: every Saturday and Sunday (Jan 9/10, 16/17, 23/24, 30/31 = 8 contracted visits).
    await t.ctx.db.update(agreements).set({ rrule: 'FREQ=WEEKLY;BYDAY=SA,SU' }).where(eq(agreements.id, a.id));
    const preview = await mgr.post(`/api/agreements/${a.id}/plan`);
    expect(preview.status).toBe(200);
    const rows = preview.body.visits as { ruleDate: string; plannedDate: string; moved: string | null }[];
    expect(rows.map((v) => v.ruleDate).sort()).toEqual([
      '2027-01-09',
      '2027-01-10',
      '2027-01-16',
      '2027-01-17',
      '2027-01-23',
      '2027-01-24',
      '2027-01-30',
      '2027-01-31',
    ]);
    expect(new Set(rows.map((v) => v.plannedDate)).size).toBe(8); // eight different working days
    expect(preview.body.dropped).toEqual([]);
    // Sat 9 → Mon 11; Sun 10 → Mon 11 is taken → Tue 12.
    expect(rows.find((v) => v.ruleDate === '2027-01-10')?.plannedDate).toBe('2027-01-12');

    // A term ending Sunday 10 January: Mon 4 … Fri 8 are free for the two weekend visits (previous free working days).
    await t.ctx.db.update(agreements).set({ termEnd: '2027-01-10', rrule: 'FREQ=DAILY' }).where(eq(agreements.id, a.id));
    const tight = await mgr.post(`/api/agreements/${a.id}/plan`);
    // Daily Mon 4 … Sun 10 = 7 contracted visits, 5 working days: 2 cannot be placed, and the preview says so.
    expect(tight.body.visits).toHaveLength(5);
    expect(tight.body.dropped.map((d: { ruleDate: string }) => d.ruleDate)).toEqual(['2027-01-09', '2027-01-10']);
    expect(tight.body.dropped[0].reason).toMatch(/^Not planned: no free working day/);
  });
});
