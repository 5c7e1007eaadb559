import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { addDays, planRoute } from '@coilpath/calc';
import { weekdays, type DayResponse, type DayStop, type SessionUser, type WorkingHours } from '@coilpath/contract';
import type { AppContext } from '../../context';
import { notFound } from '../../lib/errors';
import type { RevisionCache } from '../../lib/revision-cache';
import { visitStatus } from '../visits/access';
import { dayUnits, dayVisits, findTechnician } from './day.repo';

/** Midnight of a `YYYY-MM-DD` date in a zone, as an instant. */
export function startOfDayIn(date: string, timeZone: string, hh = 0, mm = 0): Date {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  return new Date(new TZDate(y, m - 1, d, hh, mm, 0, timeZone).getTime());
}

/**
 * The first date after `date` the technician works: a weekday with working hours set, or Monday to Friday
 * when none are set (common practice, no source). Within two weeks, else simply the next date.
 */
export function nextWorkingDate(date: string, hours: WorkingHours | null): string {
  for (let i = 1; i <= 14; i++) {
    const next = addDays(date, i);
    const wd = weekdays[new Date(`${next}T12:00:00Z`).getUTCDay()]!;
    if (hours ? hours[wd] : wd !== 'sat' && wd !== 'sun') return next;
  }
  return addDays(date, 1);
}

/** A non-fixed booking may be reached up to this many minutes before it starts. */
const LOOSE_EARLY_MINUTES = 30;

export function calendarFeedUrl(ctx: AppContext, token: string | null): string | null {
  return token ? `${ctx.config.publicUrl.replace(/\/$/, '')}/api/calendar/${token}.ics` : null;
}

/**
 * The technician's day: the visits booked for them on the date (branch time zone), with site, access
 * notes, units and work order, and the route `planRoute` suggests from their start location with
 * each stop's appointment window respected.
 */
export async function technicianDay(
  ctx: AppContext,
  user: SessionUser,
  date: string | undefined,
  cache?: RevisionCache,
): Promise<DayResponse> {
  const me = await technician(ctx, user.id);
  const day = date ?? format(new TZDate(ctx.clock.now().getTime(), me.branch.timeZone), 'yyyy-MM-dd');
  // Every row the day is made of (bookings, visits, work orders, sites, units, the branch, the technician's
  // name, hours and start point) raises the branch's roster revision at commit (migration 0004), so the day is
  // reused while it stands. What raises nothing (the start address's wording, the calendar feed) is added after.
  // A recomputation reads the technician again, after the revision it is kept under.
  const body = cache
    ? await cache.read(ctx.database, me.branch.id, `day ${me.id} ${day}`, async () => dayOf(ctx, await technician(ctx, user.id), day))
    : await dayOf(ctx, me, day);
  return {
    ...body,
    route: { ...body.route, start: { ...body.route.start, label: startLabel(me) } },
    calendarFeed: { active: !!me.calendarToken, url: calendarFeedUrl(ctx, me.calendarToken) },
  };
}

async function technician(ctx: AppContext, userId: string) {
  const me = await findTechnician(ctx.db, userId);
  if (!me) throw notFound('branch');
  return me;
}
type Technician = Awaited<ReturnType<typeof technician>>;

/** Where the technician's day starts, in words: their own start address, else the branch's shop. */
const startLabel = (me: Technician) =>
  me.startLat !== null && me.startLon !== null ? me.startAddress || 'Start' : me.branch.baseAddress || `${me.branch.name} shop`;

async function dayOf(ctx: AppContext, me: Technician, day: string): Promise<Omit<DayResponse, 'calendarFeed'>> {
  const tz = me.branch.timeZone;
  const from = startOfDayIn(day, tz);
  const to = startOfDayIn(addDays(day, 1), tz);

  const rows = await dayVisits(ctx.db, me.id, from, to);

  const unitIds = [...new Set(rows.flatMap((r) => (r.wo.unitId ? [r.wo.unitId] : [])))];
  const siteWide = [...new Set(rows.filter((r) => !r.wo.unitId).map((r) => r.site.id))];
  const unitRows = unitIds.length || siteWide.length ? await dayUnits(ctx.db, unitIds, siteWide) : [];

  // The day starts when the technician's working hours do (07:00 when none are set).
  const weekday = weekdays[new TZDate(from.getTime(), tz).getDay()]!;
  const hours = me.workingHours?.[weekday];
  const [hh, mm] = (hours?.start ?? '07:00').split(':').map(Number) as [number, number];
  const dayStart = startOfDayIn(day, tz, hh, mm);
  const minutes = (d: Date) => (d.getTime() - dayStart.getTime()) / 60_000;

  const stops: DayStop[] = rows.map(({ visit: v, booking: b, wo, site }) => {
    const service = Math.max(0, wo.estimatedMinutes);
    let window: { from: number; to: number };
    if (wo.requestedFrom && wo.requestedTo && wo.requestedTo > wo.requestedFrom) {
      const f = minutes(wo.requestedFrom);
      window = { from: f, to: Math.max(f, minutes(wo.requestedTo) - service) };
    } else {
      const f = minutes(b.startAt) - (b.fixed ? 0 : LOOSE_EARLY_MINUTES);
      window = { from: f, to: Math.max(minutes(b.startAt), minutes(b.endAt) - service) };
    }
    return {
      visitId: v.id,
      status: visitStatus(v),
      enRouteAt: v.enRouteAt?.toISOString() ?? null,
      onSiteAt: v.onSiteAt?.toISOString() ?? null,
      closedAt: v.closedAt?.toISOString() ?? null,
      outcome: v.outcome,
      booking: { id: b.id, startAt: b.startAt.toISOString(), endAt: b.endAt.toISOString(), fixed: b.fixed },
      workOrder: {
        id: wo.id,
        number: wo.number,
        kind: wo.kind,
        state: wo.state,
        priority: wo.priority,
        complaint: wo.complaint,
        estimatedMinutes: wo.estimatedMinutes,
        requestedFrom: wo.requestedFrom?.toISOString() ?? null,
        requestedTo: wo.requestedTo?.toISOString() ?? null,
      },
      site: {
        id: site.id,
        name: site.name,
        address: site.address,
        city: site.city,
        lat: site.lat,
        lon: site.lon,
        accessNotes: site.accessNotes,
        contactName: site.contactName,
        contactPhone: site.contactPhone,
      },
      units: unitRows.filter((u) => (wo.unitId ? u.id === wo.unitId : u.siteId === site.id)).map(({ siteId: _s, ...u }) => u),
      routeStop: { id: v.id, lat: site.lat, lon: site.lon, serviceMinutes: service, window },
    };
  });

  const start = {
    lat: me.startLat ?? me.branch.baseLat,
    lon: me.startLon ?? me.branch.baseLon,
    label: startLabel(me),
  };
  const plan = planRoute({ start, stops: stops.map((s) => s.routeStop), dayStart });
  let prevDepart = 0;
  const arrivals = plan.arrivals.map((a) => {
    const leg = a.arrive - prevDepart;
    prevDepart = a.depart;
    return { ...a, legMinutes: leg };
  });

  return {
    date: day,
    nextWorkingDate: nextWorkingDate(day, me.workingHours ?? null),
    timeZone: tz,
    branch: { id: me.branch.id, name: me.branch.name },
    tech: { id: me.id, name: me.name },
    stops,
    route: {
      start,
      dayStart: dayStart.toISOString(),
      order: plan.order,
      arrivals,
      totalMiles: plan.totalMiles,
      driveMinutes: plan.driveMinutes,
      lateStops: plan.lateStops,
    },
  };
}
