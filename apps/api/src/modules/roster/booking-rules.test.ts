import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeBranch, makeSiteWithUnit, makeTwoBranches, makeUser, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { auditEvents, bookings, workOrders } from '../../db/schema';

/*
 * The booking rules a dispatcher or manager may override with a reason: skill, EPA 608 certification,
 * working hours, due time. Branch A is in America/Chicago (CST = UTC−6 until 2027-03-14, then CDT = UTC−5);
 * technicians work Monday–Friday 07:00–15:30 local. Tuesday 2027-03-09 09:00 CST = 15:00Z.
 */
let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let place: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let ana: Awaited<ReturnType<typeof makeUser>>;
let sam: Awaited<ReturnType<typeof makeUser>>;
let cory: Awaited<ReturnType<typeof makeUser>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let dispatcher: Agent;
let manager: Agent;

const job = (over: Omit<Partial<typeof workOrders.$inferInsert>, 'unitId'> = {}) =>
  makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: place.site.id, unitId: place.unit.id, estimatedMinutes: 60, ...over });
const book = (agent: Agent, workOrderId: string, techId: string, startAt: string, extra: Record<string, unknown> = {}) =>
  agent.post('/api/bookings').send({ workOrderId, techId, startAt, ...extra });
const stateOf = async (id: string) =>
  (await t.ctx.db.select({ state: workOrders.state }).from(workOrders).where(eq(workOrders.id, id)))[0]!.state;

beforeAll(async () => {
  t = await createTestApp({ now: '2027-03-01T12:00:00Z' });
  f = await makeTwoBranches(t.ctx.db);
  place = await makeSiteWithUnit(t.ctx.db, f.a.id);
  ana = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Ana Ruiz', skills: ['rooftop'], epa608Type: 'universal' });
  sam = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Sam Ortiz', skills: [], epa608Type: 'I' });
  cory = await makeUser(t.ctx.db, 'technician', f.a.id, { name: 'Cory Vance', skills: ['chiller'], epa608Type: 'universal' });
  dispatcher = await signedInAgent(t.app, f.inA.dispatcher.email, TEST_PASSWORD);
  manager = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD);
});
afterAll(() => t.close());

