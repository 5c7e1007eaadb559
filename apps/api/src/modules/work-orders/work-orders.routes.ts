import { Router } from 'express';
import { workOrderCreateSchema, workOrderListQuerySchema, workOrderUpdateSchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import { createWorkOrder, getWorkOrder, listWorkOrders, updateWorkOrder } from './work-orders.service';
import { workOrderAnswerSchema, workOrderListSchema } from '@coilpath/contract/responses';

/** Work orders of the branch: the Roster's unplaced queue, Watchlist's return visits to book. */
export function workOrdersRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(requireRole('owner', 'branch_manager', 'dispatcher'));
  r.get(
    '/',
    endpoint({ query: workOrderListQuerySchema, response: workOrderListSchema }, async ({ user, query }) => ({
      workOrders: await listWorkOrders(ctx.db, user, query),
    })),
  );
  r.get(
    '/:id',
    endpoint({ params: idParams, response: workOrderAnswerSchema }, async ({ user, params }) => ({
      workOrder: await getWorkOrder(ctx.db, user, params.id),
    })),
  );
  r.post(
    '/',
    endpoint({ body: workOrderCreateSchema, status: 201, response: workOrderAnswerSchema }, async ({ user, body }) => ({
      workOrder: await createWorkOrder(ctx.db, user, body),
    })),
  );
  r.patch(
    '/:id',
    endpoint({ params: idParams, body: workOrderUpdateSchema, response: workOrderAnswerSchema }, async ({ user, params, body }) => ({
      workOrder: await updateWorkOrder(ctx.db, user, params.id, body, ctx.clock.now()),
    })),
  );
  return r;
}
