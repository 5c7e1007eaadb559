/** Evening out a week's work across technicians: placing unplaced jobs and moving booked ones. */
import { TZDate } from '@date-fns/tz';
import { technicianBreaches } from './booking-rules';
import { addDays, dayNumber, instantMs, type Instant, type IsoDate } from './dates';
import { driveMinutes, type LatLon } from './geo';
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
  /** Existing bookings; they stay where they are unless listed in `movable`. */
  bookings: readonly Booking[];
  /**
   * Booked jobs evenOut may move to another technician, day or time when that evens out the load.
   * Each carries its job so the hard rules can be checked where it would go. Default none: then
   * the result is what evenOut gave before moves existed (`moves` empty).
   */
  movable?: readonly MovableBooking[];
  /** First local day of the 7-day period, 'YYYY-MM-DD'. */
  week: IsoDate;
  options?: EvenOutOptions;
}

/**
 * A booking evenOut may move. It stays where it is when it is fixed or started (`booking.fixed`,
 * `booking.started`, or it starts at or before `options.now`), when its technician is not in
 * `techs`, when it does not lie within one local day of the period, or on a day off.
 */
export interface MovableBooking {
  /** The booking as it stands. One with the same id in `bookings` is the same booking (same technician, start and end). */
  booking: Booking;
  /**
   * The booked job: skill, EPA 608 certification, `day` and time limits (`earliest`; `latest` or
   * `window.to` is when it is due — a move never ends after it) hold where it goes; its location
   * gives the drive times. It keeps the booking's length (end − start), not `durationMinutes`.
   */
  job: SchedulingJob;
}

export interface EvenOutOptions extends SlotOptions {
  /** Days in the period; default 7. */
  days?: number;
  /** Weight of travel against load spread: one working day (480 min) of detour counts as much as a full day's load ratio² change. Default 1. */
  travelWeight?: number;
  /** Improvement passes after the first placement; default 2. */
  passes?: number;
  /** Most moves of booked jobs to propose; default 20, 0 proposes none. */
  maxMoves?: number;
  /** Least drop in the sum of squared load ratios for a move to be proposed; default 0 (any strict drop). */
  minMoveGain?: number;
  /** Now: a movable booking starting at or before it counts as started and stays; no move starts before it. */
  now?: Instant;
}

/** A booked job moved to even out the load. */
export interface ProposedMove {
  bookingId: string;
  jobId: string;
  from: { techId: string; day: IsoDate; start: string; end: string };
  /** Where it goes; travelMinutes is the drive from the previous stop there, with every proposal and move applied. */
  to: { techId: string; day: IsoDate; start: string; end: string; travelMinutes: number };
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
  /** Booked jobs to move (movable bookings only, each at most once; at most options.maxMoves), in the order of `movable`. */
  moves: ProposedMove[];
  /** Jobs that fit nowhere, with the reason. */
  unplaced: { jobId: string; reason: string }[];
  /** Load per tech and day after the proposals and moves (ratio null on days off). */
  load: { techId: string; day: IsoDate; bookedMinutes: number; capacityMinutes: number; ratio: number | null }[];
  /** Highest minus lowest load ratio over the tech-days with capacity, after the proposals and moves. */
  spread: number;
  /** The same spread for the bookings as they stand (no proposals, no moves). */
  spreadBefore: number;
  /** The same spread after the proposals alone (equals `spread` when nothing moves). */
  spreadWithoutMoves: number;
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

type BusyItem = { start: number; end: number; loc: LatLon | null; jobId?: string; bookingId?: string };

/** Highest minus lowest load ratio over the cells with capacity. */
function spreadOf(cells: readonly Cell[]): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (const c of cells) {
    if (c.capacity <= 0) continue;
    const r = c.booked / c.capacity;
    if (r < lo) lo = r;
    if (r > hi) hi = r;
  }
  return hi >= lo ? hi - lo : 0;
}

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
 * (skill, EPA 608, working hours, a start by the job's due time). Greedy placement (highest priority,
 * fewest options and longest jobs first), then improvement passes that move a proposal when that
 * lowers the objective.
 *
 * Then booked jobs listed in `movable` (not fixed, not started) may move: steepest descent, one move
 * at a time, always the single move (booked job → technician, day and earliest free slot) that
 * lowers the objective most, taken only when it strictly lowers the sum of squared load ratios
 * (travel may not eat the gain); a moved job never goes back to its own technician and day, and
 * at most `maxMoves` moves. A move keeps every hard rule: skill, EPA 608, capacity of the local day,
 * inside working hours, no overlap with anything (bookings, proposals, other moves) including drive
 * time, the job's day and time limits (never ending after it is due). When something moved, jobs
 * still unplaced get another try. Other bookings never move. Deterministic.
 */
