import type { z } from 'zod';
import { isRefrigerantId, refrigerantIds } from '@coilpath/calc';
import type { CircuitRow, Page, SessionUser, UnitRow, UnitUpdateValues, UnitValues, unitsQuerySchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import type { Tx } from '../../db/client';
import { assertBranch } from '../../auth/policy';
import { conflict, HttpError, notFound } from '../../lib/errors';
import { historyCounts, refuseIfHistory } from '../sites/history';
import { listBranch } from '../sites/list-query';
import { getSite } from '../sites/sites.service';
import * as repo from './units.repo';
import { actAs, changeAs } from '../events/actor';

type UnitsQuery = z.output<typeof unitsQuerySchema>;

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
  const rows = await repo.circuitRowsOf(db, unitIds);
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
  const { rows, total } = await repo.unitPage(ctx.db, branchId, q);
  const cs = await circuitsOf(
    ctx.db,
    rows.map((r) => r.id),
  );
  return {
    rows: rows.map((r) => ({ ...r, archivedAt: r.archivedAt?.toISOString() ?? null, circuits: cs.get(r.id) ?? [] })),
    total,
    page: q.page,
    pageSize: q.pageSize,
  };
}

export async function getUnit(db: Tx, user: SessionUser, id: string): Promise<UnitRow> {
  const row = await repo.findUnit(db, id);
  if (!row) throw notFound('unit');
  assertBranch(user, row.branchId, 'unit');
  const cs = await circuitsOf(db, [id]);
  return { ...row, archivedAt: row.archivedAt?.toISOString() ?? null, circuits: cs.get(id) ?? [] };
}

/** make + serial is unique (the index `units_make_serial_uq`); answer a clear 409 instead of a 500. */
async function refuseDuplicateSerial(db: Tx, make: string, serial: string, exceptId?: string) {
  const dup = await repo.findBySerial(db, make, serial);
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
    const unitId = await repo.insertUnit(tx, { ...fields, branchId: site.branchId });
    await repo.insertCircuits(
      tx,
      cs.map((c) => ({ ...c, unitId })),
    );
    return getUnit(tx, user, unitId);
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
    await repo.updateUnit(tx, id, fields);
    const byNumber = new Map(current.circuits.map((c) => [c.number, c]));
    const removed = current.circuits.filter((c) => !wanted.some((w) => w.number === c.number));
    if (removed.length) {
      const used = await repo.readingCountOf(
        tx,
        removed.map((c) => c.id),
      );
      if (used > 0) {
        throw conflict(
          'circuit_has_readings',
          `Circuit ${removed.map((c) => c.number).join(', ')} has readings recorded and cannot be removed. Keep the circuit; change its compressor count instead.`,
        );
      }
      await repo.deleteCircuits(
        tx,
        removed.map((c) => c.id),
      );
    }
    for (const w of wanted) {
      const existing = byNumber.get(w.number);
      if (existing) await repo.updateCircuit(tx, existing.id, { compressorCount: w.compressorCount, chargeLb: w.chargeLb });
      else await repo.insertCircuits(tx, [{ ...w, unitId: id }]);
    }
    return getUnit(tx, user, id);
  });
}

export async function setUnitArchived(ctx: AppContext, user: SessionUser, id: string, archived: boolean) {
  const unit = await getUnit(ctx.db, user, id);
  if (!archived && unit.archivedAt) {
    const site = await repo.siteArchiveState(ctx.db, unit.siteId);
    if (site?.archivedAt) throw conflict('site_archived', `${site.name} is archived. Unarchive the site to bring its units back.`);
  }
  await changeAs(ctx.db, user.id, (tx) => repo.updateUnit(tx, id, { archivedAt: archived ? ctx.clock.now() : null }));
  return getUnit(ctx.db, user, id);
}

export async function deleteUnit(ctx: AppContext, user: SessionUser, id: string): Promise<void> {
  await ctx.db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const unit = await getUnit(tx, user, id);
    refuseIfHistory(`${unit.tag} (${unit.make} ${unit.serial})`, await historyCounts(tx, [id]));
    await repo.deleteUnit(tx, id);
  });
}
