import { Router } from 'express';
import {
  customerInputSchema,
  customerPatchSchema,
  customersQuerySchema,
  siteInputSchema,
  sitePatchSchema,
  sitesQuerySchema,
} from '@coilpath/contract';
import { customerPageSchema, customerRowSchema, sitePageSchema, siteRowSchema } from '@coilpath/contract/responses';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint, idParams } from '../../lib/endpoint';
import * as svc from './sites.service';
import { onlySent } from './list-query';

/** Offices only: technicians read unit history through their own routes. */
const office = requireRole('owner', 'branch_manager', 'dispatcher');

/** `/api/customers` — branch-scoped (docs/DESIGN.md §2). */
export function customersRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(office);
  r.get(
    '/',
    endpoint({ query: customersQuerySchema, response: customerPageSchema }, ({ user, query }) => svc.listCustomers(ctx, user, query)),
  );
  r.post(
    '/',
    endpoint({ body: customerInputSchema, status: 201, response: customerRowSchema }, ({ user, body }) =>
      svc.createCustomer(ctx, user, body),
    ),
  );
  r.get(
    '/:id',
    endpoint({ params: idParams, response: customerRowSchema }, ({ user, params }) => svc.getCustomer(ctx.db, user, params.id)),
  );
  r.patch(
    '/:id',
    endpoint({ params: idParams, body: customerPatchSchema, response: customerRowSchema }, ({ user, params, body, req }) =>
      svc.updateCustomer(ctx, user, params.id, onlySent(body, req.body)),
    ),
  );
  r.post(
    '/:id/archive',
    endpoint({ params: idParams, response: customerRowSchema }, ({ user, params }) => svc.setCustomerArchived(ctx, user, params.id, true)),
  );
  r.post(
    '/:id/unarchive',
    endpoint({ params: idParams, response: customerRowSchema }, ({ user, params }) => svc.setCustomerArchived(ctx, user, params.id, false)),
  );
  r.delete(
    '/:id',
    endpoint({ params: idParams, response: 'empty' }, ({ user, params }) => svc.deleteCustomer(ctx, user, params.id)),
  );
  return r;
}

/** `/api/sites` — branch-scoped (docs/DESIGN.md §2). */
export function sitesRoutes(ctx: AppContext): Router {
  const r = Router();
  r.use(office);
  r.get(
    '/',
    endpoint({ query: sitesQuerySchema, response: sitePageSchema }, ({ user, query }) => svc.listSites(ctx, user, query)),
  );
  r.post(
    '/',
    endpoint({ body: siteInputSchema, status: 201, response: siteRowSchema }, ({ user, body }) => svc.createSite(ctx, user, body)),
  );
  r.get(
    '/:id',
    endpoint({ params: idParams, response: siteRowSchema }, ({ user, params }) => svc.getSite(ctx.db, user, params.id)),
  );
  r.patch(
    '/:id',
    endpoint({ params: idParams, body: sitePatchSchema, response: siteRowSchema }, ({ user, params, body, req }) =>
      svc.updateSite(ctx, user, params.id, onlySent(body, req.body)),
    ),
  );
  r.post(
    '/:id/archive',
    endpoint({ params: idParams, response: siteRowSchema }, ({ user, params }) => svc.setSiteArchived(ctx, user, params.id, true)),
  );
  r.post(
    '/:id/unarchive',
    endpoint({ params: idParams, response: siteRowSchema }, ({ user, params }) => svc.setSiteArchived(ctx, user, params.id, false)),
  );
  r.delete(
    '/:id',
    endpoint({ params: idParams, response: 'empty' }, ({ user, params }) => svc.deleteSite(ctx, user, params.id)),
  );
  return r;
}
