import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { addDays as dfAddDays, differenceInCalendarDays, format } from 'date-fns';
import { addDays, dayNumber, daysFrom, fromDayNumber, instantMs } from './dates';

describe('dates', () => {
  it('round-trips calendar dates and adds days across a leap day', () => {
    expect(fromDayNumber(dayNumber('2028-02-28'))).toBe('2028-02-28');
    expect(addDays('2028-02-28', 1)).toBe('2028-02-29');
    expect(addDays('2027-02-28', 1)).toBe('2027-03-01');
    expect(dayNumber('1970-01-02')).toBe(1);
  });
  it('rejects malformed and impossible dates', () => {
    expect(() => dayNumber('2027-02-30')).toThrow(RangeError);
    expect(() => dayNumber('2027-2-3')).toThrow(RangeError);
  });
  it('reads instants from strings and Dates', () => {
    expect(instantMs('1970-01-01T00:00:01Z')).toBe(1000);
    expect(instantMs(new Date(5))).toBe(5);
    expect(() => instantMs('nope')).toThrow(RangeError);
  });
  it('counts whole days from one date to another, leap days included', () => {
    // Gregorian calendar: 2028 is a leap year (divisible by 4), 2100 is not (divisible by 100, not 400).
    expect(daysFrom('2028-02-28', '2028-03-01')).toBe(2);
    expect(daysFrom('2100-02-28', '2100-03-01')).toBe(1);
    expect(daysFrom('2027-01-01', '2028-01-01')).toBe(365);
    expect(daysFrom('2028-01-01', '2029-01-01')).toBe(366);
    expect(daysFrom('2026-03-10', '2026-02-01')).toBe(-37);
  });
  it('agrees with date-fns (a general-purpose date library) on adding and counting days (fast-check)', () => {
    const day = fc
      .date({ min: new Date(Date.UTC(1990, 0, 1)), max: new Date(Date.UTC(2100, 11, 31)), noInvalidDate: true })
      .map((d) => d.toISOString().slice(0, 10));
    // date-fns works on local wall dates: read the strings as local noon so the machine's zone cannot shift a day.
    const local = (iso: string) => new Date(`${iso}T12:00:00`);
    fc.assert(
      fc.property(day, day, fc.integer({ min: -800, max: 800 }), (a, b, n) => {
        expect(daysFrom(a, b)).toBe(differenceInCalendarDays(local(b), local(a)));
        expect(addDays(a, n)).toBe(format(dfAddDays(local(a), n), 'yyyy-MM-dd'));
      }),
    );
  });
});