export function evenOut(input: EvenOutInput): EvenOutResult {
  const opts = input.options ?? {};
  const nDays = opts.days ?? 7;
  const travelWeight = opts.travelWeight ?? 1;
  const passes = opts.passes ?? 2;
  const maxMoves = opts.maxMoves ?? 20;
  const minMoveGain = opts.minMoveGain ?? 0;
  const nowMs = opts.now === undefined ? -Infinity : instantMs(opts.now, 'options.now');
  if (!(Number.isInteger(maxMoves) && maxMoves >= 0)) throw new RangeError('options.maxMoves must be a whole number, 0 or more');
  if (!(Number.isFinite(minMoveGain) && minMoveGain >= 0)) throw new RangeError('options.minMoveGain must be a number, 0 or more');
  dayNumber(input.week, 'week');
  const days = Array.from({ length: nDays }, (_, i) => addDays(input.week, i));
  const movable = input.movable ?? [];
  const allBookings = movableBookings(input.bookings, movable, input.jobs);

  // Cells: one per tech and day, with capacity and booked minutes.
  const cells: Cell[] = [];
  const busy = new Map<string, BusyItem[]>();
  for (const tech of input.techs) {
    const iv = intervalsFor(allBookings, tech.id);
    busy.set(tech.id, iv);
    for (const day of days) {
      const win = workingWindow(tech, day);
      const bounds = localDayBounds(day, tech.timeZone);
      let booked = 0;
      for (const b of iv) booked += Math.max(0, Math.min(b.end, bounds.end) - Math.max(b.start, bounds.start)) / MINUTE;
      cells.push({
        tech,
        day,
        capacity: win ? (win.end - win.start) / MINUTE : 0,
        booked,
        dayStart: bounds.start,
        dayEnd: bounds.end,
        win,
      });
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
      const cost =
        ratio2(c.booked + job.durationMinutes, c.capacity) - ratio2(c.booked, c.capacity) + (travelWeight * slot.detourMinutes) / 480;
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
    const list = busy.get(p.cell.tech.id) as BusyItem[];
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
    if (!(j.durationMinutes > 0) || !Number.isFinite(j.durationMinutes))
      throw new RangeError(`job ${j.id}: durationMinutes must be a finite number greater than 0`);
  }
  const spreadBefore = spreadOf(cells);
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
    const p: Placed = {
      job,
      cell: best.cell,
      start: best.slot.start,
      end: best.slot.end,
      travel: best.slot.travelMinutes,
      detour: best.slot.detourMinutes,
    };
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
        ? ratio2(p.cell.booked + job.durationMinutes, p.cell.capacity) -
          ratio2(p.cell.booked, p.cell.capacity) +
          (travelWeight * keepSlot.detourMinutes) / 480
        : Infinity;
      const best = place(job, cands.get(job.id) ?? []);
      let next: Placed = p;
      if (best && best.cost < keepCost - 1e-9) {
        next = {
          job,
          cell: best.cell,
          start: best.slot.start,
          end: best.slot.end,
          travel: best.slot.travelMinutes,
          detour: best.slot.detourMinutes,
        };
        moved = true;
      } else if (keepSlot) {
        next = { ...p, start: keepSlot.start, end: keepSlot.end, travel: keepSlot.travelMinutes, detour: keepSlot.detourMinutes };
      }
      addBusy(next);
      placed.set(job.id, next);
    }
    if (!moved) break;
  }

  const spreadWithoutMoves = spreadOf(cells);

  // Moves of booked jobs (steepest descent on the same objective; see the doc comment).
  const movers: Mover[] = [];
  const cellOf = new Map(cells.map((c) => [`${c.tech.id}|${c.day}`, c]));
  for (const { booking, job } of movable) {
    if (booking.fixed || booking.started) continue;
    const start = instantMs(booking.start, `booking ${booking.id} start`);
    const end = instantMs(booking.end, `booking ${booking.id} end`);
    if (start <= nowMs || end <= start) continue;
    const tech = input.techs.find((t) => t.id === booking.techId);
    if (!tech) continue;
    const cell = cellOf.get(`${tech.id}|${zonedDate(new Date(start), tech.timeZone)}`);
    if (!cell || cell.capacity <= 0 || end > cell.dayEnd) continue;
    const item = (busy.get(tech.id) ?? []).find((b) => b.bookingId === booking.id);
    if (!item) continue;
    const len = (end - start) / MINUTE;
    const from = job.earliest ?? job.window?.from;
    const earliest = Math.max(from === undefined ? -Infinity : instantMs(from, `job ${job.id} earliest`), nowMs);
    const moveJob: SchedulingJob = { ...job, durationMinutes: len, ...(Number.isFinite(earliest) ? { earliest: new Date(earliest) } : {}) };
    movers.push({ bookingId: booking.id, job: moveJob, len, home: cell, homeItem: { ...item }, cell, item, cands: candidatesFor(moveJob) });
  }
  /** Drive minutes the item adds to its day where it stands (to it, on to the next stop, minus the direct leg), as findSlot counts them. */
  const detourAt = (cell: Cell, item: BusyItem): number => {
    const win = cell.win as { start: number; end: number };
    let prevLoc: LatLon = cell.tech.start;
    let next: BusyItem | undefined;
    let seenItem = false;
    for (const b of busy.get(cell.tech.id) ?? []) {
      if (!(b.end > win.start && b.start < win.end)) continue;
      if (seenItem) {
        next = b;
        break;
      }
      if (b === item) seenItem = true;
      else if (b.loc) prevLoc = b.loc;
    }
    if (!seenItem || !item.loc) return 0;
    const onward = next?.loc ? driveMinutes(item.loc, next.loc, opts) - driveMinutes(prevLoc, next.loc, opts) : 0;
    return driveMinutes(prevLoc, item.loc, opts) + onward;
  };
  // Branch and bound per step: the load change is cheap, a slot is not. Pairs are tried in order of
  // the least cost they could have (load change minus the detour the job leaves behind), and the
  // search stops when that cannot beat the best found. Slots and detours are kept until their
  // technician-day changes.
  const version = new Map<Cell, number>(cells.map((c) => [c, 0]));
  const cellIndex = new Map<Cell, number>(cells.map((c, i) => [c, i]));
  const slotMemo = new Map<number, { version: number; slot: ReturnType<typeof findSlot> }>();
  const savedMemo = new Map<Mover, { cell: Cell; version: number; saved: number }>();
  let steps = 0;
  while (steps < maxMoves) {
    let best: { m: Mover; cell: Cell; slot: NonNullable<ReturnType<typeof findSlot>>; cost: number } | null = null;
    const pairs: { mi: number; c: Cell; dLoad: number; saved: number; bound: number; seq: number }[] = [];
    movers.forEach((m, mi) => {
      const f = m.cell;
      const dFrom = ratio2(f.booked - m.len, f.capacity) - ratio2(f.booked, f.capacity);
      let saved: number | null = null;
      for (const c of m.cands) {
        if (c === f || c === m.home) continue;
        if (c.booked + m.len > c.capacity + 1e-9) continue;
        const dLoad = dFrom + ratio2(c.booked + m.len, c.capacity) - ratio2(c.booked, c.capacity);
        if (!(dLoad < -Math.max(minMoveGain, 1e-9))) continue;
        if (saved === null) {
          const memo = savedMemo.get(m);
          if (memo && memo.cell === f && memo.version === version.get(f)) saved = memo.saved;
          else {
            saved = (travelWeight * detourAt(f, m.item)) / 480;
            savedMemo.set(m, { cell: f, version: version.get(f) as number, saved });
          }
        }
        // A detour is never negative (drive times are distances), so dLoad − saved bounds the cost.
        pairs.push({ mi, c, dLoad, saved, bound: dLoad - saved, seq: pairs.length });
      }
    });
    pairs.sort((a, b) => a.bound - b.bound || a.seq - b.seq);
    for (const pr of pairs) {
      if (best && pr.bound >= best.cost) break;
      const m = movers[pr.mi] as Mover;
      const key = pr.mi * cells.length + (cellIndex.get(pr.c) as number);
      const v = version.get(pr.c) as number;
      let memo = slotMemo.get(key);
      if (!memo || memo.version !== v) {
        memo = { version: v, slot: findSlot(pr.c.tech, pr.c.day, m.job, busy.get(pr.c.tech.id) ?? [], opts, pr.c.win) };
        slotMemo.set(key, memo);
      }
      const slot = memo.slot;
      if (!slot) continue;
      const cost = pr.dLoad + (travelWeight * slot.detourMinutes) / 480 - pr.saved;
      if (cost < -1e-12 && (!best || cost < best.cost - 1e-12)) best = { m, cell: pr.c, slot, cost };
    }
    if (!best) break;
    const { m, cell, slot } = best;
    const from = m.cell;
    const fromList = busy.get(m.cell.tech.id) as BusyItem[];
    fromList.splice(fromList.indexOf(m.item), 1);
    m.cell.booked -= m.len;
    m.item = { start: slot.start, end: slot.end, loc: { lat: m.job.lat, lon: m.job.lon }, bookingId: m.bookingId };
    m.cell = cell;
    const toList = busy.get(cell.tech.id) as BusyItem[];
    let k = toList.length;
    while (k > 0 && (toList[k - 1] as BusyItem).start > m.item.start) k--;
    toList.splice(k, 0, m.item);
    cell.booked += m.len;
    version.set(cell, (version.get(cell) as number) + 1);
    version.set(from, (version.get(from) as number) + 1);
    steps++;
  }
  // Moves can free room: jobs still unplaced get another try (only then; without moves nothing changes).
  if (steps > 0) {
    for (const job of order) {
      const k = unplaced.findIndex((u) => u.jobId === job.id);
      if (k < 0 || (cands.get(job.id) ?? []).length === 0) continue;
      const best = place(job, cands.get(job.id) ?? []);
      if (!best) continue;
      const p: Placed = {
        job,
        cell: best.cell,
        start: best.slot.start,
        end: best.slot.end,
        travel: best.slot.travelMinutes,
        detour: best.slot.detourMinutes,
      };
      addBusy(p);
      placed.set(job.id, p);
      unplaced.splice(k, 1);
    }
  }
  const moves: ProposedMove[] = [];
  for (const m of movers) {
    if (m.cell === m.home) continue;
    const tz = m.cell.tech.timeZone;
    const travel = travelFromPrevious(m.cell, m.item, busy.get(m.cell.tech.id) ?? [], opts);
    moves.push({
      bookingId: m.bookingId,
      jobId: m.job.id,
      from: {
        techId: m.home.tech.id,
        day: m.home.day,
        start: new Date(m.homeItem.start).toISOString(),
        end: new Date(m.homeItem.end).toISOString(),
      },
      to: {
        techId: m.cell.tech.id,
        day: zonedDate(new Date(m.item.start), tz),
        start: new Date(m.item.start).toISOString(),
        end: new Date(m.item.end).toISOString(),
        travelMinutes: travel,
      },
    });
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
  return {
    proposals,
    moves,
    unplaced,
    load: cells.map((c) => ({
      techId: c.tech.id,
      day: c.day,
      bookedMinutes: c.booked,
      capacityMinutes: c.capacity,
      ratio: c.capacity > 0 ? c.booked / c.capacity : null,
    })),
    spread: spreadOf(cells),
    spreadBefore,
    spreadWithoutMoves,
    totalTravelMinutes: totalTravel,
  };
}

