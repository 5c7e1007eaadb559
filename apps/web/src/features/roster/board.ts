/**
 * The technician board's arithmetic: which local days a week shows, which bookings go into which
 * technician × day cell, and what a cell and a booking chip say. Pure functions of the booking
 * instants and the branch's time zone (tested in board.test.ts).
 *
 * Rule for bookings that cross midnight: a booking is listed in every branch-local day it overlaps
 * ([start, end), so one ending exactly at 00:00 stays on its first day). On its first day the chip
 * says it runs into the next day; on a later day it says when it ends and which day it came from.
 * This matches the load figures, which count a booking's minutes on each day they fall on.
 */
import { addDays } from '@coilpath/calc';
import type { Booking, TechnicianDayLoad } from '@coilpath/contract';
import { formatMinutes } from '@/lib/format';
import { instantToLocal, localToInstant, wallDate, wallFrom } from './zone';

export type RosterView = 'board' | 'day' | 'week' | 'month';

/** Data-transfer types of what can be dropped on a board cell: a job from the unplaced work, a booking. */
export const DRAG_WORK_ORDER = 'application/x-coilpath-work-order';
export const DRAG_BOOKING = 'application/x-coilpath-booking';
export const rosterViews: readonly RosterView[] = ['board', 'day', 'week', 'month'];

const weekdayLong = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'] as const;
const weekdayShort = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'] as const;
const monthLong = [
  'January',
  'February',
  'March',
  'April',
  'May',
  'June',
  'July',
  'August',
  'September',
  'October',
  'November',
  'December',
] as const;
const monthShort = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;

/** A calendar date 'YYYY-MM-DD' plus whole days (the calc's one definition). */
export { addDays };
/** Day of the week, 0 = Sunday. */
export const weekdayOf = (day: string) => wallFrom(day).getUTCDay();
/** The Monday on or before a date. */
export const mondayOf = (day: string) => addDays(day, -((weekdayOf(day) + 6) % 7));
/** Monday to Sunday of the week a date falls in (the Roster's weeks start on Monday). */
export const weekOf = (day: string) => Array.from({ length: 7 }, (_, i) => addDays(mondayOf(day), i));

const parts = (day: string) => {
  const d = wallFrom(day);
  return { wd: d.getUTCDay(), d: d.getUTCDate(), m: d.getUTCMonth(), y: d.getUTCFullYear() };
};
/** "Tuesday 1 December". */
export function dayLong(day: string): string {
  const p = parts(day);
  return `${weekdayLong[p.wd]} ${p.d} ${monthLong[p.m]}`;
}
/** "Tue 1 Dec". */
export function dayShort(day: string): string {
  const p = parts(day);
  return `${weekdayShort[p.wd]} ${p.d} ${monthShort[p.m]}`;
}
/** "December". */
export const monthName = (day: string) => monthLong[parts(day).m]!;
/** "Tue". */
export const weekdayName = (day: string) => weekdayShort[parts(day).wd]!;

/** The local days a view shows around its anchor date: [first, last] inclusive. */
export function viewDays(view: RosterView, date: string): string[] {
  if (view === 'day') return [date];
  if (view === 'board' || view === 'week') return weekOf(date);
  // Month: six whole weeks from the Monday on or before the 1st, as the month grid draws them.
  const first = mondayOf(`${date.slice(0, 8)}01`);
  return Array.from({ length: 42 }, (_, i) => addDays(first, i));
}

/** The anchor date one step before or after (a day, a week or a month). */
export function stepDate(view: RosterView, date: string, dir: -1 | 1): string {
  if (view === 'day') return addDays(date, dir);
  if (view === 'board' || view === 'week') return addDays(date, 7 * dir);
  const p = parts(date);
  const m = new Date(Date.UTC(p.y, p.m + dir, 1));
  const last = new Date(Date.UTC(m.getUTCFullYear(), m.getUTCMonth() + 1, 0)).getUTCDate();
  return wallDate(new Date(Date.UTC(m.getUTCFullYear(), m.getUTCMonth(), Math.min(p.d, last))));
}

/** What a view shows, as a heading: "Tuesday 1 December 2026", "30 Nov – 6 Dec 2026", "December 2026". */
export function viewTitle(view: RosterView, date: string): string {
  const p = parts(date);
  if (view === 'day') return `${dayLong(date)} ${p.y}`;
  if (view === 'month') return `${monthLong[p.m]} ${p.y}`;
  const days = weekOf(date);
  const a = parts(days[0]!);
  const b = parts(days[6]!);
  if (a.y !== b.y) return `${a.d} ${monthShort[a.m]} ${a.y} – ${b.d} ${monthShort[b.m]} ${b.y}`;
  if (a.m !== b.m) return `${a.d} ${monthShort[a.m]} – ${b.d} ${monthShort[b.m]} ${b.y}`;
  return `${a.d}–${b.d} ${monthShort[b.m]} ${b.y}`;
}

/** The true instants bounding local days [first 00:00, day after last 00:00) in a zone. */
export function daysRange(days: readonly string[], timeZone: string): { from: string; to: string } {
  return { from: localToInstant(days[0]!, '00:00', timeZone), to: localToInstant(addDays(days[days.length - 1]!, 1), '00:00', timeZone) };
}

/** One booking as a board cell lists it. */
export interface BoardEntry {
  booking: Booking;
  /** The cell's day. */
  day: string;
  /** Local start and end of the whole booking. */
  start: { date: string; time: string };
  end: { date: string; time: string };
  /** It started on an earlier day (this cell continues it). */
  fromEarlierDay: boolean;
  /** It runs past midnight into a later day. */
  intoLaterDay: boolean;
}

export const cellKey = (techId: string, day: string) => `${techId}|${day}`;

