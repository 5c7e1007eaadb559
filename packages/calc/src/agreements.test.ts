import { describe, expect, it } from 'vitest';
import { expandAgreementVisits, levelVisitsAcrossWeeks, planAgreementVisits, recurrenceDates } from './agreements';

describe('expandAgreementVisits', () => {
  it('quarterly visits move off weekends and holidays to the next working day', () => {
    const r = expandAgreementVisits({
      rrule: 'RRULE:FREQ=MONTHLY;INTERVAL=3;BYMONTHDAY=1',
      termStart: '2027-01-01',
      termEnd: '2027-12-31',
      timeZone: 'America/Chicago',
      holidays: ['2027-01-01'],
    });
    expect(r).toEqual([
      { date: '2027-01-04', originalDate: '2027-01-01', moved: true, movedBecause: 'holiday' }, // holiday (Fri) → Mon
      { date: '2027-04-01', originalDate: '2027-04-01', moved: false, movedBecause: null },
      { date: '2027-07-01', originalDate: '2027-07-01', moved: false, movedBecause: null },
      { date: '2027-10-01', originalDate: '2027-10-01', moved: false, movedBecause: null },
    ]);
  });

  it('keeps every contracted visit when two land on the same working day: the next free working day', () => {
    // Weekly on Saturday and Sunday over four weeks (2027-03-06 is a Saturday; 8 contracted visits). Common
    // practice, no source: a contracted visit moved off the weekend goes to the next working day.
    const r = planAgreementVisits({
      rrule: 'FREQ=WEEKLY;BYDAY=SA,SU',
      termStart: '2027-03-01',
      termEnd: '2027-03-31',
      timeZone: 'America/Chicago',
      holidays: [],
    });
    expect(r.dropped).toEqual([]);
    expect(r.visits).toHaveLength(8);
    // Sat 6 → Mon 8, Sun 7 → Mon 8 taken → Tue 9; and so on each week.
    expect(r.visits.slice(0, 2)).toEqual([
      { date: '2027-03-08', originalDate: '2027-03-06', moved: true, movedBecause: 'weekend' },
      { date: '2027-03-09', originalDate: '2027-03-07', moved: true, movedBecause: 'weekend' },
    ]);
    expect(new Set(r.visits.map((v) => v.date)).size).toBe(8);
  });

  it('says why each visit moved: the holiday first (also on a weekend), the weekend, or a day already taken', () => {
    // Daily, Thu 2027-03-18 (a branch holiday) … Tue 23; common practice, no source. Thu 18 → Fri 19 (holiday);
    // Fri 19's own visit finds its day taken → Mon 22 (taken); Sat 20 → Tue 23 (weekend).
    const r = planAgreementVisits({
      rrule: 'FREQ=DAILY',
      termStart: '2027-03-18',
      termEnd: '2027-03-23',
      timeZone: 'America/Chicago',
      holidays: ['2027-03-18', '2027-03-20'],
    });
    const why = Object.fromEntries(r.visits.map((v) => [v.originalDate, [v.date, v.movedBecause]]));
    expect(why['2027-03-18']).toEqual(['2027-03-19', 'holiday']);
    expect(why['2027-03-19']).toEqual(['2027-03-22', 'taken']);
    // Sat 20 is also declared a holiday: the holiday is named.
    expect(why['2027-03-20']).toEqual(['2027-03-23', 'holiday']);
  });

  it('at the end of the term takes the previous free working day, and lists what cannot be placed with the reason', () => {
    // Daily in a term Tue 16 … Sun 21 with Thu 18 a holiday: Tue 16 and Wed 17 stay, Thu 18 → Fri 19 (next free);
    // then Fri 19's own visit, Sat 20 and Sun 21 find no free working day after them, nor before (16, 17, 19 taken).
    const r = planAgreementVisits({
      rrule: 'FREQ=DAILY',
      termStart: '2027-03-16',
      termEnd: '2027-03-21',
      timeZone: 'America/Chicago',
      holidays: ['2027-03-18'],
    });
    // Daily Tue 16 … Sun 21 = 6 contracted visits; working days Tue 16, Wed 17, Fri 19 = 3 places.
    expect(r.visits.map((v) => v.date)).toEqual(['2027-03-16', '2027-03-17', '2027-03-19']);
    expect(r.dropped.map((d) => d.originalDate)).toEqual(['2027-03-19', '2027-03-20', '2027-03-21']);
    expect(r.dropped[0]!.reason).toMatch(/no free working day/);
    expect(r.visits.length + r.dropped.length).toBe(6);
    // The placed visits only, as before.
    expect(
      expandAgreementVisits({
        rrule: 'FREQ=DAILY',
        termStart: '2027-03-16',
        termEnd: '2027-03-21',
        timeZone: 'America/Chicago',
        holidays: ['2027-03-18'],
      }),
    ).toEqual(r.visits);
  });

  it('reads a UTC DTSTART in the branch zone and clips to the term', () => {
    const d = recurrenceDates('DTSTART:20270302T030000Z\nRRULE:FREQ=WEEKLY;COUNT=3', '2027-03-01', '2027-03-31', 'America/Chicago');
    expect(d).toEqual(['2027-03-01', '2027-03-08', '2027-03-15']); // 03:00Z is the evening before in Chicago
    expect(recurrenceDates('RRULE:FREQ=WEEKLY', '2027-03-01', '2027-03-10', 'UTC')).toEqual(['2027-03-01', '2027-03-08']);
  });

  it('rejects bad input', () => {
    const base = { termStart: '2027-01-01', termEnd: '2027-12-31', timeZone: 'America/Chicago', holidays: [] };
    expect(() => expandAgreementVisits({ ...base, rrule: 'RRULE:FREQ=SOMETIMES' })).toThrow(RangeError);
    expect(() => expandAgreementVisits({ ...base, rrule: 'SUMMARY:x' })).toThrow(RangeError);
    expect(() => expandAgreementVisits({ ...base, rrule: 'FREQ=DAILY', termEnd: '2026-01-01' })).toThrow(RangeError);
    expect(() => expandAgreementVisits({ ...base, rrule: 'FREQ=DAILY', timeZone: 'Nowhere/City' })).toThrow(RangeError);
    expect(() => expandAgreementVisits({ ...base, rrule: 'FREQ=DAILY', weekendDays: [0, 1, 2, 3, 4, 5, 6] })).toThrow(RangeError);
  });
});

