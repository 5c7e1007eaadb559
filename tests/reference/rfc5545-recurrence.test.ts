/**
 * Reference check: agreement visit expansion (via the rrule package) against the recurrence
 * examples printed in RFC 5545 §3.8.5.3 (rfc-editor.org/rfc/rfc5545#section-3.8.5.3). Each case
 * carries the example's title from the RFC; DTSTART and RRULE are as printed there and the expected
 * dates are the RFC's listed occurrences (date part; the RFC's 9:00 AM America/New_York times are
 * not needed for visit dates). Weekends and holidays are not moved here (weekendDays: []), so the
 * raw recurrence is what is checked.
 */
import { describe, expect, it } from 'vitest';
import { expandAgreementVisits } from '@coilpath/calc';

const ny = 'America/New_York';

function expand(rrule: string, termStart = '1997-01-01', termEnd = '2006-12-31'): string[] {
  return expandAgreementVisits({ rrule, termStart, termEnd, timeZone: ny, holidays: [], weekendDays: [] }).map((v) => v.date);
}

const days = (ym: string, ds: number[]) => ds.map((d) => `${ym}-${String(d).padStart(2, '0')}`);

describe('RFC 5545 §3.8.5.3 recurrence examples', () => {
  it('"Daily for 10 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970902T090000\nRRULE:FREQ=DAILY;COUNT=10')).toEqual(
      days('1997-09', [2, 3, 4, 5, 6, 7, 8, 9, 10, 11]),
    );
  });

  it('"Daily until December 24, 1997" (last occurrence December 23)', () => {
    const r = expand('DTSTART;TZID=America/New_York:19970902T090000\nRRULE:FREQ=DAILY;UNTIL=19971224T000000Z');
    expect(r[0]).toBe('1997-09-02');
    expect(r.at(-1)).toBe('1997-12-23');
    expect(r).toHaveLength(113);
  });

  it('"Every 10 days, 5 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970902T090000\nRRULE:FREQ=DAILY;INTERVAL=10;COUNT=5')).toEqual([
      '1997-09-02',
      '1997-09-12',
      '1997-09-22',
      '1997-10-02',
      '1997-10-12',
    ]);
  });

  it('"Weekly for 10 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970902T090000\nRRULE:FREQ=WEEKLY;COUNT=10')).toEqual([
      ...days('1997-09', [2, 9, 16, 23, 30]),
      ...days('1997-10', [7, 14, 21, 28]),
      '1997-11-04',
    ]);
  });

  it('"Every other week on Monday, Wednesday, and Friday until December 24, 1997, starting on Monday, September 1, 1997"', () => {
    expect(
      expand('DTSTART;TZID=America/New_York:19970901T090000\nRRULE:FREQ=WEEKLY;INTERVAL=2;UNTIL=19971224T000000Z;WKST=SU;BYDAY=MO,WE,FR'),
    ).toEqual([
      ...days('1997-09', [1, 3, 5, 15, 17, 19, 29]),
      ...days('1997-10', [1, 3, 13, 15, 17, 27, 29, 31]),
      ...days('1997-11', [10, 12, 14, 24, 26, 28]),
      ...days('1997-12', [8, 10, 12, 22]),
    ]);
  });

  it('"Monthly on the first Friday for 10 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970905T090000\nRRULE:FREQ=MONTHLY;COUNT=10;BYDAY=1FR')).toEqual([
      '1997-09-05',
      '1997-10-03',
      '1997-11-07',
      '1997-12-05',
      '1998-01-02',
      '1998-02-06',
      '1998-03-06',
      '1998-04-03',
      '1998-05-01',
      '1998-06-05',
    ]);
  });

  it('"Every other month on the first and last Sunday of the month for 10 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970907T090000\nRRULE:FREQ=MONTHLY;INTERVAL=2;COUNT=10;BYDAY=1SU,-1SU')).toEqual([
      '1997-09-07',
      '1997-09-28',
      '1997-11-02',
      '1997-11-30',
      '1998-01-04',
      '1998-01-25',
      '1998-03-01',
      '1998-03-29',
      '1998-05-03',
      '1998-05-31',
    ]);
  });

  it('"Monthly on the second-to-last Monday of the month for 6 months"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970922T090000\nRRULE:FREQ=MONTHLY;COUNT=6;BYDAY=-2MO')).toEqual([
      '1997-09-22',
      '1997-10-20',
      '1997-11-17',
      '1997-12-22',
      '1998-01-19',
      '1998-02-16',
    ]);
  });

  it('"Monthly on the first and last day of the month for 10 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970930T090000\nRRULE:FREQ=MONTHLY;COUNT=10;BYMONTHDAY=1,-1')).toEqual([
      '1997-09-30',
      '1997-10-01',
      '1997-10-31',
      '1997-11-01',
      '1997-11-30',
      '1997-12-01',
      '1997-12-31',
      '1998-01-01',
      '1998-01-31',
      '1998-02-01',
    ]);
  });

  it('"Every 18 months on the 10th thru 15th of the month for 10 occurrences"', () => {
    expect(
      expand('DTSTART;TZID=America/New_York:19970910T090000\nRRULE:FREQ=MONTHLY;INTERVAL=18;COUNT=10;BYMONTHDAY=10,11,12,13,14,15'),
    ).toEqual([...days('1997-09', [10, 11, 12, 13, 14, 15]), ...days('1999-03', [10, 11, 12, 13])]);
  });

  it('"Yearly in June and July for 10 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970610T090000\nRRULE:FREQ=YEARLY;COUNT=10;BYMONTH=6,7')).toEqual(
      [1997, 1998, 1999, 2000, 2001].flatMap((y) => [`${y}-06-10`, `${y}-07-10`]),
    );
  });

  it('"Every third year on the 1st, 100th, and 200th day for 10 occurrences"', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970101T090000\nRRULE:FREQ=YEARLY;INTERVAL=3;COUNT=10;BYYEARDAY=1,100,200')).toEqual([
      '1997-01-01',
      '1997-04-10',
      '1997-07-19',
      '2000-01-01',
      '2000-04-09',
      '2000-07-18',
      '2003-01-01',
      '2003-04-10',
      '2003-07-19',
      '2006-01-01',
    ]);
  });

  it('"Every 4 years, the first Tuesday after a Monday in November, forever (U.S. Presidential Election day)"', () => {
    expect(
      expand(
        'DTSTART;TZID=America/New_York:19961105T090000\nRRULE:FREQ=YEARLY;INTERVAL=4;BYMONTH=11;BYDAY=TU;BYMONTHDAY=2,3,4,5,6,7,8',
        '1996-01-01',
        '2004-12-31',
      ),
    ).toEqual(['1996-11-05', '2000-11-07', '2004-11-02']);
  });

  it('"An example where the days generated makes a difference because of WKST" (WKST=MO, then WKST=SU)', () => {
    expect(expand('DTSTART;TZID=America/New_York:19970805T090000\nRRULE:FREQ=WEEKLY;INTERVAL=2;COUNT=4;BYDAY=TU,SU;WKST=MO')).toEqual([
      '1997-08-05',
      '1997-08-10',
      '1997-08-19',
      '1997-08-24',
    ]);
    expect(expand('DTSTART;TZID=America/New_York:19970805T090000\nRRULE:FREQ=WEEKLY;INTERVAL=2;COUNT=4;BYDAY=TU,SU;WKST=SU')).toEqual([
      '1997-08-05',
      '1997-08-17',
      '1997-08-19',
      '1997-08-31',
    ]);
  });

  it('"An example where an invalid date (i.e., February 30) is ignored"', () => {
    expect(
      expand('DTSTART;TZID=America/New_York:20070115T090000\nRRULE:FREQ=MONTHLY;BYMONTHDAY=15,30;COUNT=5', '2007-01-01', '2007-12-31'),
    ).toEqual(['2007-01-15', '2007-01-30', '2007-02-15', '2007-03-15', '2007-03-30']);
  });

  it('moving off weekends: "Monthly on the first and last day of the month" visits on Saturdays/Sundays go to Monday, none lost', () => {
    const r = expandAgreementVisits({
      rrule: 'DTSTART;TZID=America/New_York:19970930T090000\nRRULE:FREQ=MONTHLY;COUNT=10;BYMONTHDAY=1,-1',
      termStart: '1997-01-01',
      termEnd: '1998-12-31',
      timeZone: ny,
      holidays: ['1998-01-01'], // a branch holiday (not from the RFC)
    });
    // The ten RFC dates; 1997-11-01 and 1997-11-30 are Saturday and Sunday, 1998-01-31 Saturday, 1998-02-01 Sunday.
    // Each moves to the next working day; a contracted visit is never dropped, so one whose Monday already holds
    // a visit takes the next free working day (Coilpath's policy, common practice, no source): 11-30 → 12-01 taken
    // → 12-02; 01-31 → 02-02, 02-01 → 02-02 taken → 02-03; 01-01 (holiday) → 01-02.
    expect(r.map((v) => v.date)).toEqual([
      '1997-09-30',
      '1997-10-01',
      '1997-10-31',
      '1997-11-03',
      '1997-12-01',
      '1997-12-02',
      '1997-12-31',
      '1998-01-02',
      '1998-02-02',
      '1998-02-03',
    ]);
    expect(r).toHaveLength(10);
  });
});
