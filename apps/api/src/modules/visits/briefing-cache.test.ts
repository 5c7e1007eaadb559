/**
 * The unit briefing kept by revision (migration 0021): `GET /api/units/:id/briefing` reuses its answer while the
 * unit's site's `briefing_revisions` row stands, every change a briefing shows raises that row at commit, and the
 * repeat-alarm window still slides with the clock. `visits.unit_id` follows the work order's unit.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { createTestApp, signedInAgent, type TestApp } from '../../testing/harness';
import { makeSiteWithUnit, makeTwoBranches, TEST_PASSWORD } from '../../testing/fixtures';
import {
  alarms,
  attachments,
  branches,
  circuits,
  findings,
  leakCases,
  refrigerantEvents,
  sites,
  units,
  users,
  visits,
  workOrders,
} from '../../db/schema';
import { briefingRevision } from '../../lib/revision-cache';
import type { Clock } from '../../lib/clock';
import { makeBookedVisit, NOT_AVAILABLE } from './visits.fixtures';

const PSIG_F = { pressure: 'psig', temperature: 'F' } as const;
let now = new Date('2026-03-10T15:00:00Z');
const clock: Clock = { now: () => now };

let t: TestApp;
let f: Awaited<ReturnType<typeof makeTwoBranches>>;
let place: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let other: Awaited<ReturnType<typeof makeSiteWithUnit>>;
let circuitIds: string[];
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
let tech: Agent, manager: Agent;

beforeAll(async () => {
  t = await createTestApp({ clock });
  f = await makeTwoBranches(t.ctx.db);
  place = await makeSiteWithUnit(t.ctx.db, f.a.id, { unit: { fullChargeLb: 40 } });
  other = await makeSiteWithUnit(t.ctx.db, f.a.id);
  const cs = await t.ctx.db.select().from(circuits).where(eq(circuits.unitId, place.unit.id)).orderBy(circuits.number);
  circuitIds = cs.map((c) => c.id);
  [tech, manager] = await Promise.all([
    signedInAgent(t.app, f.inA.technician.email, TEST_PASSWORD),
    signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD),
  ]);
});
afterAll(() => t.close());

async function briefing(unitId = place.unit.id) {
  const res = await manager.get(`/api/units/${unitId}/briefing`);
  expect(res.status).toBe(200);
  return res.body;
}

/** A visit of the technician at the place, on site at `at` (readings, findings and refrigerant may be recorded). */
const onSiteVisit = (at: string, unitId: string | null = place.unit.id, siteId = place.site.id) =>
  makeBookedVisit(t.ctx.db, { branchId: f.a.id, siteId, unitId, techId: f.inA.technician.id, startAt: at, onSite: true });

