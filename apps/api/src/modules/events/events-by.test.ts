/**
 * Who made a change (`by` of the live events) for the changes made outside bookings and visits: work orders,
 * leak cases, alarms (one, or a CSV import), agreements, branch settings, the team, sites and units (and their
 * import), return visits. Each change is made by one of two people, and its event must name that person;
 * a change made by no person (a job, a controller) names no one. The events also name the rows they concern
 * (migration 0018), and another branch's events never reach a person (`mayHear`).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq, gt, sql } from 'drizzle-orm';
import {
  liveEventKinds,
  liveKindsFor,
  roles,
  unitImportColumns,
  unitImportExample,
  type LiveEvent,
  type SessionUser,
} from '@coilpath/contract';
import { leakCases, liveEvents, visits } from '../../db/schema';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, makeUser, makeWorkOrder, TEST_PASSWORD } from '../../testing/fixtures';
import { addDays } from '@coilpath/calc';
import { mayHear, toLiveEvent } from './events.service';
import { changeAs } from './actor';
import request from 'supertest';
import { signatureHeader } from '../alarm-sources/signature';

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let siteA: Awaited<ReturnType<typeof makeSiteWithUnit>>;
/** The second person of each role in branch A (the first is the fixture's). */
let ana: Awaited<ReturnType<typeof makeUser>>;
let priya: Awaited<ReturnType<typeof makeUser>>;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
const as: Record<string, Agent> = {};
const today = '2027-03-01';

beforeAll(async () => {
  t = await createTestApp({ now: `${today}T12:00:00Z` });
  f = await makeTwoBranches(t.ctx.db);
  siteA = await makeSiteWithUnit(t.ctx.db, f.a.id);
  ana = await makeUser(t.ctx.db, 'dispatcher', f.a.id, { name: 'Ana Lindqvist' });
  priya = await makeUser(t.ctx.db, 'branch_manager', f.a.id, { name: 'Priya Venkatesh' });
  const people = { dispatcher: f.inA.dispatcher, ana, manager: f.inA.manager, priya, owner: f.owner };
  for (const [k, u] of Object.entries(people)) as[k] = await signedInAgent(t.app, u.email, TEST_PASSWORD);
});

afterAll(() => t?.close());

const newestId = async () => {
  const [row] = await t.ctx.db.select({ id: sql<number>`coalesce(max(${liveEvents.id}), 0)::int` }).from(liveEvents);
  return Number(row?.id ?? 0);
};

/** The events (as `GET /api/events` sends them) that `change` wrote, of branch A. */
async function eventsOf(change: () => Promise<unknown>): Promise<LiveEvent[]> {
  const from = await newestId();
  await change();
  const rows = await t.ctx.db
    .select()
    .from(liveEvents)
    .where(and(gt(liveEvents.id, from), eq(liveEvents.branchId, f.a.id)))
    .orderBy(liveEvents.id);
  return rows.map(toLiveEvent);
}

const who = (u: { id: string; name: string }) => ({ id: u.id, name: u.name });
const ok = (status: number) => (res: { status: number; body: unknown }) => {
  expect(res.status, JSON.stringify(res.body)).toBe(status);
  return res.body as unknown;
};
const one = (events: LiveEvent[], kind: LiveEvent['kind']) => {
  const found = events.filter((e) => e.kind === kind);
  expect(found, `one ${kind} event in ${JSON.stringify(events)}`).toHaveLength(1);
  return found[0]!;
};