describe('skill and certification are rules', () => {
  it('refuses a technician without the skill (409 naming it) unless overridden with a reason, kept on the booking with who', async () => {
    const w = await job({ requiredSkill: 'chiller' });
    const refused = await book(dispatcher, w.id, ana.id, '2027-03-09T15:00:00Z');
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('skill');
    expect(refused.body.error.message).toBe(
      'Ana Ruiz lacks the skill "chiller" this work needs (has "rooftop"). Pick another technician, or override the required skill with a reason.',
    );
    expect(refused.body.error.details).toEqual({
      rule: 'skill',
      rules: ['skill'],
      breaches: [{ rule: 'skill', message: 'Ana Ruiz lacks the skill "chiller" this work needs (has "rooftop").' }],
    });
    expect(await stateOf(w.id)).toBe('unplaced');

    // An override needs its reason, and covers only the rules it names.
    expect((await book(dispatcher, w.id, ana.id, '2027-03-09T15:00:00Z', { overrideRules: ['skill'] })).status).toBe(400);
    const wrongRule = await book(dispatcher, w.id, ana.id, '2027-03-09T15:00:00Z', {
      overrideRules: ['working_hours'],
      overrideReason: 'Customer asked',
    });
    expect(wrongRule.status).toBe(409);
    expect(wrongRule.body.error.code).toBe('skill');

    const reason = 'Chiller technician off sick; Ana has shadowed this unit twice';
    const ok = await book(dispatcher, w.id, ana.id, '2027-03-09T15:00:00Z', { overrideRules: ['skill'], overrideReason: reason });
    expect(ok.status).toBe(201);
    const expected = {
      hoursOverride: false,
      overrideRules: ['skill'],
      overrideReason: reason,
      overrideBy: { id: f.inA.dispatcher.id, name: f.inA.dispatcher.name },
      workOrder: { requiredSkill: 'chiller', dueAt: null },
    };
    expect(ok.body.booking).toMatchObject(expected);
    const listed = await dispatcher.get('/api/bookings').query({ from: '2027-03-09T00:00:00Z', to: '2027-03-10T00:00:00Z' });
    expect(listed.body.bookings.find((b: { id: string }) => b.id === ok.body.booking.id)).toMatchObject(expected);

    const [row] = await t.ctx.db.select().from(bookings).where(eq(bookings.id, ok.body.booking.id));
    expect(row).toMatchObject({
      overrideRules: ['skill'],
      hoursOverride: false,
      overrideReason: reason,
      overrideById: f.inA.dispatcher.id,
    });
    const history = await t.ctx.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.entity, 'booking'), eq(auditEvents.entityId, ok.body.booking.id)));
    expect(history).toHaveLength(1);
    expect(history[0]).toMatchObject({ action: 'booking.override', actorId: f.inA.dispatcher.id });
    expect(history[0]!.details).toMatchObject({
      rules: ['skill'],
      reason,
      breaches: [{ rule: 'skill', message: expect.stringContaining('lacks the skill "chiller"') }],
    });
  });

  it('names every broken rule at once; overriding one leaves the other standing; a manager may override both', async () => {
    const w = await job({ requiredSkill: 'rooftop', requiredCertification: 'II' });
    const both = await book(dispatcher, w.id, sam.id, '2027-03-09T17:00:00Z');
    expect(both.status).toBe(409);
    expect(both.body.error.code).toBe('booking_rules');
    expect(both.body.error.details.rules).toEqual(['skill', 'certification']);
    expect(both.body.error.message).toContain('Sam Ortiz lacks the skill "rooftop" this work needs.');
    expect(both.body.error.message).toContain(
      'Sam Ortiz is not certified for this refrigerant work (needs EPA 608 Type II; Sam Ortiz holds EPA 608 Type I).',
    );
    expect(both.body.error.message).toMatch(/override the required skill and EPA 608 certification with a reason\.$/);

    const one = await book(dispatcher, w.id, sam.id, '2027-03-09T17:00:00Z', {
      overrideRules: ['skill'],
      overrideReason: 'Rooftop crane job, Sam assists',
    });
    expect(one.status).toBe(409);
    expect(one.body.error.code).toBe('certification');
    expect(one.body.error.details.rules).toEqual(['certification']);
    expect(await stateOf(w.id)).toBe('unplaced');

    const ok = await book(manager, w.id, sam.id, '2027-03-09T17:00:00Z', {
      overrideRules: ['certification', 'skill'],
      overrideReason: 'Recovery done by the certified crew lead on site; Sam only swaps the fan motor',
    });
    expect(ok.status).toBe(201);
    expect(ok.body.booking).toMatchObject({
      overrideRules: ['skill', 'certification'],
      overrideBy: { id: f.inA.manager.id, name: f.inA.manager.name },
    });
  });
});

