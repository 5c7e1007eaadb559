/**
 * Bookings: placing work orders on technicians' calendars. The rules (certification, working hours,
 * no double booking, optimistic versions) are enforced here, inside one transaction per change,
 * with the technician's user row locked so two bookings of one technician cannot both pass.
 */
import { and, asc, eq, gt, inArray, lt, ne, type SQL } from 'drizzle-orm';
import type { Booking, SessionUser } from '@coilpath/contract';
import { epa608Labels, workOrderLabel, bookingCreateSchema, bookingUpdateSchema, bookingListQuerySchema, maxBookingMinutes } from '@coilpath/contract';
import { certificationSatisfies, workingWindow } from '@coilpath/calc';
import type { z } from 'zod';
import type { Db, Tx } from '../../db/client';
import { attachments, auditEvents, bookings, branches, findings, leakCases, readings, sites, units, users, visits, workOrders } from '../../db/schema';
import { assertBranch, branchScope, resolveBranch } from '../../auth/middleware';
import { conflict, notFound } from '../../lib/errors';
import { localDay, localTime, toCalcTechnician } from './scheduling';

const MINUTE = 60_000;

function selectBookings(db: Tx) {
  return db
    .select({
      b: bookings,
      visitId: visits.id,
      wo: {
        number: workOrders.number,
        kind: workOrders.kind,
        state: workOrders.state,
        priority: workOrders.priority,
        complaint: workOrders.complaint,
        requiredCertification: workOrders.requiredCertification,
        estimatedMinutes: workOrders.estimatedMinutes,
      },
      siteName: sites.name,
      unitTag: units.tag,
      unitMake: units.make,
      unitModel: units.model,
      leakRepairDueDate: leakCases.repairDueDate,
    })
    .from(bookings)
    .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .leftJoin(units, eq(units.id, workOrders.unitId))
    .leftJoin(leakCases, eq(leakCases.id, workOrders.leakCaseId))
    .leftJoin(visits, eq(visits.bookingId, bookings.id));
}
type Row = Awaited<ReturnType<ReturnType<typeof selectBookings>['execute']>>[number];

function toBooking(r: Row): Booking {
  const b = r.b;
  return {
    id: b.id,
    branchId: b.branchId,
    workOrderId: b.workOrderId,
    techId: b.techId,
    startAt: b.startAt.toISOString(),
    endAt: b.endAt.toISOString(),
    version: b.version,
    fixed: b.fixed,
    hoursOverride: b.hoursOverride,
    overrideReason: b.overrideReason,
    visitId: r.visitId,
    workOrder: {
      ...r.wo,
      siteName: r.siteName,
      unitTag: r.unitTag,
      unitMake: r.unitMake,
      unitModel: r.unitModel,
      leakRepairDueDate: r.leakRepairDueDate,
    },
  };
}

/**
 * Bookings that overlap a span start before its end and end after its start. As no booking lasts longer than
 * `maxBookingMinutes`, they also start after (span start − that length): the lower bound lets the
 * (branch, start) and (technician, start) indexes read only the span instead of the whole history before it.
 */
export const overlapping = (from: Date, to: Date) =>
  and(lt(bookings.startAt, to), gt(bookings.endAt, from), gt(bookings.startAt, new Date(from.getTime() - maxBookingMinutes * 60_000)));

export async function listBookings(db: Db, user: SessionUser, q: z.output<typeof bookingListQuerySchema>): Promise<Booking[]> {
  const branchId = resolveBranch(user, q.branchId);
  const scope = branchScope(user);
  const where: (SQL | undefined)[] = [
    branchId ? eq(bookings.branchId, branchId) : scope ? inArray(bookings.branchId, scope) : undefined,
    overlapping(new Date(q.from), new Date(q.to)),
    q.techId ? eq(bookings.techId, q.techId) : undefined,
  ];
  const rows = await selectBookings(db).where(and(...where)).orderBy(asc(bookings.startAt));
  return rows.map(toBooking);
}

export async function getBooking(db: Tx, id: string): Promise<Booking | undefined> {
  const [row] = await selectBookings(db).where(eq(bookings.id, id)).limit(1);
  return row ? toBooking(row) : undefined;
}