describe('by: who made the change', () => {
  it('work orders: created by one dispatcher, changed by another; the roster event names the work order', async () => {
    let id = '';
    const created = await eventsOf(async () => {
      const body = ok(201)(
        await as
          .dispatcher!.post('/api/work-orders')
          .send({ siteId: siteA.site.id, unitId: siteA.unit.id, kind: 'service_call', complaint: 'Walk-in cooler warm' }),
      );
      id = (body as { workOrder: { id: string } }).workOrder.id;
    });
    const first = one(created, 'roster');
    expect(first.by).toEqual(who(f.inA.dispatcher));
    expect(first.kind === 'roster' && first.workOrders).toEqual([id]);
    const changed = one(
      await eventsOf(async () => ok(200)(await as.ana!.patch(`/api/work-orders/${id}`).send({ priority: 'high' }))),
      'roster',
    );
    expect(changed.by).toEqual(who(ana));
    expect(changed.kind === 'roster' && changed.workOrders).toEqual([id]);
  });

  it('alarms: one recorded by a manager, an import committed by another; the event names the unit', async () => {
    const recorded = one(
      await eventsOf(async () =>
        ok(201)(await as.manager!.post('/api/alarms').send({ unitId: siteA.unit.id, code: 'HP-1', raisedAt: `${today}T10:00:00Z` })),
      ),
      'alarm',
    );
    expect(recorded.by).toEqual(who(f.inA.manager));
    expect(recorded.kind === 'alarm' && recorded.units).toEqual([siteA.unit.id]);
    const csv = `unit_serial,circuit,code,raised_at\n${siteA.unit.serial},1,LP-2,${today}T09:00:00Z\n${siteA.unit.serial},1,LP-2,${today}T09:30:00Z\n`;
    const imported = one(
      await eventsOf(async () => ok(200)(await as.priya!.post('/api/alarms/import').send({ branchId: f.a.id, mode: 'commit', csv }))),
      'alarm',
    );
    expect(imported.by).toEqual(who(priya));
    expect(imported.kind === 'alarm' && imported.units).toEqual([siteA.unit.id]);
  });

  it('leak cases: marked repaired by one manager, a repair visit booked by another', async () => {
    const open = async () => {
      const [c] = await t.ctx.db
        .insert(leakCases)
        .values({
          branchId: f.a.id,
          unitId: siteA.unit.id,
          openedOn: addDays(today, -25),
          rule: 'comfort_cooling',
          method: 'annualizing',
          thresholdPercent: 10,
          leakRatePercent: 24,
          repairDueDate: addDays(today, 5),
        })
        .returning();
      return c!;
    };
    const c1 = await open();
    const repaired = await eventsOf(async () =>
      ok(200)(
        await as
          .manager!.patch(`/api/leak-cases/${c1.id}`)
          .send({ action: 'repaired', repairedOn: addDays(today, -1), notes: 'Brazed the return bend' }),
      ),
    );
    const lc = one(repaired, 'leak-case');
    expect(lc.by).toEqual(who(f.inA.manager));
    expect(lc.kind === 'leak-case' && lc.leakCases).toEqual([c1.id]);
    expect(one(repaired, 'roster').by).toEqual(who(f.inA.manager));

    const c2 = await open();
    const booked = await eventsOf(async () =>
      ok(201)(await as.priya!.post(`/api/leak-cases/${c2.id}/repair-visit`).send({ priority: 'high', notes: 'Bring nitrogen' })),
    );
    expect(one(booked, 'leak-case').by).toEqual(who(priya));
    const roster = one(booked, 'roster');
    expect(roster.by).toEqual(who(priya));
    const [repair] = await t.ctx.db.select({ wo: leakCases.repairWorkOrderId }).from(leakCases).where(eq(leakCases.id, c2.id));
    expect(roster.kind === 'roster' && roster.workOrders).toContain(repair!.wo);
  });

  it('return visits: queued from the Watchlist by a manager', async () => {
    const { site, unit } = await makeSiteWithUnit(t.ctx.db, f.a.id);
    const origin = await makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: site.id, unitId: unit.id, state: 'closed' });
    await t.ctx.db.insert(visits).values({
      branchId: f.a.id,
      workOrderId: origin.id,
      techId: f.inA.technician.id,
      closedAt: new Date(`${today}T08:00:00Z`),
      outcome: 'needs_return',
      returnNeeds: ['parts'],
    });
    const wo = await makeWorkOrder(t.ctx.db, {
      branchId: f.a.id,
      siteId: site.id,
      unitId: unit.id,
      kind: 'return_visit',
      originWorkOrderId: origin.id,
    });
    const e = one(
      await eventsOf(async () =>
        ok(200)(await as.priya!.patch(`/api/watchlist/return-visits/${wo.id}`).send({ priority: 'high', latestDate: addDays(today, 7) })),
      ),
      'roster',
    );
    expect(e.by).toEqual(who(priya));
    expect(e.kind === 'roster' && e.workOrders).toEqual([wo.id]);
  });

  it('agreements: a plan applied by a manager', async () => {
    const agreement = ok(201)(
      await as.manager!.post('/api/agreements').send({
        siteId: siteA.site.id,
        name: 'Quarterly rooftop PM',
        unitIds: [siteA.unit.id],
        recurrence: { preset: 'quarterly', startMonth: 1, dayOfMonth: 15 },
        termStart: addDays(today, 1),
        termEnd: addDays(today, 365),
        slaHours: 24,
        priceCents: 120_000,
        visitMinutes: 90,
        tasks: ['Replace filters'],
      }),
    ) as { agreement: { id: string } };
    const e = one(
      await eventsOf(async () => ok(200)(await as.priya!.post(`/api/agreements/${agreement.agreement.id}/plan/apply`))),
      'roster',
    );
    expect(e.by).toEqual(who(priya));
    expect(e.kind === 'roster' && (e.workOrders === null || e.workOrders.length > 0)).toBe(true);
  });

  it('branch settings and the team: changed by the owner', async () => {
    const branch = one(
      await eventsOf(async () => ok(200)(await as.owner!.patch(`/api/branches/${f.a.id}`).send({ baseAddress: '2 Depot Road' }))),
      'roster',
    );
    expect(branch.by).toEqual(who(f.owner));
    const tech = await makeUser(t.ctx.db, 'technician', f.a.id);
    const team = one(
      await eventsOf(async () =>
        ok(200)(await as.owner!.patch(`/api/users/${tech.id}`).send({ name: 'Renamed Tech', role: 'technician', branchId: f.a.id })),
      ),
      'roster',
    );
    expect(team.by).toEqual(who(f.owner));
  });

  it('sites and units: a unit archived by one dispatcher, a site renamed and units imported by another', async () => {
    const archived = one(await eventsOf(async () => ok(200)(await as.dispatcher!.post(`/api/units/${siteA.unit.id}/archive`))), 'roster');
    expect(archived.by).toEqual(who(f.inA.dispatcher));
    ok(200)(await as.dispatcher!.post(`/api/units/${siteA.unit.id}/unarchive`));
    const renamed = one(
      await eventsOf(async () => ok(200)(await as.ana!.patch(`/api/sites/${siteA.site.id}`).send({ name: 'Harbour Cold Store' }))),
      'roster',
    );
    expect(renamed.by).toEqual(who(ana));
    const csv = `${unitImportColumns.join(',')}\n${unitImportColumns.map((c) => unitImportExample[c]).join(',')}\n`;
    const imported = one(
      await eventsOf(async () => ok(200)(await as.ana!.post('/api/units/import').send({ siteId: siteA.site.id, mode: 'commit', csv }))),
      'roster',
    );
    expect(imported.by).toEqual(who(ana));
  });

  it('names no one for a change made by no person (a job, a controller), and the person for changeAs', async () => {
    const byJob = one(await eventsOf(() => makeWorkOrder(t.ctx.db, { branchId: f.a.id, siteId: siteA.site.id })), 'roster');
    expect(byJob.by).toBeNull();
    // A controller's signed alarm (the source registered by a manager, the alarm sent by no one).
    const source = ok(201)(await as.manager!.post('/api/alarm-sources').send({ siteId: siteA.site.id, name: 'Roof BMS' })) as {
      id: string;
      secret: string;
    };
    const raw = JSON.stringify({ deliveryId: 'd-by-1', unitTag: siteA.unit.tag, code: 'LP1', raisedAt: `${today}T11:00:00Z` });
    const ts = String(Math.floor(t.ctx.clock.now().getTime() / 1000));
    const byController = one(
      await eventsOf(async () =>
        ok(202)(
          await request(t.app)
            .post(`/api/ingest/alarms/${source.id}`)
            .set('Content-Type', 'application/json')
            .set('X-Coilpath-Timestamp', ts)
            .set('X-Coilpath-Signature', signatureHeader(source.secret, ts, Buffer.from(raw)))
            .send(raw),
        ),
      ),
      'alarm',
    );
    expect(byController.by).toBeNull();
    expect(byController.kind === 'alarm' && byController.units).toEqual([siteA.unit.id]);
    const byPerson = one(
      await eventsOf(() => changeAs(t.ctx.db, ana.id, (tx) => makeWorkOrder(tx as never, { branchId: f.a.id, siteId: siteA.site.id }))),
      'roster',
    );
    expect(byPerson.by).toEqual(who(ana));
  });
});

