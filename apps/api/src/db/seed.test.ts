import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, asc, count, eq, gte, lt, sql } from 'drizzle-orm';
import { TZDate } from '@date-fns/tz';
import { addDays } from '@coilpath/calc';
import type { Database } from './client';
import * as s from './schema';
import { DEMO_PASSWORD, demoToday, seedDemo } from './seed';
import { verifyPassword } from '../auth/password';
import { openTestDatabase } from '../testing/harness';

const TODAY = '2026-03-10'; // a Tuesday; the week spans the US spring-forward change of 2026-03-08
const WEEKEND = '2026-12-05'; // a Saturday: stops go to the coming week

const TABLES = [
  s.branches,
  s.users,
  s.customers,
  s.sites,
  s.units,
  s.circuits,
  s.agreements,
  s.agreementUnits,
  s.workOrders,
  s.bookings,
  s.visits,
  s.visitEvents,
  s.readings,
  s.findings,
  s.refrigerantEvents,
  s.leakCases,
  s.verificationTests,
  s.alarms,
  s.warrantyClaims,
  s.appMeta,
] as const;

async function counts(database: Database) {
  const out: number[] = [];
  for (const t of TABLES) {
    const r = await database.db.execute<{ n: number }>(sql`select count(*)::int as n from ${t}`);
    out.push(r.rows[0]!.n);
  }
  return out;
}

const localDay = (at: Date, tz: string) => {
  const d = new TZDate(at.getTime(), tz);
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
};

