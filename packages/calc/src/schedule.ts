/**
 * Technician calendars: daily load against capacity, free slots, and ranking candidate technicians
 * for a job. Working hours are local to each technician's IANA time zone (via @date-fns/tz TZDate),
 * so days that span a daylight-saving change are handled.
 */
import { TZDate } from '@date-fns/tz';
import { technicianBreaches, type BookingRule } from './booking-rules';
import { type Epa608Level, type Epa608Requirement } from './certification';
import { addDays, dayNumber, instantMs, type Instant, type IsoDate } from './dates';
import { driveMinutes, type DriveOptions, type LatLon } from './geo';

export type WeekdayKey = 'sun' | 'mon' | 'tue' | 'wed' | 'thu' | 'fri' | 'sat';
export const weekdayKeys: readonly WeekdayKey[] = ['sun', 'mon', 'tue', 'wed', 'thu', 'fri', 'sat'];

/** Working hours for one weekday, local 'HH:MM' (end may be '24:00'). */
export interface WorkingHours {
  start: string;
  end: string;
}

/**
 * Working hours by weekday: keys 0–6 (0 = Sunday) or 'sun'…'sat'. A missing or null day is a day
 * off.
 */
export type WeeklyHours = Partial<Record<number | WeekdayKey, WorkingHours | null>>;

export interface Technician {
  id: string;
  name: string;
  skills: readonly string[];
  epa608: Epa608Level;
  workingHours: WeeklyHours;
  /** IANA time zone of the technician's branch, e.g. 'America/Chicago'. */
  timeZone: string;
  /** Where the technician's day starts (home or shop). */
  start: LatLon;
  /** The branch's holidays (`YYYY-MM-DD` in its calendar): no working window on them. */
  holidays?: readonly IsoDate[] | undefined;
}

export interface Booking {
  id: string;
  techId: string;
  /** ISO-8601 instants (or Dates). */
  start: Instant;
  end: Instant;
  lat?: number;
  lon?: number;
  /** The unit (equipment) worked on, for continuity. */
  unitId?: string;
  /** A fixed booking is never moved by evenOut. */
  fixed?: boolean;
  /** Work on it has begun; evenOut never moves it. */
  started?: boolean;
  jobId?: string;
}

export interface SchedulingJob {
  id: string;
  durationMinutes: number;
  requiredSkill?: string;
  /** EPA 608 type the refrigerant work needs ('universal' satisfies any). */
  requiredCertification?: Epa608Requirement;
  lat: number;
  lon: number;
  unitId?: string;
  /** Higher goes first in evenOut; default 0. */
  priority?: number;
  /** A specific local day 'YYYY-MM-DD' (in the technician's zone). */
  day?: IsoDate;
  /** Not before this instant. */
  earliest?: Instant;
  /** Finished by this instant (the customer's window). */
  latest?: Instant;
  /**
   * Started by this instant: the work order's due time (`workOrderDueAt`). A booking starting later
   * breaks the due-time booking rule, so no slot is proposed after it.
   */
  dueAt?: Instant | null;
  /** Same as earliest/latest, as a pair. */
  window?: { from: Instant; to: Instant };
}

export interface TechnicianLoad {
  techId: string;
  day: IsoDate;
  /** Booked minutes falling on the tech's local day (overlapping bookings add up). */
  bookedMinutes: number;
  /** Working minutes on that local day (0 on a day off). */
  capacityMinutes: number;
  /** booked ÷ capacity; null when capacity is 0. */
  ratio: number | null;
  /** booked > capacity. */
  overloaded: boolean;
}

const HM_RE = /^([01]\d|2[0-4]):([0-5]\d)$/;
const MINUTE = 60_000;

function parseHm(v: string, what: string): { h: number; m: number } {
  const r = HM_RE.exec(v);
  if (!r || (r[1] === '24' && r[2] !== '00')) throw new RangeError(`${what} must be 'HH:MM' (00:00–24:00); got ${JSON.stringify(v)}`);
  return { h: Number(r[1]), m: Number(r[2]) };
}

/**
 * Zoned instants already computed: a week's load asks for the same few (day, time, zone) triples for every
 * technician, and each costs several time-zone lookups. Pure, so remembering is safe; bounded.
 */
