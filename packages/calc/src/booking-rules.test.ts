import { describe, expect, it } from 'vitest';
import { bookingBreaches, dueTimeBreach, technicianBreaches, unoverridden, workingHoursBreach, workOrderDueAt } from './booking-rules';
import { evenOut } from './even-out';
import { rankTechnicians, technicianLoad, workingWindow, type Booking, type SchedulingJob, type Technician } from './schedule';

/*
 * America/Chicago: CST = UTC−6 until the spring-forward night of 2027-03-14. Technicians work
 * Monday–Friday 07:00–15:30 local: on Wednesday 2027-03-10 that is 13:00Z–21:30Z.
 */
const hours = { start: '07:00', end: '15:30' };
const tech = (over: Partial<Technician> & { id: string }): Technician => ({
  name: 'Anneke Strand',
  skills: ['rooftop'],
  epa608: 'universal',
  workingHours: { mon: hours, tue: hours, wed: hours, thu: hours, fri: hours },
  timeZone: 'America/Chicago',
  start: { lat: 41.88, lon: -87.63 },
  ...over,
});

describe('workOrderDueAt', () => {
  it('is the latest acceptable start and, for an emergency, the SLA due time: the earlier of the two', () => {
    const latestAt = '2027-03-12T05:59:00Z';
    expect(workOrderDueAt({ priority: 'emergency', slaDueAt: '2027-03-10T22:00:00Z', latestAt })).toBe('2027-03-10T22:00:00.000Z');
    expect(workOrderDueAt({ priority: 'emergency', slaDueAt: '2027-03-13T22:00:00Z', latestAt })).toBe('2027-03-12T05:59:00.000Z');
    expect(workOrderDueAt({ priority: 'emergency', slaDueAt: new Date('2027-03-09T12:00:00Z') })).toBe('2027-03-09T12:00:00.000Z');
    expect(workOrderDueAt({ priority: 'normal', slaDueAt: null, latestAt })).toBe('2027-03-12T05:59:00.000Z');
  });
  it('leaves out the SLA time of other priorities (a target, not a rule)', () => {
    expect(workOrderDueAt({ priority: 'high', slaDueAt: '2027-03-10T22:00:00Z', latestAt: null })).toBeNull();
    expect(workOrderDueAt({ priority: 'normal', slaDueAt: '2027-03-10T22:00:00Z', latestAt: '2027-03-12T05:59:00Z' })).toBe(
      '2027-03-12T05:59:00.000Z',
    );
    expect(workOrderDueAt({ slaDueAt: null, latestAt: null })).toBeNull();
  });
});