interface Placement {
  techId: string;
  startAt: Date;
  endAt: Date;
  overrideHours?: boolean | undefined;
  overrideReason?: string | undefined;
}

interface WorkOrderRow {
  id: string;
  number: number;
  branchId: string;
  requiredCertification: (typeof workOrders.$inferSelect)['requiredCertification'];
}

const weekdayName = (day: string) => new Date(`${day}T12:00:00Z`).toLocaleDateString('en-US', { weekday: 'long', day: 'numeric', month: 'long', timeZone: 'UTC' });

/**
 * Checks a placement against the booking rules; locks the technician's user row first so that a
 * concurrent booking of the same technician waits for this transaction. Returns whether the
 * working-hours rule was overridden.
 */
async function checkPlacement(tx: Tx, user: SessionUser, wo: WorkOrderRow, p: Placement, excludeBookingId?: string): Promise<{ overridden: boolean }> {
  const [tech] = await tx
    .select({
      id: users.id,
      name: users.name,
      role: users.role,
      active: users.active,
      branchId: users.branchId,
      skills: users.skills,
      epa608Type: users.epa608Type,
      workingHours: users.workingHours,
      startLat: users.startLat,
      startLon: users.startLon,
    })
    .from(users)
    .where(eq(users.id, p.techId))
    .for('update')
    .limit(1);
  if (!tech || tech.role !== 'technician') throw notFound('technician');
  assertBranch(user, tech.branchId, 'technician');
  if (!tech.active) throw conflict('technician_inactive', `${tech.name} is no longer active. Pick another technician.`);
  if (tech.branchId !== wo.branchId) {
    throw conflict('other_branch', `${tech.name} works in another branch than ${workOrderLabel(wo.number)}. Pick a technician of the work order's branch.`);
  }

  // Rule 1: EPA 608 certification for the refrigerant work.
  if (!certificationSatisfies(tech.epa608Type, wo.requiredCertification)) {
    const needs = wo.requiredCertification ? epa608Labels[wo.requiredCertification] : '';
    const has = tech.epa608Type === 'none' ? 'holds no EPA 608 certification' : `holds EPA 608 ${epa608Labels[tech.epa608Type]}`;
    throw conflict(
      'certification',
      `${tech.name} is not certified for this refrigerant work (needs EPA 608 ${needs}; ${tech.name} ${has}). Pick another technician or change the work.`,
      { rule: 'certification', needs: wo.requiredCertification, has: tech.epa608Type },
    );
  }

  // Rule 2: inside the technician's working hours (the dispatcher may override, with a reason).
  const [branch] = await tx.select({ id: branches.id, timeZone: branches.timeZone, baseLat: branches.baseLat, baseLon: branches.baseLon }).from(branches).where(eq(branches.id, wo.branchId)).limit(1);
  const tz = branch!.timeZone;
  const day = localDay(p.startAt, tz);
  const win = workingWindow(toCalcTechnician(tech, branch!), day);
  const inside = !!win && p.startAt.getTime() >= win.start && p.endAt.getTime() <= win.end;
  let overridden = false;
  if (!inside) {
    if (p.overrideHours && p.overrideReason) overridden = true;
    else {
      const runs = `${localTime(p.startAt, tz)}–${localTime(p.endAt, tz)}${localDay(p.endAt, tz) !== day ? ' the next day' : ''}`;
      const message = win
        ? `${tech.name} works ${localTime(win.start, tz)}–${localTime(win.end, tz)} on ${weekdayName(day)}; this booking runs ${runs} (${tz}). Pick a time inside those hours, or override the working hours with a reason.`
        : `${tech.name} does not work on ${weekdayName(day)}. Pick another day or technician, or override the working hours with a reason.`;
      throw conflict('outside_hours', message, {
        rule: 'working_hours',
        hours: win ? { start: new Date(win.start).toISOString(), end: new Date(win.end).toISOString() } : null,
      });
    }
  }

  // Rule 3: no overlap with another booking of the same technician.
  const [clash] = await tx
    .select({ id: bookings.id, startAt: bookings.startAt, endAt: bookings.endAt, number: workOrders.number, siteName: sites.name })
    .from(bookings)
    .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .where(
      and(
        eq(bookings.techId, tech.id),
        overlapping(p.startAt, p.endAt),
        excludeBookingId ? ne(bookings.id, excludeBookingId) : undefined,
      ),
    )
    .orderBy(asc(bookings.startAt))
    .limit(1);
  if (clash) {
    throw conflict(
      'overlap',
      `${tech.name} already has ${workOrderLabel(clash.number)} at ${clash.siteName} from ${localTime(clash.startAt, tz)} to ${localTime(clash.endAt, tz)} on ${localTime(clash.startAt, tz, 'EEE d MMM')}. Pick a free time or another technician.`,
      { rule: 'overlap', bookingId: clash.id },
    );
  }
  return { overridden };
}

