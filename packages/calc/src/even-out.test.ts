import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { certificationSatisfies } from './certification';
import { evenOut, type MovableBooking } from './even-out';
import { driveMinutes } from './geo';
import { technicianLoad, workingWindow, zonedDate, type Booking, type SchedulingJob, type Technician } from './schedule';

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
  const all: Booking[] = [
    ...bookings,
    ...result.proposals.map((p) => ({ id: `p-${p.jobId}`, techId: p.techId, start: p.start, end: p.end })),
  ];
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
    const techs = makeTechs(2, lcg(1)).map((t) => ({
      ...t,
      skills: ['rooftop'],
      epa608: 'universal' as const,
      workingHours: { mon: hours },
      timeZone: 'America/Chicago',
      start: { lat: 41.9, lon: -87.7 },
    }));
    const jobs = Array.from({ length: 4 }, (_, i) => ({ id: `j${i}`, durationMinutes: 60, lat: 41.9, lon: -87.7 }));
    const r = evenOut({ jobs, techs, bookings: [], week, options: { days: 1 } });
    expect(r.unplaced).toEqual([]);
    expect(r.proposals.filter((p) => p.techId === techs[0]!.id)).toHaveLength(2);
    expect(r.spread).toBe(0);
  });

  it('never moves a fixed booking and works around it', () => {
    const techs = makeTechs(1, lcg(2)).map((t) => ({
      ...t,
      workingHours: { mon: hours },
      timeZone: 'America/Chicago',
      start: { lat: 41.9, lon: -87.7 },
    }));
    const fixed: Booking = { id: 'fx', techId: techs[0]!.id, start: '2027-03-15T13:00:00Z', end: '2027-03-15T20:00:00Z', fixed: true };
    const r = evenOut({
      jobs: [
        { id: 'j', durationMinutes: 60, lat: 41.9, lon: -87.7 },
        { id: 'k', durationMinutes: 120, lat: 41.9, lon: -87.7 },
      ],
      techs,
      bookings: [fixed],
      week,
      options: { days: 1 },
    });
    expect(r.proposals).toHaveLength(1);
    expect(r.proposals[0]).toMatchObject({ jobId: 'j', start: '2027-03-15T20:00:00.000Z', end: '2027-03-15T21:00:00.000Z' });
    expect(overlaps(r.proposals[0]!, { start: fixed.start as string, end: fixed.end as string })).toBe(false);
    expect(r.unplaced).toEqual([{ jobId: 'k', reason: 'No free slot within working hours and capacity in the period' }]);
  });

  it('reports jobs no technician can take', () => {
    const techs = makeTechs(2, lcg(3)).map((t) => ({ ...t, skills: ['rooftop'] }));
    const r = evenOut({
      jobs: [{ id: 'c', durationMinutes: 60, requiredSkill: 'boiler', lat: 41.9, lon: -87.7 }],
      techs,
      bookings: [],
      week,
    });
    expect(r.unplaced[0]!.jobId).toBe('c');
  });

  it('places 200 jobs over 15 technicians within capacity', () => {
    const r0 = lcg(42);
    const techs = makeTechs(15, r0);
    const jobs = makeJobs(200, r0);
    const bookings: Booking[] = techs
      .slice(0, 5)
      .map((t, i) => ({ id: `b${i}`, techId: t.id, start: '2027-03-16T14:00:00Z', end: '2027-03-16T17:00:00Z', fixed: i % 2 === 0 }));
    const r = evenOut({ jobs, techs, bookings, week });
    checkInvariants(techs, jobs, bookings, r);
    expect(r.proposals.length).toBeGreaterThan(150);
  });

  it('property: never exceeds capacity, never overlaps, respects skills and certification', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e6 }),
        fc.integer({ min: 1, max: 5 }),
        fc.integer({ min: 0, max: 40 }),
        (seed, nTechs, nJobs) => {
          const r0 = lcg(seed);
          const techs = makeTechs(nTechs, r0);
          const jobs = makeJobs(nJobs, r0);
          const bookings: Booking[] = techs.map((t, i) => ({
            id: `b${i}`,
            techId: t.id,
            start: '2027-03-17T15:00:00Z',
            end: `2027-03-17T${String(16 + (i % 4)).padStart(2, '0')}:00:00Z`,
            fixed: true,
          }));
          checkInvariants(techs, jobs, bookings, evenOut({ jobs, techs, bookings, week }));
        },
      ),
      { numRuns: 25 },
    );
  });
});

