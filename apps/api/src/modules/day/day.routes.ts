import { Router } from 'express';
import { dayQuerySchema } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { requireRole } from '../../auth/middleware';
import { endpoint } from '../../lib/endpoint';
import { createRevisionCache } from '../../lib/revision-cache';
import { calendarFeed, revokeCalendarToken, rotateCalendarToken } from './calendar.service';
import { technicianDay } from './day.service';
import { calendarTokenResultSchema, dayResponseSchema } from '@coilpath/contract/responses';

/** `/api/day`: the technician's Route, technicians only. */
export function dayRoutes(ctx: AppContext): Router {
  const r = Router();
  // Every technician's Route refetches its day often (and at 7 a.m. all at once): reused while the branch's
  // roster revision stands (one entry per technician and date; room for a large branch's today and tomorrow).
  const days = createRevisionCache(512);
  r.use(requireRole('technician'));
  r.get(
    '/',
    endpoint({ query: dayQuerySchema, response: dayResponseSchema }, ({ user, query }) => technicianDay(ctx, user, query.date, days)),
  );
  return r;
}

/**
 * `/api/calendar`: the feed itself is public (its URL carries the secret, for a phone's calendar);
 * creating, rotating and revoking the secret needs the technician's own session.
 */
export function calendarRoutes(ctx: AppContext): Router {
  const r = Router();
  r.post(
    '/token',
    requireRole('technician'),
    endpoint({ status: 201, response: calendarTokenResultSchema }, ({ user }) => rotateCalendarToken(ctx, user.id)),
  );
  r.delete(
    '/token',
    requireRole('technician'),
    endpoint({ response: 'empty' }, async ({ user }) => {
      await revokeCalendarToken(ctx, user.id);
    }),
  );
  r.get('/:token.ics', async (req, res) => {
    const text = await calendarFeed(ctx, String(req.params.token));
    res.setHeader('Content-Type', 'text/calendar; charset=utf-8');
    res.setHeader('Cache-Control', 'private, max-age=300');
    res.setHeader('Content-Disposition', 'inline; filename="coilpath-day.ics"');
    res.send(text);
  });
  return r;
}
