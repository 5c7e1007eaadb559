import type { SessionUser, WorkOrder, WorkOrderState } from '@coilpath/contract';
import { workOrderCreateSchema, workOrderLabel, workOrderListQuerySchema, workOrderUpdateSchema } from '@coilpath/contract';
import type { z } from 'zod';
import type { Db, Tx } from '../../db/client';
import { assertBranch, branchScope, resolveBranch } from '../../auth/policy';
import { badRequest, conflict, notFound } from '../../lib/errors';
import { findOpenReturn, openReturnExists, withOneOpenReturn } from './open-return';
import { actAs } from '../events/actor';
import {
  findLeakCaseBranch,
  findSiteBranch,
  findUnitPlace,
  findWorkOrderPlace,
  findWorkOrderRecord,
  insertWorkOrder,
  listWorkOrderRecords,
  lockWorkOrder,
  updateWorkOrderRow,
} from './work-orders.repo';
import { presentWorkOrder } from './work-orders.present';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export async function listWorkOrders(db: Db, user: SessionUser, q: z.output<typeof workOrderListQuerySchema>): Promise<WorkOrder[]> {
  const branchId = resolveBranch(user, q.branchId);
  const scope = branchScope(user);
  const rows = await listWorkOrderRecords(db, { ...q, branchId, scope });
  return rows.map(presentWorkOrder);
}

/** One work order in the user's scope (404 otherwise). */
export async function getWorkOrder(db: Tx, user: SessionUser, id: string): Promise<WorkOrder> {
  const row = await findWorkOrderRecord(db, id);
  if (!row) throw notFound('work order');
  assertBranch(user, row.wo.branchId, 'work order');
  return presentWorkOrder(row);
}

const instantOrNull = (v: string | null | undefined) => (v === undefined ? undefined : v === null ? null : new Date(v));

/**
 * A new work order. A return visit for a unit that already has an open one answers 409 `open_return_exists`
 * naming it (one open return visit per unit; add the need to that one).
 */
export async function createWorkOrder(db: Db, user: SessionUser, input: z.output<typeof workOrderCreateSchema>): Promise<WorkOrder> {
  return withOneOpenReturn(db, () =>
    db.transaction(async (tx) => {
      await actAs(tx, user.id);
      const site = await findSiteBranch(tx, input.siteId);
      if (!site) throw notFound('site');
      assertBranch(user, site.branchId, 'site');
      if (input.unitId) {
        const unit = await findUnitPlace(tx, input.unitId);
        if (!unit) throw notFound('unit');
        assertBranch(user, unit.branchId, 'unit');
        if (unit.siteId !== site.id)
          throw badRequest('The unit is not at this site. Pick a unit of the site.', {
            fields: [{ path: 'unitId', message: 'Not a unit of this site' }],
          });
      }
      if (input.originWorkOrderId) {
        const o = await findWorkOrderPlace(tx, input.originWorkOrderId);
        if (!o) throw notFound('origin work order');
        assertBranch(user, o.branchId, 'origin work order');
        if (o.siteId !== site.id) {
          throw badRequest('The origin work order is at another site. A return visit or callback goes back to the same site.', {
            fields: [{ path: 'originWorkOrderId', message: 'Not a work order of this site' }],
          });
        }
      }
      if (input.leakCaseId) {
        const lc = await findLeakCaseBranch(tx, input.leakCaseId);
        if (!lc) throw notFound('leak case');
        assertBranch(user, lc.branchId, 'leak case');
      }
      if (input.kind === 'return_visit' && input.unitId) {
        const open = await findOpenReturn(tx, input.unitId);
        if (open) throw await openReturnExists(tx, open);
      }
      const w = await insertWorkOrder(tx, {
        branchId: site.branchId,
        siteId: site.id,
        unitId: input.unitId ?? null,
        kind: input.kind,
        priority: input.priority,
        complaint: input.complaint,
        requestedFrom: instantOrNull(input.requestedFrom) ?? null,
        requestedTo: instantOrNull(input.requestedTo) ?? null,
        slaDueAt: instantOrNull(input.slaDueAt) ?? null,
        latestAt: instantOrNull(input.latestAt) ?? null,
        requiredSkill: input.requiredSkill ?? null,
        requiredCertification: input.requiredCertification ?? null,
        estimatedMinutes: input.estimatedMinutes,
        originWorkOrderId: input.originWorkOrderId ?? null,
        leakCaseId: input.leakCaseId ?? null,
        createdById: user.id,
      });
      return getWorkOrder(tx, user, w.id);
    }),
  );
}

const finished: readonly WorkOrderState[] = ['closed', 'cancelled'];

export async function updateWorkOrder(
  db: Db,
  user: SessionUser,
  id: string,
  input: z.output<typeof workOrderUpdateSchema>,
  now: Date,
): Promise<WorkOrder> {
  return db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const w = await lockWorkOrder(tx, id);
    if (!w) throw notFound('work order');
    assertBranch(user, w.branchId, 'work order');
    const label = workOrderLabel(w.number);
    if (finished.includes(w.state)) throw conflict('work_order_finished', `${label} is ${w.state}; it can no longer be changed.`);
    if (input.state === 'cancelled' && w.state !== 'unplaced') {
      throw conflict('work_order_booked', `${label} is ${w.state.replace('_', ' ')}; unbook it on the Roster before cancelling it.`);
    }
    const from = input.requestedFrom !== undefined ? input.requestedFrom : iso(w.requestedFrom);
    const to = input.requestedTo !== undefined ? input.requestedTo : iso(w.requestedTo);
    if (from && to && Date.parse(from) >= Date.parse(to)) {
      throw badRequest('The requested window must end after it starts.', {
        fields: [{ path: 'requestedTo', message: 'Must be after the start' }],
      });
    }
    await updateWorkOrderRow(tx, id, {
      priority: input.priority,
      complaint: input.complaint,
      requestedFrom: instantOrNull(input.requestedFrom),
      requestedTo: instantOrNull(input.requestedTo),
      slaDueAt: instantOrNull(input.slaDueAt),
      latestAt: instantOrNull(input.latestAt),
      requiredSkill: input.requiredSkill,
      requiredCertification: input.requiredCertification,
      estimatedMinutes: input.estimatedMinutes,
      state: input.state,
      closedAt: input.state === 'cancelled' ? now : undefined,
      updatedAt: now,
    });
    return getWorkOrder(tx, user, id);
  });
}
