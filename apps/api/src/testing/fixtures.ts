import { sql } from 'drizzle-orm';
import type { Role, WorkingHours } from '@coilpath/contract';
import type { Db } from '../db/client';
import { branches, customers, sites, units, users, workOrders } from '../db/schema';
import { hashPassword } from '../auth/password';

export const TEST_PASSWORD = 'test-password-123';
let passwordHash: Promise<string> | undefined;
const hash = () => (passwordHash ??= hashPassword(TEST_PASSWORD));

export const weekdayHours: WorkingHours = {
  sun: null,
  mon: { start: '07:00', end: '15:30' },
  tue: { start: '07:00', end: '15:30' },
  wed: { start: '07:00', end: '15:30' },
  thu: { start: '07:00', end: '15:30' },
  fri: { start: '07:00', end: '15:30' },
  sat: null,
};

let n = 0;
const next = () => ++n;

export async function makeBranch(db: Db, over: Partial<typeof branches.$inferInsert> = {}) {
  const i = next();
  const [b] = await db
    .insert(branches)
    .values({ name: `Branch ${i}`, code: `B${i}`, timeZone: 'America/Chicago', baseLat: 41.88, baseLon: -87.63, ...over })
    .returning();
  return b!;
}

export async function makeUser(db: Db, role: Role, branchId: string | null, over: Partial<typeof users.$inferInsert> = {}) {
  const i = next();
  const [u] = await db
    .insert(users)
    .values({
      email: `${role}.${i}@test.example`,
      name: `${role} ${i}`,
      role,
      branchId,
      passwordHash: await hash(),
      workingHours: role === 'technician' ? weekdayHours : null,
      epa608Type: role === 'technician' ? 'universal' : 'none',
      startLat: 41.88,
      startLon: -87.63,
      ...over,
    })
    .returning();
  return u!;
}

/** A customer, a site and a two-circuit R-410A rooftop unit in the branch. */
export async function makeSiteWithUnit(db: Db, branchId: string, over: { unit?: Partial<typeof units.$inferInsert> } = {}) {
  const i = next();
  const [c] = await db
    .insert(customers)
    .values({ branchId, name: `Customer ${i}` })
    .returning();
  const [s] = await db
    .insert(sites)
    .values({
      branchId,
      customerId: c!.id,
      name: `Site ${i}`,
      address: `${i} Test Street`,
      lat: 41.9,
      lon: -87.7,
      contactEmail: `site${i}@test.example`,
    })
    .returning();
  const [u] = await db
    .insert(units)
    .values({
      branchId,
      siteId: s!.id,
      tag: `RTU-${i}`,
      kind: 'rooftop_unit',
      make: 'Testmake',
      model: 'TM-10',
      serial: `SN-${i}`,
      refrigerant: 'R-410A',
      fullChargeLb: 18,
      applianceCategory: 'comfort_cooling',
      ...over.unit,
    })
    .returning();
  // Only the columns every release had: the migration tests make units on a database of an earlier release,
  // where Drizzle's insert (which names every column of the schema) would name columns not there yet.
  await db.execute(sql`INSERT INTO circuits (unit_id, number, compressor_count) VALUES (${u!.id}, 1, 1), (${u!.id}, 2, 1)`);
  return { customer: c!, site: s!, unit: u! };
}

export async function makeWorkOrder(
  db: Db,
  v: { branchId: string; siteId: string; unitId?: string } & Partial<typeof workOrders.$inferInsert>,
) {
  const [w] = await db
    .insert(workOrders)
    .values({ kind: 'service_call', complaint: 'Unit not cooling', ...v })
    .returning();
  return w!;
}

/** Two branches, each with one user per role, plus an owner: the usual authorization fixture. */
export async function makeTwoBranches(db: Db) {
  const a = await makeBranch(db, { name: 'Alpha', timeZone: 'America/Chicago' });
  const b = await makeBranch(db, { name: 'Bravo', timeZone: 'America/Phoenix' });
  const owner = await makeUser(db, 'owner', null);
  const mk = async (branchId: string) => ({
    manager: await makeUser(db, 'branch_manager', branchId),
    dispatcher: await makeUser(db, 'dispatcher', branchId),
    technician: await makeUser(db, 'technician', branchId),
  });
  return { a, b, owner, inA: await mk(a.id), inB: await mk(b.id) };
}
