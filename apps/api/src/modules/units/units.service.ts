import { and, asc, count, eq, inArray } from 'drizzle-orm';
import type { z } from 'zod';
import { isRefrigerantId, refrigerantIds } from '@coilpath/calc';
import type { CircuitRow, Page, SessionUser, UnitRow, UnitUpdateValues, UnitValues, unitsQuerySchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import type { Tx } from '../../db/client';
import { circuits, readings, sites, units } from '../../db/schema';
import { assertBranch } from '../../auth/policy';
import { conflict, HttpError, notFound } from '../../lib/errors';
import { historyCounts, refuseIfHistory } from '../sites/history';
import { listBranch, orderFor, pageWindow, searchAny } from '../sites/list-query';
import { getSite, statusFilter } from '../sites/sites.service';
import { actAs, changeAs } from '../events/actor';

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

/** The refrigerant check the contract leaves to the server: one of `@coilpath/calc`'s ids. */
export function assertKnownRefrigerant(refrigerant: string): void {
  if (!isRefrigerantId(refrigerant)) {
    const message = `Unknown refrigerant "${refrigerant}". Use one of ${refrigerantIds.join(', ')}.`;
    throw new HttpError(400, 'invalid', `Check these fields: refrigerant.`, { fields: [{ path: 'refrigerant', message }] });
  }
}

/** Circuits of many units in one query. */
async function circuitsOf(db: Tx, unitIds: string[]): Promise<Map<string, CircuitRow[]>> {
  const map = new Map<string, CircuitRow[]>();
  if (unitIds.length === 0) return map;
  const rows = await db
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
  for (const { unitId, ...c } of rows) {
    const list = map.get(unitId) ?? [];
    list.push(c);
    map.set(unitId, list);
  }
  return map;
}

export async function listUnits(ctx: AppContext, user: SessionUser, q: UnitsQuery): Promise<Page<UnitRow>> {
  const branchId = listBranch(user, q.branchId);
  if (q.siteId) await getSite(ctx.db, user, q.siteId);
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
    ctx.db
      .select(unitColumns)
      .from(units)
      .innerJoin(sites, eq(sites.id, units.siteId))
      .where(where)
      .orderBy(...order)
      .limit(limit)
      .offset(offset),
    ctx.db.select({ n: count() }).from(units).where(where),
  ]);
  const cs = await circuitsOf(
    ctx.db,
    rows.map((r) => r.id),
  );
  return {
    rows: rows.map((r) => ({ ...r, archivedAt: r.archivedAt?.toISOString() ?? null, circuits: cs.get(r.id) ?? [] })),
    total: total?.n ?? 0,
    page: q.page,
    pageSize: q.pageSize,
  };
}

export async function getUnit(db: Tx, user: SessionUser, id: string): Promise<UnitRow> {
  const [row] = await db.select(unitColumns).from(units).innerJoin(sites, eq(sites.id, units.siteId)).where(eq(units.id, id)).limit(1);
  if (!row) throw notFound('unit');
  assertBranch(user, row.branchId, 'unit');
  const cs = await circuitsOf(db, [id]);
  return { ...row, archivedAt: row.archivedAt?.toISOString() ?? null, circuits: cs.get(id) ?? [] };
}

/** make + serial is unique (the index `units_make_serial_uq`); answer a clear 409 instead of a 500. */
async function refuseDuplicateSerial(db: Tx, make: string, serial: string, exceptId?: string) {
  const [dup] = await db
    .select({ id: units.id, tag: units.tag, siteName: sites.name })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(and(eq(units.make, make), eq(units.serial, serial)))
    .limit(1);
  if (dup && dup.id !== exceptId) {
    throw conflict('duplicate_serial', `A ${make} unit with serial ${serial} already exists (${dup.tag} at ${dup.siteName}).`);
  }
}

export async function createUnit(ctx: AppContext, user: SessionUser, input: UnitValues): Promise<UnitRow> {
  assertKnownRefrigerant(input.refrigerant);
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const site = await getSite(tx, user, input.siteId);
    if (site.archivedAt) throw conflict('site_archived', `${site.name} is archived. Unarchive the site before adding units.`);
    await refuseDuplicateSerial(tx, input.make, input.serial);
    const { circuits: cs, ...fields } = input;
    const [u] = await tx
      .insert(units)
      .values({ ...fields, branchId: site.branchId })
      .returning({ id: units.id });
    await tx.insert(circuits).values(cs.map((c) => ({ ...c, unitId: u!.id })));
    return getUnit(tx, user, u!.id);
  });
}

/**
 * Saves a whole unit. Circuits are matched by number: existing ones are updated, new ones added,
 * and a circuit is removed only when no reading refers to it.
 */
export async function updateUnit(ctx: AppContext, user: SessionUser, id: string, input: UnitUpdateValues): Promise<UnitRow> {
  assertKnownRefrigerant(input.refrigerant);
  return ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const current = await getUnit(tx, user, id);
    await refuseDuplicateSerial(tx, input.make, input.serial, id);
    const { circuits: wanted, ...fields } = input;
    await tx.update(units).set(fields).where(eq(units.id, id));
    const byNumber = new Map(current.circuits.map((c) => [c.number, c]));
    const removed = current.circuits.filter((c) => !wanted.some((w) => w.number === c.number));
    if (removed.length) {
      const [used] = await tx
        .select({ n: count() })
        .from(readings)
        .where(
          inArray(
            readings.circuitId,
            removed.map((c) => c.id),
          ),
        );
      if ((used?.n ?? 0) > 0) {
        throw conflict(
          'circuit_has_readings',
          `Circuit ${removed.map((c) => c.number).join(', ')} has readings recorded and cannot be removed. Keep the circuit; change its compressor count instead.`,
        );
      }
      await tx.delete(circuits).where(
        inArray(
          circuits.id,
          removed.map((c) => c.id),
        ),
      );
    }
    for (const w of wanted) {
      const existing = byNumber.get(w.number);
      if (existing)
        await tx.update(circuits).set({ compressorCount: w.compressorCount, chargeLb: w.chargeLb }).where(eq(circuits.id, existing.id));
      else await tx.insert(circuits).values({ ...w, unitId: id });
    }
    return getUnit(tx, user, id);
  });
}

export async function setUnitArchived(ctx: AppContext, user: SessionUser, id: string, archived: boolean) {
  const unit = await getUnit(ctx.db, user, id);
  if (!archived && unit.archivedAt) {
    const [site] = await ctx.db.select({ archivedAt: sites.archivedAt, name: sites.name }).from(sites).where(eq(sites.id, unit.siteId));
    if (site?.archivedAt) throw conflict('site_archived', `${site.name} is archived. Unarchive the site to bring its units back.`);
  }
  await changeAs(ctx.db, user.id, (tx) =>
    tx
      .update(units)
      .set({ archivedAt: archived ? ctx.clock.now() : null })
      .where(eq(units.id, id)),
  );
  return getUnit(ctx.db, user, id);
}

export async function deleteUnit(ctx: AppContext, user: SessionUser, id: string): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const unit = await getUnit(tx, user, id);
    refuseIfHistory(`${unit.tag} (${unit.make} ${unit.serial})`, await historyCounts(tx, [id]));
    await tx.delete(units).where(eq(units.id, id));
  });
}