async function auditOverride(tx: Tx, user: SessionUser, bookingId: string, p: Placement) {
  await tx.insert(auditEvents).values({
    actorId: user.id,
    action: 'booking.hours_override',
    entity: 'booking',
    entityId: bookingId,
    details: { reason: p.overrideReason ?? '', techId: p.techId, startAt: p.startAt.toISOString(), endAt: p.endAt.toISOString() },
  });
}

async function lockWorkOrder(tx: Tx, user: SessionUser, id: string): Promise<typeof workOrders.$inferSelect> {
  const [wo] = await tx.select().from(workOrders).where(eq(workOrders.id, id)).for('update').limit(1);
  if (!wo) throw notFound('work order');
  assertBranch(user, wo.branchId, 'work order');
  return wo;
}

/** Books an unplaced work order, creating its visit in the same transaction. */
export async function createBooking(tx: Tx, user: SessionUser, input: z.output<typeof bookingCreateSchema>, now: Date): Promise<Booking> {
  const wo = await lockWorkOrder(tx, user, input.workOrderId);
  if (wo.state !== 'unplaced') {
    throw conflict('not_unplaced', `${workOrderLabel(wo.number)} is already ${wo.state.replace('_', ' ')}. Move its booking on the calendar instead.`);
  }
  const startAt = new Date(input.startAt);
  const endAt = input.endAt ? new Date(input.endAt) : new Date(startAt.getTime() + wo.estimatedMinutes * MINUTE);
  const p: Placement = { techId: input.techId, startAt, endAt, overrideHours: input.overrideHours, overrideReason: input.overrideReason };
  const { overridden } = await checkPlacement(tx, user, wo, p);
  const [b] = await tx
    .insert(bookings)
    .values({
      branchId: wo.branchId,
      workOrderId: wo.id,
      techId: p.techId,
      startAt,
      endAt,
      fixed: input.fixed ?? false,
      hoursOverride: overridden,
      overrideReason: overridden ? (p.overrideReason ?? null) : null,
      overrideById: overridden ? user.id : null,
      createdById: user.id,
      createdAt: now,
      updatedAt: now,
    })
    .returning({ id: bookings.id });
  await tx.insert(visits).values({ branchId: wo.branchId, workOrderId: wo.id, bookingId: b!.id, techId: p.techId, createdAt: now, updatedAt: now });
  await tx.update(workOrders).set({ state: 'booked', updatedAt: now }).where(eq(workOrders.id, wo.id));
  if (overridden) await auditOverride(tx, user, b!.id, p);
  return (await getBooking(tx, b!.id))!;
}

/** Whether the visit of a booking has begun (the technician set off, or recorded anything). */
async function visitStarted(tx: Tx, bookingId: string): Promise<{ visitId: string | null; started: boolean }> {
  const [v] = await tx.select({ id: visits.id, enRouteAt: visits.enRouteAt, onSiteAt: visits.onSiteAt, closedAt: visits.closedAt }).from(visits).where(eq(visits.bookingId, bookingId)).limit(1);
  if (!v) return { visitId: null, started: false };
  if (v.enRouteAt || v.onSiteAt || v.closedAt) return { visitId: v.id, started: true };
  const recorded = await Promise.all([
    tx.select({ id: readings.id }).from(readings).where(eq(readings.visitId, v.id)).limit(1),
    tx.select({ id: findings.id }).from(findings).where(eq(findings.visitId, v.id)).limit(1),
    tx.select({ id: attachments.id }).from(attachments).where(eq(attachments.visitId, v.id)).limit(1),
  ]);
  return { visitId: v.id, started: recorded.some((r) => r.length > 0) };
}

