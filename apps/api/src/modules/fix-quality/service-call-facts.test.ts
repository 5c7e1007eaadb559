import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import type { Database } from '../../db/client';
import { findings, serviceCallFacts, visits, workOrders } from '../../db/schema';
import { openTestDatabase } from '../../testing/harness';
import { makeBranch, makeSiteWithUnit, makeUser, makeWorkOrder } from '../../testing/fixtures';

/**
 * service_call_facts is kept by triggers (migration 0002) row by row; `rebuild_service_call_facts()` computes
 * it from scratch in one statement. After every kind of change the report depends on, both must agree, and
 * the facts must say what the rows say.
 */
let database: Database;
beforeAll(async () => {
  database = await openTestDatabase();
});
afterAll(async () => {
  await database.close();
});

const snapshot = async () =>
  (await database.db.select().from(serviceCallFacts).orderBy(serviceCallFacts.jobId)).map((r) => ({
    ...r,
    openedAt: r.openedAt.toISOString(),
    firstClosedAt: r.firstClosedAt?.toISOString() ?? null,
    firstCallbackAt: r.firstCallbackAt?.toISOString() ?? null,
    firstReturnAt: r.firstReturnAt?.toISOString() ?? null,
    lastClosedAt: r.lastClosedAt?.toISOString() ?? null,
  }));

async function expectRebuildAgrees() {
  const kept = await snapshot();
  await database.db.execute(sql`SELECT rebuild_service_call_facts()`);
  expect(await snapshot()).toEqual(kept);
  return kept;
}

describe('service_call_facts', () => {
  it('follows inserts, updates and deletes of work orders, visits and findings', async () => {
    const db = database.db;
    const branch = await makeBranch(db);
    const tech = await makeUser(db, 'technician', branch.id);
    const tech2 = await makeUser(db, 'technician', branch.id);
    const { site, unit } = await makeSiteWithUnit(db, branch.id);
    const job = await makeWorkOrder(db, {
      branchId: branch.id,
      siteId: site.id,
      unitId: unit.id,
      kind: 'service_call',
      createdAt: new Date('2026-03-01T08:00:00Z'),
    });
    const pm = await makeWorkOrder(db, { branchId: branch.id, siteId: site.id, unitId: unit.id, kind: 'planned_maintenance' });

    let facts = await expectRebuildAgrees();
    expect(facts).toHaveLength(1); // the service call only
    expect(facts[0]).toMatchObject({ jobId: job.id, firstVisitId: null, returnVisits: 0 });

    const [v1] = await db.insert(visits).values({ branchId: branch.id, workOrderId: job.id, techId: tech.id }).returning();
    await db
      .update(visits)
      .set({ closedAt: new Date('2026-03-02T10:00:00Z'), outcome: 'needs_return' })
      .where(eq(visits.id, v1!.id));
    await db
      .insert(findings)
      .values({ visitId: v1!.id, unitId: unit.id, causeCode: 'airflow', origin: 'wear', createdAt: new Date('2026-03-02T09:00:00Z') });
    facts = await expectRebuildAgrees();
    // One finding: it is the root cause by default.
    expect(facts[0]).toMatchObject({
      firstVisitId: v1!.id,
      firstOutcome: 'needs_return',
      techId: tech.id,
      causeCode: 'airflow',
      origin: 'wear',
      lastOutcome: 'needs_return',
    });
    const [second] = await db
      .insert(findings)
      .values({ visitId: v1!.id, unitId: unit.id, causeCode: 'settings', origin: 'external', createdAt: new Date('2026-03-02T09:30:00Z') })
      .returning();
    // Two findings and none marked: no cause (close-out requires the mark; migration 0017).
    facts = await expectRebuildAgrees();
    expect(facts[0]).toMatchObject({ causeCode: null, origin: null });
    // The technician marks the second finding: the call's cause is the marked one, not the first typed.
    await db.update(visits).set({ rootCauseFindingId: second!.id }).where(eq(visits.id, v1!.id));
    facts = await expectRebuildAgrees();
    expect(facts[0]).toMatchObject({ causeCode: 'settings', origin: 'external' });
    await db.update(findings).set({ origin: 'installation' }).where(eq(findings.id, second!.id));
    facts = await expectRebuildAgrees();
    expect(facts[0]).toMatchObject({ causeCode: 'settings', origin: 'installation' });
    await db.update(visits).set({ rootCauseFindingId: null }).where(eq(visits.id, v1!.id));
    await db.delete(findings).where(eq(findings.id, second!.id));
    facts = await expectRebuildAgrees();
    expect(facts[0]).toMatchObject({ causeCode: 'airflow', origin: 'wear' });

    // A return visit and a callback booked off the job; the return visit resolves it.
    const rv = await makeWorkOrder(db, {
      branchId: branch.id,
      siteId: site.id,
      unitId: unit.id,
      kind: 'return_visit',
      originWorkOrderId: job.id,
      createdAt: new Date('2026-03-03T08:00:00Z'),
    });
    await db.insert(visits).values({
      branchId: branch.id,
      workOrderId: rv.id,
      techId: tech2.id,
      closedAt: new Date('2026-03-04T12:00:00Z'),
      outcome: 'resolved',
    });
    const cb = await makeWorkOrder(db, {
      branchId: branch.id,
      siteId: site.id,
      unitId: unit.id,
      kind: 'callback',
      originWorkOrderId: job.id,
      createdAt: new Date('2026-03-20T08:00:00Z'),
    });
    facts = await expectRebuildAgrees();
    expect(facts[0]).toMatchObject({
      returnVisits: 1,
      firstReturnAt: '2026-03-03T08:00:00.000Z',
      firstCallbackAt: '2026-03-20T08:00:00.000Z',
      lastOutcome: 'resolved',
      lastClosedAt: '2026-03-04T12:00:00.000Z',
    });

    // An earlier closed visit becomes the first visit; the first finding is deleted; the callback goes away.
    await db.insert(visits).values({
      branchId: branch.id,
      workOrderId: job.id,
      techId: tech2.id,
      closedAt: new Date('2026-03-01T15:00:00Z'),
      outcome: 'declined',
    });
    await db.delete(findings).where(eq(findings.causeCode, 'airflow'));
    await db.delete(workOrders).where(eq(workOrders.id, cb.id));
    facts = await expectRebuildAgrees();
    expect(facts[0]).toMatchObject({ firstOutcome: 'declined', techId: tech2.id, causeCode: null, firstCallbackAt: null });

    // The return visit is re-pointed at maintenance work, and the job stops being a service call.
    await db.update(workOrders).set({ originWorkOrderId: pm.id }).where(eq(workOrders.id, rv.id));
    facts = await expectRebuildAgrees();
    expect(facts[0]).toMatchObject({ returnVisits: 0, firstReturnAt: null, lastOutcome: 'needs_return' });
    await db.update(workOrders).set({ kind: 'planned_maintenance' }).where(eq(workOrders.id, job.id));
    expect(await expectRebuildAgrees()).toHaveLength(0);
  });
});
