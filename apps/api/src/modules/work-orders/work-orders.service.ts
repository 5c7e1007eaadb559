import { and, desc, eq, gte, inArray, lt, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type { SessionUser, WorkOrder, WorkOrderState } from '@coilpath/contract';
import { modelAlertRef, workOrderCreateSchema, workOrderLabel, workOrderListQuerySchema, workOrderUpdateSchema } from '@coilpath/contract';
import type { z } from 'zod';
import type { Db, Tx } from '../../db/client';
import { bookings, leakCases, sites, units, workOrders } from '../../db/schema';
import { assertBranch, branchScope, resolveBranch } from '../../auth/policy';
import { badRequest, conflict, notFound } from '../../lib/errors';
import { findOpenReturn, openReturnExists, withOneOpenReturn } from './open-return';
import { actAs } from '../events/actor';

const origin = alias(workOrders, 'origin_work_order');

const iso = (d: Date | null) => (d ? d.toISOString() : null);

function selectWorkOrders(db: Tx) {
  return db
    .select({
      wo: workOrders,
      siteName: sites.name,
      siteAddress: sites.address,
      siteLat: sites.lat,
      siteLon: sites.lon,
      unitTag: units.tag,
      unitMake: units.make,
      unitModel: units.model,
      unitRefrigerant: units.refrigerant,
      originNumber: origin.number,
      leakRepairDueDate: leakCases.repairDueDate,
      booking: { id: bookings.id, techId: bookings.techId, startAt: bookings.startAt, endAt: bookings.endAt, version: bookings.version },
    })
    .from(workOrders)
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .leftJoin(units, eq(units.id, workOrders.unitId))
    .leftJoin(origin, eq(origin.id, workOrders.originWorkOrderId))
    .leftJoin(leakCases, eq(leakCases.id, workOrders.leakCaseId))
    .leftJoin(bookings, eq(bookings.workOrderId, workOrders.id));
}

type Row = Awaited<ReturnType<ReturnType<typeof selectWorkOrders>['execute']>>[number];

function toWorkOrder(r: Row): WorkOrder {
  const w = r.wo;
  return {
    id: w.id,
    number: w.number,
    branchId: w.branchId,
    siteId: w.siteId,
    siteName: r.siteName,
    siteAddress: r.siteAddress,
    siteLat: r.siteLat,
    siteLon: r.siteLon,
    unitId: w.unitId,
    unitTag: r.unitTag,
    unitMake: r.unitMake,
    unitModel: r.unitModel,
    unitRefrigerant: r.unitRefrigerant,
    kind: w.kind,
    state: w.state,
    priority: w.priority,
    complaint: w.complaint,
    requestedFrom: iso(w.requestedFrom),
    requestedTo: iso(w.requestedTo),
    slaDueAt: iso(w.slaDueAt),
    latestAt: iso(w.latestAt),
    plannedDate: w.plannedDate,
    requiredSkill: w.requiredSkill,
    requiredCertification: w.requiredCertification,
    estimatedMinutes: w.estimatedMinutes,
    originWorkOrderId: w.originWorkOrderId,
    originNumber: r.originNumber,
    leakCaseId: w.leakCaseId,
    leakRepairDueDate: r.leakRepairDueDate,
    modelAlert: modelAlertRef(w.purpose),
    booking:
      r.booking && r.booking.id
        ? {
            id: r.booking.id,
            techId: r.booking.techId,
            startAt: r.booking.startAt.toISOString(),
            endAt: r.booking.endAt.toISOString(),
            version: r.booking.version,
          }
        : null,
    createdAt: w.createdAt.toISOString(),
    updatedAt: w.updatedAt.toISOString(),
  };
}

export async function listWorkOrders(db: Db, user: SessionUser, q: z.output<typeof workOrderListQuerySchema>): Promise<WorkOrder[]> {
  const branchId = resolveBranch(user, q.branchId);
  const scope = branchScope(user);
  const where: (SQL | undefined)[] = [
    branchId ? eq(workOrders.branchId, branchId) : scope ? inArray(workOrders.branchId, scope) : undefined,
    q.state ? inArray(workOrders.state, q.state) : undefined,
    q.kind ? eq(workOrders.kind, q.kind) : undefined,
    q.unitId ? eq(workOrders.unitId, q.unitId) : undefined,
    q.siteId ? eq(workOrders.siteId, q.siteId) : undefined,
    q.from ? gte(workOrders.createdAt, new Date(q.from)) : undefined,
    q.to ? lt(workOrders.createdAt, new Date(q.to)) : undefined,
  ];
  const rows = await selectWorkOrders(db)
    .where(and(...where))
    .orderBy(desc(workOrders.createdAt))
    .limit(q.limit);
  return rows.map(toWorkOrder);
}

/** One work order in the user's scope (404 otherwise). */
export async function getWorkOrder(db: Tx, user: SessionUser, id: string): Promise<WorkOrder> {
  const [row] = await selectWorkOrders(db).where(eq(workOrders.id, id)).limit(1);
  if (!row) throw notFound('work order');
  assertBranch(user, row.wo.branchId, 'work order');
  return toWorkOrder(row);
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
      const [site] = await tx.select({ id: sites.id, branchId: sites.branchId }).from(sites).where(eq(sites.id, input.siteId)).limit(1);
      if (!site) throw notFound('site');
      assertBranch(user, site.branchId, 'site');
      if (input.unitId) {
        const [unit] = await tx
          .select({ siteId: units.siteId, branchId: units.branchId })
          .from(units)
          .where(eq(units.id, input.unitId))
          .limit(1);
        if (!unit) throw notFound('unit');
        assertBranch(user, unit.branchId, 'unit');
        if (unit.siteId !== site.id)
          throw badRequest('The unit is not at this site. Pick a unit of the site.', {
            fields: [{ path: 'unitId', message: 'Not a unit of this site' }],
          });
      }
      if (input.originWorkOrderId) {
        const [o] = await tx
          .select({ branchId: workOrders.branchId, siteId: workOrders.siteId })
          .from(workOrders)
          .where(eq(workOrders.id, input.originWorkOrderId))
          .limit(1);
        if (!o) throw notFound('origin work order');
        assertBranch(user, o.branchId, 'origin work order');
        if (o.siteId !== site.id) {
          throw badRequest('The origin work order is at another site. A return visit or callback goes back to the same site.', {
            fields: [{ path: 'originWorkOrderId', message: 'Not a work order of this site' }],
          });
        }
      }
      if (input.leakCaseId) {
        const [lc] = await tx.select({ branchId: leakCases.branchId }).from(leakCases).where(eq(leakCases.id, input.leakCaseId)).limit(1);
        if (!lc) throw notFound('leak case');
        assertBranch(user, lc.branchId, 'leak case');
      }
      if (input.kind === 'return_visit' && input.unitId) {
        const open = await findOpenReturn(tx, input.unitId);
        if (open) throw await openReturnExists(tx, open);
      }
      const [w] = await tx
        .insert(workOrders)
        .values({
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
        })
        .returning({ id: workOrders.id });
      return getWorkOrder(tx, user, w!.id);
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
    const [w] = await tx.select().from(workOrders).where(eq(workOrders.id, id)).for('update').limit(1);
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
    await tx
      .update(workOrders)
      .set({
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
      })
      .where(eq(workOrders.id, id));
    return getWorkOrder(tx, user, id);
  });
}