const zonedInstants = new Map<string, number>();
const ZONED_INSTANTS_MAX = 20_000;

/** Instant (ms) of a local wall time on a local date in a zone. */
export function zonedInstant(day: IsoDate, hm: string, timeZone: string): number {
  const key = `${day} ${hm} ${timeZone}`;
  const known = zonedInstants.get(key);
  if (known !== undefined) return known;
  const t = computeZonedInstant(day, hm, timeZone);
  if (zonedInstants.size >= ZONED_INSTANTS_MAX) zonedInstants.clear();
  zonedInstants.set(key, t);
  return t;
}

function computeZonedInstant(day: IsoDate, hm: string, timeZone: string): number {
  dayNumber(day, 'day');
  const { h, m } = parseHm(hm, 'time');
  const [y, mo, d] = (h === 24 ? addDays(day, 1) : day).split('-').map(Number) as [number, number, number];
  const t = new TZDate(y, mo - 1, d, h === 24 ? 0 : h, m, 0, timeZone).getTime();
  if (!Number.isFinite(t)) throw new RangeError(`Unknown time zone ${JSON.stringify(timeZone)}`);
  return t;
}

/** Local calendar date 'YYYY-MM-DD' of an instant in a zone. */
export function zonedDate(instant: Instant, timeZone: string): IsoDate {
  const z = new TZDate(instantMs(instant), timeZone);
  const y = z.getFullYear();
  if (!Number.isFinite(y)) throw new RangeError(`Unknown time zone ${JSON.stringify(timeZone)}`);
  return `${String(y).padStart(4, '0')}-${String(z.getMonth() + 1).padStart(2, '0')}-${String(z.getDate()).padStart(2, '0')}`;
}

/** Day of week (0 = Sunday) of a calendar date. */
export function weekdayOf(day: IsoDate): number {
  return new Date(dayNumber(day) * 86_400_000).getUTCDay();
}

/** The tech's working hours on a local day as instants, or null on a day off. */
export function workingWindow(tech: Technician, day: IsoDate): { start: number; end: number } | null {
  if (tech.holidays?.includes(day)) return null;
  const wd = weekdayOf(day);
  const wh = tech.workingHours[wd] ?? tech.workingHours[weekdayKeys[wd] as WeekdayKey] ?? null;
  if (!wh) return null;
  const start = zonedInstant(day, wh.start, tech.timeZone);
  const end = zonedInstant(day, wh.end, tech.timeZone);
  if (end <= start) return null;
  return { start, end };
}

/** The local day's bounds [00:00, next 00:00) as instants (23 or 25 h across a DST change). */
export function localDayBounds(day: IsoDate, timeZone: string): { start: number; end: number } {
  return { start: zonedInstant(day, '00:00', timeZone), end: zonedInstant(day, '24:00', timeZone) };
}

interface Interval {
  start: number;
  end: number;
  loc: LatLon | null;
  unitId?: string;
  /** The booking it comes from (evenOut finds a movable booking's interval by it). */
  bookingId?: string;
}

function bookingInterval(b: Booking): Interval {
  const start = instantMs(b.start, `booking ${b.id} start`);
  const end = instantMs(b.end, `booking ${b.id} end`);
  if (end < start) throw new RangeError(`booking ${b.id} ends before it starts`);
  const loc = typeof b.lat === 'number' && typeof b.lon === 'number' ? { lat: b.lat, lon: b.lon } : null;
  return { start, end, loc, ...(b.unitId !== undefined ? { unitId: b.unitId } : {}), bookingId: b.id };
}

function overlapMinutes(a0: number, a1: number, b0: number, b1: number): number {
  return Math.max(0, Math.min(a1, b1) - Math.max(a0, b0)) / MINUTE;
}

/**
 * Booked minutes against working capacity for every technician on a local day
 * ('YYYY-MM-DD' in each technician's zone). Bookings count by their overlap with the local day.
 */
