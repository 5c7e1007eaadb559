import { describe, expect, it } from 'vitest';
import { fromWallClock, instantToLocal, localToInstant, movedTimes, toWallClock, wallFrom } from './zone';

/*
 * America/Chicago springs forward on Sunday 2027-03-14 at 02:00 CST (08:00Z) to 03:00 CDT: the second
 * Sunday of March (US Energy Policy Act of 2005, in force since 2007). CST = UTC−6, CDT = UTC−5.
 */
const tz = 'America/Chicago';

describe('toWallClock / fromWallClock', () => {
  it('shows an instant at the branch’s local time on either side of the change', () => {
    expect(toWallClock('2027-03-14T04:00:00Z', tz).toISOString()).toBe('2027-03-13T22:00:00.000Z'); // Sat 22:00 CST
    expect(toWallClock('2027-03-14T07:59:00Z', tz).toISOString()).toBe('2027-03-14T01:59:00.000Z'); // 01:59 CST
    expect(toWallClock('2027-03-14T08:00:00Z', tz).toISOString()).toBe('2027-03-14T03:00:00.000Z'); // 03:00 CDT
    expect(toWallClock('2027-03-14T08:30:00Z', tz).toISOString()).toBe('2027-03-14T03:30:00.000Z');
  });

  it('turns local wall times back into true instants with the offset in force', () => {
    expect(fromWallClock(wallFrom('2027-03-13', '22:00'), tz).toISOString()).toBe('2027-03-14T04:00:00.000Z');
    expect(fromWallClock(wallFrom('2027-03-14', '03:30'), tz).toISOString()).toBe('2027-03-14T08:30:00.000Z');
    expect(fromWallClock(wallFrom('2027-03-15', '09:00'), tz).toISOString()).toBe('2027-03-15T14:00:00.000Z');
    expect(fromWallClock(wallFrom('2027-03-12', '09:00'), tz).toISOString()).toBe('2027-03-12T15:00:00.000Z');
  });

  it('moves a wall time the change skips forward by the gap (02:30 does not exist that night)', () => {
    expect(fromWallClock(wallFrom('2027-03-14', '02:30'), tz).toISOString()).toBe('2027-03-14T08:30:00.000Z'); // = 03:30 CDT
  });

  it('round-trips every quarter hour of the two days around the change', () => {
    for (let t = Date.parse('2027-03-13T06:00:00Z'); t < Date.parse('2027-03-15T06:00:00Z'); t += 15 * 60_000) {
      expect(fromWallClock(toWallClock(t, tz), tz).getTime()).toBe(t);
    }
  });
});

describe('a booking spanning the spring-forward night', () => {
  // Sat 22:00 CST to Sun 03:30 CDT: 4 h 30 min of real time, drawn from 22:00 to 03:30 on the grid.
  const booking = { startAt: '2027-03-14T04:00:00.000Z', endAt: '2027-03-14T08:30:00.000Z' };

  it('is drawn at its local start and end', () => {
    expect(instantToLocal(booking.startAt, tz)).toEqual({ date: '2027-03-13', time: '22:00' });
    expect(instantToLocal(booking.endAt, tz)).toEqual({ date: '2027-03-14', time: '03:30' });
  });

  it('keeps its real duration when moved a week later (no clock change then)', () => {
    const moved = movedTimes('move', booking, wallFrom('2027-03-20', '22:00'), wallFrom('2027-03-21', '03:30'), tz);
    expect(moved).toEqual({ startAt: '2027-03-21T03:00:00.000Z', endAt: '2027-03-21T07:30:00.000Z' }); // 22:00–02:30 CDT
  });

  it('keeps its real duration when a booking from the week before is moved onto the change night', () => {
    const before = { startAt: '2027-03-07T04:00:00.000Z', endAt: '2027-03-07T08:30:00.000Z' }; // Sat 6th 22:00–02:30 CST
    const moved = movedTimes('move', before, wallFrom('2027-03-13', '22:00'), null, tz);
    expect(moved).toEqual(booking);
  });

  it('takes the wall time of a resized end', () => {
    const resized = movedTimes('resize', booking, wallFrom('2027-03-13', '22:00'), wallFrom('2027-03-14', '04:00'), tz);
    expect(resized).toEqual({ startAt: booking.startAt, endAt: '2027-03-14T09:00:00.000Z' });
  });

  it('books from a form’s local date and time as true instants', () => {
    expect(localToInstant('2027-03-13', '22:00', tz)).toBe(booking.startAt);
    expect(localToInstant('2027-03-14', '03:30', tz)).toBe(booking.endAt);
  });
});
