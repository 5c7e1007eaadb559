import { describe, expect, it } from 'vitest';
import type { Booking } from '@coilpath/contract';
import {
  cellKey,
  cellLabel,
  daysRange,
  entryTime,
  gaugeText,
  groupBookings,
  localDaysOf,
  loadWords,
  stepDate,
  viewDays,
  viewTitle,
  weekOf,
} from './board';

/*
 * America/Chicago (CST = UTC−6, CDT = UTC−5) falls back on Sunday 2026-11-01 at 02:00 CDT (07:00Z) and
 * springs forward on Sunday 2027-03-14 at 02:00 CST (08:00Z): the first Sunday of November and the
 * second Sunday of March (US Energy Policy Act of 2005, in force since 2007).
 */
const tz = 'America/Chicago';
const ANNEKE = '00000000-0000-4000-8000-00000000000a';
const SAM = '00000000-0000-4000-8000-00000000000b';

let seq = 0;
function booking(techId: string, startAt: string, endAt: string, number = 11000 + ++seq): Booking {
  return {
    id: `00000000-0000-4000-8000-${String(number).padStart(12, '0')}`,
    branchId: '00000000-0000-4000-8000-000000000001',
    workOrderId: `00000000-0000-4000-9000-${String(number).padStart(12, '0')}`,
    techId,
    startAt,
    endAt,
    version: 1,
    fixed: false,
    hoursOverride: false,
    overrideRules: [],
    overrideReason: null,
    overrideBy: null,
    visitId: null,
    workOrder: {
      number,
      kind: 'service_call',
      state: 'booked',
      priority: 'normal',
      complaint: '',
      siteName: 'Test site',
      unitTag: null,
      unitMake: null,
      unitModel: null,
      requiredSkill: null,
      requiredCertification: null,
      estimatedMinutes: 60,
      dueAt: null,
      leakRepairDueDate: null,
    },
  };
}

const numbers = (cells: ReturnType<typeof groupBookings>, techId: string, day: string) =>
  (cells.get(cellKey(techId, day)) ?? []).map((e) => e.booking.workOrder.number);

describe('weeks and views', () => {
  it('runs a week from Monday to Sunday, across month and year ends', () => {
    expect(weekOf('2026-12-01')).toEqual([
      '2026-11-30',
      '2026-12-01',
      '2026-12-02',
      '2026-12-03',
      '2026-12-04',
      '2026-12-05',
      '2026-12-06',
    ]);
    expect(weekOf('2026-12-06')[0]).toBe('2026-11-30'); // a Sunday belongs to the week before it
    expect(weekOf('2027-01-01')).toEqual([
      '2026-12-28',
      '2026-12-29',
      '2026-12-30',
      '2026-12-31',
      '2027-01-01',
      '2027-01-02',
      '2027-01-03',
    ]);
  });

  it('steps by a day, a week or a month (keeping the day of the month where it exists)', () => {
    expect(stepDate('day', '2026-12-31', 1)).toBe('2027-01-01');
    expect(stepDate('board', '2026-12-01', -1)).toBe('2026-11-24');
    expect(stepDate('week', '2026-12-29', 1)).toBe('2027-01-05');
    expect(stepDate('month', '2027-01-31', 1)).toBe('2027-02-28');
    expect(stepDate('month', '2027-01-15', -1)).toBe('2026-12-15');
  });

  it('shows a month as six whole weeks from the Monday on or before the 1st', () => {
    const days = viewDays('month', '2026-12-17');
    expect(days).toHaveLength(42);
    expect(days[0]).toBe('2026-11-30');
    expect(days[41]).toBe('2027-01-10');
  });

  it('names what a view shows', () => {
    expect(viewTitle('board', '2026-12-01')).toBe('30 Nov – 6 Dec 2026');
    expect(viewTitle('week', '2026-12-09')).toBe('7–13 Dec 2026');
    expect(viewTitle('board', '2026-12-31')).toBe('28 Dec 2026 – 3 Jan 2027');
    expect(viewTitle('day', '2026-12-01')).toBe('Tuesday 1 December 2026');
    expect(viewTitle('month', '2026-12-01')).toBe('December 2026');
  });

  it('asks the API for the week from local midnight to local midnight, with the offset of each end', () => {
    // 26 Oct – 1 Nov 2026: starts in CDT (−5), the following Monday is in CST (−6).
    expect(daysRange(weekOf('2026-10-28'), tz)).toEqual({ from: '2026-10-26T05:00:00.000Z', to: '2026-11-02T06:00:00.000Z' });
  });
});