export function technicianLoad(bookings: readonly Booking[], techs: readonly Technician[], day: IsoDate): TechnicianLoad[] {
  dayNumber(day, 'day');
  return techs.map((tech) => {
    const bounds = localDayBounds(day, tech.timeZone);
    const win = workingWindow(tech, day);
    const capacityMinutes = win ? (win.end - win.start) / MINUTE : 0;
    let bookedMinutes = 0;
    for (const b of bookings) {
      if (b.techId !== tech.id) continue;
      const iv = bookingInterval(b);
      bookedMinutes += overlapMinutes(iv.start, iv.end, bounds.start, bounds.end);
    }
    return {
      techId: tech.id,
      day,
      bookedMinutes,
      capacityMinutes,
      ratio: capacityMinutes > 0 ? bookedMinutes / capacityMinutes : null,
      overloaded: bookedMinutes > capacityMinutes,
    };
  });
}

export interface SlotOptions extends DriveOptions {
  /** Proposed starts are rounded up to this many minutes; default 5. */
  slotStepMinutes?: number;
}

export interface Slot {
  start: number;
  end: number;
  /** Drive minutes from the previous stop (or the tech's start) to the job. */
  travelMinutes: number;
  /** Extra drive minutes the job adds to the day (to it, on to the next stop, minus the direct leg). */
  detourMinutes: number;
  /** Free working minutes left on the day before placing the job. */
  freeMinutes: number;
}

/** The job's own time limits as instants: start from `earliest`, by `due`, and end by `latest`. */
function jobLimits(job: SchedulingJob): { earliest: number; latest: number; due: number } {
  const e = job.earliest ?? job.window?.from;
  const l = job.latest ?? job.window?.to;
  return {
    earliest: e === undefined ? -Infinity : instantMs(e, `job ${job.id} earliest`),
    latest: l === undefined ? Infinity : instantMs(l, `job ${job.id} latest`),
    due: job.dueAt === undefined || job.dueAt === null ? Infinity : instantMs(job.dueAt, `job ${job.id} due time`),
  };
}

/**
 * @internal Earliest slot for `job` on the tech's local `day`, inside working hours and the job's
 * limits, not overlapping `busy` (sorted by start), leaving drive time from the previous stop and
 * to the next. Null when none fits.
 */
export function findSlot(
  tech: Technician,
  day: IsoDate,
  job: SchedulingJob,
  busy: readonly Interval[],
  opts: SlotOptions = {},
  window?: { start: number; end: number } | null,
): Slot | null {
  const win = window === undefined ? workingWindow(tech, day) : window;
  if (!win) return null;
  const { earliest, latest, due } = jobLimits(job);
  const step = (opts.slotStepMinutes ?? 5) * MINUTE;
  const dur = job.durationMinutes * MINUTE;
  const here: LatLon = { lat: job.lat, lon: job.lon };
  const inDay: Interval[] = [];
  for (const b of busy) if (b.end > win.start && b.start < win.end) inDay.push(b);
  let free = (win.end - win.start) / MINUTE;
  for (const b of inDay) free -= overlapMinutes(b.start, b.end, win.start, win.end);
  let prevEnd = win.start;
  let prevLoc: LatLon = tech.start;
  for (let k = 0; k <= inDay.length; k++) {
    const next = inDay[k];
    const gapEnd = next ? next.start : win.end;
    const toJob = driveMinutes(prevLoc, here, opts);
    let s = Math.max(prevEnd + toJob * MINUTE, earliest, win.start);
    s = Math.ceil(s / step) * step;
    const e = s + dur;
    const onward = next?.loc ? driveMinutes(here, next.loc, opts) : 0;
    if (s <= due && e + onward * MINUTE <= gapEnd && e <= win.end && e <= latest) {
      const direct = next?.loc ? driveMinutes(prevLoc, next.loc, opts) : 0;
      return { start: s, end: e, travelMinutes: toJob, detourMinutes: toJob + onward - direct, freeMinutes: Math.max(0, free) };
    }
    if (next) {
      prevEnd = Math.max(prevEnd, next.end);
      if (next.loc) prevLoc = next.loc;
    }
  }
  return null;
}

/** @internal Bookings of one tech as sorted intervals. */
export function intervalsFor(bookings: readonly Booking[], techId: string): Interval[] {
  return bookings
    .filter((b) => b.techId === techId)
    .map(bookingInterval)
    .sort((a, b) => a.start - b.start);
}

