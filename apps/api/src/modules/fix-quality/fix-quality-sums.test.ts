import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { asc, eq, inArray, sql } from 'drizzle-orm';
import { fixQuality } from '@coilpath/calc';
import { causeCodes, causeOrigins, type FixQualityReport, type VisitOutcome } from '@coilpath/contract';
import type { Database, Db } from '../../db/client';
import { branches, findings, fixQualitySums, fixQualitySumsPending, units, visits, workOrders } from '../../db/schema';
import { openTestDatabase } from '../../testing/harness';
import { makeBranch, makeSiteWithUnit, makeUser, makeWorkOrder } from '../../testing/fixtures';
import { fixQualityReport, NONE, splitByMonths } from './fix-quality.service';

/**
 * fix_quality_sums is kept by triggers (migration 0005) from service_call_facts, the branches' callback
 * windows and the units' makes and models, one transaction's deltas at a time; `rebuild_fix_quality_sums()`
 * computes it from scratch. After every kind of change both must agree. The property test at the end also
 * checks the report that adds the sums up against a plain computation from the work orders, visits and
 * findings themselves.
 */
let database: Database;
let db: Db;
beforeAll(async () => {
  database = await openTestDatabase();
  db = database.db;
});
afterAll(async () => {
  await database.close();
});

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const US_PER_MS = 1000;

const snapshot = () =>
  db
    .select()
    .from(fixQualitySums)
    .orderBy(
      asc(fixQualitySums.month),
      asc(fixQualitySums.branchId),
      asc(fixQualitySums.dim),
      asc(fixQualitySums.techId),
      asc(fixQualitySums.make),
      asc(fixQualitySums.model),
      asc(fixQualitySums.causeCode),
      asc(fixQualitySums.origin),
    );

/** The sums as the triggers kept them equal the sums computed from scratch; nothing is left pending. */
async function expectSumsAgree() {
  const kept = await snapshot();
  expect(await db.select().from(fixQualitySumsPending)).toEqual([]);
  await db.execute(sql`SELECT rebuild_fix_quality_sums()`);
  expect(await snapshot()).toEqual(kept);
  return kept;
}

/** The row of one dimension of one branch and month (the 'origin' rows add up to every job once). */
const rowOf = (
  rows: Awaited<ReturnType<typeof snapshot>>,
  branchId: string,
  month: string,
  dim: string,
  key: Partial<(typeof rows)[number]> = {},
) =>
  rows.filter(
    (r) =>
      r.branchId === branchId && r.month === month && r.dim === dim && Object.entries(key).every(([k, v]) => r[k as keyof typeof r] === v),
  );

describe('splitByMonths', () => {
  const z = (d: string) => `${d}T00:00:00.000Z`;
  it('reads whole months from the sums and counts the days around them from the jobs', () => {
    // The benchmark's year: 28–30 November, December to October whole, 1–27 November.
    expect(splitByMonths(z('2025-11-28'), z('2026-11-28'))).toEqual({
      months: ['2025-12-01', '2026-11-01'],
      edges: [
        [z('2025-11-28'), z('2025-12-01')],
        [z('2026-11-01'), z('2026-11-28')],
      ],
    });
    // Whole months only (1–31 March); a period inside one month has no whole month.
    expect(splitByMonths(z('2026-03-01'), z('2026-04-01'))).toEqual({ months: ['2026-03-01', '2026-04-01'], edges: [] });
    expect(splitByMonths(z('2026-02-15'), z('2026-03-15'))).toEqual({ months: null, edges: [[z('2026-02-15'), z('2026-03-15')]] });
    // Across a year end, starting on the first of a month.
    expect(splitByMonths(z('2025-12-01'), z('2026-01-10'))).toEqual({
      months: ['2025-12-01', '2026-01-01'],
      edges: [[z('2026-01-01'), z('2026-01-10')]],
    });
    // Sums only for months that end by `sumsUntil` (now minus the longest callback window): with now
    // 2026-11-20 and a 30-day window, sumsUntil is 10-21; October ends after it and is counted job by job.
    expect(splitByMonths(z('2026-01-01'), z('2026-11-21'), '2026-10-21T00:00:00.000Z')).toEqual({
      months: ['2026-01-01', '2026-10-01'],
      edges: [[z('2026-10-01'), z('2026-11-21')]],
    });
    // A month ending exactly at `sumsUntil` still comes from the sums; nothing does when it is before the period.
    expect(splitByMonths(z('2026-01-01'), z('2026-11-21'), z('2026-10-01'))).toEqual({
      months: ['2026-01-01', '2026-10-01'],
      edges: [[z('2026-10-01'), z('2026-11-21')]],
    });
    expect(splitByMonths(z('2026-03-01'), z('2026-04-01'), z('2026-02-10'))).toEqual({
      months: null,
      edges: [[z('2026-03-01'), z('2026-04-01')]],
    });
  });
});