describe('bookings → technician × local day', () => {
  it('puts each booking in its technician’s cell for its local day, in start order', () => {
    const days = weekOf('2026-12-01');
    const late = booking(ANNEKE, '2026-12-01T19:00:00.000Z', '2026-12-01T21:00:00.000Z', 3); // Tue 13:00–15:00 CST
    const early = booking(ANNEKE, '2026-12-01T14:00:00.000Z', '2026-12-01T16:00:00.000Z', 2); // Tue 08:00–10:00
    const same = booking(ANNEKE, '2026-12-01T14:00:00.000Z', '2026-12-01T15:00:00.000Z', 4); // Tue 08:00–09:00: shorter first
    const other = booking(SAM, '2026-12-01T14:00:00.000Z', '2026-12-01T16:00:00.000Z', 5);
    // Tue 23:30 CST is already Wednesday in UTC: it still belongs to Tuesday.
    const evening = booking(ANNEKE, '2026-12-02T05:30:00.000Z', '2026-12-02T05:55:00.000Z', 6);
    const cells = groupBookings([late, early, other, evening, same], tz, days);
    expect(numbers(cells, ANNEKE, '2026-12-01')).toEqual([4, 2, 3, 6]);
    expect(numbers(cells, SAM, '2026-12-01')).toEqual([5]);
    expect(numbers(cells, ANNEKE, '2026-12-02')).toEqual([]);
    expect(cells.get(cellKey(ANNEKE, '2026-12-01'))!.map(entryTime)).toEqual(['08:00–09:00', '08:00–10:00', '13:00–15:00', '23:30–23:55']);
  });

  it('keeps bookings on their local day in the week clocks fall back (1 Nov 2026)', () => {
    const days = weekOf('2026-10-28'); // Mon 26 Oct – Sun 1 Nov
    // Sun 1 Nov 01:30 happens twice: 06:30Z (CDT) and 07:30Z (CST). Both are Sunday.
    const first130 = booking(ANNEKE, '2026-11-01T06:30:00.000Z', '2026-11-01T07:00:00.000Z', 10);
    const second130 = booking(ANNEKE, '2026-11-01T07:30:00.000Z', '2026-11-01T08:00:00.000Z', 11);
    // Sun 23:30 CST = Mon 05:30Z; with the summer offset it would wrongly read Monday 00:30.
    const lateSunday = booking(ANNEKE, '2026-11-02T05:30:00.000Z', '2026-11-02T05:45:00.000Z', 12);
    // Mon 2 Nov 00:15 CST: the next week, not shown.
    const nextWeek = booking(ANNEKE, '2026-11-02T06:15:00.000Z', '2026-11-02T07:00:00.000Z', 13);
    // Sat 31 Oct 23:30 CDT = Sun 04:30Z: Saturday.
    const lateSaturday = booking(SAM, '2026-11-01T04:30:00.000Z', '2026-11-01T04:55:00.000Z', 14);
    const cells = groupBookings([nextWeek, lateSunday, second130, first130, lateSaturday], tz, days);
    expect(numbers(cells, ANNEKE, '2026-11-01')).toEqual([10, 11, 12]);
    expect(cells.get(cellKey(ANNEKE, '2026-11-01'))!.map(entryTime)).toEqual(['01:30–01:00', '01:30–02:00', '23:30–23:45']);
    expect(numbers(cells, SAM, '2026-10-31')).toEqual([14]);
    expect([...cells.keys()].some((k) => k.endsWith('2026-11-02'))).toBe(false);
  });

  it('shows a booking across the spring-forward night on both days (13–14 Mar 2027)', () => {
    const days = weekOf('2027-03-10'); // Mon 8 – Sun 14 Mar
    // Sat 22:00 CST to Sun 03:30 CDT: 4 h 30 min of real time.
    const night = booking(ANNEKE, '2027-03-14T04:00:00.000Z', '2027-03-14T08:30:00.000Z', 20);
    const sunday = booking(ANNEKE, '2027-03-14T14:00:00.000Z', '2027-03-14T15:00:00.000Z', 21); // Sun 09:00 CDT
    const cells = groupBookings([sunday, night], tz, days);
    expect(numbers(cells, ANNEKE, '2027-03-13')).toEqual([20]);
    expect(numbers(cells, ANNEKE, '2027-03-14')).toEqual([20, 21]);
    const [sat] = cells.get(cellKey(ANNEKE, '2027-03-13'))!;
    const [sun, morning] = cells.get(cellKey(ANNEKE, '2027-03-14'))!;
    expect(sat).toMatchObject({ fromEarlierDay: false, intoLaterDay: true });
    expect(entryTime(sat!)).toBe('22:00–03:30 next day');
    expect(sun).toMatchObject({ fromEarlierDay: true, intoLaterDay: false });
    expect(entryTime(sun!)).toBe('until 03:30, from Sat');
    expect(entryTime(morning!)).toBe('09:00–10:00');
  });

  it('keeps a booking that ends exactly at local midnight on its own day', () => {
    const b = booking(ANNEKE, '2026-12-02T04:00:00.000Z', '2026-12-02T06:00:00.000Z'); // Tue 22:00 – Wed 00:00 CST
    expect(localDaysOf(b, tz)).toEqual(['2026-12-01']);
    const cells = groupBookings([b], tz, weekOf('2026-12-01'));
    expect(cells.get(cellKey(ANNEKE, '2026-12-01'))![0]!.intoLaterDay).toBe(false);
  });

  it('shows only the shown week’s part of a booking from the Sunday before', () => {
    const b = booking(SAM, '2026-12-07T04:00:00.000Z', '2026-12-07T08:00:00.000Z', 30); // Sun 6 Dec 22:00 – Mon 7 Dec 02:00 CST
    const next = groupBookings([b], tz, weekOf('2026-12-07'));
    expect(numbers(next, SAM, '2026-12-07')).toEqual([30]);
    expect(entryTime(next.get(cellKey(SAM, '2026-12-07'))![0]!)).toBe('until 02:00, from Sun');
    expect([...next.keys()]).toEqual([cellKey(SAM, '2026-12-07')]);
  });
});

