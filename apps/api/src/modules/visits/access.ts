/**
 * Who may read and write a visit, and whose unit history a technician may read.
 *
 * - A technician reads and writes only visits assigned to them; anyone else's visit answers 404.
 * - Office roles (owner, branch manager, dispatcher) read visits in their branch scope (owner: all);
 *   another branch's visit answers 404. They may not record work on a visit: 403.
 * - A closed visit takes no more work: 409.
 * - Readings, findings and refrigerant are recorded on a visit that is on site: 409 before that, naming the
 *   state (`recordingRefusal` in @coilpath/contract, which the Visit screen shows too).
 * - A technician reads the history of a unit only when it is on one of their assignments (a visit
 *   assigned to them whose work order names the unit, or names no unit at the unit's site); else 404.
 */
import type { SessionUser } from '@coilpath/contract';
import { recordingRefusal } from '@coilpath/contract';
import type { Tx } from '../../db/client';
import { conflict, notFound } from '../../lib/errors';
import { enforce, unitMayRead, visitMayRead, visitMayRecordWork } from '../../auth/policy';

import { unitWithAssignment, type UnitRow, type VisitRow } from './visits.repo';

export { loadVisit, unitOnAssignments, type UnitRow, type VisitRow } from './visits.repo';

/** Throws 404 when the signed-in person may not see the visit. */
export function assertVisitReadable(user: SessionUser, v: VisitRow | undefined): asserts v is VisitRow {
  enforce(visitMayRead(user, v));
}

/** Throws 404/403/409 unless the signed-in person is the assigned technician of an open visit. */
export function assertVisitWritable(user: SessionUser, v: VisitRow | undefined): asserts v is VisitRow {
  enforce(visitMayRecordWork(user, v));
  if (v!.closedAt) {
    throw conflict('visit_closed', 'This visit is already closed; it takes no more work. Add a return visit if more is needed.');
  }
}

/** Throws like `assertVisitWritable`, and 409 unless the visit is on site: where readings, findings and refrigerant are recorded. */
export function assertVisitRecordable(user: SessionUser, v: VisitRow | undefined): asserts v is VisitRow {
  assertVisitWritable(user, v);
  const status = visitStatus(v);
  const refusal = recordingRefusal(status);
  if (refusal) throw conflict(refusal.code, refusal.message, { state: status });
}

/** The visit's state as the technician's buttons see it. */
export function visitStatus(v: Pick<VisitRow, 'enRouteAt' | 'onSiteAt' | 'closedAt'>): 'booked' | 'en_route' | 'on_site' | 'closed' {
  if (v.closedAt) return 'closed';
  if (v.onSiteAt) return 'on_site';
  if (v.enRouteAt) return 'en_route';
  return 'booked';
}

/**
 * Loads a unit the signed-in person may read, else 404: office roles within their branch scope,
 * technicians only for units on their assignments.
 */
export async function loadReadableUnit(db: Tx, user: SessionUser, unitId: string): Promise<UnitRow> {
  const row = await unitWithAssignment(db, user.role === 'technician' ? user.id : null, unitId);
  if (!row) throw notFound('unit');
  enforce(unitMayRead(user, row.unit, row.assigned));
  return row.unit;
}
