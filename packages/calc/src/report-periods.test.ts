import { describe, expect, it } from 'vitest';
import { activePreset, addMonthsClamped, periodDays, previousPeriod, reportPresets } from './report-periods';

// Calendar facts (Gregorian calendar, common knowledge): 2024 and 2028 are leap years (divisible by 4, not by
// 100); 2026 and 2027 are not; February has 29 days in a leap year, 28 otherwise; 2026-03-31 − 2026-03-01 = 30 days.

describe('previousPeriod', () => {
  it('has the same length and ends the day before the period starts', () => {
    // 1–31 March 2026: 31 days; the 31 days before are 29 January – 28 February 2026 (28 + 3 days).
    expect(previousPeriod({ from: '2026-03-01', to: '2026-03-31' })).toEqual({ from: '2026-01-29', to: '2026-02-28' });
    // Same in a leap year: 1–31 March 2028 ← 30 January – 29 February 2028 (29 + 2 days).
    expect(previousPeriod({ from: '2028-03-01', to: '2028-03-31' })).toEqual({ from: '2028-01-30', to: '2028-02-29' });
    // A single day, across a year end.
    expect(previousPeriod({ from: '2027-01-01', to: '2027-01-01' })).toEqual({ from: '2026-12-31', to: '2026-12-31' });
    // A whole leap year (366 days) ← the 366 days before: 2027-01-01 – 2027-12-31 is 365 days, so one day of 2026 too.
    expect(previousPeriod({ from: '2028-01-01', to: '2028-12-31' })).toEqual({ from: '2026-12-31', to: '2027-12-31' });
    for (const p of [
      { from: '2026-03-01', to: '2026-03-31' },
      { from: '2028-02-10', to: '2028-03-09' },
    ]) {
      const prev = previousPeriod(p);
      expect(periodDays(prev)).toBe(periodDays(p));
    }
  });
  it('refuses a period that ends before it starts', () => {
    expect(() => previousPeriod({ from: '2026-03-02', to: '2026-03-01' })).toThrow(RangeError);
  });
});

describe('addMonthsClamped', () => {
  it('keeps the day or takes the month’s last day', () => {
    expect(addMonthsClamped('2026-03-31', -1)).toBe('2026-02-28');
    expect(addMonthsClamped('2028-03-31', -1)).toBe('2028-02-29');
    expect(addMonthsClamped('2028-02-29', -12)).toBe('2027-02-28');
    expect(addMonthsClamped('2026-01-15', -13)).toBe('2024-12-15');
  });
});

describe('reportPresets', () => {
  it('gives the 12 months ending today, apart from this year', () => {
    const p = reportPresets('2026-12-05');
    expect(p.last12).toEqual({ from: '2025-12-06', to: '2026-12-05' });
    expect(p.year).toEqual({ from: '2026-01-01', to: '2026-12-05' });
    expect(p.last30).toEqual({ from: '2026-11-06', to: '2026-12-05' });
    expect(p.quarter).toEqual({ from: '2026-10-01', to: '2026-12-05' });
    // At a month end and on a leap day: 29 February 2028 − 12 months is 28 February 2027, so from 1 March 2027.
    expect(reportPresets('2028-02-29').last12).toEqual({ from: '2027-03-01', to: '2028-02-29' });
    expect(reportPresets('2027-02-28').last12).toEqual({ from: '2026-03-01', to: '2027-02-28' });
    expect(reportPresets('2027-02-28').last12).toSatisfy((x: { from: string; to: string }) => periodDays(x) === 365);
    expect(periodDays(reportPresets('2028-02-29').last12)).toBe(366);
  });
  it('highlights one preset at most, even when two give the same dates', () => {
    // 31 December: the last 12 months are this year.
    const p = reportPresets('2027-12-31');
    expect(p.last12).toEqual(p.year);
    expect(activePreset(p, p.year)).toBe('last12');
    expect(activePreset(p, p.year, 'year')).toBe('year');
    // On other days they differ and each highlights alone.
    const q = reportPresets('2026-12-05');
    expect(activePreset(q, q.year, 'last12')).toBe('year');
    expect(activePreset(q, q.last12)).toBe('last12');
    expect(activePreset(q, { from: '2026-02-01', to: '2026-02-10' })).toBeNull();
  });
});