// ---------------------------------------------------------------------------------------------
// Moving booked jobs to even out the load
// ---------------------------------------------------------------------------------------------

const weekdays = days.slice(0, 5);
const MIN = 60_000;

/**
 * A booked week: each technician's day is filled from 08:30 with jobs of 60, 90 or 120 min and
 * 30 min between them (more than the longest drive in the 0.1° square, so the bookings as they
 * stand keep drive times), up to a target load per technician. Every booking is listed as movable;
 * some are fixed, some need the chiller skill or EPA 608 Type II, some are due the day they are
 * booked or the next.
 */
function bookedWeek(seed: number, nTechs: number, target: (i: number) => number, fixedShare = 0.15) {
  const r = lcg(seed);
  const techs: Technician[] = Array.from({ length: nTechs }, (_, i) => ({
    id: `t${i}`,
    name: `Tech ${i}`,
    skills: r() < 0.7 ? ['rooftop', 'chiller'] : ['rooftop'],
    epa608: r() < 0.8 ? 'universal' : 'II',
    workingHours: { mon: hours, tue: hours, wed: hours, thu: hours, fri: i % 5 === 4 ? null : hours },
    timeZone: i % 2 ? 'America/Chicago' : 'America/New_York',
    start: { lat: 41.85 + r() * 0.1, lon: -87.7 + r() * 0.1 },
  }));
  const bookings: Booking[] = [];
  const movable: MovableBooking[] = [];
  for (const t of techs) {
    for (const d of weekdays) {
      const win = workingWindow(t, d);
      if (!win) continue;
      let at = win.start + 30 * MIN;
      let load = 0;
      for (;;) {
        const len = [60, 90, 120][Math.floor(r() * 3)] as number;
        if (load + len > target(Number(t.id.slice(1))) || at + len * MIN > win.end) break;
        const id = `b${bookings.length}`;
        const job: SchedulingJob = {
          id: `w${id}`,
          durationMinutes: len,
          lat: 41.85 + r() * 0.1,
          lon: -87.7 + r() * 0.1,
          ...(t.skills.includes('chiller') && r() < 0.3 ? { requiredSkill: 'chiller' } : {}),
          ...(r() < 0.5 ? { requiredCertification: 'II' as const } : {}),
          ...(r() < 0.25 ? { latest: new Date(win.end + Math.floor(r() * 2) * 86_400_000).toISOString() } : {}),
        };
        const b: Booking = {
          id,
          techId: t.id,
          jobId: job.id,
          start: new Date(at).toISOString(),
          end: new Date(at + len * MIN).toISOString(),
          lat: job.lat,
          lon: job.lon,
          ...(r() < fixedShare ? { fixed: true } : {}),
        };
        bookings.push(b);
        movable.push({ booking: b, job });
        at += (len + 30) * MIN;
        load += len;
      }
    }
  }
  return { techs, bookings, movable };
}

const ms = (v: string | Date) => new Date(v).getTime();

/** The week as it stands after the result: bookings with the moves applied, plus the proposals. */
function planAfter(bookings: Booking[], result: ReturnType<typeof evenOut>, jobs: SchedulingJob[], movable: MovableBooking[]) {
  const moved = new Map(result.moves.map((m) => [m.bookingId, m]));
  const loc = new Map([...jobs, ...movable.map((m) => m.job)].map((j) => [j.id, { lat: j.lat, lon: j.lon }]));
  return [
    ...bookings.map((b) => {
      const m = moved.get(b.id);
      return m
        ? { ...b, techId: m.to.techId, start: m.to.start, end: m.to.end, kind: 'move' as const }
        : { ...b, kind: 'booking' as const };
    }),
    ...result.proposals.map((p) => ({
      id: `p-${p.jobId}`,
      jobId: p.jobId,
      techId: p.techId,
      start: p.start,
      end: p.end,
      ...loc.get(p.jobId),
      kind: 'proposal' as const,
    })),
  ];
}

