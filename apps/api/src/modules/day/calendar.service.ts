/**
 * The technician's private iCalendar (RFC 5545) feed. The URL's secret is `users.calendarToken`;
 * rotating it ends the old URL, revoking it ends the feed.
 */
import { randomBytes } from 'node:crypto';
import { workOrderKindLabels } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { notFound } from '../../lib/errors';
import { writeCalendar, type CalendarEvent } from '../../lib/ical';
import { calendarFeedUrl } from './day.service';
import { calendarBookings, findCalendarUser, setCalendarToken } from './day.repo';

/** The feed covers bookings from this many days back to this many days ahead. */
const PAST_DAYS = 14;
const AHEAD_DAYS = 60;

export async function rotateCalendarToken(ctx: AppContext, userId: string): Promise<{ url: string }> {
  const token = randomBytes(24).toString('base64url');
  await setCalendarToken(ctx.db, userId, token);
  return { url: calendarFeedUrl(ctx, token)! };
}

export async function revokeCalendarToken(ctx: AppContext, userId: string): Promise<void> {
  await setCalendarToken(ctx.db, userId, null);
}

/** The .ics text for a feed token; 404 for an unknown or revoked token or an inactive user. */
export async function calendarFeed(ctx: AppContext, token: string): Promise<string> {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) throw notFound('calendar');
  const u = await findCalendarUser(ctx.db, token);
  if (!u || !u.active) throw notFound('calendar');
  const now = ctx.clock.now().getTime();
  const rows = await calendarBookings(ctx.db, u.id, new Date(now - PAST_DAYS * 86_400_000), new Date(now + AHEAD_DAYS * 86_400_000));
  const base = ctx.config.publicUrl.replace(/\/$/, '');
  const events: CalendarEvent[] = rows.map(({ booking: b, visitId, wo, site }) => ({
    uid: `${b.id}@coilpath`,
    start: b.startAt,
    end: b.endAt,
    summary: `WO-${wo.number} ${workOrderKindLabels[wo.kind]}: ${site.name}`,
    location: [site.address, site.city].filter(Boolean).join(', '),
    geo: { lat: site.lat, lon: site.lon },
    description: [wo.complaint, site.accessNotes ? `Access: ${site.accessNotes}` : null].filter(Boolean).join('\n'),
    ...(visitId ? { url: `${base}/visits/${visitId}` } : {}),
    status: 'CONFIRMED',
    sequence: b.version,
    lastModified: b.updatedAt,
  }));
  return writeCalendar({ productId: '-//Coilpath//Route//EN', name: `Coilpath: ${u.name}`, stamp: ctx.clock.now(), events });
}