/** Every local day a booking overlaps, [start, end); a booking with no length stays on its start day. */
export function localDaysOf(b: Pick<Booking, 'startAt' | 'endAt'>, timeZone: string): string[] {
  const first = instantToLocal(b.startAt, timeZone).date;
  const endMs = Date.parse(b.endAt);
  if (endMs <= Date.parse(b.startAt)) return [first];
  const last = instantToLocal(new Date(endMs - 1).toISOString(), timeZone).date;
  const out = [first];
  for (let d = addDays(first, 1); d <= last; d = addDays(d, 1)) out.push(d);
  return out;
}

/**
 * Bookings → technician × local day cells, each cell in start order (then end, then work order
 * number). Only the given days get cells; a technician with no booking on a day has no entry.
 */
export function groupBookings(bookings: readonly Booking[], timeZone: string, days: readonly string[]): Map<string, BoardEntry[]> {
  const shown = new Set(days);
  const cells = new Map<string, BoardEntry[]>();
  const sorted = [...bookings].sort(
    (x, y) =>
      Date.parse(x.startAt) - Date.parse(y.startAt) || Date.parse(x.endAt) - Date.parse(y.endAt) || x.workOrder.number - y.workOrder.number,
  );
  for (const b of sorted) {
    const covered = localDaysOf(b, timeZone);
    const start = instantToLocal(b.startAt, timeZone);
    const end = instantToLocal(b.endAt, timeZone);
    covered.forEach((day, i) => {
      if (!shown.has(day)) return;
      const key = cellKey(b.techId, day);
      const list = cells.get(key) ?? [];
      list.push({ booking: b, day, start, end, fromEarlierDay: i > 0, intoLaterDay: i < covered.length - 1 });
      cells.set(key, list);
    });
  }
  return cells;
}

/** A chip's time: "07:00–09:00", "22:00–03:30 next day", "until 03:30, from Sat". */
export function entryTime(e: Pick<BoardEntry, 'start' | 'end' | 'fromEarlierDay' | 'intoLaterDay'>): string {
  if (e.fromEarlierDay && e.intoLaterDay) return `all day, from ${weekdayName(e.start.date)}`;
  if (e.fromEarlierDay) return `until ${e.end.time}, from ${weekdayName(e.start.date)}`;
  if (e.intoLaterDay) return `${e.start.time}–${e.end.time} next day`;
  return `${e.start.time}–${e.end.time}`;
}

/** Hours and minutes, short: "5 h 30", "8 h", "45 min". */
export function shortMinutes(minutes: number): string {
  const h = Math.floor(minutes / 60);
  const m = Math.round(minutes % 60);
  if (!h) return `${m} min`;
  return m ? `${h} h ${m.toString().padStart(2, '0')}` : `${h} h`;
}

/** Hours and minutes, tight, for a board cell: "5h30", "8h", "0h", "45m". */
export function tightMinutes(minutes: number): string {
  const h = Math.floor(minutes / 60);
  const m = Math.round(minutes % 60);
  if (!h) return m ? `${m}m` : '0h';
  return m ? `${h}h${m.toString().padStart(2, '0')}` : `${h}h`;
}

export type LoadState = 'off' | 'ok' | 'near' | 'over';
/** Share of capacity at which a day counts as nearly full (the load table's rule). */
export const NEARLY_FULL = 0.85;

export function loadState(l: Pick<TechnicianDayLoad, 'bookedMinutes' | 'capacityMinutes' | 'ratio' | 'overloaded'>): LoadState {
  if (l.overloaded) return 'over';
  if (l.capacityMinutes === 0) return 'off';
  return (l.ratio ?? 0) >= NEARLY_FULL ? 'near' : 'ok';
}

type LoadFigures = Pick<TechnicianDayLoad, 'bookedMinutes' | 'capacityMinutes' | 'holiday'>;

/** A day without working time: the branch's holiday, or the technician's day off. */
export const offDayWord = (l: Pick<TechnicianDayLoad, 'holiday'>): string => (l.holiday ? 'holiday' : 'day off');

/** The booked time against the working time: "5 h 30 min of 8 h 30 min", "Day off", "Holiday", "1 h 00 min on a day off". */
export function gaugeText(l: LoadFigures): string {
  if (l.capacityMinutes > 0) return `${formatMinutes(l.bookedMinutes)} of ${formatMinutes(l.capacityMinutes)}`;
  const word = offDayWord(l);
  return l.bookedMinutes > 0 ? `${formatMinutes(l.bookedMinutes)} on a ${word}` : word.charAt(0).toUpperCase() + word.slice(1);
}

/** The load in words: `gaugeText`, plus "Over by …" or "Nearly full". */
export function loadWords(l: LoadFigures & Pick<TechnicianDayLoad, 'ratio' | 'overloaded'>): string {
  const base = gaugeText(l);
  const state = loadState(l);
  if (state === 'over')
    return l.capacityMinutes === 0
      ? `${base}. Over: booked on a ${offDayWord(l)}`
      : `${base}. Over by ${formatMinutes(l.bookedMinutes - l.capacityMinutes)}`;
  if (state === 'near') return `${base}. Nearly full`;
  return base;
}

/** A cell's name for screen readers: "Anneke Strand, Tuesday 1 December: 3 bookings, 5 h 30 min of 8 h 30 min". */
export function cellLabel(techName: string, day: string, count: number, load: TechnicianDayLoad | undefined, today?: string): string {
  const n = count === 0 ? 'no bookings' : count === 1 ? '1 booking' : `${count} bookings`;
  return `${techName}, ${dayLong(day)}${day === today ? ' (today)' : ''}: ${n}${load ? `, ${loadWords(load)}` : ''}`;
}