describe('the rules', () => {
  it('skill: names the skill the work needs and the ones the technician has', () => {
    const [b] = technicianBreaches(tech({ id: 'a' }), { requiredSkill: 'chiller' });
    expect(b).toEqual({
      rule: 'skill',
      reason: 'Lacks the skill "chiller"',
      message: 'Anneke Strand lacks the skill "chiller" this work needs (has "rooftop").',
    });
    expect(technicianBreaches(tech({ id: 'a', skills: ['chiller'] }), { requiredSkill: 'chiller' })).toEqual([]);
  });

  it('certification: the technician’s EPA 608 type must cover the work (Universal covers any)', () => {
    const [b] = technicianBreaches(tech({ id: 'a', epa608: 'I' }), { requiredCertification: 'II' });
    expect(b!.rule).toBe('certification');
    expect(b!.message).toBe(
      'Anneke Strand is not certified for this refrigerant work (needs EPA 608 Type II; Anneke Strand holds EPA 608 Type I).',
    );
    expect(technicianBreaches(tech({ id: 'a', epa608: 'none' }), { requiredCertification: 'I' })[0]!.message).toContain(
      'holds no EPA 608 certification',
    );
    expect(technicianBreaches(tech({ id: 'a', epa608: 'universal' }), { requiredCertification: 'III' })).toEqual([]);
    expect(technicianBreaches(tech({ id: 'a', epa608: 'II' }), { requiredCertification: 'universal' })).toHaveLength(1);
  });

  it('working hours: inside the start day’s hours, in the technician’s zone', () => {
    const t = tech({ id: 'a' });
    expect(workingHoursBreach(t, '2027-03-10T13:00:00Z', '2027-03-10T21:30:00Z')).toBeNull(); // 07:00–15:30 exactly
    const late = workingHoursBreach(t, '2027-03-10T21:00:00Z', '2027-03-10T22:30:00Z');
    expect(late).toMatchObject({ rule: 'working_hours', reason: 'Outside working hours (07:00–15:30 on 2027-03-10)' });
    expect(late!.message).toBe('Anneke Strand works 07:00–15:30 on Wednesday, March 10; this booking runs 15:00–16:30 (America/Chicago).');
    expect(workingHoursBreach(t, '2027-03-11T04:00:00Z', '2027-03-11T07:00:00Z')!.message).toContain('runs 22:00–01:00 the next day');
    expect(workingHoursBreach(t, '2027-03-07T15:00:00Z', '2027-03-07T16:00:00Z')!.message).toBe(
      'Anneke Strand does not work on Sunday, March 7.',
    );
  });

  it('working hours: a branch holiday has no working window, whatever the weekday’s hours say', () => {
    // 2027-12-24 is a Friday (a working weekday for this technician); the branch keeps it as a holiday.
    const t = tech({ id: 'a', holidays: ['2027-12-24'] });
    const b = workingHoursBreach(t, '2027-12-24T15:00:00Z', '2027-12-24T16:00:00Z');
    expect(b).toMatchObject({ rule: 'working_hours', reason: 'Branch holiday on 2027-12-24' });
    expect(b!.message).toBe('Friday, December 24 is a branch holiday; Anneke Strand is not rostered to work.');
    // The next working day is unaffected, and a holiday on a weekend keeps the day-off wording.
    expect(workingHoursBreach(t, '2027-12-27T15:00:00Z', '2027-12-27T16:00:00Z')).toBeNull();
    expect(workingWindow(t, '2027-12-24')).toBeNull();
    expect(technicianLoad([], [t], '2027-12-24')[0]).toMatchObject({ capacityMinutes: 0, ratio: null });
  });

  it('due time: a booking may start at the due time, not after it', () => {
    const job = { dueAt: '2027-03-10T17:00:00Z' }; // 11:00 CST
    expect(dueTimeBreach(job, '2027-03-10T17:00:00Z', 'America/Chicago')).toBeNull();
    const b = dueTimeBreach(job, '2027-03-10T17:05:00Z', 'America/Chicago');
    expect(b).toMatchObject({ rule: 'due_time', reason: 'Starts after the due time (Wednesday, March 10 at 11:00)' });
    expect(b!.message).toBe(
      'This work is due by Wednesday, March 10 at 11:00 (America/Chicago); this booking starts Wednesday, March 10 at 11:05, after it.',
    );
    expect(dueTimeBreach({ dueAt: null }, '2030-01-01T00:00:00Z', 'America/Chicago')).toBeNull();
  });

  it('lists every broken rule in rule order; an override takes out only the rules it names', () => {
    const t = tech({ id: 'a', epa608: 'I' });
    const job = { requiredSkill: 'chiller', requiredCertification: 'II' as const, dueAt: '2027-03-09T23:00:00Z' };
    const all = bookingBreaches(t, job, '2027-03-10T21:00:00Z', '2027-03-10T22:30:00Z');
    expect(all.map((b) => b.rule)).toEqual(['skill', 'certification', 'working_hours', 'due_time']);
    expect(unoverridden(all, ['working_hours', 'skill']).map((b) => b.rule)).toEqual(['certification', 'due_time']);
    expect(unoverridden(all, [])).toHaveLength(4);
    expect(bookingBreaches(tech({ id: 'b', skills: ['chiller'] }), job, '2027-03-09T15:00:00Z', '2027-03-09T16:00:00Z')).toEqual([]);
  });
});

