/**
 * The Roster's calendar runs FullCalendar in 'UTC' and feeds it "wall-clock" dates: a Date whose UTC
 * fields equal the branch's local time. These two functions convert between true instants (what the
 * API speaks) and wall-clock dates (what the calendar draws), so the grid shows the branch's local
 * times whatever the viewer's own zone, and correctly across daylight-saving changes.
 */
import { TZDate } from '@date-fns/tz';

/** The branch-local wall time of an instant, as a Date whose UTC fields carry it. */
export function toWallClock(instant: string | number | Date, timeZone: string): Date {
  const z = new TZDate(new Date(instant).getTime(), timeZone);
  return new Date(Date.UTC(z.getFullYear(), z.getMonth(), z.getDate(), z.getHours(), z.getMinutes(), z.getSeconds(), z.getMilliseconds()));
}

/**
 * The instant of a branch-local wall time given as a Date's UTC fields. A wall time that does not
 * exist (skipped by a spring-forward change, e.g. 02:30 on 2027-03-14 in America/Chicago) is moved
 * forward by the gap, as clocks do; an ambiguous one (fall back) resolves to the first occurrence.
 */
export function fromWallClock(wall: Date, timeZone: string): Date {
  const t = new TZDate(
    wall.getUTCFullYear(),
    wall.getUTCMonth(),
    wall.getUTCDate(),
    wall.getUTCHours(),
    wall.getUTCMinutes(),
    wall.getUTCSeconds(),
    wall.getUTCMilliseconds(),
    timeZone,
  );
  return new Date(t.getTime());
}

/** 'YYYY-MM-DD' of a wall-clock date. */
export function wallDate(wall: Date): string {
  return wall.toISOString().slice(0, 10);
}

/** A wall-clock Date from a local date 'YYYY-MM-DD' and time 'HH:MM'. */
export function wallFrom(date: string, time = '00:00'): Date {
  return new Date(`${date}T${time}:00.000Z`);
}

/** The instant of a local date and time in a zone, as ISO-8601. */
export function localToInstant(date: string, time: string, timeZone: string): string {
  return fromWallClock(wallFrom(date, time), timeZone).toISOString();
}

/** Local date and time 'HH:MM' of an instant in a zone. */
export function instantToLocal(instant: string, timeZone: string): { date: string; time: string } {
  const w = toWallClock(instant, timeZone).toISOString();
  return { date: w.slice(0, 10), time: w.slice(11, 16) };
}

/**
 * New times of a booking the dispatcher dragged on the calendar. A move keeps the booking's real
 * duration (a 4 h 30 min job stays 4 h 30 min even when dropped across a clock change); a resize takes
 * the new end's wall time.
 */
export function movedTimes(
  kind: 'move' | 'resize',
  before: { startAt: string; endAt: string },
  wallStart: Date,
  wallEnd: Date | null,
  timeZone: string,
): { startAt: string; endAt: string } {
  if (kind === 'resize') {
    return { startAt: before.startAt, endAt: fromWallClock(wallEnd ?? wallStart, timeZone).toISOString() };
  }
  const start = fromWallClock(wallStart, timeZone);
  const duration = Date.parse(before.endAt) - Date.parse(before.startAt);
  return { startAt: start.toISOString(), endAt: new Date(start.getTime() + duration).toISOString() };
}
