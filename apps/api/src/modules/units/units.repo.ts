/** Every query of units and their circuits (units.service.ts, units-import.ts, circuit-targets.service.ts). */
import { and, asc, count, eq, inArray } from 'drizzle-orm';
import type { z } from 'zod';
import type { unitsQuerySchema } from '@coilpath/contract';
import type { Tx } from '../../db/client';
import { branches, circuits, readings, sites, units } from '../../db/schema';
import { orderFor, pageWindow, searchAny } from '../sites/list-query';
import { statusFilter } from '../sites/sites.repo';

type UnitsQuery = z.output<typeof unitsQuerySchema>;

const unitColumns = {
  id: units.id,
  branchId: units.branchId,
  siteId: units.siteId,
  siteName: sites.name,
  tag: units.tag,
  kind: units.kind,
  make: units.make,
  model: units.model,
  serial: units.serial,
  installDate: units.installDate,
  warrantyEnd: units.warrantyEnd,
  refrigerant: units.refrigerant,
  fullChargeLb: units.fullChargeLb,
  applianceCategory: units.applianceCategory,
  tonnage: units.tonnage,
  notes: units.notes,
  archivedAt: units.archivedAt,
};

/** Circuits of many units, by unit and number. */
export function circuitRowsOf(db: Tx, unitIds: string[]) {
  return db
    .select({
      id: circuits.id,
      unitId: circuits.unitId,
      number: circuits.number,
      compressorCount: circuits.compressorCount,
      chargeLb: circuits.chargeLb,
    })
    .from(circuits)
    .where(inArray(circuits.unitId, unitIds))
    .orderBy(asc(circuits.unitId), asc(circuits.number));
}

/** A page of units of the branch (undefined: every branch) and their total. */
export async function unitPage(db: Tx, branchId: string | undefined, q: UnitsQuery) {
  const where = and(
    branchId ? eq(units.branchId, branchId) : undefined,
    q.siteId ? eq(units.siteId, q.siteId) : undefined,
    statusFilter(units.archivedAt, q.status),
    searchAny(q.q, [units.tag, units.make, units.model, units.serial, units.refrigerant]),
  );
  const order = orderFor(
    q.sort,
    q.dir,
    {
      tag: units.tag,
      kind: units.kind,
      make: units.make,
      model: units.model,
      serial: units.serial,
      refrigerant: units.refrigerant,
      fullChargeLb: units.fullChargeLb,
      installDate: units.installDate,
      warrantyEnd: units.warrantyEnd,
    },
    'tag',
    units.id,
  );
  const { limit, offset } = pageWindow(q.page, q.pageSize);
  const [rows, [total]] = await Promise.all([
    db
      .select(unitColumns)
      .from(units)
      .innerJoin(sites, eq(sites.id, units.siteId))
      .where(where)
      .orderBy(...order)
      .limit(limit)
      .offset(offset),
    db.select({ n: count() }).from(units).where(where),
  ]);
  return { rows, total: total?.n ?? 0 };
}

export async function findUnit(db: Tx, id: string) {
  const [row] = await db.select(unitColumns).from(units).innerJoin(sites, eq(sites.id, units.siteId)).where(eq(units.id, id)).limit(1);
  return row;
}

/** A unit of this make and serial (the index `units_make_serial_uq`), with its site's name. */
export async function findBySerial(db: Tx, make: string, serial: string) {
  const [dup] = await db
    .select({ id: units.id, tag: units.tag, siteName: sites.name })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(and(eq(units.make, make), eq(units.serial, serial)))
    .limit(1);
  return dup;
}

/** Units with any of these serials, with their site's name. */
export function unitsBySerials(db: Tx, serials: string[]) {
  return db
    .select({ make: units.make, serial: units.serial, tag: units.tag, siteName: sites.name })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(inArray(units.serial, serials));
}

export async function insertUnit(db: Tx, values: typeof units.$inferInsert): Promise<string> {
  const [u] = await db.insert(units).values(values).returning({ id: units.id });
  return u!.id;
}

export async function insertUnits(db: Tx, values: (typeof units.$inferInsert)[]) {
  return db.insert(units).values(values).returning({ id: units.id });
}

export async function insertCircuits(db: Tx, values: (typeof circuits.$inferInsert)[]): Promise<void> {
  await db.insert(circuits).values(values);
}

export async function updateUnit(db: Tx, id: string, set: Partial<typeof units.$inferInsert>): Promise<void> {
  await db.update(units).set(set).where(eq(units.id, id));
}

/** How many readings refer to these circuits. */
export async function readingCountOf(db: Tx, circuitIds: string[]): Promise<number> {
  const [used] = await db.select({ n: count() }).from(readings).where(inArray(readings.circuitId, circuitIds));
  return used?.n ?? 0;
}

export async function deleteCircuits(db: Tx, ids: string[]): Promise<void> {
  await db.delete(circuits).where(inArray(circuits.id, ids));
}

export async function updateCircuit(db: Tx, id: string, set: Partial<typeof circuits.$inferInsert>): Promise<void> {
  await db.update(circuits).set(set).where(eq(circuits.id, id));
}

/** Sets a circuit's columns, the circuit named by id and unit; answers the circuit. */
export async function updateUnitCircuit(db: Tx, unitId: string, circuitId: string, set: Partial<typeof circuits.$inferInsert>) {
  const [row] = await db
    .update(circuits)
    .set(set)
    .where(and(eq(circuits.id, circuitId), eq(circuits.unitId, unitId)))
    .returning();
  return row;
}

export async function siteArchiveState(db: Tx, siteId: string) {
  const [site] = await db.select({ archivedAt: sites.archivedAt, name: sites.name }).from(sites).where(eq(sites.id, siteId));
  return site;
}

export async function deleteUnit(db: Tx, id: string): Promise<void> {
  await db.delete(units).where(eq(units.id, id));
}

export async function branchUnitSystem(db: Tx, branchId: string) {
  const [branch] = await db.select({ unitSystem: branches.unitSystem }).from(branches).where(eq(branches.id, branchId));
  return branch;
}
