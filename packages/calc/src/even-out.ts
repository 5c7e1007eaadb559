/** Evening out a week's unplaced work across technicians. */
import { TZDate } from '@date-fns/tz';
import { technicianBreaches } from './booking-rules';
import { addDays, dayNumber, instantMs, type IsoDate } from './dates';
import {
  findSlot,
  intervalsFor,
  localDayBounds,
  workingWindow,
  zonedDate,
  type Booking,
  type SchedulingJob,
  type SlotOptions,
  type Technician,
} from './schedule';

export interface EvenOutInput {
  /** Jobs to place (unplaced work). */
  jobs: readonly SchedulingJob[];
  techs: readonly Technician[];
  /** Existing bookings; none is ever moved (fixed or not). */
  bookings: readonly Booking[];
  /** First local day of the 7-day period, 'YYYY-MM-DD'. */
  week: IsoDate;
  options?: EvenOutOptions;
}

export interface EvenOutOptions extends SlotOptions {
  /** Days in the period; default 7. */
  days?: number;
  /** Weight of travel against load spread: one working day (480 min) of detour counts as much as a full day's load ratio² change. Default 1. */
  travelWeight?: number;
  /** Improvement passes after the first placement; default 2. */
  passes?: number;
}

export interface ProposedBooking {
  jobId: string;
  techId: string;
  /** Local day in the tech's zone. */
  day: IsoDate;
  start: string;
  end: string;
  /** Drive minutes from the previous stop. */
  travelMinutes: number;
}

export interface EvenOutResult {
  proposals: ProposedBooking[];
  /** Jobs that fit nowhere, with the reason. */
  unplaced: { jobId: string; reason: string }[];
  /** Load per tech and day after the proposals (ratio null on days off). */
  load: { techId: string; day: IsoDate; bookedMinutes: number; capacityMinutes: number; ratio: number | null }[];
  /** Highest minus lowest load ratio over the tech-days with capacity. */
  spread: number;
  /** Sum of the proposals' detour minutes. */
  totalTravelMinutes: number;
}

interface Cell {
  tech: Technician;
  day: IsoDate;
  capacity: number;
  booked: number;
  dayStart: number;
  dayEnd: number;
  win: { start: number; end: number } | null;
}

const MINUTE = 60_000;

/** "2027-03-12 17:00" in a zone. */
function localWhen(ms: number, timeZone: string): string {
  const z = new TZDate(ms, timeZone);
  return `${zonedDate(new Date(ms), timeZone)} ${String(z.getHours()).padStart(2, '0')}:${String(z.getMinutes()).padStart(2, '0')}`;
}

/** Why no technician may take a job in the period, naming the rule (or rules) no one meets. */
function whyNoTechnician(job: SchedulingJob, techs: readonly Technician[]): string {
  const breaches = techs.map((t) => technicianBreaches(t, job));
  const nobody = (rule: string) => breaches.every((bs) => bs.some((b) => b.rule === rule));
  const cert = job.requiredCertification === 'universal' ? 'EPA 608 Universal' : `EPA 608 Type ${job.requiredCertification} or Universal`;
  if (job.requiredSkill !== undefined && nobody('skill')) return `No technician has the skill "${job.requiredSkill}"`;
  if (job.requiredCertification !== undefined && nobody('certification')) return `No technician holds ${cert}`;
  if (breaches.every((bs) => bs.length > 0)) return `No technician has both the skill "${job.requiredSkill}" and ${cert}`;
  return 'No technician who may do this work (skill, EPA 608) works in the period';
}

/**
 * Proposes bookings for unplaced jobs over a week so that every technician stays within capacity
 * (booked minutes on a local day never exceed working minutes, and every proposal sits inside
 * working hours without overlapping anything), while keeping load even (minimising the sum of
 * squared load ratios) and travel low (insertion detour). The booking rules hold as in rankTechnicians
 * (skill, EPA 608, working hours, a start by the job's due time). Existing bookings are never moved. Greedy placement (highest priority, fewest options
 * and longest jobs first), then improvement passes that move a proposal when that lowers the
 * objective. Deterministic.
 */