describe('suggestions and evening out keep the rules', () => {
  const job: SchedulingJob = { id: 'j', durationMinutes: 90, lat: 41.9, lon: -87.65, day: '2027-03-10' };

  it('never proposes a start after the due time, and says the due time is what stands in the way', () => {
    const t = tech({ id: 'a' });
    const busyMorning: Booking[] = [{ id: 'm', techId: 'a', start: '2027-03-10T13:00:00Z', end: '2027-03-10T17:00:00Z' }]; // 07:00–11:00
    const due = { ...job, dueAt: '2027-03-10T16:00:00Z' }; // 10:00 CST
    const [r] = rankTechnicians(due, [t], busyMorning);
    expect(r).toMatchObject({ eligible: false, proposedStart: null, blockedBy: ['due_time'] });
    expect(r!.reasons[0]).toBe('Due by 10:00; no free slot of 1 h 30 min starts by then (4 h 30 min free on 2027-03-10)');
    // Due before the day's hours begin.
    const [early] = rankTechnicians({ ...job, dueAt: '2027-03-09T23:00:00Z' }, [t], []);
    expect(early!.blockedBy).toEqual(['due_time']);
    expect(early!.reasons[0]).toBe("Due by 2027-03-09 17:00, before this day's working hours");
    // A start by the due time is proposed.
    const [ok] = rankTechnicians({ ...job, dueAt: '2027-03-10T18:00:00Z' }, [t], busyMorning);
    expect(ok!.eligible).toBe(true);
    expect(Date.parse(ok!.proposedStart!)).toBeLessThanOrEqual(Date.parse('2027-03-10T18:00:00Z'));
  });

  it('says "no free slot" only when the free time is too short, and names the rule otherwise', () => {
    const skilled = rankTechnicians({ ...job, requiredSkill: 'chiller' }, [tech({ id: 'a' })], []);
    expect(skilled[0]).toMatchObject({ eligible: false, blockedBy: ['skill'] });
    expect(skilled[0]!.reasons.join(' ')).not.toMatch(/free slot/);
    expect(skilled[0]!.freeMinutes).toBe(510);
    const full: Booking[] = [{ id: 'f', techId: 'a', start: '2027-03-10T13:00:00Z', end: '2027-03-10T21:00:00Z' }];
    expect(rankTechnicians(job, [tech({ id: 'a' })], full)[0]!.blockedBy).toEqual(['free_time']);
    const windowed = rankTechnicians({ ...job, day: undefined, earliest: '2027-03-10T20:30:00Z' }, [tech({ id: 'a' })], []);
    expect(windowed[0]!.blockedBy).toEqual(['window']);
    expect(windowed[0]!.reasons[0]).toBe(
      'No free slot of 1 h 30 min on 2027-03-10 between 14:30 and 15:30, the time the job allows (8 h 30 min free)',
    );
    expect(rankTechnicians(job, [tech({ id: 'a', workingHours: {} })], [])[0]!.blockedBy).toEqual(['working_hours']);
  });

  it('evenOut places a job only where it starts by its due time, or says the due time stops it', () => {
    const techs = [tech({ id: 'a' })];
    const week = '2027-03-08'; // Monday
    const r = evenOut({
      jobs: [{ ...job, day: undefined, dueAt: '2027-03-08T19:00:00Z' }],
      techs,
      bookings: [],
      week,
      options: { days: 5 },
    });
    expect(r.proposals).toHaveLength(1);
    expect(Date.parse(r.proposals[0]!.start)).toBeLessThanOrEqual(Date.parse('2027-03-08T19:00:00Z'));
    const busy: Booking[] = [{ id: 'x', techId: 'a', start: '2027-03-08T13:00:00Z', end: '2027-03-08T20:00:00Z' }];
    const late = evenOut({
      jobs: [{ ...job, day: undefined, dueAt: '2027-03-08T19:00:00Z' }],
      techs,
      bookings: busy,
      week,
      options: { days: 5 },
    });
    expect(late.proposals).toEqual([]);
    expect(late.unplaced[0]!.reason).toBe('Due by 2027-03-08 13:00: no free slot within working hours and capacity starts by then');
    const nobody = evenOut({ jobs: [{ ...job, day: undefined, requiredSkill: 'boiler' }], techs, bookings: [], week });
    expect(nobody.unplaced[0]!.reason).toBe('No technician has the skill "boiler"');
    const uncertified = evenOut({
      jobs: [{ ...job, day: undefined, requiredCertification: 'II' }],
      techs: [tech({ id: 'b', epa608: 'I' })],
      bookings: [],
      week,
    });
    expect(uncertified.unplaced[0]!.reason).toBe('No technician holds EPA 608 Type II or Universal');
  });
});