describe('the due time is a rule', () => {
  it('refuses a start after an emergency’s SLA due time unless overridden; a start at the due time is fine', async () => {
    const due = '2027-03-09T17:00:00Z'; // Tue 11:00 CST
    const onTime = await job({ priority: 'emergency', slaDueAt: new Date(due) });
    const atDue = await book(dispatcher, onTime.id, cory.id, due);
    expect(atDue.status).toBe(201);
    expect(atDue.body.booking.workOrder.dueAt).toBe('2027-03-09T17:00:00.000Z');
    expect(atDue.body.booking.overrideRules).toEqual([]);

    const w = await job({ priority: 'emergency', slaDueAt: new Date(due) });
    const late = await book(dispatcher, w.id, ana.id, '2027-03-09T17:30:00Z');
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('past_due');
    expect(late.body.error.message).toBe(
      'This work is due by Tuesday, March 9 at 11:00 (America/Chicago); this booking starts Tuesday, March 9 at 11:30, after it. Pick another time, or override the due time with a reason.',
    );
    expect(late.body.error.details).toMatchObject({ rule: 'due_time', rules: ['due_time'], dueAt: '2027-03-09T17:00:00.000Z' });

    const ok = await book(dispatcher, w.id, ana.id, '2027-03-09T17:30:00Z', {
      overrideRules: ['due_time'],
      overrideReason: 'Customer cannot open the plant room before 11:30',
    });
    expect(ok.status).toBe(201);
    expect(ok.body.booking).toMatchObject({
      overrideRules: ['due_time'],
      overrideReason: 'Customer cannot open the plant room before 11:30',
    });
  });

  it('leaves the SLA time of other priorities to the dispatcher (a target, not a rule)', async () => {
    const w = await job({ priority: 'high', slaDueAt: new Date('2027-03-09T17:00:00Z') });
    const res = await book(dispatcher, w.id, ana.id, '2027-03-10T15:00:00Z');
    expect(res.status).toBe(201);
    expect(res.body.booking).toMatchObject({ overrideRules: [], workOrder: { dueAt: null } });
  });

  it('a leak-repair deadline (latest start) too, together with the working hours', async () => {
    const w = await job({ latestAt: new Date('2027-03-10T05:59:00Z'), requiredCertification: 'II' }); // Tue 23:59 CST
    const late = await book(dispatcher, w.id, ana.id, '2027-03-10T22:00:00Z'); // Wed 16:00 CST: after hours and after the deadline
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('booking_rules');
    expect(late.body.error.details.rules).toEqual(['working_hours', 'due_time']);
    expect(late.body.error.message).toContain(
      'Ana Ruiz works 07:00–15:30 on Wednesday, March 10; this booking runs 16:00–17:00 (America/Chicago).',
    );
    expect(late.body.error.message).toContain('This work is due by Tuesday, March 9 at 23:59 (America/Chicago)');
    expect(late.body.error.message).toMatch(/Pick another time, or override the working hours and due time with a reason\.$/);

    // The working-hours override alone (the older field) leaves the deadline standing.
    const hoursOnly = await book(dispatcher, w.id, ana.id, '2027-03-10T22:00:00Z', {
      overrideHours: true,
      overrideReason: 'Parts arrive Wednesday afternoon',
    });
    expect(hoursOnly.status).toBe(409);
    expect(hoursOnly.body.error.code).toBe('past_due');

    const ok = await book(dispatcher, w.id, ana.id, '2027-03-10T22:00:00Z', {
      overrideHours: true,
      overrideRules: ['due_time'],
      overrideReason: 'Parts arrive Wednesday afternoon',
    });
    expect(ok.status).toBe(201);
    expect(ok.body.booking).toMatchObject({ hoursOverride: true, overrideRules: ['working_hours', 'due_time'] });
  });

  it('never lets an override cover a double booking', async () => {
    const a = await job();
    const b = await job({ requiredSkill: 'chiller' });
    expect((await book(dispatcher, a.id, ana.id, '2027-03-11T15:00:00Z')).status).toBe(201);
    const clash = await book(dispatcher, b.id, ana.id, '2027-03-11T15:30:00Z', {
      overrideRules: ['skill', 'certification', 'working_hours', 'due_time'],
      overrideReason: 'Anything',
    });
    expect(clash.status).toBe(409);
    expect(clash.body.error.code).toBe('overlap');
  });
});

describe('a move goes through the same rules', () => {
  it('keeps the override while the placement stands, re-checks it on a move, and clears it when nothing is broken', async () => {
    const w = await job({ requiredSkill: 'chiller' });
    const created = (
      await book(dispatcher, w.id, ana.id, '2027-03-12T15:00:00Z', { overrideRules: ['skill'], overrideReason: 'Training run' })
    ).body.booking;

    const fixed = await dispatcher.patch(`/api/bookings/${created.id}`).send({ version: 1, fixed: true });
    expect(fixed.status).toBe(200);
    expect(fixed.body.booking).toMatchObject({ fixed: true, overrideRules: ['skill'], overrideReason: 'Training run' });

    const moved = await dispatcher.patch(`/api/bookings/${created.id}`).send({ version: 2, startAt: '2027-03-12T16:00:00Z' });
    expect(moved.status).toBe(409);
    expect(moved.body.error.code).toBe('skill');
    const [row] = await t.ctx.db.select().from(bookings).where(eq(bookings.id, created.id));
    expect(row).toMatchObject({ version: 2, overrideRules: ['skill'] });

    const toCory = await dispatcher
      .patch(`/api/bookings/${created.id}`)
      .send({ version: 2, techId: cory.id, startAt: '2027-03-12T16:00:00Z' });
    expect(toCory.status).toBe(200);
    expect(toCory.body.booking).toMatchObject({
      techId: cory.id,
      overrideRules: [],
      hoursOverride: false,
      overrideReason: null,
      overrideBy: null,
    });

    const back = await manager
      .patch(`/api/bookings/${created.id}`)
      .send({ version: 3, techId: ana.id, overrideRules: ['skill'], overrideReason: 'Cory called away' });
    expect(back.status).toBe(200);
    expect(back.body.booking).toMatchObject({
      techId: ana.id,
      overrideRules: ['skill'],
      overrideReason: 'Cory called away',
      overrideBy: { id: f.inA.manager.id },
    });
    const history = await t.ctx.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.entityId, created.id), eq(auditEvents.action, 'booking.override')));
    expect(history.map((h) => h.details.reason).sort()).toEqual(['Cory called away', 'Training run']);
  });
});