describe('levelVisitsAcrossWeeks', () => {
  it('moves the overflow of a week forward to the next week with room', () => {
    const visits = [
      { id: 'a', date: '2027-04-05' },
      { id: 'b', date: '2027-04-06' },
      { id: 'c', date: '2027-04-07' },
      { id: 'd', date: '2027-04-12' },
    ];
    const r = levelVisitsAcrossWeeks(visits, { maxPerWeek: 2 });
    expect(r).toEqual([
      { id: 'a', date: '2027-04-05', originalDate: '2027-04-05', moved: false },
      { id: 'b', date: '2027-04-06', originalDate: '2027-04-06', moved: false },
      { id: 'c', date: '2027-04-14', originalDate: '2027-04-07', moved: true },
      { id: 'd', date: '2027-04-12', originalDate: '2027-04-12', moved: false },
    ]);
  });
  it('skips holidays in the target week and gives up after maxShiftWeeks', () => {
    const r = levelVisitsAcrossWeeks(
      [
        { id: 'a', date: '2027-04-05' },
        { id: 'b', date: '2027-04-05' },
      ],
      { maxPerWeek: 1, holidays: ['2027-04-12'] },
    );
    expect(r[1]).toMatchObject({ id: 'b', date: '2027-04-13', moved: true });
    expect(() =>
      levelVisitsAcrossWeeks(
        [
          { id: 'a', date: '2027-04-05' },
          { id: 'b', date: '2027-04-05' },
        ],
        { maxPerWeek: 1, maxShiftWeeks: 0 },
      ),
    ).toThrow(RangeError);
    expect(() => levelVisitsAcrossWeeks([], { maxPerWeek: 0 })).toThrow(RangeError);
  });
});
