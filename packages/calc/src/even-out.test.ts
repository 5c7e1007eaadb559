import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { evenOut } from './even-out';
import { technicianLoad, type Booking, type SchedulingJob, type Technician } from './schedule';

const hours = { start: '08:00', end: '16:00' };
const week = '2027-03-15'; // Monday
const days = ['2027-03-15', '2027-03-16', '2027-03-17', '2027-03-18', '2027-03-19', '2027-03-20', '2027-03-21'];

function lcg(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (Math.imul(a, 1664525) + 1013904223) >>> 0;
    return a / 2 ** 32;
  };
}

function makeTechs(n: number, r: () => number): Technician[] {
  return Array.from({ length: n }, (_, i) => ({
    id: `t${i}`,
    name: `Tech ${i}`,
    skills: r() < 0.7 ? ['rooftop', 'chiller'] : ['rooftop'],
    epa608: r() < 0.8 ? 'universal' : 'I',
    workingHours: { mon: hours, tue: hours, wed: hours, thu: hours, fri: r() < 0.5 ? hours : null },
    timeZone: i % 2 ? 'America/Chicago' : 'America/New_York',
    start: { lat: 41.8 + r() * 0.3, lon: -87.8 + r() * 0.3 },
  }));
}

function makeJobs(n: number, r: () => number): SchedulingJob[] {
  return Array.from({ length: n }, (_, i) => ({
    id: `j${i}`,
    durationMinutes: 30 + Math.floor(r() * 8) * 15,
    ...(r() < 0.3 ? { requiredSkill: 'chiller' } : {}),
    ...(r() < 0.5 ? { requiredCertification: 'II' as const } : {}),
    lat: 41.8 + r() * 0.3,
    lon: -87.8 + r() * 0.3,
    priority: Math.floor(r() * 3),
  }));
}

function overlaps(a: { start: string | Date; end: string | Date }, b: { start: string | Date; end: string | Date }): boolean {
  return new Date(a.start).getTime() < new Date(b.end).getTime() && new Date(b.start).getTime() < new Date(a.end).getTime();
}

function checkInvariants(techs: Technician[], jobs: SchedulingJob[], bookings: Booking[], result: ReturnType<typeof evenOut>): void {
  const all: Booking[] = [...bookings, ...result.proposals.map((p) => ({ id: `p-${p.jobId}`, techId: p.techId, start: p.start, end: p.end }))];
  const before = new Map(days.flatMap((d) => technicianLoad(bookings, techs, d).map((l) => [`${l.techId}|${d}`, l])));
  for (const d of days) {
    for (const l of technicianLoad(all, techs, d)) {
      const b = before.get(`${l.techId}|${d}`)!;
      if (l.bookedMinutes > b.bookedMinutes) expect(l.bookedMinutes).toBeLessThanOrEqual(l.capacityMinutes); // never over capacity
    }
  }
  for (const p of result.proposals) {
    const t = techs.find((x) => x.id === p.techId)!;
    const j = jobs.find((x) => x.id === p.jobId)!;
    if (j.requiredSkill) expect(t.skills).toContain(j.requiredSkill);
    if (j.requiredCertification) expect(t.epa608).toBe('universal');
    for (const o of all) if (o.techId === p.techId && o.id !== `p-${p.jobId}`) expect(overlaps(p, o)).toBe(false);
  }
  expect(result.proposals.length + result.unplaced.length).toBe(jobs.length);
}

describe('evenOut', () => {
  it('spreads equal jobs across equal technicians', () => {
    const techs = makeTechs(2, lcg(1)).map((t) => ({ ...t, skills: ['rooftop'], epa608: 'universal' as const, workingHours: { mon: hours }, timeZone: 'America/Chicago', start: { lat: 41.9, lon: -87.7 } }));
    const jobs = Array.from({ length: 4 }, (_, i) => ({ id: `j${i}`, durationMinutes: 60, lat: 41.9, lon: -87.7 }));
    const r = evenOut({ jobs, techs, bookings: [], week, options: { days: 1 } });
    expect(r.unplaced).toEqual([]);
    expect(r.proposals.filter((p) => p.techId === techs[0]!.id)).toHaveLength(2);
    expect(r.spread).toBe(0);
  });

  it('never moves a fixed booking and works around it', () => {
    const techs = makeTechs(1, lcg(2)).map((t) => ({ ...t, workingHours: { mon: hours }, timeZone: 'America/Chicago', start: { lat: 41.9, lon: -87.7 } }));
    const fixed: Booking = { id: 'fx', techId: techs[0]!.id, start: '2027-03-15T13:00:00Z', end: '2027-03-15T20:00:00Z', fixed: true };
    const r = evenOut({ jobs: [{ id: 'j', durationMinutes: 60, lat: 41.9, lon: -87.7 }, { id: 'k', durationMinutes: 120, lat: 41.9, lon: -87.7 }], techs, bookings: [fixed], week, options: { days: 1 } });
    expect(r.proposals).toHaveLength(1);
    expect(r.proposals[0]).toMatchObject({ jobId: 'j', start: '2027-03-15T20:00:00.000Z', end: '2027-03-15T21:00:00.000Z' });
    expect(overlaps(r.proposals[0]!, { start: fixed.start as string, end: fixed.end as string })).toBe(false);
    expect(r.unplaced).toEqual([{ jobId: 'k', reason: 'No free slot within working hours and capacity in the period' }]);
  });

  it('reports jobs no technician can take', () => {
    const techs = makeTechs(2, lcg(3)).map((t) => ({ ...t, skills: ['rooftop'] }));
    const r = evenOut({ jobs: [{ id: 'c', durationMinutes: 60, requiredSkill: 'boiler', lat: 41.9, lon: -87.7 }], techs, bookings: [], week });
    expect(r.unplaced[0]!.jobId).toBe('c');
  });

  it('places 200 jobs over 15 technicians within capacity', () => {
    const r0 = lcg(42);
    const techs = makeTechs(15, r0);
    const jobs = makeJobs(200, r0);
    const bookings: Booking[] = techs.slice(0, 5).map((t, i) => ({ id: `b${i}`, techId: t.id, start: '2027-03-16T14:00:00Z', end: '2027-03-16T17:00:00Z', fixed: i % 2 === 0 }));
    const r = evenOut({ jobs, techs, bookings, week });
    checkInvariants(techs, jobs, bookings, r);
    expect(r.proposals.length).toBeGreaterThan(150);
  });

  it('property: never exceeds capacity, never overlaps, respects skills and certification', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 1, max: 5 }), fc.integer({ min: 0, max: 40 }), (seed, nTechs, nJobs) => {
        const r0 = lcg(seed);
        const techs = makeTechs(nTechs, r0);
        const jobs = makeJobs(nJobs, r0);
        const bookings: Booking[] = techs.map((t, i) => ({ id: `b${i}`, techId: t.id, start: '2027-03-17T15:00:00Z', end: `2027-03-17T${String(16 + (i % 4)).padStart(2, '0')}:00:00Z`, fixed: true }));
        checkInvariants(techs, jobs, bookings, evenOut({ jobs, techs, bookings, week }));
      }),
      { numRuns: 25 },
    );
  });
});
