/** The Roster's read side and proposals: technicians, load per day, suggestions, evening out a week. */
import { and, asc, eq, inArray, isNull, lt, ne } from 'drizzle-orm';
import type { Booking, Candidate, EvenOutPreview, RosterSite, SessionUser, Technician, TechnicianDayLoad } from '@coilpath/contract';
import { evenOutApplySchema, evenOutSchema, loadQuerySchema, suggestSchema, workOrderLabel } from '@coilpath/contract';
import { addDays, evenOut, rankTechnicians, technicianLoad, type SchedulingJob } from '@coilpath/calc';
import type { z } from 'zod';
import type { Db, Tx } from '../../db/client';
import { bookings, branches, sites, units, users, visits, workOrders } from '../../db/schema';
import { assertBranch, resolveBranch } from '../../auth/policy';
import { badRequest, conflict, HttpError, notFound } from '../../lib/errors';
import { createBooking, overlapping, ruleJob, updateBooking } from './bookings.service';
import {
  eachDay,
  localRange,
  localTime,
  mondayOf,
  priorityRank,
  toCalcBooking,
  toCalcTechnician,
  weekDriveMinutes,
  type BranchRow,
  type TechRow,
} from './scheduling';
import { actAs } from '../events/actor';

/** The branch a Roster request is about; the owner must choose one. */
export async function rosterBranch(db: Tx, user: SessionUser, requested: string | undefined): Promise<BranchRow> {
  const id = resolveBranch(user, requested);
  if (!id) throw badRequest('Choose a branch to see its roster.');
  const [b] = await db
    .select({
      id: branches.id,
      timeZone: branches.timeZone,
      baseLat: branches.baseLat,
      baseLon: branches.baseLon,
      holidays: branches.holidays,
    })
    .from(branches)
    .where(eq(branches.id, id))
    .limit(1);
  if (!b) throw notFound('branch');
  return b;
}

type TechFull = TechRow & { colorIndex: number };

async function branchTechs(db: Tx, branchId: string): Promise<TechFull[]> {
  return db
    .select({
      id: users.id,
      name: users.name,
      colorIndex: users.colorIndex,
      skills: users.skills,
      epa608Type: users.epa608Type,
      workingHours: users.workingHours,
      startLat: users.startLat,
      startLon: users.startLon,
    })
    .from(users)
    .where(and(eq(users.branchId, branchId), eq(users.role, 'technician'), eq(users.active, true)))
    .orderBy(asc(users.name));
}

export async function listTechnicians(db: Db, branch: BranchRow): Promise<Technician[]> {
  const rows = await branchTechs(db, branch.id);
  return rows.map((t) => ({ ...t, colorIndex: ((t.colorIndex % 8) + 8) % 8 }));
}

/** Bookings of the branch overlapping [start, end), with the site's location and the unit. */
async function branchBookings(
  db: Tx,
  branchId: string,
  start: Date,
  end: Date,
  extra?: { unitId?: string | null; excludeWorkOrderId?: string },
) {
  const rows = await db
    .select({
      id: bookings.id,
      techId: bookings.techId,
      startAt: bookings.startAt,
      endAt: bookings.endAt,
      fixed: bookings.fixed,
      workOrderId: bookings.workOrderId,
      unitId: workOrders.unitId,
      lat: sites.lat,
      lon: sites.lon,
    })
    .from(bookings)
    .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .where(
      and(
        eq(bookings.branchId, branchId),
        overlapping(start, end),
        extra?.excludeWorkOrderId ? ne(bookings.workOrderId, extra.excludeWorkOrderId) : undefined,
      ),
    );
  if (extra?.unitId) {
    // Earlier visits to the same unit count for continuity (calc's "has worked on this unit").
    const history = await db
      .select({
        id: bookings.id,
        techId: bookings.techId,
        startAt: bookings.startAt,
        endAt: bookings.endAt,
        fixed: bookings.fixed,
        workOrderId: bookings.workOrderId,
        unitId: workOrders.unitId,
        lat: sites.lat,
        lon: sites.lon,
      })
      .from(bookings)
      .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
      .innerJoin(sites, eq(sites.id, workOrders.siteId))
      .where(
        and(
          eq(workOrders.unitId, extra.unitId),
          lt(bookings.endAt, start),
          extra.excludeWorkOrderId ? ne(bookings.workOrderId, extra.excludeWorkOrderId) : undefined,
        ),
      )
      .limit(200);
    const seen = new Set(rows.map((r) => r.id));
    for (const h of history) if (!seen.has(h.id)) rows.push(h);
  }
  return rows;
}