export interface RankedTechnician {
  techId: string;
  name: string;
  /** False when a hard rule excludes the technician (see reasons). */
  eligible: boolean;
  /** Higher is better; null when not eligible. */
  score: number | null;
  /** Plain-language reasons, hard-rule failures first. */
  reasons: string[];
  /**
   * What keeps the technician from being proposed, in the order of `reasons`: a booking rule
   * (skill, certification, working hours, due time) or, with every rule kept, no free slot long
   * enough ('free_time') or none inside the job's requested window ('window'). Empty when eligible.
   */
  blockedBy: CandidateBlock[];
  /** Earliest free start on the day (ISO-8601), for one-click booking; null when none. */
  proposedStart: string | null;
  proposedEnd: string | null;
  /** Drive minutes from the previous stop (or the tech's start); null when no slot. */
  travelMinutes: number | null;
  /** Free working minutes on the day. */
  freeMinutes: number;
  /** Earlier bookings of this technician on the job's unit. */
  visitsToUnit: number;
}

/** Why a technician is not proposed for a job on a day. */
export type CandidateBlock = BookingRule | 'free_time' | 'window';

export interface RankOptions extends SlotOptions {
  /** The local day to book; defaults to job.day, else the local date of job.earliest. */
  day?: IsoDate;
}

function fmtMinutes(min: number): string {
  const m = Math.round(min);
  const h = Math.floor(m / 60);
  return h > 0 ? `${h} h ${m % 60} min` : `${m} min`;
}

/** A local wall time and, when it is another day than `day`, its date: "17:00", "2027-03-12 17:00". */
function whenOn(ms: number, day: IsoDate, timeZone: string): string {
  const z = new TZDate(ms, timeZone);
  const time = `${String(z.getHours()).padStart(2, '0')}:${String(z.getMinutes()).padStart(2, '0')}`;
  const d = zonedDate(new Date(ms), timeZone);
  return d === day ? time : `${d} ${time}`;
}

/**
 * Ranks technicians for a job. Hard rules exclude: the booking rules of `booking-rules.ts` (missing
 * skill, EPA 608 certification that does not cover the job's refrigerant work, not working that day,
 * no start by the job's due time) and no free slot long enough. Each excluded technician says which
 * (`blockedBy`, and the reasons): "no free slot" only when the free time really is too short. Soft
 * rules rank the rest (score = 50 + up to 20 for free time + up to 10 for an early start − up to 25
 * for travel from the previous stop (capped at 90 min) + 15 for having worked on this unit before).
 * Eligible technicians come first by score (ties: earlier start, then id), excluded ones after.
 */