function sumSquares(result: ReturnType<typeof evenOut>): number {
  return result.load.reduce((s, l) => s + (l.ratio === null ? 0 : l.ratio * l.ratio), 0);
}

/** Every hard rule for every move, and the plan's drive times, capacity and load figures. */
function checkMoves(
  techs: Technician[],
  bookings: Booking[],
  jobs: SchedulingJob[],
  movable: MovableBooking[],
  result: ReturnType<typeof evenOut>,
  opts: { now?: string; maxMoves?: number; period: string[] },
) {
  const byBooking = new Map(movable.map((m) => [m.booking.id, m]));
  const techOf = new Map(techs.map((t) => [t.id, t]));
  expect(result.moves.length).toBeLessThanOrEqual(opts.maxMoves ?? 20);
  expect(new Set(result.moves.map((m) => m.bookingId)).size).toBe(result.moves.length);
  for (const m of result.moves) {
    const entry = byBooking.get(m.bookingId)!;
    expect(entry).toBeDefined();
    const { booking, job } = entry;
    expect(m.jobId).toBe(job.id);
    // Never a fixed or started booking.
    expect(booking.fixed).not.toBe(true);
    expect(booking.started).not.toBe(true);
    if (opts.now) expect(ms(booking.start)).toBeGreaterThan(ms(opts.now));
    // From where it stands, to the same length.
    expect(m.from).toMatchObject({
      techId: booking.techId,
      start: new Date(booking.start).toISOString(),
      end: new Date(booking.end).toISOString(),
    });
    expect(ms(m.to.end) - ms(m.to.start)).toBe(ms(booking.end) - ms(booking.start));
    expect(m.to.techId !== m.from.techId || m.to.day !== m.from.day).toBe(true);
    // Skill, certification, the period, inside working hours, not before it may start, never after it is due.
    const t = techOf.get(m.to.techId)!;
    if (job.requiredSkill) expect(t.skills).toContain(job.requiredSkill);
    expect(certificationSatisfies(t.epa608, job.requiredCertification)).toBe(true);
    expect(opts.period).toContain(m.to.day);
    if (job.day) expect(m.to.day).toBe(job.day);
    const win = workingWindow(t, m.to.day)!;
    expect(ms(m.to.start)).toBeGreaterThanOrEqual(win.start);
    expect(ms(m.to.end)).toBeLessThanOrEqual(win.end);
    if (job.latest) expect(ms(m.to.end)).toBeLessThanOrEqual(ms(job.latest));
    if (job.earliest) expect(ms(m.to.start)).toBeGreaterThanOrEqual(ms(job.earliest));
    if (opts.now) expect(ms(m.to.start)).toBeGreaterThanOrEqual(ms(opts.now));
  }
  // No overlap, drive time kept around every moved or proposed job, capacity where anything arrived.
  const plan = planAfter(bookings, result, jobs, movable);
  const before = new Map(opts.period.flatMap((d) => technicianLoad(bookings, techs, d).map((l) => [`${l.techId}|${d}`, l])));
  for (const t of techs) {
    const mine = plan.filter((b) => b.techId === t.id).sort((a, b) => ms(a.start) - ms(b.start));
    for (let i = 0; i < mine.length; i++) {
      const x = mine[i]!;
      for (let k = i + 1; k < mine.length; k++)
        if (x.kind !== 'booking' || mine[k]!.kind !== 'booking') expect(overlaps(x, mine[k]!)).toBe(false);
      if (x.kind === 'booking') continue;
      const win = workingWindow(t, zonedDate(new Date(x.start), t.timeZone))!;
      const earlier = mine.slice(0, i).filter((b) => ms(b.end) > win.start && ms(b.start) < win.end);
      const prev = earlier.at(-1);
      const from = prev && prev.lat !== undefined ? { lat: prev.lat, lon: prev.lon! } : t.start;
      const prevEnd = prev ? Math.max(...earlier.map((b) => ms(b.end))) : win.start;
      expect(ms(x.start)).toBeGreaterThanOrEqual(prevEnd + driveMinutes(from, { lat: x.lat!, lon: x.lon! }) * MIN - 1e-3);
      const next = mine[i + 1];
      if (next && ms(next.start) < win.end && next.lat !== undefined)
        expect(ms(x.end) + driveMinutes({ lat: x.lat!, lon: x.lon! }, { lat: next.lat, lon: next.lon! }) * MIN).toBeLessThanOrEqual(
          ms(next.start) + 1e-3,
        );
    }
  }
  const arrived = new Set(
    plan.filter((b) => b.kind !== 'booking').map((b) => `${b.techId}|${zonedDate(new Date(b.start), techOf.get(b.techId)!.timeZone)}`),
  );
  const reported = new Map(result.load.map((l) => [`${l.techId}|${l.day}`, l]));
  for (const d of opts.period) {
    for (const l of technicianLoad(plan, techs, d)) {
      const key = `${l.techId}|${d}`;
      expect(reported.get(key)!.bookedMinutes).toBeCloseTo(l.bookedMinutes, 6); // the reported load is the plan's
      if (arrived.has(key) || l.bookedMinutes > before.get(key)!.bookedMinutes)
        expect(l.bookedMinutes).toBeLessThanOrEqual(l.capacityMinutes);
    }
  }
}