describe('a branch holiday is nobody’s working day', () => {
  it('shows no capacity on the holiday, refuses a booking on it as outside working hours (overridable), and proposes nobody', async () => {
    // Tuesday 2027-03-16 is an ordinary weekday, kept by this branch as a holiday.
    const branch = await makeBranch(t.ctx.db, { timeZone: 'America/Chicago', holidays: ['2027-03-16'] });
    const site = await makeSiteWithUnit(t.ctx.db, branch.id);
    const dee = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Dee Park', skills: [] });
    const agent = await signedInAgent(t.app, (await makeUser(t.ctx.db, 'dispatcher', branch.id)).email, TEST_PASSWORD);
    const w = await makeWorkOrder(t.ctx.db, { branchId: branch.id, siteId: site.site.id, unitId: site.unit.id, estimatedMinutes: 60 });

    const load = await agent.get('/api/roster/load').query({ branchId: branch.id, from: '2027-03-15', to: '2027-03-17' });
    expect(load.status).toBe(200);
    const days = new Map(load.body.load.map((l: { day: string }) => [l.day, l]));
    expect(days.get('2027-03-16')).toMatchObject({ capacityMinutes: 0, holiday: true });
    expect(days.get('2027-03-15')).toMatchObject({ capacityMinutes: 510 });
    expect((days.get('2027-03-15') as { holiday?: boolean }).holiday).toBeUndefined();

    // 09:00 CDT on the holiday = 14:00Z.
    const refused = await book(agent, w.id, dee.id, '2027-03-16T14:00:00Z');
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('outside_hours');
    expect(refused.body.error.details).toMatchObject({ rules: ['working_hours'], hours: null });
    expect(refused.body.error.details.breaches[0].message).toBe('Tuesday, March 16 is a branch holiday; Dee Park is not rostered to work.');
    expect(await stateOf(w.id)).toBe('unplaced');

    const suggest = await agent.post('/api/roster/suggest').send({ workOrderId: w.id, day: '2027-03-16' });
    expect(suggest.body.candidates.every((c: { eligible: boolean }) => !c.eligible)).toBe(true);

    const ok = await book(agent, w.id, dee.id, '2027-03-16T14:00:00Z', {
      overrideRules: ['working_hours'],
      overrideReason: 'Hospital chiller, owner asked',
    });
    expect(ok.status).toBe(201);
  });
});