export function evenOut(input: EvenOutInput): EvenOutResult {
  const opts = input.options ?? {};
  const nDays = opts.days ?? 7;
  const travelWeight = opts.travelWeight ?? 1;
  const passes = opts.passes ?? 2;
  dayNumber(input.week, 'week');
  const days = Array.from({ length: nDays }, (_, i) => addDays(input.week, i));

  // Cells: one per tech and day, with capacity and booked minutes.
  const cells: Cell[] = [];
  const busy = new Map<string, { start: number; end: number; loc: { lat: number; lon: number } | null; jobId?: string }[]>();
  for (const tech of input.techs) {
    const iv = intervalsFor(input.bookings, tech.id);
    busy.set(tech.id, iv);
    for (const day of days) {
      const win = workingWindow(tech, day);
      const bounds = localDayBounds(day, tech.timeZone);
      let booked = 0;
      for (const b of iv) booked += Math.max(0, Math.min(b.end, bounds.end) - Math.max(b.start, bounds.start)) / MINUTE;
      cells.push({ tech, day, capacity: win ? (win.end - win.start) / MINUTE : 0, booked, dayStart: bounds.start, dayEnd: bounds.end, win });
    }
  }

  const candidatesFor = (job: SchedulingJob): Cell[] =>
    cells.filter((c) => {
      if (c.capacity <= 0) return false;
      if (technicianBreaches(c.tech, job).length > 0) return false;
      if (job.day !== undefined && job.day !== c.day) return false;
      return true;
    });

  const ratio2 = (booked: number, cap: number) => (booked / cap) * (booked / cap);
  const place = (job: SchedulingJob, cands: Cell[]) => {
    let best: { cell: Cell; slot: NonNullable<ReturnType<typeof findSlot>>; cost: number } | null = null;
    for (const c of cands) {
      if (c.booked + job.durationMinutes > c.capacity + 1e-9) continue;
      const slot = findSlot(c.tech, c.day, job, busy.get(c.tech.id) ?? [], opts, c.win);
      if (!slot) continue;
      const cost = ratio2(c.booked + job.durationMinutes, c.capacity) - ratio2(c.booked, c.capacity) + (travelWeight * slot.detourMinutes) / 480;
      if (!best || cost < best.cost - 1e-12) best = { cell: c, slot, cost };
    }
    return best;
  };

  interface Placed {
    job: SchedulingJob;
    cell: Cell;
    start: number;
    end: number;
    travel: number;
    detour: number;
  }
  const placed = new Map<string, Placed>();
  const addBusy = (p: Placed) => {
    const list = busy.get(p.cell.tech.id) as { start: number; end: number; loc: { lat: number; lon: number } | null; jobId?: string }[];
    const item = { start: p.start, end: p.end, loc: { lat: p.job.lat, lon: p.job.lon }, jobId: p.job.id };
    let k = list.length;
    while (k > 0 && (list[k - 1] as { start: number }).start > item.start) k--;
    list.splice(k, 0, item);
    p.cell.booked += p.job.durationMinutes;
  };
  const removeBusy = (p: Placed) => {
    const list = busy.get(p.cell.tech.id) as { jobId?: string }[];
    const k = list.findIndex((b) => b.jobId === p.job.id);
    if (k >= 0) list.splice(k, 1);
    p.cell.booked -= p.job.durationMinutes;
  };

  const seen = new Set<string>();
  for (const j of input.jobs) {
    if (seen.has(j.id)) throw new RangeError(`duplicate job id ${JSON.stringify(j.id)}`);
    seen.add(j.id);
    if (!(j.durationMinutes > 0) || !Number.isFinite(j.durationMinutes)) throw new RangeError(`job ${j.id}: durationMinutes must be a finite number greater than 0`);
  }
  const cands = new Map(input.jobs.map((j) => [j.id, candidatesFor(j)]));
  const order = [...input.jobs].sort(
    (a, b) =>
      (b.priority ?? 0) - (a.priority ?? 0) ||
      (cands.get(a.id)?.length ?? 0) - (cands.get(b.id)?.length ?? 0) ||
      b.durationMinutes - a.durationMinutes ||
      a.id.localeCompare(b.id),
  );
  const unplaced: { jobId: string; reason: string }[] = [];
  for (const job of order) {
    const cs = cands.get(job.id) ?? [];
    if (cs.length === 0) {
      unplaced.push({ jobId: job.id, reason: whyNoTechnician(job, input.techs) });
      continue;
    }
    const best = place(job, cs);
    if (!best) {
      const due = job.dueAt === undefined || job.dueAt === null ? null : instantMs(job.dueAt, `job ${job.id} due time`);
      const dueBlocks = due !== null && place({ ...job, dueAt: null }, cs) !== null;
      unplaced.push({
        jobId: job.id,
        reason: dueBlocks
          ? `Due by ${localWhen(due!, cs[0]!.tech.timeZone)}: no free slot within working hours and capacity starts by then`
          : 'No free slot within working hours and capacity in the period',
      });
      continue;
    }
    const p: Placed = { job, cell: best.cell, start: best.slot.start, end: best.slot.end, travel: best.slot.travelMinutes, detour: best.slot.detourMinutes };
    addBusy(p);
    placed.set(job.id, p);
  }

  // Improvement: take each proposal out and put it back where it costs least.
  for (let pass = 0; pass < passes; pass++) {
    let moved = false;
    for (const job of order) {
      const p = placed.get(job.id);
      if (!p) continue;
      removeBusy(p);
      const keepSlot = findSlot(p.cell.tech, p.cell.day, job, busy.get(p.cell.tech.id) ?? [], opts, p.cell.win);
      const keepCost = keepSlot
        ? ratio2(p.cell.booked + job.durationMinutes, p.cell.capacity) - ratio2(p.cell.booked, p.cell.capacity) + (travelWeight * keepSlot.detourMinutes) / 480
        : Infinity;
      const best = place(job, cands.get(job.id) ?? []);
      let next: Placed = p;
      if (best && best.cost < keepCost - 1e-9) {
        next = { job, cell: best.cell, start: best.slot.start, end: best.slot.end, travel: best.slot.travelMinutes, detour: best.slot.detourMinutes };
        moved = true;
      } else if (keepSlot) {
        next = { ...p, start: keepSlot.start, end: keepSlot.end, travel: keepSlot.travelMinutes, detour: keepSlot.detourMinutes };
      }
      addBusy(next);
      placed.set(job.id, next);
    }
    if (!moved) break;
  }

  const proposals: ProposedBooking[] = [];
  let totalTravel = 0;
  for (const job of input.jobs) {
    const p = placed.get(job.id);
    if (!p) continue;
    totalTravel += p.detour;
    proposals.push({
      jobId: job.id,
      techId: p.cell.tech.id,
      day: zonedDate(new Date(p.start), p.cell.tech.timeZone),
      start: new Date(p.start).toISOString(),
      end: new Date(p.end).toISOString(),
      travelMinutes: p.travel,
    });
  }
  const ratios = cells.filter((c) => c.capacity > 0).map((c) => c.booked / c.capacity);
  return {
    proposals,
    unplaced,
    load: cells.map((c) => ({ techId: c.tech.id, day: c.day, bookedMinutes: c.booked, capacityMinutes: c.capacity, ratio: c.capacity > 0 ? c.booked / c.capacity : null })),
    spread: ratios.length ? Math.max(...ratios) - Math.min(...ratios) : 0,
    totalTravelMinutes: totalTravel,
  };
}