/** A request that must succeed. */
const ok = (res: { status: number; body: unknown }) => {
  if (res.status >= 300) throw new Error(`answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res;
};

/** Runs `change` with the briefing trigger of `table` off: a change nothing announces. */
async function unannounced(table: string, change: () => Promise<unknown>) {
  await t.ctx.db.execute(sql.raw(`ALTER TABLE "${table}" DISABLE TRIGGER briefing_revision`));
  try {
    await change();
  } finally {
    await t.ctx.db.execute(sql.raw(`ALTER TABLE "${table}" ENABLE TRIGGER briefing_revision`));
  }
}

describe('the unit briefing, kept by its site’s revision', () => {
  it('is reused while nothing it shows changes: a change the triggers do not announce is not seen', async () => {
    const first = await briefing();
    await unannounced('units', () => t.ctx.db.update(units).set({ tag: 'RTU-SILENT' }).where(eq(units.id, place.unit.id)));
    const again = await manager.get(`/api/units/${place.unit.id}/briefing`);
    // Computed afresh, the answer would carry the new tag: it was the kept one.
    expect(again.body.unit.tag).toBe(first.unit.tag);
    expect(again.headers.etag).toBeDefined();
    expect((await manager.get(`/api/units/${place.unit.id}/briefing`).set('If-None-Match', String(again.headers.etag))).status).toBe(304);
    // The same unit, asked by someone else who may see it: the same kept answer.
    expect((await tech.get(`/api/units/${place.unit.id}/briefing`)).status).toBe(404); // not on the technician's work yet
    // Any announced change (here another column of the unit) makes it read again, the silent change with it.
    await t.ctx.db.update(units).set({ model: 'TM-20' }).where(eq(units.id, place.unit.id));
    expect((await briefing()).unit).toMatchObject({ tag: 'RTU-SILENT', model: 'TM-20' });
  });

  it('sees every change that alters a briefing', async () => {
    const steps: [string, () => Promise<unknown>, (b: Awaited<ReturnType<typeof briefing>>) => void][] = [];
    const visit = await onSiteVisit('2026-03-10T14:00:00Z');
    const step = (name: string, change: () => Promise<unknown>, check: (b: Awaited<ReturnType<typeof briefing>>) => void) =>
      steps.push([name, change, check]);

    step(
      'a reading posted',
      () =>
        tech
          .post(`/api/visits/${visit.visit.id}/readings`)
          .send({ units: PSIG_F, readings: [{ circuitId: circuitIds[0], suctionPressure: 111.5, suctionLineTemp: 48.7 }] })
          .then(ok),
      (b) =>
        expect(b.lastReadings.map((r: { circuitNumber: number; suctionPressure: number }) => [r.circuitNumber, r.suctionPressure])).toEqual(
          [[1, 111.5]],
        ),
    );
    step(
      'refrigerant added',
      () =>
        tech
          .post(`/api/units/${place.unit.id}/refrigerant-events`)
          .send({ refrigerant: 'R-410A', poundsAdded: 2.5, reason: 'leak_top_off', date: '2026-03-10' })
          .then(ok),
      (b) => expect(b.refrigerantThisYear.poundsAdded).toBe(2.5),
    );
    step(
      'a finding recorded and the visit closed',
      async () => {
        await tech
          .post(`/api/visits/${visit.visit.id}/findings`)
          .send({ causeCode: 'sensor_fault', origin: 'wear', reportedCircuit: 1, actualCircuit: 1 })
          .then(ok);
        await tech.post(`/api/visits/${visit.visit.id}/close`).send({ signature: NOT_AVAILABLE, outcome: 'resolved' }).then(ok);
      },
      (b) => {
        expect(b.lastVisit).toMatchObject({ visitId: visit.visit.id, outcome: 'resolved', techName: f.inA.technician.name });
        expect(b.lastVisit.findings.map((x: { causeCode: string }) => x.causeCode)).toEqual(['sensor_fault']);
      },
    );
    step(
      'a finding added to the closed visit',
      () => t.ctx.db.insert(findings).values({ visitId: visit.visit.id, unitId: null, causeCode: 'airflow', origin: 'wear' }),
      (b) => expect(b.lastVisit.findings.map((x: { causeCode: string }) => x.causeCode)).toEqual(['sensor_fault', 'airflow']),
    );
    step(
      'the technician renamed',
      () => t.ctx.db.update(users).set({ name: 'Renamed Technician' }).where(eq(users.id, f.inA.technician.id)),
      (b) => expect(b.lastVisit.techName).toBe('Renamed Technician'),
    );
    step(
      'a leak case opened',
      () =>
        t.ctx.db.insert(leakCases).values({
          branchId: f.a.id,
          unitId: place.unit.id,
          openedOn: '2026-03-10',
          rule: 'comfort_cooling',
          method: 'annualizing',
          thresholdPercent: 10,
          leakRatePercent: 25,
          repairDueDate: '2026-04-09',
        }),
      (b) => expect(b.openLeakCase).toMatchObject({ repairDueDate: '2026-04-09' }),
    );
    step(
      'the leak case closed',
      () => t.ctx.db.update(leakCases).set({ status: 'closed' }).where(eq(leakCases.unitId, place.unit.id)),
      (b) => expect(b.openLeakCase).toBeNull(),
    );
    step(
      'two alarms of one code',
      () =>
        t.ctx.db.insert(alarms).values([
          {
            branchId: f.a.id,
            unitId: place.unit.id,
            circuit: 1,
            code: 'LP1',
            raisedAt: new Date('2026-03-01T10:00:00Z'),
            source: 'controller',
          },
          {
            branchId: f.a.id,
            unitId: place.unit.id,
            circuit: 1,
            code: 'LP1',
            raisedAt: new Date('2026-03-08T10:00:00Z'),
            source: 'controller',
          },
        ]),
      (b) => expect(b.repeatAlarms).toEqual([{ code: 'LP1', circuit: 1, count: 2, lastRaisedAt: '2026-03-08T10:00:00.000Z' }]),
    );
    step(
      'the branch’s repeat-alarm rule',
      () => t.ctx.db.update(branches).set({ repeatAlarmCount: 3 }).where(eq(branches.id, f.a.id)),
      (b) => {
        expect(b.repeatAlarms).toEqual([]);
        expect(b.repeatAlarmWindow).toEqual({ days: 30, minCount: 3 });
      },
    );
    step(
      'the branch’s rule back',
      () => t.ctx.db.update(branches).set({ repeatAlarmCount: 2 }).where(eq(branches.id, f.a.id)),
      (b) => expect(b.repeatAlarms).toHaveLength(1),
    );
    step(
      'the branch’s units',
      () => t.ctx.db.update(branches).set({ unitSystem: 'si' }).where(eq(branches.id, f.a.id)),
      (b) => expect(b.units.pressure).toBe('kPag'),
    );
    step(
      'a photo of the unit',
      () =>
        t.ctx.db.insert(attachments).values({
          unitId: place.unit.id,
          kind: 'photo',
          storageKey: 'k1',
          displayName: 'coil.jpg',
          contentType: 'image/jpeg',
          sizeBytes: 10,
        }),
      (b) => expect(b.photos).toHaveLength(1),
    );
    step(
      'a circuit added',
      () => t.ctx.db.insert(circuits).values({ unitId: place.unit.id, number: 3 }),
      (b) => expect(b.circuits).toHaveLength(3),
    );
    step(
      'the site renamed',
      () => t.ctx.db.update(sites).set({ name: 'Renamed Site' }).where(eq(sites.id, place.site.id)),
      (b) => expect(b.unit.siteName).toBe('Renamed Site'),
    );
    let siteWide: Awaited<ReturnType<typeof onSiteVisit>>;
    step(
      'a later site-wide visit closed',
      async () => {
        siteWide = await onSiteVisit('2026-03-10T16:00:00Z', null);
        await t.ctx.db
          .update(visits)
          .set({ closedAt: new Date('2026-03-10T17:00:00Z'), outcome: 'resolved' })
          .where(eq(visits.id, siteWide.visit.id));
      },
      (b) => expect(b.lastVisit.visitId).toBe(siteWide.visit.id),
    );
    let elsewhere: Awaited<ReturnType<typeof onSiteVisit>>;
    step(
      'a still later visit’s work order moved to this unit from another site’s',
      async () => {
        elsewhere = await onSiteVisit('2026-03-10T18:00:00Z', other.unit.id, other.site.id);
        await t.ctx.db
          .update(visits)
          .set({ closedAt: new Date('2026-03-10T19:00:00Z'), outcome: 'resolved' })
          .where(eq(visits.id, elsewhere.visit.id));
        await t.ctx.db
          .update(workOrders)
          .set({ unitId: place.unit.id, siteId: place.site.id })
          .where(eq(workOrders.id, elsewhere.workOrder.id));
      },
      (b) => expect(b.lastVisit.visitId).toBe(elsewhere.visit.id),
    );
    step(
      'a refrigerant entry removed',
      () => t.ctx.db.delete(refrigerantEvents).where(eq(refrigerantEvents.unitId, place.unit.id)),
      (b) => expect(b.refrigerantThisYear.poundsAdded).toBe(0),
    );

    let before = await briefing();
    for (const [name, change, check] of steps) {
      await change();
      const after = await briefing();
      expect(after, name).not.toEqual(before);
      check(after);
      before = after;
    }
    const [moved] = await t.ctx.db.select({ unitId: visits.unitId }).from(visits).where(eq(visits.id, elsewhere!.visit.id));
    expect(moved!.unitId).toBe(place.unit.id);
  });

  it('counts a repeat alarm only while it is in the window, as the clock moves', async () => {
    const b = await briefing();
    expect(b.repeatAlarms).toHaveLength(1);
    // The first of the two LP1 alarms (1 March) leaves the 30-day window after 31 March, 10:00.
    now = new Date('2026-03-31T10:00:00Z');
    manager = await signedInAgent(t.app, f.inA.manager.email, TEST_PASSWORD); // the session of 10 March has ended
    expect((await briefing()).repeatAlarms).toHaveLength(1);
    now = new Date('2026-03-31T10:00:01Z');
    expect((await briefing()).repeatAlarms).toEqual([]);
  });

  it('raises the site’s revision once per transaction, and no other site’s', async () => {
    const revs = async () => [await briefingRevision(t.ctx.db, place.site.id), await briefingRevision(t.ctx.db, other.site.id)];
    const [a, b] = await revs();
    await t.ctx.db.transaction(async (tx) => {
      await tx.update(units).set({ tag: 'RTU-A' }).where(eq(units.id, place.unit.id));
      await tx
        .insert(alarms)
        .values({ branchId: f.a.id, unitId: place.unit.id, circuit: 2, code: 'HP2', raisedAt: now, source: 'controller' });
    });
    expect(await revs()).toEqual([a! + 1, b]);
    await expect(
      t.ctx.db.transaction(async (tx) => {
        await tx.update(units).set({ tag: 'RTU-B' }).where(eq(units.id, place.unit.id));
        throw new Error('rolled back');
      }),
    ).rejects.toThrow('rolled back');
    expect(await revs()).toEqual([a! + 1, b]);
  });
});
