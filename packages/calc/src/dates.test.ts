import { describe, expect, it } from 'vitest';
import { addDays, dayNumber, fromDayNumber, instantMs } from './dates';

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
});