describe('the rows an event names', () => {
  it('says null (many) beyond 50 rows, and each row once', async () => {
    const many = one(
      await eventsOf(() =>
        changeAs(t.ctx.db, ana.id, async (tx) => {
          for (let i = 0; i < 55; i++) await makeWorkOrder(tx as never, { branchId: f.a.id, siteId: siteA.site.id });
        }),
      ),
      'roster',
    );
    expect(many.kind === 'roster' && many.workOrders).toBeNull();
    let id = '';
    const twice = one(
      await eventsOf(() =>
        changeAs(t.ctx.db, ana.id, async (tx) => {
          id = (await makeWorkOrder(tx as never, { branchId: f.a.id, siteId: siteA.site.id })).id;
          await tx.execute(sql`update work_orders set priority = 'high' where id = ${id}`);
        }),
      ),
      'roster',
    );
    expect(twice.kind === 'roster' && twice.workOrders).toEqual([id]);
  });
});

describe('mayHear: each kind within the person’s branches and role', () => {
  const person = (role: SessionUser['role'], branchId: string | null, id = 'u-1') => ({ id, role, branchId }) as SessionUser;

  it('never lets an event of another branch through, of any kind, for any role but the owner', () => {
    for (const kind of liveEventKinds) {
      for (const role of roles) {
        if (role === 'owner') continue;
        expect(mayHear(person(role, f.b.id), { branchId: f.a.id, kind, userId: null }), `${role} of B hearing ${kind} of A`).toBe(false);
        expect(mayHear(person(role, f.a.id), { branchId: f.a.id, kind, userId: null }), `${role} of A hearing ${kind} of A`).toBe(
          liveKindsFor(role).includes(kind),
        );
      }
      expect(mayHear(person('owner', null), { branchId: f.a.id, kind, userId: null })).toBe(liveKindsFor('owner').includes(kind));
    }
  });

  it('keeps a day to its technician', () => {
    expect(mayHear(person('technician', f.a.id, 'tech-1'), { branchId: f.a.id, kind: 'day', userId: 'tech-1' })).toBe(true);
    expect(mayHear(person('technician', f.a.id, 'tech-2'), { branchId: f.a.id, kind: 'day', userId: 'tech-1' })).toBe(false);
  });
});