/**
 * Lower bound on the spread (highest minus lowest load ratio over the tech-days with capacity) any
 * arrangement of the movable bookings can reach. Method (common practice, no source): the
 * relaxation that lets load split freely — every tech-day i carries x_i between L_i (what cannot
 * leave: fixed, started, or not movable) and U_i = min(capacity C_i, L_i + every movable job that
 * may go there by skill, certification and its time limits, or stands there), with Σ x_i = T, the
 * week's booked minutes. Water-filling at level λ (x_i = clamp(λ·C_i, L_i, U_i)) gives: the highest
 * ratio is at least max(λ_lo, max L_i/C_i) and the lowest at most min(λ_hi, min U_i/C_i), where
 * [λ_lo, λ_hi] are the levels whose water-filling sums to T (if the highest ratio M were below λ_lo,
 * Σ x_i ≤ Σ clamp(M·C_i, L_i, U_i) < T). Then indivisibility: when every capacity is the same C and
 * every load is a multiple of g minutes, the highest load is at least that bound rounded up to a
 * multiple of g and the lowest at most that bound rounded down. Drive time is ignored (it only
 * makes the real spread larger).
 */
function spreadLowerBound(techs: Technician[], bookings: Booking[], movable: MovableBooking[], period: string[], now: string, g: number) {
  const nowMs = ms(now);
  const cells = techs.flatMap((t) =>
    period.flatMap((d) => {
      const win = workingWindow(t, d);
      return win ? [{ t, d, win, C: (win.end - win.start) / MIN, L: 0, extra: 0 }] : [];
    }),
  );
  const zoneOf = new Map(techs.map((t) => [t.id, t.timeZone]));
  const cellAt = (techId: string, at: number) => {
    const d = zonedDate(new Date(at), zoneOf.get(techId)!);
    return cells.find((c) => c.t.id === techId && c.d === d)!;
  };
  const byBooking = new Map(movable.map((m) => [m.booking.id, m]));
  let T = 0;
  for (const b of bookings) {
    const s = ms(b.start);
    const len = (ms(b.end) - s) / MIN;
    T += len;
    const home = cellAt(b.techId, s);
    const m = byBooking.get(b.id);
    if (!m || b.fixed || b.started || s <= nowMs) {
      home.L += len;
      continue;
    }
    const j = m.job;
    for (const c of cells) {
      const fits =
        (!j.requiredSkill || c.t.skills.includes(j.requiredSkill)) &&
        certificationSatisfies(c.t.epa608, j.requiredCertification) &&
        Math.max(c.win.start, nowMs) + len * MIN <= Math.min(c.win.end, j.latest ? ms(j.latest) : Infinity);
      if (fits || c === home) c.extra += len;
    }
  }
  const U = cells.map((c) => Math.min(c.C, c.L + c.extra));
  const fill = (level: number) => cells.reduce((s, c, i) => s + Math.min(U[i]!, Math.max(c.L, level * c.C)), 0);
  let [a, b] = [0, 2];
  for (let i = 0; i < 200; i++) [a, b] = fill((a + b) / 2) >= T ? [a, (a + b) / 2] : [(a + b) / 2, b];
  const lambdaLo = a; // fill(a) < T ≤ fill(b): a ≤ λ_lo, rounded down
  [a, b] = [0, 2];
  for (let i = 0; i < 200; i++) [a, b] = fill((a + b) / 2) <= T ? [(a + b) / 2, b] : [a, (a + b) / 2];
  const lambdaHi = b; // rounded up
  const highest = Math.max(lambdaLo, ...cells.map((c) => c.L / c.C));
  const lowest = Math.min(lambdaHi, ...cells.map((c, i) => U[i]! / c.C));
  const C = cells[0]!.C;
  expect(cells.every((c) => c.C === C)).toBe(true);
  expect(bookings.every((x) => ((ms(x.end) - ms(x.start)) / MIN) % g === 0)).toBe(true);
  const relaxed = Math.max(0, highest - lowest);
  const indivisible = Math.max(0, (Math.ceil((highest * C) / g - 1e-9) - Math.floor((lowest * C) / g + 1e-9)) * g) / C;
  return { relaxed, indivisible, average: T / cells.reduce((s, c) => s + c.C, 0) };
}