async function lockBooking(tx: Tx, user: SessionUser, id: string) {
  const [b] = await tx.select().from(bookings).where(eq(bookings.id, id)).for('update').limit(1);
  if (!b) throw notFound('booking');
  assertBranch(user, b.branchId, 'booking');
  return b;
}

/** Moves, resizes or reassigns a booking based on the version the client saw. */
export async function updateBooking(tx: Tx, user: SessionUser, id: string, input: z.output<typeof bookingUpdateSchema>, now: Date): Promise<Booking> {
  const b = await lockBooking(tx, user, id);
  if (b.version !== input.version) {
    const current = await getBooking(tx, id);
    throw conflict('stale_version', 'This booking was moved by someone else. It has been reloaded; make your change again if it is still needed.', { current });
  }
  const [wo] = await tx.select().from(workOrders).where(eq(workOrders.id, b.workOrderId)).limit(1);
  const techId = input.techId ?? b.techId;
  const startAt = input.startAt ? new Date(input.startAt) : b.startAt;
  const endAt = input.endAt ? new Date(input.endAt) : input.startAt ? new Date(startAt.getTime() + (b.endAt.getTime() - b.startAt.getTime())) : b.endAt;
  if (endAt <= startAt) throw conflict('bad_span', 'The booking must end after it starts.');
  const placementChanged = techId !== b.techId || startAt.getTime() !== b.startAt.getTime() || endAt.getTime() !== b.endAt.getTime();
  let hoursOverride = b.hoursOverride;
  let overrideReason = b.overrideReason;
  let overrideById = b.overrideById;
  const p: Placement = { techId, startAt, endAt, overrideHours: input.overrideHours, overrideReason: input.overrideReason };
  if (placementChanged) {
    if (wo!.state !== 'booked') {
      throw conflict('visit_started', `${workOrderLabel(wo!.number)} is already ${wo!.state.replace('_', ' ')}; its booking can no longer be moved.`);
    }
    const { started } = await visitStarted(tx, b.id);
    if (started) throw conflict('visit_started', `The visit for ${workOrderLabel(wo!.number)} has started; its booking can no longer be moved.`);
    const { overridden } = await checkPlacement(tx, user, wo!, p, b.id);
    hoursOverride = overridden;
    overrideReason = overridden ? (p.overrideReason ?? null) : null;
    overrideById = overridden ? user.id : null;
  }
  const updated = await tx
    .update(bookings)
    .set({ techId, startAt, endAt, fixed: input.fixed ?? b.fixed, hoursOverride, overrideReason, overrideById, version: b.version + 1, updatedAt: now })
    .where(and(eq(bookings.id, b.id), eq(bookings.version, input.version)))
    .returning({ id: bookings.id });
  if (updated.length === 0) {
    const current = await getBooking(tx, id);
    throw conflict('stale_version', 'This booking was moved by someone else. It has been reloaded; make your change again if it is still needed.', { current });
  }
  if (techId !== b.techId) await tx.update(visits).set({ techId, updatedAt: now }).where(eq(visits.bookingId, b.id));
  if (placementChanged && hoursOverride) await auditOverride(tx, user, b.id, p);
  return (await getBooking(tx, id))!;
}

/** Unbooks: deletes the untouched visit and the booking; the work order goes back to the queue. */
export async function deleteBooking(tx: Tx, user: SessionUser, id: string, now: Date): Promise<void> {
  const b = await lockBooking(tx, user, id);
  const [wo] = await tx.select({ id: workOrders.id, number: workOrders.number, state: workOrders.state }).from(workOrders).where(eq(workOrders.id, b.workOrderId)).for('update').limit(1);
  const { visitId, started } = await visitStarted(tx, b.id);
  if (started || (wo && wo.state !== 'booked')) {
    throw conflict('visit_started', `The visit for ${workOrderLabel(wo?.number)} has started; it can no longer be unbooked.`);
  }
  if (visitId) await tx.delete(visits).where(eq(visits.id, visitId));
  await tx.delete(bookings).where(eq(bookings.id, b.id));
  await tx.update(workOrders).set({ state: 'unplaced', updatedAt: now }).where(eq(workOrders.id, b.workOrderId));
}