describe('demo scenario', { timeout: 120_000 }, () => {
  let a: Database;
  let b: Database;

  beforeAll(async () => {
    a = await openTestDatabase();
    b = await openTestDatabase();
  });
  afterAll(async () => {
    await a?.close();
    await b?.close();
  });

  it('applies the migrations to an empty database', async () => {
    expect(await counts(a)).toEqual(TABLES.map(() => 0));
  });

  it('loads the stories', async () => {
    expect(await seedDemo(a.db, { today: TODAY })).toEqual({ seeded: true });
    const db = a.db;

    const branches = await db.select().from(s.branches).orderBy(asc(s.branches.code));
    expect(branches.length).toBeGreaterThanOrEqual(3);
    expect(new Set(branches.map((x) => x.timeZone)).size).toBeGreaterThanOrEqual(3);
    expect(branches.map((x) => x.timeZone)).toContain('America/Phoenix');
    for (const br of branches) expect(br.holidays).toContain('2026-12-25');

    const users = await db.select().from(s.users);
    const byEmail = new Map(users.map((u) => [u.email, u]));
    const chicago = branches.find((x) => x.timeZone === 'America/Chicago')!;
    expect(byEmail.get('owner@coilpath.example')).toMatchObject({ role: 'owner', branchId: null });
    expect(byEmail.get('manager@coilpath.example')).toMatchObject({ role: 'branch_manager', branchId: chicago.id });
    expect(byEmail.get('dispatch@coilpath.example')).toMatchObject({ role: 'dispatcher', branchId: chicago.id });
    expect(byEmail.get('tech@coilpath.example')).toMatchObject({ role: 'technician', branchId: chicago.id });
    expect(await verifyPassword(byEmail.get('tech@coilpath.example')!.passwordHash, DEMO_PASSWORD)).toBe(true);
    expect(new Set(users.map((u) => u.passwordHash)).size).toBe(1);
    expect(users.every((u) => u.calendarToken && /^[0-9a-f]{40}$/.test(u.calendarToken))).toBe(true);
    const techs = users.filter((u) => u.role === 'technician');
    expect(techs.length).toBeGreaterThanOrEqual(10);
    expect(techs.some((u) => u.epa608Type === 'I')).toBe(true);
    for (const br of branches) {
      const colors = techs.filter((u) => u.branchId === br.id).map((u) => u.colorIndex);
      expect(new Set(colors).size).toBe(colors.length);
      expect(users.some((u) => u.branchId === br.id && u.role === 'branch_manager')).toBe(true);
      expect(users.some((u) => u.branchId === br.id && u.role === 'dispatcher')).toBe(true);
    }

    // Every technician has at least one booking today in the branch's own time zone, inside working hours.
    const bookings = await db.select().from(s.bookings);
    const tzOf = new Map(branches.map((x) => [x.id, x.timeZone]));
    for (const t of techs) {
      const today = bookings.filter((bk) => bk.techId === t.id && localDay(bk.startAt, tzOf.get(t.branchId!)!) === TODAY);
      expect(today.length, t.email).toBeGreaterThanOrEqual(1);
      const hours = t.workingHours!.tue!;
      for (const bk of today) {
        const start = new TZDate(bk.startAt.getTime(), tzOf.get(t.branchId!)!);
        const hhmm = `${String(start.getHours()).padStart(2, '0')}:${String(start.getMinutes()).padStart(2, '0')}`;
        expect(hhmm >= hours.start && hhmm < hours.end, `${t.email} ${hhmm}`).toBe(true);
      }
    }
    // Today's first stop for tech@ is a service call on a two-circuit R-410A rooftop unit with history.
    const tech = byEmail.get('tech@coilpath.example')!;
    const first = bookings
      .filter((bk) => bk.techId === tech.id && localDay(bk.startAt, chicago.timeZone) === TODAY)
      .sort((x, y) => +x.startAt - +y.startAt)[0]!;
    const [firstWo] = await db.select().from(s.workOrders).where(eq(s.workOrders.id, first.workOrderId));
    expect(firstWo).toMatchObject({ kind: 'service_call', state: 'booked' });
    const [firstUnit] = await db.select().from(s.units).where(eq(s.units.id, firstWo!.unitId!));
    expect(firstUnit).toMatchObject({ kind: 'rooftop_unit', refrigerant: 'R-410A' });
    expect((await db.select().from(s.circuits).where(eq(s.circuits.unitId, firstUnit!.id))).length).toBe(2);
    expect((await db.select().from(s.readings).where(eq(s.readings.unitId, firstUnit!.id))).length).toBeGreaterThan(0);
    expect((await db.select().from(s.findings).where(eq(s.findings.unitId, firstUnit!.id))).length).toBeGreaterThan(0);

    // A visit row exists for each booking; booked work orders have bookings, unplaced ones none; closed ones are complete.
    const visits = await db.select().from(s.visits);
    expect(new Set(visits.map((v) => v.bookingId)).size).toBe(bookings.length);
    const wos = await db.select().from(s.workOrders);
    const booked = new Set(bookings.map((bk) => bk.workOrderId));
    for (const w of wos) {
      if (w.state === 'booked') expect(booked.has(w.id)).toBe(true);
      if (w.state === 'unplaced') expect(booked.has(w.id)).toBe(false);
      if (w.state === 'closed') expect(w.outcome && w.closedAt).toBeTruthy();
    }
    // No technician is double-booked.
    const [overlap] = await db
      .execute<{ n: number }>(
        sql`select count(*)::int as n from bookings x join bookings y
      on x.tech_id = y.tech_id and x.id < y.id and x.start_at < y.end_at and y.start_at < x.end_at`,
      )
      .then((r) => r.rows);
    expect(overlap!.n).toBe(0);

    // Unplaced work this week in every branch, including a return visit whose origin closed needs_return.
    for (const br of branches) {
      const unplaced = wos.filter(
        (w) =>
          w.branchId === br.id &&
          w.state === 'unplaced' &&
          (w.slaDueAt === null || w.slaDueAt <= new Date(`${addDays(TODAY, 5)}T12:00:00Z`)),
      );
      expect(unplaced.length, br.code).toBeGreaterThanOrEqual(5);
      const rv = unplaced.find((w) => w.kind === 'return_visit');
      expect(rv).toBeDefined();
      const origin = wos.find((w) => w.id === rv!.originWorkOrderId);
      expect(origin).toMatchObject({ state: 'closed', outcome: 'needs_return' });
    }

    // At most one open return visit per unit (the database refuses more, migration 0010; the scenario never tries).
    const openReturnUnits = wos
      .filter((w) => w.kind === 'return_visit' && w.state !== 'closed' && w.state !== 'cancelled')
      .map((w) => w.unitId);
    expect(openReturnUnits.length).toBeGreaterThan(0);
    expect(new Set(openReturnUnits).size).toBe(openReturnUnits.length);

    // A leak case due within 7 days; consistent with its triggering addition.
    const cases = await db.select().from(s.leakCases);
    const soon = cases.filter((c) => c.status === 'open' && c.repairDueDate >= TODAY && c.repairDueDate <= addDays(TODAY, 7));
    expect(soon.length).toBeGreaterThanOrEqual(1);
    const [trigger] = await db.select().from(s.refrigerantEvents).where(eq(s.refrigerantEvents.id, soon[0]!.triggeringEventId!));
    expect(soon[0]!.repairDueDate).toBe(addDays(trigger!.date, 30));
    expect(soon[0]!.leakRatePercent).toBeGreaterThan(soon[0]!.thresholdPercent);
    expect(cases.some((c) => c.status === 'open' && c.repairDueDate < TODAY)).toBe(true);
    const closedCase = cases.find((c) => c.status === 'closed')!;
    const tests = await db.select().from(s.verificationTests).where(eq(s.verificationTests.leakCaseId, closedCase.id));
    expect(tests.length).toBe(2);
    expect(tests.every((x) => x.passed)).toBe(true);

    // The factory-defect finding at three or more sites, in at least two branches.
    const defects = await db
      .select({ siteId: s.workOrders.siteId, branchId: s.workOrders.branchId, kind: s.workOrders.kind })
      .from(s.findings)
      .innerJoin(s.visits, eq(s.visits.id, s.findings.visitId))
      .innerJoin(s.workOrders, eq(s.workOrders.id, s.visits.workOrderId))
      .where(
        and(
          eq(s.findings.origin, 'factory_defect'),
          eq(s.findings.causeCode, 'wiring_fault'),
          eq(s.findings.reportedCircuit, 1),
          eq(s.findings.actualCircuit, 2),
        ),
      );
    expect(new Set(defects.map((d) => d.siteId)).size).toBeGreaterThanOrEqual(3);
    expect(new Set(defects.map((d) => d.branchId)).size).toBeGreaterThanOrEqual(2);
    expect(defects.every((d) => d.kind === 'callback')).toBe(true);
    expect((await db.select().from(s.warrantyClaims)).length).toBeGreaterThanOrEqual(3);

    // A unit with two or more alarms of the same code in the last 30 days.
    const repeats = await db
      .select({ unitId: s.alarms.unitId, code: s.alarms.code, n: count() })
      .from(s.alarms)
      .where(gte(s.alarms.raisedAt, new Date(`${addDays(TODAY, -30)}T00:00:00Z`)))
      .groupBy(s.alarms.unitId, s.alarms.code)
      .having(sql`count(*) >= 2`);
    expect(repeats.length).toBeGreaterThanOrEqual(1);

    const [meta] = await db.select().from(s.appMeta).where(eq(s.appMeta.key, 'demo_seeded'));
    expect(meta!.value).toEqual({ today: TODAY });
  });

  it('works the days of this week before today like the coming ones', async () => {
    const db = a.db;
    const monday = addDays(TODAY, -1);
    const branches = await db.select().from(s.branches);
    const tzOf = new Map(branches.map((x) => [x.id, x.timeZone]));
    const techs = await db.select().from(s.users).where(eq(s.users.role, 'technician'));
    const jobs = await db
      .select({
        techId: s.bookings.techId,
        branchId: s.bookings.branchId,
        startAt: s.bookings.startAt,
        state: s.workOrders.state,
        kind: s.workOrders.kind,
        closedAt: s.visits.closedAt,
      })
      .from(s.bookings)
      .innerJoin(s.workOrders, eq(s.workOrders.id, s.bookings.workOrderId))
      .innerJoin(s.visits, eq(s.visits.bookingId, s.bookings.id))
      .where(
        and(
          gte(s.bookings.startAt, new Date(`${addDays(monday, -1)}T00:00:00Z`)),
          lt(s.bookings.startAt, new Date(`${addDays(TODAY, 1)}T12:00:00Z`)),
        ),
      );
    const on = (techId: string, day: string) =>
      jobs.filter((j) => j.techId === techId && localDay(j.startAt, tzOf.get(j.branchId)!) === day);
    for (const t of techs) {
      const mon = on(t.id, monday);
      // The coming days book 2–4 jobs per technician; Monday, already worked, has as many, all closed.
      expect(mon.length, t.email).toBeGreaterThanOrEqual(2);
      expect(
        mon.every((j) => j.state === 'closed' && j.closedAt),
        t.email,
      ).toBe(true);
      expect(on(t.id, TODAY).length, t.email).toBeGreaterThanOrEqual(1);
    }
  });

  it('does not duplicate when run twice', async () => {
    const before = await counts(a);
    expect(await seedDemo(a.db, { today: TODAY })).toEqual({ seeded: false });
    expect(await seedDemo(a.db, { today: '2026-04-01' })).toEqual({ seeded: false });
    expect(await counts(a)).toEqual(before);
  });

  it('gives the same data for the same day on another database', async () => {
    expect(await seedDemo(b.db, { today: TODAY })).toEqual({ seeded: true });
    expect(await counts(b)).toEqual(await counts(a));
    const snapshot = async (database: Database) => ({
      units: await database.db
        .select({ id: s.units.id, serial: s.units.serial, make: s.units.make })
        .from(s.units)
        .orderBy(asc(s.units.serial)),
      users: await database.db
        .select({ email: s.users.email, name: s.users.name, token: s.users.calendarToken })
        .from(s.users)
        .orderBy(asc(s.users.email)),
      sites: await database.db.select({ name: s.sites.name, lat: s.sites.lat }).from(s.sites).orderBy(asc(s.sites.name)),
      workOrders: await database.db
        .select({ id: s.workOrders.id, number: s.workOrders.number, state: s.workOrders.state })
        .from(s.workOrders)
        .orderBy(asc(s.workOrders.number)),
      readings: await database.db.select({ id: s.readings.id, p: s.readings.suctionPressure }).from(s.readings).orderBy(asc(s.readings.id)),
    });
    expect(await snapshot(b)).toEqual(await snapshot(a));
  });

  it('gives a weekend day the coming week’s stops', async () => {
    const c = await openTestDatabase();
    try {
      expect(await seedDemo(c.db, { today: WEEKEND })).toEqual({ seeded: true });
      const branches = await c.db.select().from(s.branches);
      const tzOf = new Map(branches.map((x) => [x.id, x.timeZone]));
      const techs = await c.db.select().from(s.users).where(eq(s.users.role, 'technician'));
      const open = await c.db
        .select({ techId: s.bookings.techId, startAt: s.bookings.startAt })
        .from(s.bookings)
        .innerJoin(s.workOrders, eq(s.workOrders.id, s.bookings.workOrderId))
        .where(eq(s.workOrders.state, 'booked'));
      const monday = addDays(WEEKEND, 2);
      for (const t of techs) {
        const days = new Set(open.filter((o) => o.techId === t.id).map((o) => localDay(o.startAt, tzOf.get(t.branchId!)!)));
        expect(days.has(monday), t.email).toBe(true);
        expect([...days].every((d) => d >= monday && d <= addDays(monday, 4))).toBe(true);
      }
      const cases = await c.db.select().from(s.leakCases);
      expect(cases.some((x) => x.status === 'open' && x.repairDueDate >= WEEKEND && x.repairDueDate <= addDays(WEEKEND, 7))).toBe(true);
    } finally {
      await c.close();
    }
  });
});

describe('demo anchoring day', () => {
  it('is the date in the first demo branch (Chicago), not the UTC date', async () => {
    // 2026-12-02T03:50Z is 21:50 on 1 December in Chicago (CST, UTC−6).
    expect(demoToday(new Date('2026-12-02T03:50:00Z'))).toBe('2026-12-01');
    expect(demoToday(new Date('2026-12-02T07:00:00Z'))).toBe('2026-12-02');
    // Daylight saving: 2026-07-01T04:30Z is 23:30 on 30 June in Chicago (CDT, UTC−5).
    expect(demoToday(new Date('2026-07-01T04:30:00Z'))).toBe('2026-06-30');
  });
});
