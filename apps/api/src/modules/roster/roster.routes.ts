import { Router } from 'express';
import {
  bookingCreateSchema,
  bookingListQuerySchema,
  bookingUpdateSchema,
  evenOutApplySchema,
  evenOutSchema,
  loadQuerySchema,
  rosterBranchQuerySchema,
  suggestSchema,
} from '@coilpath/contract';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { resolveBranch } from '../../auth/policy';
import { endpoint, idParams } from '../../lib/endpoint';
import { createRevisionCache } from '../../lib/revision-cache';
import { createBooking, deleteBooking, listBookings, updateBooking } from './bookings.service';
import { evenOutApply, evenOutPreview, listSites, listTechnicians, load, rosterBranch, suggest } from './roster.service';
import {
  bookingAnswerSchema,
  bookingListSchema,
  evenOutApplyResultSchema,
  evenOutPreviewSchema,
  loadSchema,
  rosterSiteListSchema,
  suggestResultSchema,
  technicianListSchema,
} from '@coilpath/contract/responses';

const bookers = requireRole('owner', 'branch_manager', 'dispatcher');

/** `/api/bookings`: the technicians' calendars (book, move, resize, reassign, unbook). */
export function bookingsRoutes(ctx: AppContext): Router {
  const r = Router();
  const weeks = createRevisionCache();
  r.use(bookers);
  // A week is read by every open Roster and refetched often: reused while the branch's roster revision stands.
  r.get(
    '/',
    endpoint({ query: bookingListQuerySchema, response: bookingListSchema }, ({ user, query }) =>
      weeks.json(ctx.database, resolveBranch(user, query.branchId), `${query.from} ${query.to} ${query.techId ?? ''}`, async () => ({
        bookings: await listBookings(ctx.db, user, query),
      })),
    ),
  );
  r.post(
    '/',
    endpoint({ body: bookingCreateSchema, status: 201, response: bookingAnswerSchema }, async ({ user, body }) => ({
      booking: await ctx.db.transaction((tx) => createBooking(tx, user, body, ctx.clock.now())),
    })),
  );
  r.patch(
    '/:id',
    endpoint({ params: idParams, body: bookingUpdateSchema, response: bookingAnswerSchema }, async ({ user, params, body }) => ({
      booking: await ctx.db.transaction((tx) => updateBooking(tx, user, params.id, body, ctx.clock.now())),
    })),
  );
  r.delete(
    '/:id',
    endpoint({ params: idParams, response: 'empty' }, async ({ user, params }) => {
      await ctx.db.transaction((tx) => deleteBooking(tx, user, params.id, ctx.clock.now()));
    }),
  );
  return r;
}

/** `/api/roster`: technicians, load per day, suggestions and evening out a week. */
export function rosterRoutes(ctx: AppContext): Router {
  const r = Router();
  const loads = createRevisionCache();
  r.use(bookers);
  r.get(
    '/technicians',
    endpoint({ query: rosterBranchQuerySchema, response: technicianListSchema }, async ({ user, query }) => {
      const branch = await rosterBranch(ctx.db, user, query.branchId);
      return { timeZone: branch.timeZone, technicians: await listTechnicians(ctx.db, branch) };
    }),
  );
  r.get(
    '/sites',
    endpoint({ query: rosterBranchQuerySchema, response: rosterSiteListSchema }, async ({ user, query }) => ({
      sites: await listSites(ctx.db, await rosterBranch(ctx.db, user, query.branchId)),
    })),
  );
  r.get(
    '/load',
    endpoint({ query: loadQuerySchema, response: loadSchema }, ({ user, query }) =>
      loads.json(ctx.database, resolveBranch(user, query.branchId), `${query.from} ${query.to}`, () => load(ctx.db, user, query)),
    ),
  );
  r.post(
    '/suggest',
    endpoint({ body: suggestSchema, response: suggestResultSchema }, ({ user, body }) => suggest(ctx.db, user, body, ctx.clock.now())),
  );
  r.post(
    '/even-out',
    endpoint({ body: evenOutSchema, response: evenOutPreviewSchema }, ({ user, body }) =>
      evenOutPreview(ctx.db, user, body, ctx.clock.now()),
    ),
  );
  r.post(
    '/even-out/apply',
    endpoint({ body: evenOutApplySchema, response: evenOutApplyResultSchema }, async ({ user, body }) => ({
      bookings: await evenOutApply(ctx.db, user, body, ctx.clock.now()),
    })),
  );
  return r;
}