describe('evenOut moving booked jobs', () => {
  const tue = '2027-03-16';
  const twoTechs = (): Technician[] =>
    ['a', 'b'].map((id) => ({
      id,
      name: id,
      skills: ['rooftop'],
      epa608: 'universal' as const,
      workingHours: { mon: hours, tue: hours },
      timeZone: 'America/Chicago',
      start: { lat: 41.9, lon: -87.7 },
    }));
  /** Three 2 h jobs booked on a's Tuesday (09:00, 11:30 and 14:00 Chicago). */
  const crowded = (job: Partial<SchedulingJob> = {}, booking: Partial<Booking> = {}): MovableBooking[] =>
    ['09:00', '11:30', '14:00'].map((hm, i) => {
      const start = `${tue}T${hm}:00-05:00`;
      const j: SchedulingJob = { id: `w${i}`, durationMinutes: 120, lat: 41.9, lon: -87.7, ...job };
      return {
        job: j,
        booking: {
          id: `b${i}`,
          techId: 'a',
          jobId: j.id,
          start,
          end: new Date(ms(start) + 120 * MIN).toISOString(),
          lat: 41.9,
          lon: -87.7,
          ...booking,
        },
      };
    });

  it('moves booked work from a crowded day to a free one, lowering the spread', () => {
    const techs = twoTechs();
    const movable = crowded();
    const bookings = movable.map((m) => m.booking);
    const r = evenOut({ jobs: [], techs, bookings, movable, week: tue, options: { days: 1 } });
    expect(r.spreadBefore).toBe(0.75); // 360 / 480 against 0
    expect(r.spreadWithoutMoves).toBe(0.75);
    expect(r.moves).toHaveLength(1); // 240/120 beats 360/0; a second move would only swap the two
    expect(r.moves[0]!.to).toMatchObject({ techId: 'b', day: tue });
    expect(r.spread).toBe(0.25);
    checkMoves(techs, bookings, [], movable, r, { period: [tue] });
  });

  it('moves nothing that is fixed, started, past now, due before the free time, or needs what the other lacks', () => {
    const techs = twoTechs();
    // b is busy until 09:30, so a 2 h job moved there ends 11:30 at the earliest.
    const blocker: Booking = { id: 'x', techId: 'b', start: `${tue}T08:00:00-05:00`, end: `${tue}T09:30:00-05:00`, fixed: true };
    const run = (movable: MovableBooking[], opts: { now?: string } = {}, ts: Technician[] = techs) =>
      evenOut({
        jobs: [],
        techs: ts,
        bookings: [...movable.map((m) => m.booking), blocker],
        movable,
        week: tue,
        options: { days: 1, ...opts },
      });
    // Without a restriction the work moves (360 / 90 min → 240 / 210).
    const control = run(crowded());
    expect(control.moves.length).toBeGreaterThan(0);
    expect(control.spread).toBeLessThan(control.spreadWithoutMoves);
    const chillerA = techs.map((t) => (t.id === 'a' ? { ...t, skills: ['rooftop', 'chiller'] } : t));
    const typeIB = techs.map((t) => (t.id === 'b' ? { ...t, epa608: 'I' as const } : t));
    const cases: [string, ReturnType<typeof evenOut>][] = [
      ['fixed', run(crowded({}, { fixed: true }))],
      ['started', run(crowded({}, { started: true }))],
      ['begun before now', run(crowded(), { now: `${tue}T16:00:00-05:00` })],
      ['skill', run(crowded({ requiredSkill: 'chiller' }), {}, chillerA)],
      ['certification', run(crowded({ requiredCertification: 'II' }), {}, typeIB)],
      ['due', run(crowded({ latest: `${tue}T11:00:00-05:00` }))],
      ['its day', run(crowded({ day: '2027-03-15' }))],
    ];
    for (const [what, r] of cases) {
      expect(r.moves, what).toEqual([]);
      expect(r.spread, what).toBe(r.spreadWithoutMoves);
    }
  });

  it('never fills a day past its capacity, even to relieve an overloaded one', () => {
    const techs = twoTechs();
    // a is booked 12 h (two 6 h jobs, the second into the evening); b has work after hours.
    const movable: MovableBooking[] = ['08:00', '14:00'].map((hm, i) => {
      const start = `${tue}T${hm}:00-05:00`;
      const job: SchedulingJob = { id: `w${i}`, durationMinutes: 360, lat: 41.9, lon: -87.7 };
      return {
        job,
        booking: {
          id: `b${i}`,
          techId: 'a',
          jobId: job.id,
          start,
          end: new Date(ms(start) + 360 * MIN).toISOString(),
          lat: 41.9,
          lon: -87.7,
        },
      };
    });
    const evening = (hours: number): Booking => ({
      id: 'e',
      techId: 'b',
      start: `${tue}T16:00:00-05:00`,
      end: `${tue}T${16 + hours}:00:00-05:00`,
      fixed: true,
    });
    const run = (h: number) =>
      evenOut({ jobs: [], techs, bookings: [...movable.map((m) => m.booking), evening(h)], movable, week: tue, options: { days: 1 } });
    // 1 h after hours: a 6 h job fits (420 of 480 min).
    expect(run(1).moves).toHaveLength(1);
    // 4 h after hours: it would make 600 of 480 min, though 720/240 → 360/600 lowers the sum of squares.
    const r = run(4);
    expect(r.moves).toEqual([]);
    expect(r.load.find((l) => l.techId === 'b')!.bookedMinutes).toBe(240);
  });

  it('with nothing movable the result is what it was: moves empty and every other field equal', () => {
    const r0 = lcg(5);
    const techs = makeTechs(6, r0);
    const jobs = makeJobs(60, r0);
    const w = bookedWeek(5, 6, (i) => (i < 2 ? 360 : 120));
    const techsW = w.techs;
    const plain = evenOut({ jobs, techs: techsW, bookings: w.bookings, week });
    expect(plain.moves).toEqual([]);
    expect(plain.spreadWithoutMoves).toBe(plain.spread);
    expect(evenOut({ jobs, techs: techsW, bookings: w.bookings, movable: [], week })).toEqual(plain);
    // Listed but fixed or started, or with moves turned off: the same.
    const pinned = w.movable.map((m, i) => ({ ...m, booking: { ...m.booking, ...(i % 2 ? { fixed: true } : { started: true }) } }));
    expect(evenOut({ jobs, techs: techsW, bookings: pinned.map((m) => m.booking), movable: pinned, week })).toEqual(plain);
    expect(evenOut({ jobs, techs: techsW, bookings: w.bookings, movable: w.movable, week, options: { maxMoves: 0 } })).toEqual(plain);
    // Techs and jobs of the earlier tests, no bookings: nothing to move.
    expect(evenOut({ jobs, techs, bookings: [], week }).moves).toEqual([]);
  });

  it('refuses a movable list that contradicts itself', () => {
    const techs = twoTechs();
    const movable = crowded();
    expect(() =>
      evenOut({ jobs: [{ id: 'w0', durationMinutes: 60, lat: 41.9, lon: -87.7 }], techs, bookings: [], movable, week: tue }),
    ).toThrow(RangeError);
    expect(() => evenOut({ jobs: [], techs, bookings: [{ ...movable[0]!.booking, techId: 'b' }], movable, week: tue })).toThrow(RangeError);
    expect(() => evenOut({ jobs: [], techs, bookings: [], movable: [movable[0]!, movable[0]!], week: tue })).toThrow(RangeError);
    expect(() => evenOut({ jobs: [], techs, bookings: [], movable, week: tue, options: { maxMoves: -1 } })).toThrow(RangeError);
    expect(() => evenOut({ jobs: [], techs, bookings: [], movable, week: tue, options: { minMoveGain: Number.NaN } })).toThrow(RangeError);
    // Two bookings of one job (a job over two visits) are fine.
    const twoVisits = movable.map((m) => ({ ...m, job: movable[0]!.job, booking: { ...m.booking, jobId: movable[0]!.job.id } }));
    expect(evenOut({ jobs: [], techs, bookings: [], movable: twoVisits, week: tue, options: { days: 1 } }).moves).toHaveLength(1);
    // The booking may come only through `movable`: it counts once either way.
    expect(evenOut({ jobs: [], techs, bookings: [], movable, week: tue, options: { days: 1 } })).toEqual(
      evenOut({ jobs: [], techs, bookings: movable.map((m) => m.booking), movable, week: tue, options: { days: 1 } }),
    );
  });

  it('property: every move keeps skill, certification, due time, working hours, capacity, no overlap; moves only when the load evens out', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e6 }),
        fc.integer({ min: 1, max: 5 }),
        fc.integer({ min: 0, max: 12 }),
        fc.integer({ min: 0, max: 25 }),
        fc.constantFrom(undefined, '2027-03-15T15:00:00Z', '2027-03-17T18:30:00Z'),
        fc.double({ min: 0, max: 0.5, noNaN: true }),
        (seed, nTechs, nJobs, maxMoves, now, fixedShare) => {
          const r0 = lcg(seed);
          const w = bookedWeek(seed, nTechs, () => 60 + Math.floor(r0() * 7) * 60, fixedShare);
          const movable = w.movable.map((m, i) => (i % 11 === 3 ? { ...m, booking: { ...m.booking, started: true } } : m));
          const bookings = movable.map((m) => m.booking);
          const jobs = makeJobs(nJobs, r0).map((j) => ({ ...j, lat: 41.85 + r0() * 0.1, lon: -87.7 + r0() * 0.1 }));
          const options = { maxMoves, ...(now ? { now } : {}) };
          const r = evenOut({ jobs, techs: w.techs, bookings, movable, week, options });
          checkMoves(w.techs, bookings, jobs, movable, r, { ...options, period: days });
          expect(r.proposals.length + r.unplaced.length).toBe(jobs.length);
          const without = evenOut({ jobs, techs: w.techs, bookings, week, options });
          expect(r.spreadWithoutMoves).toBe(without.spread);
          if (r.moves.length === 0) expect(r).toEqual(without);
          // No churn: moves (with no extra placement they freed room for) lower the sum of squared load ratios.
          else if (r.proposals.length === without.proposals.length) expect(sumSquares(r)).toBeLessThan(sumSquares(without) - 1e-9);
        },
      ),
      { numRuns: 30 },
    );
  });

  /**
   * Seeded weeks (bookedWeek, seeds 1–8): 10 technicians (two off on Friday), 8 h days; three booked
   * to 7 h a day, three to 4 h, four to 2 h (about 110 bookings); 15 % fixed; now is Monday 10:00
   * Chicago, so Monday's earlier work has started. Only moves, no unplaced jobs. The bound is
   * spreadLowerBound's indivisible form (g = 30 min, every length a multiple of it); "relaxed" is
   * the same without indivisibility. Measured when written:
   *
   *   seed  before  after (20 moves)  after (no limit, moves)  bound   relaxed
   *   1     0.625   0.3125            0.3125 (21)              0.25    0.210
   *   2     0.625   0.375             0.375  (20)              0.3125  0.289
   *   3     0.625   0.1875            0.1875 (20)              0.1875  0.140
   *   4     0.625   0.1875            0.125  (23)              0.125   0.085
   *   5     0.625   0.25              0.25   (24)              0.125   0.094
   *   6     0.625   0.25              0.1875 (25)              0.125   0.106
   *   7     0.625   0.1875            0.125  (22)              0.0625  0
   *   8     0.625   0.1875            0.125  (22)              0.0625  0.016
   *
   * So: the default 20 moves end within 3× the bound (2× or better on six of eight), with no limit
   * the search stops within 2× of it, where no single move lowers the sum of squares any more — the
   * rest would take exchanges (a 90 for a 60 min job: a step of 30 min), which this search does not make.
   */
  it('on seeded weeks the spread drops to within a stated factor of a computed lower bound', () => {
    const now = '2027-03-15T15:00:00Z';
    for (let seed = 1; seed <= 8; seed++) {
      const w = bookedWeek(seed, 10, (i) => (i < 3 ? 420 : i < 6 ? 240 : 120));
      const input = { jobs: [], techs: w.techs, bookings: w.bookings, movable: w.movable, week };
      const r = evenOut({ ...input, options: { now } });
      const unlimited = evenOut({ ...input, options: { now, maxMoves: 1000 } });
      checkMoves(w.techs, w.bookings, [], w.movable, r, { now, period: days });
      checkMoves(w.techs, w.bookings, [], w.movable, unlimited, { now, maxMoves: 1000, period: days });
      const bound = spreadLowerBound(w.techs, w.bookings, w.movable, weekdays, now, 30);
      expect(bound.indivisible).toBeGreaterThanOrEqual(bound.relaxed);
      expect(bound.indivisible).toBeGreaterThan(0);
      expect(r.spreadBefore).toBe(0.625);
      expect(r.spreadWithoutMoves).toBe(r.spreadBefore); // nothing to place
      expect(r.moves.length).toBeLessThanOrEqual(20);
      expect(r.spread).toBeLessThan(r.spreadWithoutMoves);
      expect(r.spreadBefore - r.spread).toBeGreaterThanOrEqual(0.25);
      for (const x of [r, unlimited]) expect(x.spread).toBeGreaterThanOrEqual(bound.indivisible - 1e-9); // the bound is a bound
      expect(r.spread).toBeLessThanOrEqual(3 * bound.indivisible + 1e-9);
      expect(unlimited.spread).toBeLessThanOrEqual(2 * bound.indivisible + 1e-9);
      expect(unlimited.spread).toBeLessThanOrEqual(r.spread);
    }
  });
});