export async function load(
  db: Db,
  user: SessionUser,
  q: z.output<typeof loadQuerySchema>,
): Promise<{ timeZone: string; load: TechnicianDayLoad[] }> {
  const branch = await rosterBranch(db, user, q.branchId);
  const techs = (await branchTechs(db, branch.id)).map((t) => toCalcTechnician(t, branch));
  const range = localRange(q.from, q.to, branch.timeZone);
  const rows = await branchBookings(db, branch.id, range.start, range.end);
  const calcBookings = rows.map(toCalcBooking);
  const out: TechnicianDayLoad[] = [];
  const holidays = new Set(branch.holidays);
  for (const day of eachDay(q.from, q.to)) {
    for (const l of technicianLoad(calcBookings, techs, day)) out.push(holidays.has(day) ? { ...l, holiday: true } : l);
  }
  return { timeZone: branch.timeZone, load: out };
}

async function workOrderForPlanning(db: Tx, user: SessionUser, id: string) {
  const [row] = await db
    .select({ wo: workOrders, lat: sites.lat, lon: sites.lon, siteName: sites.name })
    .from(workOrders)
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .where(eq(workOrders.id, id))
    .limit(1);
  if (!row) throw notFound('work order');
  assertBranch(user, row.wo.branchId, 'work order');
  return row;
}

type PlanningRow = Awaited<ReturnType<typeof workOrderForPlanning>>;

/**
 * A work order as calc's scheduling job: not before now or the requested start, ending by the requested end,
 * and under the same booking rules the API enforces (skill, EPA 608, a start by the due time: `ruleJob`).
 */
function toJob(r: PlanningRow, now: Date): SchedulingJob {
  const w = r.wo;
  const earliest = Math.max(now.getTime(), w.requestedFrom?.getTime() ?? -Infinity);
  const latestCandidates = [w.requestedTo].filter((d): d is Date => !!d).map((d) => d.getTime());
  const { dueAt } = ruleJob(w);
  return {
    id: w.id,
    durationMinutes: w.estimatedMinutes,
    lat: r.lat,
    lon: r.lon,
    priority: priorityRank[w.priority],
    earliest: new Date(earliest),
    ...(latestCandidates.length ? { latest: new Date(Math.min(...latestCandidates)) } : {}),
    ...(w.requiredSkill ? { requiredSkill: w.requiredSkill } : {}),
    ...(w.requiredCertification ? { requiredCertification: w.requiredCertification } : {}),
    ...(dueAt ? { dueAt } : {}),
    ...(w.unitId ? { unitId: w.unitId } : {}),
  };
}

export async function suggest(
  db: Db,
  user: SessionUser,
  input: z.output<typeof suggestSchema>,
  now: Date,
): Promise<{ workOrderId: string; day: string; candidates: Candidate[] }> {
  const row = await workOrderForPlanning(db, user, input.workOrderId);
  if (row.wo.state !== 'unplaced' && row.wo.state !== 'booked') {
    throw conflict(
      'work_order_finished',
      `${workOrderLabel(row.wo.number)} is ${row.wo.state.replace('_', ' ')}; there is nothing to book.`,
    );
  }
  const branch = await rosterBranch(db, user, row.wo.branchId);
  const techRows = await branchTechs(db, branch.id);
  const techs = techRows.map((t) => toCalcTechnician(t, branch));
  const range = localRange(input.day, input.day, branch.timeZone);
  const rows = await branchBookings(db, branch.id, range.start, range.end, { unitId: row.wo.unitId, excludeWorkOrderId: row.wo.id });
  const ranked = rankTechnicians(toJob(row, now), techs, rows.map(toCalcBooking), { day: input.day });
  return {
    workOrderId: row.wo.id,
    day: input.day,
    candidates: ranked.map((c) => ({
      techId: c.techId,
      name: c.name,
      eligible: c.eligible,
      score: c.score,
      reasons: c.reasons,
      blockedBy: c.blockedBy,
      proposedStart: c.proposedStart,
      proposedEnd: c.proposedEnd,
      travelMinutes: c.travelMinutes,
      freeMinutes: c.freeMinutes,
    })),
  };
}

