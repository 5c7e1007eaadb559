/** Every query of the technician's day and calendar feed: the technician, the day's stops and units, the feed token and bookings. */
import { and, asc, eq, gte, inArray, isNull, lt, ne, or } from 'drizzle-orm';
import type { Db, Tx } from '../../db/client';
import { bookings, branches, sites, units, users, visits, workOrders } from '../../db/schema';

type Q = Db | Tx;

/** The technician with their branch, start point, hours and feed token. */
export async function findTechnician(db: Q, userId: string) {
  const [me] = await db
    .select({
      id: users.id,
      name: users.name,
      startLat: users.startLat,
      startLon: users.startLon,
      startAddress: users.startAddress,
      workingHours: users.workingHours,
      calendarToken: users.calendarToken,
      branch: branches,
    })
    .from(users)
    .innerJoin(branches, eq(branches.id, users.branchId))
    .where(eq(users.id, userId))
    .limit(1);
  return me;
}

/** The technician's visits booked in [from, to) with their booking, work order and site, work orders not cancelled. */
export async function dayVisits(db: Q, techId: string, from: Date, to: Date) {
  return (
    db
      .select({ visit: visits, booking: bookings, wo: workOrders, site: sites })
      .from(visits)
      .innerJoin(bookings, eq(bookings.id, visits.bookingId))
      .innerJoin(workOrders, eq(workOrders.id, visits.workOrderId))
      .innerJoin(sites, eq(sites.id, workOrders.siteId))
      // The booking's technician is the visit's (a move carries the visit along, roster/bookings.service.ts); asking
      // it of the booking lets the (technician, start) index read the day alone instead of every booking in the range
      // (on the large contractor's PostgreSQL: a parallel scan of 300,000 bookings, 66 ms, became 1.7 ms).
      .where(
        and(
          eq(visits.techId, techId),
          eq(bookings.techId, techId),
          gte(bookings.startAt, from),
          lt(bookings.startAt, to),
          ne(workOrders.state, 'cancelled'),
        ),
      )
      .orderBy(asc(bookings.startAt))
  );
}

/** The units `unitIds` and the units not archived at the sites `siteWide`, by tag. */
export async function dayUnits(db: Q, unitIds: string[], siteWide: string[]) {
  return db
    .select({
      id: units.id,
      siteId: units.siteId,
      tag: units.tag,
      kind: units.kind,
      make: units.make,
      model: units.model,
      refrigerant: units.refrigerant,
    })
    .from(units)
    .where(
      or(
        unitIds.length ? inArray(units.id, unitIds) : undefined,
        siteWide.length ? and(inArray(units.siteId, siteWide), isNull(units.archivedAt)) : undefined,
      ),
    )
    .orderBy(asc(units.tag));
}

export async function setCalendarToken(db: Q, userId: string, token: string | null): Promise<void> {
  await db.update(users).set({ calendarToken: token }).where(eq(users.id, userId));
}

export async function findCalendarUser(db: Q, token: string) {
  const [u] = await db
    .select({ id: users.id, name: users.name, active: users.active })
    .from(users)
    .where(eq(users.calendarToken, token))
    .limit(1);
  return u;
}

/** The technician's bookings starting in [from, to) with their visit, work order and site, work orders not cancelled. */
export async function calendarBookings(db: Q, techId: string, from: Date, to: Date) {
  return db
    .select({ booking: bookings, visitId: visits.id, wo: workOrders, site: sites })
    .from(bookings)
    .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .leftJoin(visits, eq(visits.bookingId, bookings.id))
    .where(and(eq(bookings.techId, techId), gte(bookings.startAt, from), lt(bookings.startAt, to), ne(workOrders.state, 'cancelled')))
    .orderBy(asc(bookings.startAt));
}
