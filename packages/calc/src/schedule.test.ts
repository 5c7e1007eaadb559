import { describe, expect, it } from 'vitest';
import { driveMinutes } from './geo';
import {
  localDayBounds,
  rankTechnicians,
  weekdayOf,
  technicianLoad,
  workingWindow,
  zonedDate,
  zonedInstant,
  type Booking,
  type SchedulingJob,
  type Technician,
} from './schedule';

const hours = { start: '07:00', end: '17:00' };
const tech = (over: Partial<Technician> & { id: string }): Technician => ({
  name: over.id.toUpperCase(),
  skills: ['rooftop', 'chiller'],
  epa608: 'universal',
  workingHours: { mon: hours, tue: hours, wed: hours, thu: hours, fri: hours },
  timeZone: 'America/Chicago',
  start: { lat: 41.88, lon: -87.63 },
  ...over,
});

describe('time-zone helpers', () => {
  it('spring-forward day in America/Chicago (2027-03-14) has 23 hours', () => {
    const b = localDayBounds('2027-03-14', 'America/Chicago');
    expect((b.end - b.start) / 3_600_000).toBe(23);
    expect(new Date(b.start).toISOString()).toBe('2027-03-14T06:00:00.000Z'); // CST, UTC−6
    expect(new Date(b.end).toISOString()).toBe('2027-03-15T05:00:00.000Z'); // CDT, UTC−5
  });
  it('fall-back day (2027-11-07) has 25 hours', () => {
    const b = localDayBounds('2027-11-07', 'America/Chicago');
    expect((b.end - b.start) / 3_600_000).toBe(25);
  });
  it('converts local wall times and dates', () => {
    expect(new Date(zonedInstant('2027-03-15', '07:00', 'America/Chicago')).toISOString()).toBe('2027-03-15T12:00:00.000Z');
    expect(zonedDate('2027-03-15T04:59:00Z', 'America/Chicago')).toBe('2027-03-14');
    expect(() => zonedInstant('2027-03-15', '25:00', 'America/Chicago')).toThrow(RangeError);
    expect(() => zonedInstant('2027-03-15', '07:00', 'Mars/Olympus')).toThrow(RangeError);
  });
  it('weekdayOf gives 0 for Sunday', () => {
    expect(weekdayOf('2027-03-14')).toBe(0);
    expect(weekdayOf('2027-03-15')).toBe(1);
  });
  it('reads working hours by number or weekday name', () => {
    const t = tech({ id: 'a', workingHours: { 0: { start: '00:00', end: '06:00' }, sat: null } });
    const w = workingWindow(t, '2027-03-14'); // Sunday, across the 02:00 jump
    expect(w && (w.end - w.start) / 60_000).toBe(300);
    expect(workingWindow(t, '2027-03-13')).toBeNull();
  });
});

describe('technicianLoad', () => {
  it('sums bookings on the local day against working minutes, across a DST change', () => {
    const techs = [tech({ id: 'a', workingHours: { sun: { start: '00:00', end: '24:00' } } }), tech({ id: 'b' })];
    const bookings: Booking[] = [
      // Local midnight to midnight on 2027-03-14: 23 h of real time.
      { id: 'b1', techId: 'a', start: '2027-03-14T06:00:00Z', end: '2027-03-15T05:00:00Z' },
      { id: 'b2', techId: 'b', start: '2027-03-14T15:00:00Z', end: '2027-03-14T16:00:00Z' },
    ];
    const load = technicianLoad(bookings, techs, '2027-03-14');
    expect(load[0]).toEqual({ techId: 'a', day: '2027-03-14', bookedMinutes: 1380, capacityMinutes: 1380, ratio: 1, overloaded: false });
    expect(load[1]).toEqual({ techId: 'b', day: '2027-03-14', bookedMinutes: 60, capacityMinutes: 0, ratio: null, overloaded: true });
  });
  it('clips bookings to the day and flags overload', () => {
    const t = tech({ id: 'a' });
    const bookings: Booking[] = [
      { id: 'x', techId: 'a', start: '2027-03-15T10:00:00Z', end: '2027-03-15T23:00:00Z' }, // 05:00–18:00 CDT: 780 min
      { id: 'y', techId: 'a', start: '2027-03-16T03:00:00Z', end: '2027-03-16T07:00:00Z' }, // 22:00–02:00: 120 min on the 15th
      { id: 'z', techId: 'other', start: '2027-03-15T13:00:00Z', end: '2027-03-15T14:00:00Z' },
    ];
    const [l] = technicianLoad(bookings, [t], '2027-03-15');
    expect(l).toMatchObject({ bookedMinutes: 900, capacityMinutes: 600, ratio: 1.5, overloaded: true });
  });
});