export async function evenOutPreview(db: Db, user: SessionUser, input: z.output<typeof evenOutSchema>, now: Date): Promise<EvenOutPreview> {
  const branch = await rosterBranch(db, user, input.branchId);
  const week = mondayOf(input.week);
  const last = addDays(week, 6);
  const range = localRange(week, last, branch.timeZone);
  const techRows = await branchTechs(db, branch.id);
  const techs = techRows.map((t) => toCalcTechnician(t, branch));
  const names = new Map(techRows.map((t) => [t.id, t.name]));
  const existing = await branchBookings(db, branch.id, range.start, range.end);
  const calcBookings = existing.map(toCalcBooking);

  // The unplaced work that may go in this week: no window, or a window that touches it.
  const queue = await db
    .select({ wo: workOrders, lat: sites.lat, lon: sites.lon, siteName: sites.name })
    .from(workOrders)
    .innerJoin(sites, eq(sites.id, workOrders.siteId))
    .where(and(eq(workOrders.branchId, branch.id), eq(workOrders.state, 'unplaced')))
    .orderBy(asc(workOrders.number));
  const inWeek = queue.filter((r) => {
    const w = r.wo;
    if (w.requestedFrom && w.requestedFrom >= range.end) return false;
    const latest = [w.latestAt, w.requestedTo].filter((d): d is Date => !!d);
    if (latest.some((d) => d <= range.start)) return false;
    if (w.plannedDate && (w.plannedDate < week || w.plannedDate > last)) return false;
    return true;
  });
  const jobs = inWeek.map((r) => toJob(r, now));

  // Booked work of the week that has not started and is not fixed may move to even the load out.
  const candidateIds = existing
    .filter((b) => !b.fixed && b.startAt.getTime() > now.getTime() && b.startAt >= range.start && b.endAt <= range.end)
    .map((b) => b.id);
  const movableRows = candidateIds.length
    ? await db
        .select({
          bookingId: bookings.id,
          version: bookings.version,
          wo: workOrders,
          lat: sites.lat,
          lon: sites.lon,
          siteName: sites.name,
          enRouteAt: visits.enRouteAt,
          onSiteAt: visits.onSiteAt,
          closedAt: visits.closedAt,
        })
        .from(bookings)
        .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
        .innerJoin(sites, eq(sites.id, workOrders.siteId))
        .leftJoin(visits, eq(visits.bookingId, bookings.id))
        .where(and(inArray(bookings.id, candidateIds), eq(workOrders.state, 'booked')))
    : [];
  const existingById = new Map(existing.map((b) => [b.id, b]));
  const movableById = new Map(movableRows.filter((r) => !r.enRouteAt && !r.onSiteAt && !r.closedAt).map((r) => [r.bookingId, r]));
  const movable = [...movableById.values()].map((r) => ({ booking: toCalcBooking(existingById.get(r.bookingId)!), job: toJob(r, now) }));
  const result = evenOut({ jobs, techs, bookings: calcBookings, movable, week, options: { now } });

  const before = new Map<string, number>();
  for (const day of eachDay(week, last)) {
    for (const l of technicianLoad(calcBookings, techs, day)) before.set(l.techId, (before.get(l.techId) ?? 0) + l.bookedMinutes);
  }
  const after = new Map<string, { booked: number; capacity: number }>();
  for (const l of result.load) {
    const a = after.get(l.techId) ?? { booked: 0, capacity: 0 };
    a.booked += l.bookedMinutes;
    a.capacity += l.capacityMinutes;
    after.set(l.techId, a);
  }
  const byId = new Map(inWeek.map((r) => [r.wo.id, r]));
  const stopsBefore = existing.map((b) => ({ techId: b.techId, start: b.startAt, lat: b.lat, lon: b.lon }));
  const stopsAfter = [
    ...stopsBefore,
    ...result.proposals.map((p) => {
      const r = byId.get(p.jobId)!;
      return { techId: p.techId, start: new Date(p.start), lat: r.lat, lon: r.lon };
    }),
  ];
  return {
    week: { from: week, to: last },
    proposals: result.proposals.map((p) => {
      const r = byId.get(p.jobId)!;
      return {
        workOrderId: p.jobId,
        techId: p.techId,
        startAt: p.start,
        endAt: p.end,
        number: r.wo.number,
        siteName: r.siteName,
        travelMinutes: Math.round(p.travelMinutes),
        reason: `${names.get(p.techId) ?? 'Technician'} on ${localTime(new Date(p.start), branch.timeZone, 'EEE d MMM')} at ${localTime(new Date(p.start), branch.timeZone)}, ${Math.round(p.travelMinutes)} min drive from the previous stop`,
      };
    }),
    leftUnplaced: result.unplaced.map((u) => ({ workOrderId: u.jobId, number: byId.get(u.jobId)?.wo.number ?? 0, reason: u.reason })),
    load: techRows.map((t) => ({
      techId: t.id,
      capacityMinutes: after.get(t.id)?.capacity ?? 0,
      beforeMinutes: before.get(t.id) ?? 0,
      afterMinutes: after.get(t.id)?.booked ?? before.get(t.id) ?? 0,
    })),
    driveMinutes: { before: weekDriveMinutes(techs, stopsBefore), after: weekDriveMinutes(techs, stopsAfter) },
    moves: result.moves
      .map((m) => {
        const r = movableById.get(m.bookingId)!;
        const dueAt = ruleJob(r.wo).dueAt;
        return {
          bookingId: m.bookingId,
          version: r.version,
          workOrderId: m.jobId,
          number: r.wo.number,
          siteName: r.siteName,
          priority: r.wo.priority,
          dueAt: dueAt ? new Date(dueAt).toISOString() : null,
          from: { techId: m.from.techId, startAt: m.from.start, endAt: m.from.end },
          to: { techId: m.to.techId, startAt: m.to.start, endAt: m.to.end },
          travelMinutes: Math.round(m.to.travelMinutes),
        };
      })
      .sort((a, b) => (a.dueAt ?? '\uffff').localeCompare(b.dueAt ?? '\uffff') || a.number - b.number),
    spread: { before: result.spreadBefore, withoutMoves: result.spreadWithoutMoves, after: result.spread },
  };
}