describe('fix_quality_sums', () => {
  it('follows each kind of change: visit closed, finding, callback, return visit, window, model, month, branch, deletion', async () => {
    const a = await makeBranch(db, { callbackWindowDays: 30 });
    const b = await makeBranch(db, { callbackWindowDays: 14 });
    const ta = await makeUser(db, 'technician', a.id);
    const { site, unit } = await makeSiteWithUnit(db, a.id, { unit: { make: 'Testmake', model: 'TM-10' } });
    const opened = new Date('2026-03-01T08:00:00Z');
    const job = await makeWorkOrder(db, { branchId: a.id, siteId: site.id, unitId: unit.id, kind: 'service_call', createdAt: opened });

    // No closed visit yet: the job is in no month.
    expect(await expectSumsAgree()).toEqual([]);

    // The first visit closes, resolved, 26 hours after opening: one job in March, fixed the first time.
    const [v1] = await db.insert(visits).values({ branchId: a.id, workOrderId: job.id, techId: ta.id }).returning();
    await db
      .update(visits)
      .set({ closedAt: new Date('2026-03-02T10:00:00Z'), outcome: 'resolved' })
      .where(eq(visits.id, v1!.id));
    let rows = await expectSumsAgree();
    expect(rows).toHaveLength(4); // one row per dimension
    expect(rowOf(rows, a.id, '2026-03-01', 'origin', { origin: null })[0]).toMatchObject({
      jobs: 1,
      eligible: 1,
      firstTimeFixed: 1,
      resolvedFirstVisits: 1,
      callbacks: 0,
      returnVisits: 0,
      resolvedJobs: 1,
      resolveUs: 26 * HOUR * US_PER_MS,
    });
    expect(rowOf(rows, a.id, '2026-03-01', 'technician', { techId: ta.id })).toHaveLength(1);
    expect(rowOf(rows, a.id, '2026-03-01', 'model', { make: 'Testmake', model: 'TM-10' })).toHaveLength(1);

    // A finding on the first visit: the job moves from "none recorded" to its cause and origin.
    await db.insert(findings).values({ visitId: v1!.id, unitId: unit.id, causeCode: 'airflow', origin: 'wear' });
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'cause', { causeCode: null })).toEqual([]);
    expect(rowOf(rows, a.id, '2026-03-01', 'cause', { causeCode: 'airflow' })[0]).toMatchObject({ jobs: 1 });
    expect(rowOf(rows, a.id, '2026-03-01', 'origin', { origin: 'wear' })[0]).toMatchObject({ jobs: 1 });
    // A second finding, then the technician marks it as the root cause: the job moves to the marked finding's cause.
    const [marked] = await db
      .insert(findings)
      .values({ visitId: v1!.id, unitId: unit.id, causeCode: 'refrigerant_leak', origin: 'factory_defect' })
      .returning();
    await db.update(visits).set({ rootCauseFindingId: marked!.id }).where(eq(visits.id, v1!.id));
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'cause', { causeCode: 'airflow' })).toEqual([]);
    expect(rowOf(rows, a.id, '2026-03-01', 'origin', { origin: 'factory_defect' })[0]).toMatchObject({ jobs: 1 });
    // Marked back on the first finding (and the second dropped), as the rest of this history expects.
    await db.update(visits).set({ rootCauseFindingId: null }).where(eq(visits.id, v1!.id));
    await db.delete(findings).where(eq(findings.id, marked!.id));
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'cause', { causeCode: 'airflow' })[0]).toMatchObject({ jobs: 1 });

    // A callback opened 18 days after the close: inside the 30-day window.
    const cb = await makeWorkOrder(db, {
      branchId: a.id,
      siteId: site.id,
      unitId: unit.id,
      kind: 'callback',
      originWorkOrderId: job.id,
      createdAt: new Date('2026-03-20T10:00:00Z'),
    });
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'origin')[0]).toMatchObject({ callbacks: 1, firstTimeFixed: 0 });

    // The branch's window shrinks to 14 days: the callback falls outside; back to 30, inside again.
    await db.update(branches).set({ callbackWindowDays: 14 }).where(eq(branches.id, a.id));
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'origin')[0]).toMatchObject({ callbacks: 0, firstTimeFixed: 1 });
    await db.update(branches).set({ callbackWindowDays: 30 }).where(eq(branches.id, a.id));
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'technician')[0]).toMatchObject({ callbacks: 1, firstTimeFixed: 0 });

    // A return visit booked off the job; its visit closes resolved on 03-25: the job now took 24 days.
    const rv = await makeWorkOrder(db, {
      branchId: a.id,
      siteId: site.id,
      unitId: unit.id,
      kind: 'return_visit',
      originWorkOrderId: job.id,
      createdAt: new Date('2026-03-22T08:00:00Z'),
    });
    await db
      .insert(visits)
      .values({ branchId: a.id, workOrderId: rv.id, techId: ta.id, closedAt: new Date('2026-03-25T08:00:00Z'), outcome: 'resolved' });
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'cause', { causeCode: 'airflow' })[0]).toMatchObject({
      returnVisits: 1,
      resolvedJobs: 1,
      resolveUs: 24 * DAY * US_PER_MS,
    });

    // The unit's model is corrected: the job moves to the new model.
    await db.update(units).set({ model: 'TM-12' }).where(eq(units.id, unit.id));
    rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-03-01', 'model', { model: 'TM-10' })).toEqual([]);
    expect(rowOf(rows, a.id, '2026-03-01', 'model', { make: 'Testmake', model: 'TM-12' })[0]).toMatchObject({ jobs: 1 });

    // An earlier visit closed in February becomes the first visit, declined: the job moves to February, not eligible.
    await db
      .insert(visits)
      .values({ branchId: a.id, workOrderId: job.id, techId: ta.id, closedAt: new Date('2026-02-28T23:30:00Z'), outcome: 'declined' });
    rows = await expectSumsAgree();
    expect(rows.every((r) => r.month === '2026-02-01')).toBe(true);
    expect(rowOf(rows, a.id, '2026-02-01', 'origin')[0]).toMatchObject({
      jobs: 1,
      eligible: 0,
      callbacks: 0,
      returnVisits: 0,
      resolvedJobs: 0,
      resolveUs: 0,
    });

    // The job moves to branch B (window 14 days).
    await db.update(workOrders).set({ branchId: b.id }).where(eq(workOrders.id, job.id));
    rows = await expectSumsAgree();
    expect(rows.every((r) => r.branchId === b.id)).toBe(true);

    // Deleted: the callback, then the job with its visits and follow-ups — nothing is left.
    await db.delete(workOrders).where(eq(workOrders.id, cb.id));
    await expectSumsAgree();
    await db.delete(findings).where(eq(findings.visitId, v1!.id));
    await db.delete(visits).where(inArray(visits.workOrderId, [job.id, rv.id]));
    await db.delete(workOrders).where(eq(workOrders.id, rv.id));
    await db.delete(workOrders).where(eq(workOrders.id, job.id));
    expect(await expectSumsAgree()).toEqual([]);
  });

  it('adds a transaction’s changes at commit and nothing of a rolled-back one', async () => {
    const a = await makeBranch(db);
    const t = await makeUser(db, 'technician', a.id);
    const { site, unit } = await makeSiteWithUnit(db, a.id);
    const before = await expectSumsAgree();
    await expect(
      db.transaction(async (tx) => {
        const job = await makeWorkOrder(tx as unknown as Db, {
          branchId: a.id,
          siteId: site.id,
          unitId: unit.id,
          kind: 'service_call',
          createdAt: new Date('2026-04-01T08:00:00Z'),
        });
        await tx
          .insert(visits)
          .values({ branchId: a.id, workOrderId: job.id, techId: t.id, closedAt: new Date('2026-04-01T12:00:00Z'), outcome: 'resolved' });
        throw new Error('roll back');
      }),
    ).rejects.toThrow('roll back');
    expect(await expectSumsAgree()).toEqual(before);

    // Two jobs in one transaction: both counted once the transaction commits.
    await db.transaction(async (tx) => {
      for (const at of ['2026-04-02T12:00:00Z', '2026-04-03T12:00:00Z']) {
        const job = await makeWorkOrder(tx as unknown as Db, {
          branchId: a.id,
          siteId: site.id,
          unitId: unit.id,
          kind: 'service_call',
          createdAt: new Date('2026-04-01T08:00:00Z'),
        });
        await tx.insert(visits).values({ branchId: a.id, workOrderId: job.id, techId: t.id, closedAt: new Date(at), outcome: 'resolved' });
      }
    });
    const rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-04-01', 'origin')[0]).toMatchObject({ jobs: 2, firstTimeFixed: 2 });
  });

  it('counts every one of several transactions at once on the same sums, in either order of months', async () => {
    const a = await makeBranch(db);
    const t = await makeUser(db, 'technician', a.id);
    const { site, unit } = await makeSiteWithUnit(db, a.id);
    // On PostgreSQL these run side by side; each touches the May and June rows, half of them June first.
    await Promise.all(
      Array.from({ length: 6 }, (_, i) =>
        db.transaction(async (tx) => {
          const months = i % 2 ? ['2026-06-10T12:00:00Z', '2026-05-10T12:00:00Z'] : ['2026-05-10T12:00:00Z', '2026-06-10T12:00:00Z'];
          for (const closed of months) {
            const job = await makeWorkOrder(tx as unknown as Db, {
              branchId: a.id,
              siteId: site.id,
              unitId: unit.id,
              kind: 'service_call',
              createdAt: new Date('2026-05-01T08:00:00Z'),
            });
            await tx
              .insert(visits)
              .values({ branchId: a.id, workOrderId: job.id, techId: t.id, closedAt: new Date(closed), outcome: 'resolved' });
          }
        }),
      ),
    );
    const rows = await expectSumsAgree();
    expect(rowOf(rows, a.id, '2026-05-01', 'technician', { techId: t.id })[0]).toMatchObject({ jobs: 6 });
    expect(rowOf(rows, a.id, '2026-06-01', 'technician', { techId: t.id })[0]).toMatchObject({ jobs: 6 });
  });
});