export function rankTechnicians(
  job: SchedulingJob,
  techs: readonly Technician[],
  bookings: readonly Booking[],
  opts: RankOptions = {},
): RankedTechnician[] {
  if (!(job.durationMinutes > 0) || !Number.isFinite(job.durationMinutes))
    throw new RangeError('job.durationMinutes must be a finite number greater than 0');
  const limits = jobLimits(job);
  const ranked = techs.map((tech): RankedTechnician => {
    const day =
      opts.day ??
      job.day ??
      ((job.earliest ?? job.window?.from) ? zonedDate((job.earliest ?? job.window?.from) as Instant, tech.timeZone) : null);
    if (!day) throw new RangeError('rankTechnicians needs a day: opts.day, job.day or job.earliest');
    const reasons: string[] = [];
    const hard: string[] = [];
    const blockedBy: CandidateBlock[] = [];
    const block = (why: CandidateBlock, reason: string) => {
      blockedBy.push(why);
      hard.push(reason);
    };
    for (const b of technicianBreaches(tech, job)) block(b.rule, b.reason);
    if (job.requiredSkill !== undefined && !blockedBy.includes('skill')) reasons.push(`Has the skill "${job.requiredSkill}"`);
    if (job.requiredCertification !== undefined && !blockedBy.includes('certification')) {
      const label = (l: string) => (l === 'universal' ? 'Universal' : `Type ${l}`);
      reasons.push(`EPA 608 ${label(tech.epa608)} covers the ${label(job.requiredCertification)} refrigerant work`);
    }
    const busy = intervalsFor(bookings, tech.id);
    const visitsToUnit = job.unitId === undefined ? 0 : busy.filter((b) => b.unitId === job.unitId).length;
    const win = workingWindow(tech, day);
    let slot: Slot | null = null;
    let freeMinutes = 0;
    if (!win) block('working_hours', `Not working on ${day}`);
    else {
      slot = findSlot(tech, day, job, busy, opts, win);
      let free = (win.end - win.start) / MINUTE;
      for (const b of busy) free -= overlapMinutes(b.start, b.end, win.start, win.end);
      freeMinutes = Math.max(0, free);
      if (!slot) {
        // Say what is really in the way: the due time, the job's window, or the free time itself.
        const dur = fmtMinutes(job.durationMinutes);
        const { earliest: _e, latest: _l, window: _w, dueAt: _d, ...open } = job;
        const dueAt = job.dueAt;
        const withoutDue = dueAt !== undefined && dueAt !== null ? findSlot(tech, day, { ...job, dueAt: null }, busy, opts, win) : null;
        if (dueAt !== undefined && dueAt !== null && (limits.due < win.start || withoutDue)) {
          const due = whenOn(limits.due, day, tech.timeZone);
          block(
            'due_time',
            limits.due < win.start
              ? `Due by ${due}, before this day's working hours`
              : `Due by ${due}; no free slot of ${dur} starts by then (${fmtMinutes(freeMinutes)} free on ${day})`,
          );
        } else if (freeMinutes >= job.durationMinutes && findSlot(tech, day, open, busy, opts, win)) {
          const from = whenOn(Math.max(limits.earliest, win.start), day, tech.timeZone);
          const to = whenOn(Math.min(limits.latest, win.end), day, tech.timeZone);
          block(
            'window',
            `No free slot of ${dur} on ${day} between ${from} and ${to}, the time the job allows (${fmtMinutes(freeMinutes)} free)`,
          );
        } else {
          block('free_time', `No free slot of ${dur} on ${day} (${fmtMinutes(freeMinutes)} free)`);
        }
      }
    }
    const base = { techId: tech.id, name: tech.name, freeMinutes, visitsToUnit };
    if (hard.length > 0 || !slot || !win) {
      return {
        ...base,
        eligible: false,
        score: null,
        reasons: [...hard, ...reasons],
        blockedBy,
        proposedStart: null,
        proposedEnd: null,
        travelMinutes: slot ? slot.travelMinutes : null,
      };
    }
    const capacity = (win.end - win.start) / MINUTE;
    const freeShare = Math.min(1, freeMinutes / capacity);
    const earliness = 1 - Math.min(1, (slot.start - win.start) / MINUTE / capacity);
    const travelPenalty = Math.min(slot.travelMinutes, 90) / 90;
    const score = 50 + 20 * freeShare + 10 * earliness - 25 * travelPenalty + (visitsToUnit > 0 ? 15 : 0);
    reasons.push(`${fmtMinutes(freeMinutes)} free on ${day}`);
    reasons.push(`${fmtMinutes(slot.travelMinutes)} drive from the previous stop`);
    if (visitsToUnit > 0) reasons.push(`Has worked on this unit before (${visitsToUnit} visit${visitsToUnit === 1 ? '' : 's'})`);
    return {
      ...base,
      eligible: true,
      score: Math.round(score * 10) / 10,
      reasons,
      blockedBy,
      proposedStart: new Date(slot.start).toISOString(),
      proposedEnd: new Date(slot.end).toISOString(),
      travelMinutes: slot.travelMinutes,
    };
  });
  return ranked.sort((a, b) => {
    if (a.eligible !== b.eligible) return a.eligible ? -1 : 1;
    if (a.eligible && b.eligible) {
      const d = (b.score as number) - (a.score as number);
      if (d !== 0) return d;
      const s = (a.proposedStart as string).localeCompare(b.proposedStart as string);
      if (s !== 0) return s;
    }
    return a.techId.localeCompare(b.techId);
  });
}