describe('rankTechnicians', () => {
  const job: SchedulingJob = {
    id: 'j1',
    durationMinutes: 90,
    requiredSkill: 'chiller',
    requiredCertification: 'II',
    lat: 41.9,
    lon: -87.65,
    unitId: 'CH-7',
    day: '2027-03-15',
  };

  it('excludes on hard rules with plain reasons and ranks the rest', () => {
    const techs = [
      tech({ id: 'noskill', skills: ['rooftop'] }),
      tech({ id: 'typeI', epa608: 'I' }),
      tech({ id: 'off', workingHours: {} }),
      tech({ id: 'far', start: { lat: 42.3, lon: -88.2 } }),
      tech({ id: 'near' }),
      tech({ id: 'history' }),
    ];
    const bookings: Booking[] = [
      { id: 'old', techId: 'history', start: '2027-01-10T15:00:00Z', end: '2027-01-10T16:00:00Z', unitId: 'CH-7', lat: 41.9, lon: -87.65 },
    ];
    const r = rankTechnicians(job, techs, bookings);
    expect(r.map((x) => x.techId)).toEqual(['history', 'near', 'far', 'noskill', 'off', 'typeI']);
    expect(r[0]!.reasons).toContain('Has worked on this unit before (1 visit)');
    expect(r[0]!.score!).toBeGreaterThan(r[1]!.score!);
    expect(r[1]!.score!).toBeGreaterThan(r[2]!.score!);
    expect(r.find((x) => x.techId === 'noskill')).toMatchObject({ eligible: false, score: null, proposedStart: null });
    expect(r.find((x) => x.techId === 'noskill')!.reasons[0]).toBe('Lacks the skill "chiller"');
    expect(r.find((x) => x.techId === 'typeI')!.reasons[0]).toBe('EPA 608 Type I does not cover the Type II refrigerant work');
    expect(r.find((x) => x.techId === 'off')!.reasons[0]).toBe('Not working on 2027-03-15');
  });

  it('proposes the earliest free start after the previous stop plus travel, rounded to 5 minutes', () => {
    const t = tech({ id: 'a' });
    const prev = { lat: 41.95, lon: -87.7 };
    const bookings: Booking[] = [{ id: 'm', techId: 'a', start: '2027-03-15T12:00:00Z', end: '2027-03-15T15:00:00Z', ...prev }]; // 07:00–10:00 CDT
    const [r] = rankTechnicians(job, [t], bookings);
    const travel = driveMinutes(prev, job);
    const expected = Math.ceil((Date.parse('2027-03-15T15:00:00Z') + travel * 60_000) / 300_000) * 300_000;
    expect(r!.proposedStart).toBe(new Date(expected).toISOString());
    expect(Date.parse(r!.proposedEnd!) - expected).toBe(90 * 60_000);
    expect(r!.travelMinutes).toBeCloseTo(travel, 9);
    expect(r!.freeMinutes).toBe(420);
  });

  it('honours job earliest/latest and reports no slot when the day is full', () => {
    const t = tech({ id: 'a' });
    const late = rankTechnicians({ ...job, day: undefined, earliest: '2027-03-15T20:00:00Z' }, [t], []);
    expect(late[0]!.proposedStart).toBe('2027-03-15T20:00:00.000Z');
    const full: Booking[] = [{ id: 'f', techId: 'a', start: '2027-03-15T12:00:00Z', end: '2027-03-15T22:00:00Z' }];
    const r = rankTechnicians(job, [t], full);
    expect(r[0]).toMatchObject({ eligible: false });
    expect(r[0]!.reasons[0]).toMatch(/^No free slot of 1 h 30 min on 2027-03-15/);
    expect(() => rankTechnicians({ ...job, day: undefined }, [t], [])).toThrow(RangeError);
  });
});