// ---------------------------------------------------------------------------------------------
// Property: random changes, then the kept sums equal a rebuild and the report equals a plain computation
// ---------------------------------------------------------------------------------------------

const T0 = Date.parse('2026-01-01T00:00:00Z');
const SPAN_MINUTES = 90 * 24 * 60; // January to March 2026
const at = (minute: number) => new Date(T0 + minute * 60_000);
const MODELS = ['TM-10', 'TM-20', 'AX-1'];

const minute = fc.integer({ min: 0, max: SPAN_MINUTES });
/** Hours after a work order was opened (follow-ups and visits come some hours to weeks later). */
const later = fc.integer({ min: 0, max: 50 * 24 });
const pick = fc.nat({ max: 1000 });
const outcome = fc.constantFrom<VisitOutcome | null>('resolved', 'resolved', 'needs_return', 'declined', null);
const op = fc.oneof(
  { arbitrary: fc.record({ t: fc.constant('job' as const), branch: pick, unit: fc.option(pick), at: minute }), weight: 4 },
  {
    arbitrary: fc.record({ t: fc.constant('visit' as const), wo: pick, tech: pick, hours: fc.option(later, { freq: 5 }), outcome }),
    weight: 6,
  },
  { arbitrary: fc.record({ t: fc.constant('close' as const), visit: pick, hours: fc.option(later, { freq: 5 }), outcome }), weight: 2 },
  {
    arbitrary: fc.record({
      t: fc.constant('finding' as const),
      visit: pick,
      cause: fc.constantFrom(...causeCodes),
      origin: fc.constantFrom(...causeOrigins),
      at: minute,
    }),
    weight: 3,
  },
  { arbitrary: fc.record({ t: fc.constant('dropFinding' as const), finding: pick }), weight: 1 },
  { arbitrary: fc.record({ t: fc.constant('markRootCause' as const), finding: fc.option(pick) }), weight: 2 },
  {
    arbitrary: fc.record({
      t: fc.constant('followUp' as const),
      job: pick,
      kind: fc.constantFrom('callback' as const, 'return_visit' as const),
      hours: later,
    }),
    weight: 3,
  },
  { arbitrary: fc.record({ t: fc.constant('delete' as const), wo: pick }), weight: 1 },
  { arbitrary: fc.record({ t: fc.constant('move' as const), wo: pick, branch: pick }), weight: 1 },
  { arbitrary: fc.record({ t: fc.constant('window' as const), branch: pick, days: fc.integer({ min: 0, max: 45 }) }), weight: 1 },
  { arbitrary: fc.record({ t: fc.constant('model' as const), unit: pick, model: fc.constantFrom(...MODELS) }), weight: 1 },
  { arbitrary: fc.record({ t: fc.constant('kind' as const), wo: pick }), weight: 1 },
);
/** A service call with its first visit (and a finding), the start of every run. */
const seedJob = fc.record({
  t: fc.constant('seed' as const),
  branch: pick,
  unit: fc.option(pick, { freq: 6 }),
  tech: pick,
  at: minute,
  hours: fc.integer({ min: 0, max: 72 }),
  outcome,
  finding: fc.option(fc.record({ cause: fc.constantFrom(...causeCodes), origin: fc.constantFrom(...causeOrigins) })),
  followUp: fc.option(
    fc.record({ kind: fc.constantFrom('callback' as const, 'return_visit' as const), hours: later, visitHours: fc.option(later), outcome }),
  ),
});
type Op = (typeof op extends fc.Arbitrary<infer T> ? T : never) | (typeof seedJob extends fc.Arbitrary<infer T> ? T : never);