describe('suggestions and evening out propose no booking that breaks a rule', () => {
  it('ranks out a technician without the skill or past the due time, saying which rule (not "no free slot")', async () => {
    // A branch of its own, so only this test's technicians and work count.
    const branch = await makeBranch(t.ctx.db, { timeZone: 'America/Chicago' });
    const site = await makeSiteWithUnit(t.ctx.db, branch.id);
    const skilled = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Dee Park', skills: ['chiller'] });
    const plain = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Eli Stone', skills: [] });
    const agent = await signedInAgent(t.app, (await makeUser(t.ctx.db, 'dispatcher', branch.id)).email, TEST_PASSWORD);
    const w = await makeWorkOrder(t.ctx.db, {
      branchId: branch.id,
      siteId: site.site.id,
      unitId: site.unit.id,
      requiredSkill: 'chiller',
      estimatedMinutes: 60,
    });

    const res = await agent.post('/api/roster/suggest').send({ workOrderId: w.id, day: '2027-03-16' });
    expect(res.status).toBe(200);
    const byId = new Map(res.body.candidates.map((c: { techId: string }) => [c.techId, c]));
    expect(byId.get(skilled.id)).toMatchObject({ eligible: true, blockedBy: [] });
    const eli = byId.get(plain.id) as {
      eligible: boolean;
      blockedBy: string[];
      reasons: string[];
      freeMinutes: number;
      proposedStart: string | null;
    };
    expect(eli).toMatchObject({ eligible: false, blockedBy: ['skill'], proposedStart: null, freeMinutes: 510 });
    expect(eli.reasons[0]).toBe('Lacks the skill "chiller"');
    expect(eli.reasons.join(' ')).not.toMatch(/free slot/);

    // Due on Monday evening (a leak-repair deadline): nobody is proposed on Tuesday, each saying the due time is why.
    await t.ctx.db
      .update(workOrders)
      .set({ latestAt: new Date('2027-03-15T23:00:00Z') })
      .where(eq(workOrders.id, w.id));
    const due = await agent.post('/api/roster/suggest').send({ workOrderId: w.id, day: '2027-03-16' });
    const dee = due.body.candidates.find((c: { techId: string }) => c.techId === skilled.id);
    expect(dee).toMatchObject({ eligible: false, blockedBy: ['due_time'], proposedStart: null });
    expect(dee.reasons[0]).toBe("Due by 2027-03-15 18:00, before this day's working hours");
    expect(due.body.candidates.every((c: { eligible: boolean }) => !c.eligible)).toBe(true);
  });

  it('evening out places work only with a technician who keeps the rules; applying a proposal that breaks one books nothing', async () => {
    const branch = await makeBranch(t.ctx.db, { timeZone: 'America/Chicago' });
    const site = await makeSiteWithUnit(t.ctx.db, branch.id);
    const skilled = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Fay Lund', skills: ['chiller'] });
    const plain = await makeUser(t.ctx.db, 'technician', branch.id, { name: 'Gus Hale', skills: [] });
    const agent = await signedInAgent(t.app, (await makeUser(t.ctx.db, 'dispatcher', branch.id)).email, TEST_PASSWORD);
    const chiller = await makeWorkOrder(t.ctx.db, {
      branchId: branch.id,
      siteId: site.site.id,
      requiredSkill: 'chiller',
      estimatedMinutes: 120,
    });
    // An emergency due on Sunday 2027-03-14, before the week of 2027-03-15 has any working hours.
    const overdue = await makeWorkOrder(t.ctx.db, {
      branchId: branch.id,
      siteId: site.site.id,
      estimatedMinutes: 60,
      priority: 'emergency',
      slaDueAt: new Date('2027-03-14T18:00:00Z'),
    });

    const preview = await agent.post('/api/roster/even-out').send({ week: '2027-03-15' });
    expect(preview.status).toBe(200);
    const proposal = preview.body.proposals.find((p: { workOrderId: string }) => p.workOrderId === chiller.id);
    expect(proposal.techId).toBe(skilled.id);
    expect(preview.body.proposals.some((p: { workOrderId: string }) => p.workOrderId === overdue.id)).toBe(false);
    expect(preview.body.leftUnplaced.find((u: { workOrderId: string }) => u.workOrderId === overdue.id).reason).toMatch(
      /^Due by 2027-03-14 13:00: no free slot/,
    );

    const { workOrderId, startAt, endAt } = proposal as { workOrderId: string; startAt: string; endAt: string };
    const refused = await agent.post('/api/roster/even-out/apply').send({ proposals: [{ workOrderId, techId: plain.id, startAt, endAt }] });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('skill');
    expect(refused.body.error.message).toMatch(/^WO-\d+: Gus Hale lacks the skill "chiller".* Nothing was changed; preview again\.$/);
    expect(await stateOf(chiller.id)).toBe('unplaced');
    const applied = await agent
      .post('/api/roster/even-out/apply')
      .send({ proposals: [{ workOrderId, techId: skilled.id, startAt, endAt }] });
    expect(applied.status).toBe(200);
    expect(applied.body.bookings[0]).toMatchObject({ techId: skilled.id, overrideRules: [] });
  });
});
