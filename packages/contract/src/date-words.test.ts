import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { format } from 'date-fns';
import { TZDate } from '@date-fns/tz';
import { recordDate, scheduleDay } from './date-words';

// Reference: date-fns `format` (a general-purpose date library), patterns "d MMM yyyy" and "EEE d MMM".
const ref = (iso: string, pattern: string) => format(new TZDate(new Date(`${iso}T12:00:00Z`).getTime(), 'UTC'), pattern);
const isoDate = fc
  .date({ min: new Date('1990-01-01T00:00:00Z'), max: new Date('2099-12-31T00:00:00Z'), noInvalidDate: true })
  .map((d) => d.toISOString().slice(0, 10));

describe('dates in words', () => {
  it('writes a record date as "7 Dec 2026", a schedule day as "Mon 7 Dec" — as date-fns does, on any date', () => {
    fc.assert(
      fc.property(isoDate, (iso) => {
        expect(recordDate(iso)).toBe(ref(iso, 'd MMM yyyy'));
        expect(scheduleDay(iso, `${iso.slice(0, 4)}-06-15`)).toBe(ref(iso, 'EEE d MMM'));
        expect(scheduleDay(iso)).toBe(ref(iso, 'EEE d MMM yyyy'));
      }),
    );
  });

  it('adds the year to a schedule day outside the current year, and keeps September short', () => {
    // 7 December 2026 is a Monday; 7 September 2026 is a Monday (perpetual calendar).
    expect(scheduleDay('2026-12-07', '2026-12-05')).toBe('Mon 7 Dec');
    expect(scheduleDay('2027-01-04', '2026-12-31')).toBe('Mon 4 Jan 2027');
    expect(recordDate('2026-09-07')).toBe('7 Sep 2026');
    // Not a date: given back as it came.
    expect(recordDate('2026-13-45')).toBe('2026-13-45');
    expect(scheduleDay('soon')).toBe('soon');
  });
});