interface World {
  branches: string[];
  techs: string[];
  units: { id: string; siteId: string; branchId: string }[];
}

const of = <T>(list: T[], i: number): T | undefined => (list.length ? list[i % list.length] : undefined);

async function apply(w: World, o: Op) {
  const wos = await db
    .select({ id: workOrders.id, kind: workOrders.kind, branchId: workOrders.branchId, createdAt: workOrders.createdAt })
    .from(workOrders)
    .orderBy(workOrders.id);
  const after = (t: Date, hours: number) => new Date(t.getTime() + hours * HOUR);
  const jobs = wos.filter((x) => x.kind === 'service_call');
  switch (o.t) {
    case 'seed': {
      const branchId = of(w.branches, o.branch)!;
      const u = o.unit === null ? undefined : of(w.units, o.unit);
      const job = await makeWorkOrder(db, {
        branchId,
        siteId: u?.siteId ?? w.units[0]!.siteId,
        unitId: u?.id,
        kind: 'service_call',
        createdAt: at(o.at),
      });
      const [v] = await db
        .insert(visits)
        .values({ branchId, workOrderId: job.id, techId: of(w.techs, o.tech)!, closedAt: at(o.at + o.hours * 60), outcome: o.outcome })
        .returning();
      if (o.finding)
        await db
          .insert(findings)
          .values({ visitId: v!.id, causeCode: o.finding.cause, origin: o.finding.origin, createdAt: at(o.at + o.hours * 60) });
      if (o.followUp) {
        const f = o.followUp;
        const fu = await makeWorkOrder(db, {
          branchId,
          siteId: w.units[0]!.siteId,
          kind: f.kind,
          originWorkOrderId: job.id,
          createdAt: after(job.createdAt, f.hours),
        });
        if (f.visitHours !== null) {
          await db.insert(visits).values({
            branchId,
            workOrderId: fu.id,
            techId: of(w.techs, o.tech + 1)!,
            closedAt: after(fu.createdAt, f.visitHours),
            outcome: f.outcome,
          });
        }
      }
      return;
    }
    case 'job': {
      const branchId = of(w.branches, o.branch)!;
      const u = o.unit === null ? undefined : of(w.units, o.unit);
      await makeWorkOrder(db, {
        branchId,
        siteId: u?.siteId ?? w.units[0]!.siteId,
        unitId: u?.id,
        kind: 'service_call',
        createdAt: at(o.at),
      });
      return;
    }
    case 'visit': {
      const wo = of(wos, o.wo);
      if (!wo) return;
      const closedAt = o.hours === null ? null : after(wo.createdAt, o.hours);
      await db.insert(visits).values({
        branchId: wo.branchId,
        workOrderId: wo.id,
        techId: of(w.techs, o.tech)!,
        closedAt,
        outcome: closedAt ? o.outcome : null,
      });
      return;
    }
    case 'close': {
      const v = of(
        await db
          .select({ id: visits.id, opened: workOrders.createdAt })
          .from(visits)
          .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
          .orderBy(visits.id),
        o.visit,
      );
      if (v)
        await db
          .update(visits)
          .set({ closedAt: o.hours === null ? null : after(v.opened, o.hours), outcome: o.outcome })
          .where(eq(visits.id, v.id));
      return;
    }
    case 'finding': {
      const v = of(await db.select({ id: visits.id }).from(visits).orderBy(visits.id), o.visit);
      if (v) await db.insert(findings).values({ visitId: v.id, causeCode: o.cause, origin: o.origin, createdAt: at(o.at) });
      return;
    }
    case 'dropFinding': {
      const f = of(await db.select({ id: findings.id }).from(findings).orderBy(findings.id), o.finding);
      if (f) {
        await db.update(visits).set({ rootCauseFindingId: null }).where(eq(visits.rootCauseFindingId, f.id));
        await db.delete(findings).where(eq(findings.id, f.id));
      }
      return;
    }
    case 'markRootCause': {
      // The technician marks a finding as its visit's root cause (none: the mark is taken off the finding's visit).
      const f = of(await db.select({ id: findings.id, visitId: findings.visitId }).from(findings).orderBy(findings.id), o.finding ?? 0);
      if (f)
        await db
          .update(visits)
          .set({ rootCauseFindingId: o.finding === null ? null : f.id })
          .where(eq(visits.id, f.visitId));
      return;
    }
    case 'followUp': {
      const job = of(jobs, o.job);
      if (!job) return;
      await makeWorkOrder(db, {
        branchId: job.branchId,
        siteId: w.units[0]!.siteId,
        kind: o.kind,
        originWorkOrderId: job.id,
        createdAt: after(job.createdAt, o.hours),
      });
      return;
    }
    case 'delete': {
      const wo = of(wos, o.wo);
      if (!wo) return;
      await db.update(workOrders).set({ originWorkOrderId: null }).where(eq(workOrders.originWorkOrderId, wo.id));
      const vs = (await db.select({ id: visits.id }).from(visits).where(eq(visits.workOrderId, wo.id))).map((v) => v.id);
      if (vs.length) {
        await db.update(visits).set({ rootCauseFindingId: null }).where(inArray(visits.id, vs));
        await db.delete(findings).where(inArray(findings.visitId, vs));
        await db.delete(visits).where(inArray(visits.id, vs));
      }
      await db.delete(workOrders).where(eq(workOrders.id, wo.id));
      return;
    }
    case 'move': {
      const wo = of(wos, o.wo);
      if (wo)
        await db
          .update(workOrders)
          .set({ branchId: of(w.branches, o.branch)! })
          .where(eq(workOrders.id, wo.id));
      return;
    }
    case 'window':
      await db
        .update(branches)
        .set({ callbackWindowDays: o.days })
        .where(eq(branches.id, of(w.branches, o.branch)!));
      return;
    case 'model':
      await db
        .update(units)
        .set({ model: o.model })
        .where(eq(units.id, of(w.units, o.unit)!.id));
      return;
    case 'kind': {
      const wo = of(wos, o.wo);
      if (wo)
        await db
          .update(workOrders)
          .set({ kind: wo.kind === 'service_call' ? 'planned_maintenance' : 'service_call' })
          .where(eq(workOrders.id, wo.id));
      return;
    }
  }
}

