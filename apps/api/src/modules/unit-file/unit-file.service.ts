/**
 * Unit file: everything known about one unit, for everyone who may read it — the owner (every unit),
 * the unit branch's managers and dispatchers, and technicians with a visit or booking on the unit.
 * Anyone else gets 404, so the unit's existence is not revealed.
 */
import type { SessionUser, UnitFile, UnitSearchQuery, UnitSearchResult } from '@coilpath/contract';
import type { Db } from '../../db/client';
import { notFound } from '../../lib/errors';
import { enforce, unitMayRead } from '../../auth/policy';
import * as repo from './unit-file.repo';
import { presentUnitFile } from './unit-file.present';

/** Readings returned for the trend (the latest ones). */
const READINGS_LIMIT = 1500;
const ALARMS_LIMIT = 500;

/** The unit when the user may read it; otherwise 404. */
export async function readableUnit(db: Db, user: SessionUser, unitId: string) {
  const u = await repo.findUnit(db, unitId);
  if (!u) throw notFound('unit');
  let onAssignments = false;
  if (user.role === 'technician') {
    onAssignments = await repo.onTechAssignments(db, user.id, unitId);
  }
  enforce(unitMayRead(user, u, onAssignments));
  return u;
}

export async function unitFile(db: Db, user: SessionUser, unitId: string): Promise<UnitFile> {
  const u = await readableUnit(db, user, unitId);
  return presentUnitFile(u, await repo.unitFileRows(db, u, READINGS_LIMIT, ALARMS_LIMIT));
}

/** One attachment of the unit (or of a visit on it), for someone who may read the unit. */
export async function unitAttachment(db: Db, user: SessionUser, unitId: string, attachmentId: string) {
  await readableUnit(db, user, unitId);
  const a = await repo.findUnitAttachment(db, unitId, attachmentId);
  if (!a) throw notFound('attachment');
  return a;
}

/** Units the person may open, matching tag, serial, make, model or site name. */
export async function searchUnits(db: Db, user: SessionUser, q: UnitSearchQuery, branchId: string | undefined): Promise<UnitSearchResult> {
  const term = q.q ? `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` : undefined;
  const rowsFound = await repo.searchUnitRows(db, user.role === 'technician' ? user.id : null, term, branchId, q.limit);
  return {
    units: rowsFound.slice(0, q.limit).map((r) => ({ ...r, openWorkOrders: Number(r.openWorkOrders) })),
    more: rowsFound.length > q.limit,
  };
}