/**
 * Applies the accepted moves and books the accepted proposals, all or none: the moves first (they free the
 * room the proposals may use), each through the same rules and version check as a move on the Roster, then each
 * proposal as a single booking. A refusal of any rolls the whole set back and names the one refused.
 */
export async function evenOutApply(db: Db, user: SessionUser, input: z.output<typeof evenOutApplySchema>, now: Date): Promise<Booking[]> {
  const ids = input.proposals.map((p) => p.workOrderId);
  if (new Set(ids).size !== ids.length) throw badRequest('A work order appears twice in the proposals.');
  const moved = input.moves.map((m) => m.bookingId);
  if (new Set(moved).size !== moved.length) throw badRequest('A booking appears twice in the moves.');
  const numbers = new Map(
    ids.length
      ? (await db.select({ id: workOrders.id, number: workOrders.number }).from(workOrders).where(inArray(workOrders.id, ids))).map((r) => [
          r.id,
          r.number,
        ])
      : [],
  );
  const refused = (e: unknown, label: string, details: Record<string, unknown>) => {
    if (e instanceof HttpError && e.status === 409) {
      return conflict(e.code, `${label}: ${e.message} Nothing was changed; preview again.`, {
        ...details,
        ...(typeof e.details === 'object' && e.details ? e.details : {}),
      });
    }
    return e;
  };
  return db.transaction(async (tx) => {
    await actAs(tx, user.id);
    const out: Booking[] = [];
    for (const m of input.moves) {
      try {
        out.push(
          await updateBooking(tx, user, m.bookingId, { version: m.version, techId: m.techId, startAt: m.startAt, endAt: m.endAt }, now),
        );
      } catch (e) {
        const b = await getBookingLabel(tx, m.bookingId);
        throw refused(e, `Moving ${b}`, { bookingId: m.bookingId });
      }
    }
    for (const p of input.proposals) {
      try {
        out.push(await createBooking(tx, user, p, now));
      } catch (e) {
        throw refused(e, workOrderLabel(numbers.get(p.workOrderId)), { workOrderId: p.workOrderId });
      }
    }
    return out;
  });
}

/** "WO-10234" of a booking's work order, for a refusal's message. */
async function getBookingLabel(tx: Tx, bookingId: string): Promise<string> {
  const [r] = await tx
    .select({ number: workOrders.number })
    .from(bookings)
    .innerJoin(workOrders, eq(workOrders.id, bookings.workOrderId))
    .where(eq(bookings.id, bookingId))
    .limit(1);
  return r ? workOrderLabel(r.number) : 'the booking';
}

/** Active sites of the branch with their active units (two queries, no N+1). */
export async function listSites(db: Db, branch: BranchRow): Promise<RosterSite[]> {
  const siteRows = await db
    .select({ id: sites.id, name: sites.name, address: sites.address })
    .from(sites)
    .where(and(eq(sites.branchId, branch.id), isNull(sites.archivedAt)))
    .orderBy(asc(sites.name));
  const unitRows = siteRows.length
    ? await db
        .select({
          id: units.id,
          siteId: units.siteId,
          tag: units.tag,
          make: units.make,
          model: units.model,
          refrigerant: units.refrigerant,
        })
        .from(units)
        .where(
          and(
            inArray(
              units.siteId,
              siteRows.map((s) => s.id),
            ),
            isNull(units.archivedAt),
          ),
        )
        .orderBy(asc(units.tag))
    : [];
  return siteRows.map((s) => ({
    ...s,
    units: unitRows.filter((u) => u.siteId === s.id).map(({ siteId: _siteId, ...u }) => u),
  }));
}