interface Counts {
  jobs: number;
  eligible: number;
  firstTimeFixed: number;
  resolvedFirstVisits: number;
  callbacks: number;
  returnVisits: number;
  resolvedJobs: number;
  days: number;
  pending: number;
}

/**
 * The report's counts straight from work orders, visits, findings, branches and units, with the definitions
 * of packages/contract/src/fix-quality.ts (first visit = earliest closed visit; window W in whole 24-hour days).
 */
async function plainCounts(from: string, to: string, now: Date, branchId?: string) {
  const [wos, vs, fs, bs, us] = await Promise.all([
    db.select().from(workOrders),
    db.select().from(visits),
    db.select().from(findings),
    db.select().from(branches),
    db.select().from(units),
  ]);
  const start = Date.parse(`${from}T00:00:00Z`);
  const end = Date.parse(`${to}T00:00:00Z`) + DAY;
  const byKey = (a: { t: number; id: string }, b: { t: number; id: string }) => a.t - b.t || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);
  const closedOf = (woId: string) =>
    vs.filter((v) => v.workOrderId === woId && v.closedAt).map((v) => ({ ...v, t: v.closedAt!.getTime() }));
  const groups = new Map<string, Counts>();
  const add = (key: string, c: Omit<Counts, 'jobs'>) => {
    const g = groups.get(key) ?? {
      jobs: 0,
      eligible: 0,
      firstTimeFixed: 0,
      resolvedFirstVisits: 0,
      callbacks: 0,
      returnVisits: 0,
      resolvedJobs: 0,
      days: 0,
      pending: 0,
    };
    g.jobs++;
    for (const k of Object.keys(c) as (keyof typeof c)[]) g[k] += c[k];
    groups.set(key, g);
  };
  for (const job of wos) {
    if (job.kind !== 'service_call' || (branchId && job.branchId !== branchId)) continue;
    const first = closedOf(job.id).sort(byKey)[0];
    if (!first || first.t < start || first.t >= end) continue;
    // The call's cause: its first visit's marked root cause, else that visit's only finding (migration 0017).
    const own = fs.filter((f) => f.visitId === first.id);
    const finding = first.rootCauseFindingId ? own.find((f) => f.id === first.rootCauseFindingId) : own.length === 1 ? own[0] : undefined;
    const followUps = wos.filter((f) => f.originWorkOrderId === job.id && (f.kind === 'callback' || f.kind === 'return_visit'));
    const last = [job, ...followUps]
      .flatMap((x) => closedOf(x.id))
      .sort(byKey)
      .at(-1)!;
    // First-time fix, callbacks and maturity by the pure definition (calc's `fixQuality`, kept as this
    // test's oracle): the SQL of the migrations is the product's, and must count the same job by job.
    const o = fixQuality(
      [
        {
          id: job.id,
          kind: job.kind,
          // A visit closed without an outcome is not a resolved one.
          firstVisitOutcome: first.outcome ?? 'needs_return',
          firstVisitClosedAt: first.closedAt!,
          followUps: followUps.map((f) => ({ kind: f.kind as 'callback' | 'return_visit', openedAt: f.createdAt })),
        },
      ],
      { windowDays: bs.find((b) => b.id === job.branchId)!.callbackWindowDays, asOf: now },
    );
    const eligible = o.eligible === 1;
    const resolvedJob = eligible && last.outcome === 'resolved';
    const c = {
      pending: o.pending,
      eligible: o.eligible,
      firstTimeFixed: o.firstTimeFixed,
      resolvedFirstVisits: o.resolvedFirstVisits,
      callbacks: o.callbacks,
      returnVisits: eligible ? followUps.filter((f) => f.kind === 'return_visit').length : 0,
      resolvedJobs: resolvedJob ? 1 : 0,
      days: resolvedJob ? (last.t - job.createdAt.getTime()) / DAY : 0,
    };
    const unit = us.find((u) => u.id === job.unitId);
    add('all', c);
    add(`byBranch:${job.branchId}`, c);
    add(`byTechnician:${first.techId}`, c);
    add(`byMonth:${new Date(first.t).toISOString().slice(0, 7)}`, c);
    add(`byModel:${unit ? `${unit.make}|${unit.model}` : NONE}`, c);
    add(`byCause:${finding?.causeCode ?? NONE}`, c);
    add(`byOrigin:${finding?.origin ?? NONE}`, c);
  }
  return groups;
}