interface Mover {
  bookingId: string;
  /** The booked job with the booking's length and no start before now. */
  job: SchedulingJob;
  len: number;
  /** Where the booking stands in the input. */
  home: Cell;
  homeItem: BusyItem;
  /** Where it stands now in the search. */
  cell: Cell;
  item: BusyItem;
  cands: Cell[];
}

/** Drive minutes to the item from the stop before it on its working day (or the technician's start), as findSlot counts them. */
function travelFromPrevious(cell: Cell, item: BusyItem, list: readonly BusyItem[], opts: SlotOptions): number {
  const win = cell.win as { start: number; end: number };
  let prevLoc: LatLon = cell.tech.start;
  for (const b of list) {
    if (b === item) break;
    if (b.end > win.start && b.start < win.end && b.loc) prevLoc = b.loc;
  }
  return item.loc ? driveMinutes(prevLoc, item.loc, opts) : 0;
}

/** The bookings with the movable ones added (once), after checking the movable list. */
function movableBookings(
  bookings: readonly Booking[],
  movable: readonly MovableBooking[],
  jobs: readonly SchedulingJob[],
): readonly Booking[] {
  if (movable.length === 0) return bookings;
  const byId = new Map(bookings.map((b) => [b.id, b]));
  const unplacedIds = new Set(jobs.map((j) => j.id));
  const seen = new Set<string>();
  const extra: Booking[] = [];
  for (const { booking: b, job } of movable) {
    if (seen.has(b.id)) throw new RangeError(`booking ${JSON.stringify(b.id)} is movable twice`);
    seen.add(b.id);
    if (unplacedIds.has(job.id)) throw new RangeError(`job ${JSON.stringify(job.id)} is both unplaced and booked`);
    if (b.jobId !== undefined && b.jobId !== job.id)
      throw new RangeError(`booking ${JSON.stringify(b.id)} is for job ${JSON.stringify(b.jobId)}, not ${JSON.stringify(job.id)}`);
    const same = byId.get(b.id);
    if (!same) {
      extra.push(b);
      continue;
    }
    const t = (v: Instant, what: string) => instantMs(v, `booking ${b.id} ${what}`);
    if (same.techId !== b.techId || t(same.start, 'start') !== t(b.start, 'start') || t(same.end, 'end') !== t(b.end, 'end')) {
      throw new RangeError(`booking ${JSON.stringify(b.id)} differs between bookings and movable`);
    }
  }
  return extra.length ? [...bookings, ...extra] : bookings;
}
