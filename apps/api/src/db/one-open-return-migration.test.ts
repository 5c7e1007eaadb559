/**
 * Migration 0010 (`*_one-open-return`) on a database loaded before the one-open-return rule: each unit's extra open return visits
 * are folded into one before the unique index is built, so the upgrade starts instead of failing on old data.
 * The migrations are applied in two steps (those before it from a copy of the folder, then the rest), on PGlite or,
 * with `DATABASE_URL`, on PostgreSQL.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, inArray, sql } from 'drizzle-orm';
import type { Database } from './client';
import { bookings, leakCases, visits, workOrders } from './schema';
import { makeSiteWithUnit, makeUser, makeWorkOrder } from '../testing/fixtures';
import { databaseBefore } from '../testing/before-migration';

let database: Database;
let before: Awaited<ReturnType<typeof databaseBefore>>;

beforeAll(async () => {
  // The migrations before this one, as a database of the previous release has them.
  before = await databaseBefore('_one-open-return');
  database = before.database;
});
afterAll(() => before?.close());

describe('migration 0010 (one open return visit per unit)', () => {
  it('folds the extras into the one furthest along, keeps their needs, deadline and priority, and then refuses a second', async () => {
    const db = database.db;
    // The branch as the previous release's table has it (later migrations add columns the schema file knows).
    const inserted = (await db.execute(
      sql`INSERT INTO branches (name, code, time_zone, base_lat, base_lon) VALUES ('Alpha', 'B1', 'America/Chicago', 41.88, -87.63) RETURNING id`,
    )) as unknown as { rows: { id: string }[] };
    const alpha = { id: inserted.rows[0]!.id };
    const f = { a: alpha, inA: { technician: await makeUser(db, 'technician', alpha.id) } };
    const [p, q, r] = [await makeSiteWithUnit(db, f.a.id), await makeSiteWithUnit(db, f.a.id), await makeSiteWithUnit(db, f.a.id)];
    const origin = await makeWorkOrder(db, {
      branchId: f.a.id,
      siteId: p.site.id,
      unitId: p.unit.id,
      state: 'closed',
      outcome: 'needs_return',
    });
    const ret = (unit: typeof p, v: Omit<Partial<typeof workOrders.$inferInsert>, 'unitId'>) =>
      makeWorkOrder(db, {
        branchId: f.a.id,
        siteId: unit.site.id,
        unitId: unit.unit.id,
        kind: 'return_visit',
        originWorkOrderId: origin.id,
        ...v,
      });
    const book = async (woId: string) => {
      const [b] = await db
        .insert(bookings)
        .values({
          branchId: f.a.id,
          workOrderId: woId,
          techId: f.inA.technician.id,
          startAt: new Date('2026-12-16T15:00:00Z'),
          endAt: new Date('2026-12-16T17:00:00Z'),
        })
        .returning();
      // The visit as the previous release's table has it (migration 0017 adds columns the schema file knows).
      const v = (
        (await db.execute(
          sql`INSERT INTO visits (branch_id, work_order_id, booking_id, tech_id) VALUES (${f.a.id}, ${woId}, ${b!.id}, ${f.inA.technician.id}) RETURNING id`,
        )) as unknown as { rows: { id: string }[] }
      ).rows[0]!;
      return { booking: b!, visit: v };
    };

    // Unit p: three open returns; the booked one is furthest along and stays.
    const a = await ret(p, {
      state: 'unplaced',
      createdAt: new Date('2026-12-01T10:00:00Z'),
      returnNeeds: ['parts'],
      latestAt: new Date('2026-12-30T23:00:00Z'),
      priority: 'normal',
      complaint: 'Contactor on order',
    });
    const b = await ret(p, {
      state: 'booked',
      createdAt: new Date('2026-12-02T10:00:00Z'),
      returnNeeds: ['leak_search'],
      latestAt: null,
      priority: 'low',
      estimatedMinutes: 90,
      complaint: 'Leak search',
    });
    const c = await ret(p, {
      state: 'unplaced',
      createdAt: new Date('2026-12-03T10:00:00Z'),
      returnNeeds: ['parts', 'second_tech'],
      latestAt: new Date('2026-12-20T23:00:00Z'),
      priority: 'high',
      estimatedMinutes: 180,
      complaint: 'Two techs',
    });
    const bBooked = await book(b.id);
    const [lc] = await db
      .insert(leakCases)
      .values({
        branchId: f.a.id,
        unitId: p.unit.id,
        openedOn: '2026-11-20',
        rule: '40 CFR 84.106',
        method: 'annualizing',
        thresholdPercent: 10,
        leakRatePercent: 30,
        repairDueDate: '2026-12-20',
        repairWorkOrderId: c.id,
      })
      .returning();
    await db.update(workOrders).set({ leakCaseId: lc!.id }).where(eq(workOrders.id, c.id));
    // Unit q: two booked returns; the older stays, the other is unbooked and cancelled.
    const q1 = await ret(q, { state: 'booked', createdAt: new Date('2026-12-01T10:00:00Z'), complaint: 'First' });
    const q2 = await ret(q, { state: 'booked', createdAt: new Date('2026-12-02T10:00:00Z'), complaint: 'Second' });
    await book(q1.id);
    const q2Booked = await book(q2.id);
    // Unit r: one open return, untouched.
    const r1 = await ret(r, { state: 'unplaced', complaint: 'Alone' });

    await before.migrateRest();

    const byId = async (id: string) => (await db.select().from(workOrders).where(eq(workOrders.id, id)))[0]!;
    const kept = await byId(b.id);
    expect(kept).toMatchObject({ state: 'booked', priority: 'high', estimatedMinutes: 180, leakCaseId: lc!.id });
    expect([...kept.returnNeeds].sort()).toEqual(['leak_search', 'parts', 'second_tech']);
    expect(kept.latestAt!.toISOString()).toBe('2026-12-20T23:00:00.000Z');
    expect(kept.complaint).toBe(`Leak search Also (from WO-${a.number}): Contactor on order Also (from WO-${c.number}): Two techs`);
    for (const extra of [a, c]) {
      const w = await byId(extra.id);
      expect(w.state).toBe('cancelled');
      expect(w.closedAt).not.toBeNull();
      expect(w.complaint).toMatch(new RegExp(`^Folded into WO-${b.number} \\(one open return visit per unit\\)\\. `));
    }
    expect((await db.select().from(leakCases).where(eq(leakCases.id, lc!.id)))[0]!.repairWorkOrderId).toBe(b.id);
    expect(await db.select().from(visits).where(eq(visits.id, bBooked.visit.id))).toHaveLength(1);

    expect((await byId(q1.id)).state).toBe('booked');
    expect((await byId(q2.id)).state).toBe('cancelled');
    expect(await db.select().from(visits).where(eq(visits.id, q2Booked.visit.id))).toHaveLength(0);
    expect(await db.select().from(bookings).where(eq(bookings.id, q2Booked.booking.id))).toHaveLength(0);

    expect(await byId(r1.id)).toMatchObject({ state: 'unplaced', complaint: 'Alone' });

    const open = await db
      .select({ unitId: workOrders.unitId })
      .from(workOrders)
      .where(inArray(workOrders.state, ['unplaced', 'booked', 'en_route', 'on_site']));
    expect(open.filter((w) => w.unitId === p.unit.id)).toHaveLength(1);
    await expect(ret(r, { state: 'unplaced' })).rejects.toMatchObject({
      cause: { code: '23505', constraint: 'work_orders_one_open_return_uq' },
    });
  });
});