/** The report's counts in the same shape (groups without any job are left out of both). */
function reportCounts(r: FixQualityReport) {
  const out = new Map<string, Omit<Counts, 'jobs'>>();
  const put = (key: string, g: FixQualityReport['previous']) => {
    if (g.eligible === 0 && g.resolvedJobs === 0 && g.returnVisits === 0 && g.firstTimeFixed === 0 && g.pending === 0) return;
    out.set(key, {
      pending: g.pending,
      eligible: g.eligible,
      firstTimeFixed: g.firstTimeFixed,
      resolvedFirstVisits: g.resolvedFirstVisits,
      callbacks: g.callbacks,
      returnVisits: g.returnVisits,
      resolvedJobs: g.resolvedJobs,
      days: g.avgDaysToResolve === null ? 0 : g.avgDaysToResolve * g.resolvedJobs,
    });
  };
  put('all', r);
  for (const table of ['byBranch', 'byTechnician', 'byMonth', 'byModel', 'byCause', 'byOrigin'] as const)
    for (const g of r[table]) put(`${table}:${g.key}`, g);
  return out;
}

function expectSameCounts(report: FixQualityReport, plain: Map<string, Counts>) {
  const expected = new Map<string, Omit<Counts, 'jobs'>>();
  for (const [key, { jobs: _jobs, ...c }] of plain) {
    if (c.eligible === 0 && c.resolvedJobs === 0 && c.returnVisits === 0 && c.firstTimeFixed === 0 && c.pending === 0) continue;
    expected.set(key, c);
  }
  const got = reportCounts(report);
  expect([...got.keys()].sort()).toEqual([...expected.keys()].sort());
  for (const [key, c] of expected) {
    const g = got.get(key)!;
    expect({ key, ...g, days: 0 }).toEqual({ key, ...c, days: 0 });
    expect(g.days).toBeCloseTo(c.days, 6);
  }
}