describe('what a cell says', () => {
  const load = (bookedMinutes: number, capacityMinutes: number) => ({
    techId: ANNEKE,
    day: '2026-12-01',
    bookedMinutes,
    capacityMinutes,
    ratio: capacityMinutes ? bookedMinutes / capacityMinutes : null,
    overloaded: bookedMinutes > capacityMinutes,
  });

  it('names the technician, the day, the bookings and the load', () => {
    expect(cellLabel('Anneke Strand', '2026-12-01', 3, load(330, 510))).toBe(
      'Anneke Strand, Tuesday 1 December: 3 bookings, 5 h 30 min of 8 h 30 min',
    );
    expect(cellLabel('Anneke Strand', '2026-12-01', 1, load(60, 510), '2026-12-01')).toBe(
      'Anneke Strand, Tuesday 1 December (today): 1 booking, 1 h 00 min of 8 h 30 min',
    );
    expect(cellLabel('Sam Okafor', '2026-12-05', 0, load(0, 0))).toBe('Sam Okafor, Saturday 5 December: no bookings, Day off');
  });

  it('says "Over" when a day is overbooked and "Nearly full" from 85 %', () => {
    expect(loadWords(load(570, 510))).toBe('9 h 30 min of 8 h 30 min. Over by 1 h 00 min');
    expect(loadWords(load(60, 0))).toBe('1 h 00 min on a day off. Over: booked on a day off');
    expect(loadWords(load(450, 510))).toBe('7 h 30 min of 8 h 30 min. Nearly full');
    expect(loadWords(load(420, 510))).toBe('7 h 00 min of 8 h 30 min');
  });

  it('calls a branch holiday a holiday, not a day off', () => {
    const holiday = { ...load(0, 0), day: '2026-12-25', holiday: true };
    expect(gaugeText(holiday)).toBe('Holiday');
    expect(cellLabel('Anneke Strand', '2026-12-25', 0, holiday)).toBe('Anneke Strand, Friday 25 December: no bookings, Holiday');
    expect(loadWords({ ...load(60, 0), holiday: true })).toBe('1 h 00 min on a holiday. Over: booked on a holiday');
    expect(gaugeText(load(0, 0))).toBe('Day off');
  });
});
