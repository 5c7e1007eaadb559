/**
 * Bookings: placing work orders on technicians' calendars. Enforced here, inside one transaction per
 * change, with the technician's user row locked so two bookings of one technician cannot both pass:
 * an active technician of the work order's branch, no double booking, optimistic versions, and the
 * booking rules of @coilpath/calc (skill, EPA 608 certification, working hours, due time), which a
 * dispatcher or manager may override with a reason, kept on the booking with who gave it.
 */
import { and, asc, eq, gt, inArray, lt, ne, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type { Booking, BookingRule, BookingRuleRefusal, SessionUser } from '@coilpath/contract';
import {
  bookingCreateSchema,
  bookingListQuerySchema,
  bookingRuleCodes,
  andList,
  bookingRuleLabels,
  bookingRules,
  bookingUpdateSchema,
  maxBookingMinutes,
  requestedOverrides,
  workOrderLabel,
} from '@coilpath/contract';
import {
  bookingBreaches,
  unoverridden,
  workingWindow,
  workOrderDueAt,
  type BookingRule as CalcBookingRule,
  type RuleBreach,
  type RuleJob,
} from '@coilpath/calc';
import type { z } from 'zod';
import type { Db, Tx } from '../../db/client';
import {
  attachments,
  auditEvents,
  bookings,
  branches,
  findings,
  leakCases,
  readings,
  sites,
  units,
  users,
  visits,
  workOrders,
} from '../../db/schema';
import { assertBranch, branchScope, resolveBranch } from '../../auth/policy';
import { conflict, notFound } from '../../lib/errors';
import { localDay, localTime, toCalcTechnician } from './scheduling';
import { actAs } from '../events/actor';

/** The rule names of @coilpath/calc (which checks them) and @coilpath/contract (which carries them) are one list. */
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const rulesAgree: Same<CalcBookingRule, BookingRule> = true;
void rulesAgree;

/** What the booking rules read of a work order. */
export function ruleJob(
  w: Pick<typeof workOrders.$inferSelect, 'priority' | 'requiredSkill' | 'requiredCertification' | 'slaDueAt' | 'latestAt'>,
): RuleJob {
  return { requiredSkill: w.requiredSkill, requiredCertification: w.requiredCertification, dueAt: workOrderDueAt(w) };
}

/** The rules a stored booking overrides (a row from before `override_rules` has only `hours_override`). */
function storedOverrides(b: Pick<typeof bookings.$inferSelect, 'overrideRules' | 'hoursOverride'>): BookingRule[] {
  const rules = new Set<BookingRule>(b.overrideRules);
  if (b.hoursOverride) rules.add('working_hours');
  return bookingRules.filter((r) => rules.has(r));
}

const MINUTE = 60_000;

const overrider = alias(users, 'overrider');

function selectBookings(db: Tx) {
  return db
    .select({
      b: bookings,
      visitId: visits.id,
      overrideByName: overrider.name,
      wo: {
        number: workOrders.number,
        kind: workOrders.kind,
        state: workOrders.state,
        priority: workOrders.priority,
        complaint: workOrders.complaint,
        requiredSkill: workOrders.requiredSkill,
        requiredCertification: workOrders.requiredCertification,
        estimatedMinutes: workOrders.estimatedMinutes,
        slaDueAt: workOrders.slaDueAt,
        latestAt: workOrders.latestAt,
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
    .leftJoin(visits, eq(visits.bookingId, bookings.id))
    .leftJoin(overrider, eq(overrider.id, bookings.overrideById));
}
type Row = Awaited<ReturnType<ReturnType<typeof selectBookings>['execute']>>[number];

function toBooking(r: Row): Booking {
  const b = r.b;
  const w = r.wo;
  const rules = storedOverrides(b);
  return {
    id: b.id,
    branchId: b.branchId,
    workOrderId: b.workOrderId,
    techId: b.techId,
    startAt: b.startAt.toISOString(),
    endAt: b.endAt.toISOString(),
    version: b.version,
    fixed: b.fixed,
    hoursOverride: rules.includes('working_hours'),
    overrideRules: rules,
    overrideReason: rules.length ? b.overrideReason : null,
    overrideBy: rules.length && b.overrideById ? { id: b.overrideById, name: r.overrideByName ?? 'Someone no longer listed' } : null,
    visitId: r.visitId,
    workOrder: {
      number: w.number,
      kind: w.kind,
      state: w.state,
      priority: w.priority,
      complaint: w.complaint,
      siteName: r.siteName,
      unitTag: r.unitTag,
      unitMake: r.unitMake,
      unitModel: r.unitModel,
      requiredSkill: w.requiredSkill,
      requiredCertification: w.requiredCertification,
      estimatedMinutes: w.estimatedMinutes,
      dueAt: workOrderDueAt(w),
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
  const rows = await selectBookings(db)
    .where(and(...where))
    .orderBy(asc(bookings.startAt));
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
  /** The rules the request overrides, and why. */
  overrideRules: BookingRule[];
  overrideReason?: string | undefined;
}

type WorkOrderRow = Pick<
  typeof workOrders.$inferSelect,
  'id' | 'number' | 'branchId' | 'priority' | 'requiredSkill' | 'requiredCertification' | 'slaDueAt' | 'latestAt'
>;

/** "another technician", "another time", "another technician or time". */
function whatElse(rules: readonly BookingRule[]): string {
  const who = rules.some((r) => r === 'skill' || r === 'certification');
  const when = rules.some((r) => r === 'working_hours' || r === 'due_time');
  return who && when ? 'another technician or time' : who ? 'another technician' : 'another time';
}

/** The 409 for a placement that breaks rules nobody overrode: names each one, and what the dispatcher can do. */
function ruleRefusal(open: readonly RuleBreach[], extra: Record<string, unknown>) {
  const rules = open.map((b) => b.rule);
  const details: BookingRuleRefusal & Record<string, unknown> = {
    rule: rules[0]!,
    rules,
    breaches: open.map((b) => ({ rule: b.rule, message: b.message })),
    ...extra,
  };
  const message = `${open.map((b) => b.message).join(' ')} Pick ${whatElse(rules)}, or override the ${andList(rules.map((r) => bookingRuleLabels[r]))} with a reason.`;
  return conflict(rules.length === 1 ? bookingRuleCodes[rules[0]!] : 'booking_rules', message, details);
}

/**
 * Checks a placement; locks the technician's user row first so that a concurrent booking of the same
 * technician waits for this transaction. Refuses outright a technician who is inactive or of another
 * branch and a double booking; refuses a broken booking rule the request does not override. Returns the
 * rules the placement breaks (all of them overridden).
 */
async function checkPlacement(
  tx: Tx,
  user: SessionUser,
  wo: WorkOrderRow,
  p: Placement,
  excludeBookingId?: string,
): Promise<{ overridden: RuleBreach[] }> {
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
    throw conflict(
      'other_branch',
      `${tech.name} works in another branch than ${workOrderLabel(wo.number)}. Pick a technician of the work order's branch.`,
    );
  }
  const [branch] = await tx
    .select({
      id: branches.id,
      timeZone: branches.timeZone,
      baseLat: branches.baseLat,
      baseLon: branches.baseLon,
      holidays: branches.holidays,
    })
    .from(branches)
    .where(eq(branches.id, wo.branchId))
    .limit(1);
  const tz = branch!.timeZone;

  // No overlap with another booking of the same technician (not overridable: checked first, so nobody
  // writes a reason for a booking that cannot be made anyway).
  const [clash] = await tx
    .select({ id: bookings.id, startAt: bookings.startAt, endAt: bookings.endAt, number: workOrders.number, siteName: sites.name })
    .from(bookings)
    .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .where(
      and(eq(bookings.techId, tech.id), overlapping(p.startAt, p.endAt), excludeBookingId ? ne(bookings.id, excludeBookingId) : undefined),
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

  // The booking rules (skill, EPA 608 certification, working hours, due time): overridable with a reason.
  const calcTech = toCalcTechnician(tech, branch!);
  const job = ruleJob(wo);
  const breaches = bookingBreaches(calcTech, job, p.startAt, p.endAt);
  const open = unoverridden(breaches, p.overrideRules);
  if (open.length) {
    const extra: Record<string, unknown> = {};
    if (open.some((b) => b.rule === 'working_hours')) {
      const win = workingWindow(calcTech, localDay(p.startAt, tz));
      extra.hours = win ? { start: new Date(win.start).toISOString(), end: new Date(win.end).toISOString() } : null;
    }
    if (open.some((b) => b.rule === 'due_time')) extra.dueAt = job.dueAt;
    throw ruleRefusal(open, extra);
  }
  return { overridden: breaches };
}

/** The booking's override columns for the rules a placement breaks on purpose. */
function overrideColumns(user: SessionUser, overridden: readonly RuleBreach[], reason: string | undefined) {
  const rules = overridden.map((b) => b.rule);
  return {
    overrideRules: rules,
    hoursOverride: rules.includes('working_hours'),
    overrideReason: rules.length ? (reason ?? null) : null,
    overrideById: rules.length ? user.id : null,
  };
}

/** The booking's history: who booked it against which rules, why, and what each rule said. */
async function auditOverride(tx: Tx, user: SessionUser, bookingId: string, p: Placement, overridden: readonly RuleBreach[]) {
  await tx.insert(auditEvents).values({
    actorId: user.id,
    action: 'booking.override',
    entity: 'booking',
    entityId: bookingId,
    details: {
      rules: overridden.map((b) => b.rule),
      reason: p.overrideReason ?? '',
      breaches: overridden.map((b) => ({ rule: b.rule, message: b.message })),
      techId: p.techId,
      startAt: p.startAt.toISOString(),
      endAt: p.endAt.toISOString(),
    },
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
  await actAs(tx, user.id);
  const wo = await lockWorkOrder(tx, user, input.workOrderId);
  if (wo.state !== 'unplaced') {
    throw conflict(
      'not_unplaced',
      `${workOrderLabel(wo.number)} is already ${wo.state.replace('_', ' ')}. Move its booking on the calendar instead.`,
    );
  }
  const startAt = new Date(input.startAt);
  const endAt = input.endAt ? new Date(input.endAt) : new Date(startAt.getTime() + wo.estimatedMinutes * MINUTE);
  const p: Placement = {
    techId: input.techId,
    startAt,
    endAt,
    overrideRules: requestedOverrides(input),
    overrideReason: input.overrideReason,
  };
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
      ...overrideColumns(user, overridden, p.overrideReason),
      createdById: user.id,
      createdAt: now,
      updatedAt: now,
    })
    .returning({ id: bookings.id });
  await tx
    .insert(visits)
    .values({ branchId: wo.branchId, workOrderId: wo.id, bookingId: b!.id, techId: p.techId, createdAt: now, updatedAt: now });
  await tx.update(workOrders).set({ state: 'booked', updatedAt: now }).where(eq(workOrders.id, wo.id));
  if (overridden.length) await auditOverride(tx, user, b!.id, p, overridden);
  return (await getBooking(tx, b!.id))!;
}

/** Whether the visit of a booking has begun (the technician set off, or recorded anything). */
async function visitStarted(tx: Tx, bookingId: string): Promise<{ visitId: string | null; started: boolean }> {
  const [v] = await tx
    .select({ id: visits.id, enRouteAt: visits.enRouteAt, onSiteAt: visits.onSiteAt, closedAt: visits.closedAt })
    .from(visits)
    .where(eq(visits.bookingId, bookingId))
    .limit(1);
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
export async function updateBooking(
  tx: Tx,
  user: SessionUser,
  id: string,
  input: z.output<typeof bookingUpdateSchema>,
  now: Date,
): Promise<Booking> {
  await actAs(tx, user.id);
  const b = await lockBooking(tx, user, id);
  if (b.version !== input.version) {
    const current = await getBooking(tx, id);
    throw conflict(
      'stale_version',
      'This booking was moved by someone else. It has been reloaded; make your change again if it is still needed.',
      { current },
    );
  }
  const [wo] = await tx.select().from(workOrders).where(eq(workOrders.id, b.workOrderId)).limit(1);
  const techId = input.techId ?? b.techId;
  const startAt = input.startAt ? new Date(input.startAt) : b.startAt;
  const endAt = input.endAt
    ? new Date(input.endAt)
    : input.startAt
      ? new Date(startAt.getTime() + (b.endAt.getTime() - b.startAt.getTime()))
      : b.endAt;
  if (endAt <= startAt) throw conflict('bad_span', 'The booking must end after it starts.');
  const placementChanged = techId !== b.techId || startAt.getTime() !== b.startAt.getTime() || endAt.getTime() !== b.endAt.getTime();
  // An unchanged placement keeps its override; a new one is checked afresh against every rule.
  let overrides: ReturnType<typeof overrideColumns> | null = null;
  let overridden: RuleBreach[] = [];
  const p: Placement = { techId, startAt, endAt, overrideRules: requestedOverrides(input), overrideReason: input.overrideReason };
  if (placementChanged) {
    if (wo!.state !== 'booked') {
      throw conflict(
        'visit_started',
        `${workOrderLabel(wo!.number)} is already ${wo!.state.replace('_', ' ')}; its booking can no longer be moved.`,
      );
    }
    const { started } = await visitStarted(tx, b.id);
    if (started)
      throw conflict('visit_started', `The visit for ${workOrderLabel(wo!.number)} has started; its booking can no longer be moved.`);
    overridden = (await checkPlacement(tx, user, wo!, p, b.id)).overridden;
    overrides = overrideColumns(user, overridden, p.overrideReason);
  }
  const updated = await tx
    .update(bookings)
    .set({ techId, startAt, endAt, fixed: input.fixed ?? b.fixed, ...(overrides ?? {}), version: b.version + 1, updatedAt: now })
    .where(and(eq(bookings.id, b.id), eq(bookings.version, input.version)))
    .returning({ id: bookings.id });
  if (updated.length === 0) {
    const current = await getBooking(tx, id);
    throw conflict(
      'stale_version',
      'This booking was moved by someone else. It has been reloaded; make your change again if it is still needed.',
      { current },
    );
  }
  if (techId !== b.techId) await tx.update(visits).set({ techId, updatedAt: now }).where(eq(visits.bookingId, b.id));
  if (overridden.length) await auditOverride(tx, user, b.id, p, overridden);
  return (await getBooking(tx, id))!;
}

/** Unbooks: deletes the untouched visit and the booking; the work order goes back to the queue. */
export async function deleteBooking(tx: Tx, user: SessionUser, id: string, now: Date): Promise<void> {
  await actAs(tx, user.id);
  const b = await lockBooking(tx, user, id);
  const [wo] = await tx
    .select({ id: workOrders.id, number: workOrders.number, state: workOrders.state })
    .from(workOrders)
    .where(eq(workOrders.id, b.workOrderId))
    .for('update')
    .limit(1);
  const { visitId, started } = await visitStarted(tx, b.id);
  if (started || (wo && wo.state !== 'booked')) {
    throw conflict('visit_started', `The visit for ${workOrderLabel(wo?.number)} has started; it can no longer be unbooked.`);
  }
  if (visitId) await tx.delete(visits).where(eq(visits.id, visitId));
  await tx.delete(bookings).where(eq(bookings.id, b.id));
  await tx.update(workOrders).set({ state: 'unplaced', updatedAt: now }).where(eq(workOrders.id, b.workOrderId));
}