describe('fix_quality_sums under random changes', () => {
  it('stays equal to a rebuild, and the report equals a plain computation from the rows', async () => {
    const w: World = { branches: [], techs: [], units: [] };
    for (let i = 0; i < 2; i++) {
      const b = await makeBranch(db);
      w.branches.push(b.id);
      w.techs.push((await makeUser(db, 'technician', b.id)).id, (await makeUser(db, 'technician', b.id)).id);
      for (const [make, model] of [
        ['Testmake', 'TM-10'],
        ['Acme', 'AX-1'],
      ] as const) {
        const { site, unit } = await makeSiteWithUnit(db, b.id, { unit: { make, model } });
        w.units.push({ id: unit.id, siteId: site.id, branchId: b.id });
      }
    }
    const period = fc
      .record({ start: fc.integer({ min: -10, max: 80 }), days: fc.integer({ min: 1, max: 130 }) })
      .map(({ start, days }) => {
        const iso = (d: number) => new Date(T0 + d * DAY).toISOString().slice(0, 10);
        return { from: iso(start), to: iso(start + days - 1) };
      });
    await fc.assert(
      // "Now" from inside the jobs' span to well after it: some or all callback windows still open.
      fc.asyncProperty(
        fc.array(seedJob, { minLength: 3, maxLength: 20, size: 'max' }),
        fc.array(op, { maxLength: 40, size: 'max' }),
        period,
        fc.boolean(),
        fc.integer({ min: 20 * 24, max: 200 * 24 }),
        async (seeds, changes, p, oneBranch, nowHours) => {
          // A clean start: no work from the previous run (and no sums left behind by its deletion).
          await db.update(workOrders).set({ originWorkOrderId: null });
          await db.update(visits).set({ rootCauseFindingId: null });
          await db.delete(findings);
          await db.delete(visits);
          await db.delete(workOrders);
          expect(await expectSumsAgree()).toEqual([]);
          for (const o of [...seeds, ...changes]) await apply(w, o);
          await expectSumsAgree();
          const branchId = oneBranch ? w.branches[0] : undefined;
          const now = new Date(T0 + nowHours * HOUR);
          const report = await fixQualityReport(db, p, branchId, now);
          expectSameCounts(report, await plainCounts(p.from, p.to, now, branchId));
          const prev = await plainCounts(report.previousPeriod.from, report.previousPeriod.to, now, branchId);
          expect(report.previous.eligible).toBe(prev.get('all')?.eligible ?? 0);
          expect(report.previous.firstTimeFixed).toBe(prev.get('all')?.firstTimeFixed ?? 0);
          expect(report.previous.callbacks).toBe(prev.get('all')?.callbacks ?? 0);
          expect(report.previous.pending).toBe(prev.get('all')?.pending ?? 0);
        },
      ),
      // Shrinking a failure re-runs whole scenarios: bounded, so a failure is reported in good time.
      { numRuns: 25, interruptAfterTimeLimit: 90_000 },
    );
  }, 180_000);
});
