/**
 * The mixed-load phase of `npm run bench`: a contractor's morning, everyone at once, on the large scenario.
 *
 * On the bench's day (BENCH_END, a Friday, the API's clock started at 07:00 in Chicago) for `seconds`:
 *  - 150 technicians: the Route screen's day (`GET /api/day`) every 30 s, then a unit briefing per stop; after
 *    each of those requests, one time in ten, readings posted on their own visit on site;
 *  - 10 dispatchers: the Roster week (`GET /api/bookings`) and its load (`GET /api/roster/load`) every 5 s, and a
 *    booking moved (`PATCH /api/bookings/:id` with its version) every 30 s;
 *  - 5 managers: the Watchlist (its four requests) every 15 s;
 *  - the owner: Fix Quality for a year of all branches once a minute.
 * Each client's first request falls at a random point of its first interval (seeded), so the clients do not
 * fire in lockstep and the requests per second are the scenario's whatever the run's length: in a run shorter
 * than an interval only the clients whose first turn falls inside it take part — except the owner, whose one
 * report falls in the first half of such a run. A client that falls behind starts its next round as soon as
 * the last one is answered; no request starts after the window (those under way are awaited and counted).
 *
 * `clientsScale` K (bench `--clients-scale K`) signs every person in K times: each session runs that person's
 * round on its own (the same day, stops, units and visit — what K phones of one person would ask), so the load
 * is K times the scenario's with requests as realistic as one person's; each dispatcher session moves its own
 * booking (on the branch's first K technicians). `closedLoop` drops the pauses between read rounds.
 *
 * Before the measured window, and through the API as the people would: everyone signs in; each branch's
 * dispatcher books one new service call per technician after the technician's last booking of the day (working
 * hours overridden with a reason where it runs past them) and one more for the booking moves; each technician
 * sets off to theirs and arrives (en route, then on site) — the visit their readings go to. The phase runs on a
 * throwaway copy of the scenario (bench.ts), so every run starts from the same data.
 */
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { TZDate } from '@date-fns/tz';
import { sql } from 'drizzle-orm';
import type { Database } from '../../apps/api/src/db/client';
import { Rng } from '../../apps/api/src/db/seed/random';
import { BENCH_END, BENCH_OWNER, BENCH_PASSWORD, benchManager } from './scenario';

/** The API's clock for this phase: the bench's day, 07:00 in Chicago (the first branch). */
export const MIXED_NOW = `${BENCH_END}T07:00:00-06:00`;
const DAY = BENCH_END;
const MINUTE = 60_000;

/** The instant of a local wall-clock time on a `YYYY-MM-DD` date in a zone. */
function localAt(date: string, hh: number, mm: number, zone: string): number {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  return new TZDate(y, m - 1, d, hh, mm, 0, zone).getTime();
}

export const ROUTE_CLASSES = ['day', 'briefing', 'readings', 'rosterWeek', 'rosterLoad', 'move', 'watchlist', 'fixQuality'] as const;
export type RouteClass = (typeof ROUTE_CLASSES)[number];
export const WRITE_CLASSES: readonly RouteClass[] = ['readings', 'move'];
export const CLASS_LABELS: Record<RouteClass, string> = {
  day: 'Route: day (GET /api/day)',
  briefing: 'Route: unit briefing',
  readings: 'Visit: readings posted',
  rosterWeek: 'Roster: week of bookings',
  rosterLoad: 'Roster: load',
  move: 'Roster: booking moved',
  watchlist: 'Watchlist (4 requests)',
  fixQuality: 'Fix Quality, 1 year, all',
};

export interface ClassFigures {
  requests: number;
  p50: number;
  p95: number;
  p99: number;
  max: number;
  /** Answers not 2xx, by status (`network` for a request that got no answer). */
  errors: Record<string, number>;
}

export interface LoopDelay {
  mean: number;
  p50: number;
  p99: number;
  max: number;
}

export interface MixedFigures {
  seconds: number;
  /** API processes answering (behind the bench's round-robin proxy when more than one). */
  processes?: number;
  /** The machine's load average (1, 5, 15 min) when the window closed. */
  loadAverage?: number[];
  clients: { technicians: number; dispatchers: number; managers: number; owners: number };
  /** Sessions per person (`--clients-scale`), and whether the clients asked as fast as answered. */
  clientsScale?: number;
  closedLoop?: boolean;
  setupSeconds: number;
  requests: number;
  rps: number;
  errors: Record<string, number>;
  over1s: number;
  classes: Record<RouteClass, ClassFigures>;
  /** Event-loop delay of the API process(es) over the window (from COILPATH_BENCH_ELD), and of the bench itself. */
  apiLoopDelay: LoopDelay | null;
  clientLoopDelay: LoopDelay;
}

export interface MixedOptions {
  /** Where the API answers, e.g. http://127.0.0.1:3210. */
  base: string;
  seconds: number;
  /**
   * Sessions per person (default 1): every technician, dispatcher, manager and the owner signs in `clientsScale`
   * times and each session runs that person's round on its own (see the file's comment).
   */
  clientsScale?: number;
  /** Every client starts its next round as soon as the last is answered (no pause: the API's capacity). */
  closedLoop?: boolean;
  /** The database the API runs on (read for ids before the API starts; the writes go through the API). */
  plan: MixedPlan;
  /** Resets and reads the API's event-loop delay (null when it cannot be asked). */
  apiLoop: { reset(): Promise<void>; read(): Promise<LoopDelay | null> } | null;
  log: (s: string) => void;
}

// ---------------------------------------------------------------------------------------------
// What the database holds: people, the day's last bookings, units to book
// ---------------------------------------------------------------------------------------------

interface PlanTech {
  id: string;
  email: string;
  /** End of the technician's last booking on the day (or 07:00 local when none). */
  lastEnd: number;
}

interface PlanBranch {
  id: string;
  zone: string;
  dispatcher: string;
  techs: PlanTech[];
  /** Units with refrigerant (readings need one) and their sites. */
  units: { id: string; siteId: string }[];
}

export interface MixedPlan {
  branches: PlanBranch[];
}

/** Reads who works where and how full each technician's day is, before the API starts. */
export async function readMixedPlan(database: Database): Promise<MixedPlan> {
  const q = async <T>(s: ReturnType<typeof sql>) => ((await database.db.execute(s)) as unknown as { rows: T[] }).rows;
  const branchRows = await q<{ id: string; time_zone: string; code: string }>(sql`SELECT id, time_zone, code FROM branches ORDER BY code`);
  const branches: PlanBranch[] = [];
  for (const b of branchRows) {
    const from = new Date(localAt(DAY, 0, 0, b.time_zone));
    const to = new Date(from.getTime() + 24 * 60 * MINUTE); // no change of daylight-saving time on 27 November
    const people = await q<{ id: string; email: string; role: string }>(
      sql`SELECT id, email, role FROM users WHERE branch_id = ${b.id} AND role IN ('technician', 'dispatcher') AND active ORDER BY email`,
    );
    const last = await q<{ tech_id: string; end_at: string | Date }>(
      sql`SELECT tech_id, max(end_at) AS end_at FROM bookings WHERE branch_id = ${b.id} AND start_at >= ${from.toISOString()} AND start_at < ${to.toISOString()} GROUP BY tech_id`,
    );
    const lastBy = new Map(last.map((r) => [r.tech_id, new Date(r.end_at).getTime()]));
    const dayStart = localAt(DAY, 7, 0, b.time_zone);
    const units = await q<{ id: string; site_id: string }>(
      sql`SELECT id, site_id FROM units WHERE branch_id = ${b.id} AND refrigerant IS NOT NULL AND archived_at IS NULL ORDER BY serial LIMIT 40`,
    );
    const dispatcher = people.find((p) => p.role === 'dispatcher');
    if (!dispatcher) throw new Error(`branch ${b.code} has no dispatcher`);
    branches.push({
      id: b.id,
      zone: b.time_zone,
      dispatcher: dispatcher.email,
      techs: people
        .filter((p) => p.role === 'technician')
        .map((p) => ({ id: p.id, email: p.email, lastEnd: Math.max(dayStart, lastBy.get(p.id) ?? dayStart) })),
      units: units.map((u) => ({ id: u.id, siteId: u.site_id })),
    });
  }
  return { branches };
}

// ---------------------------------------------------------------------------------------------
// Clients
// ---------------------------------------------------------------------------------------------

interface Sample {
  cls: RouteClass;
  ms: number;
  status: number | 'network';
}

class Recorder {
  samples: Sample[] = [];
  measuring = false;
}

/** One signed-in person: their own cookie; Node's fetch keeps connections alive (undici's pool). */
class Client {
  cookie = '';
  constructor(
    readonly email: string,
    private readonly base: string,
    private readonly rec: Recorder,
  ) {}

  async signIn() {
    const res = await fetch(`${this.base}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: this.email, password: BENCH_PASSWORD }),
    });
    if (!res.ok) throw new Error(`sign-in of ${this.email} answered ${res.status}: ${await res.text()}`);
    await res.arrayBuffer();
    this.cookie = res.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
  }

  /** A request; timed (when the window is open) under `cls`. Answers the parsed body, or null when it failed. */
  async call<T>(cls: RouteClass | null, method: string, path: string, body?: unknown): Promise<T | null> {
    const measured = cls !== null && this.rec.measuring;
    const t0 = performance.now();
    let status: number | 'network' = 'network';
    let out: T | null = null;
    try {
      const res = await fetch(`${this.base}${path}`, {
        method,
        headers: body === undefined ? { cookie: this.cookie } : { cookie: this.cookie, 'content-type': 'application/json' },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const text = await res.text();
      status = res.status;
      if (res.ok) out = (text ? JSON.parse(text) : {}) as T;
      else if (!measured) throw new Error(`${method} ${path} answered ${res.status}: ${text.slice(0, 300)}`);
    } catch (e) {
      if (!measured) throw e;
    }
    if (measured) this.rec.samples.push({ cls, ms: performance.now() - t0, status });
    return out;
  }

  async get<T>(cls: RouteClass | null, path: string) {
    return this.call<T>(cls, 'GET', path);
  }
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, Math.max(0, ms)));

/** Runs `round` every `intervalMs` from `t0 + offsetMs` until `stopAt` (performance.now() times). */
async function every(t0: number, offsetMs: number, intervalMs: number, stopAt: number, round: () => Promise<void>) {
  let next = t0 + offsetMs;
  for (;;) {
    await sleep(Math.min(next, stopAt) - performance.now());
    if (performance.now() >= stopAt) return;
    await round();
    next = Math.max(next + intervalMs, performance.now());
  }
}

/** A whole number of `step` minutes at or after `ms`. */
const ceilTo = (ms: number, step: number) => Math.ceil(ms / (step * MINUTE)) * step * MINUTE;

/** Working-hours override for a booking that ends after 15:30 local (the scenario's working day). */
function hoursOverride(endMs: number, zone: string) {
  const dayEnd = localAt(DAY, 15, 30, zone);
  return endMs > dayEnd ? { overrideRules: ['working_hours'], overrideReason: 'Bench: work after the day already booked' } : {};
}

interface DayAnswer {
  stops: { visitId: string; status: string; workOrder: { id: string }; units: { id: string }[] }[];
}
interface BookingAnswer {
  booking: { id: string; version: number; visitId: string | null; startAt: string; endAt: string };
}

/** Runs the phase against an API already started with `COILPATH_NOW=MIXED_NOW` on a copy of the scenario. */
export async function runMixed(o: MixedOptions): Promise<MixedFigures> {
  const rec = new Recorder();
  const rng = new Rng(20);
  const { plan } = o;
  const mk = (email: string) => new Client(email, o.base, rec);
  const K = o.clientsScale ?? 1;
  if (!Number.isInteger(K) || K < 1) throw new Error('clientsScale needs a whole number (at least 1)');
  const sessions = <T>(make: (j: number) => T) => Array.from({ length: K }, (_, j) => make(j));
  // K sessions per person: `dispatchers[bi][j]` is session j of branch bi's dispatcher.
  const dispatchers = plan.branches.map((b) => sessions(() => mk(b.dispatcher)));
  const techs = plan.branches.flatMap((b, bi) =>
    b.techs.flatMap((t, ti) => sessions((j) => ({ client: mk(t.email), branch: b, bi, tech: t, ti, j }))),
  );
  const managers = plan.branches.slice(0, 5).flatMap((_, bi) => sessions(() => mk(benchManager(bi))));
  const owners = sessions(() => mk(BENCH_OWNER));
  const everyone = [...dispatchers.flat(), ...techs.map((t) => t.client), ...managers, ...owners];
  for (const b of plan.branches)
    if (b.techs.length < K)
      throw new Error(`clientsScale ${K}: a branch has only ${b.techs.length} technicians (one movable booking per dispatcher session)`);

  const setupStart = performance.now();
  o.log(`mixed: ${everyone.length} sign-ins (${K} session${K === 1 ? '' : 's'} per person)`);
  await pool(everyone, 4, (c) => c.signIn());
  o.log(`mixed: signed in after ${((performance.now() - setupStart) / 1000).toFixed(0)} s`);

  // Each branch's dispatcher books a service call per technician after their day, and one to move around
  // per dispatcher session (on the branch's first K technicians, so no two sessions move the same booking).
  o.log('mixed: booking a visit per technician (dispatchers), en route and on site (technicians)');
  const openVisit = new Map<string, { visitId: string; circuitId: string }>();
  type Movable = { id: string; version: number; zone: string; startAt: number; endAt: number; moved: boolean };
  /** Per branch (by index) and dispatcher session: the booking that session moves. */
  const movable: Movable[][] = plan.branches.map(() => []);
  const circuitsOf = new Map<string, string>();
  await pool(
    plan.branches.map((b, bi) => ({ b, bi })),
    3,
    async ({ b, bi }) => {
      const d = dispatchers[bi]![0]!;
      const book = async (tech: PlanTech, unit: { id: string; siteId: string }, startAt: number, complaint: string) => {
        const wo = await d.call<{ workOrder: { id: string } }>(null, 'POST', '/api/work-orders', {
          siteId: unit.siteId,
          unitId: unit.id,
          kind: 'service_call',
          complaint,
          estimatedMinutes: 60,
        });
        const endAt = startAt + 60 * MINUTE;
        const res = await d.call<BookingAnswer>(null, 'POST', '/api/bookings', {
          workOrderId: wo!.workOrder.id,
          techId: tech.id,
          startAt: new Date(startAt).toISOString(),
          endAt: new Date(endAt).toISOString(),
          ...hoursOverride(endAt, b.zone),
        });
        return res!.booking;
      };
      for (const [ti, tech] of b.techs.entries()) {
        const unit = b.units[ti % b.units.length]!;
        const start = ceilTo(tech.lastEnd, 15);
        const booking = await book(tech, unit, start, 'No cooling (bench: the visit on site)');
        openVisit.set(tech.id, { visitId: booking.visitId!, circuitId: '' });
        circuitsOf.set(tech.id, unit.id);
        if (ti < K) {
          const later = start + 90 * MINUTE;
          const m = await book(
            tech,
            b.units[(ti + 20) % b.units.length]!,
            later,
            'Planned check (bench: the booking the dispatcher moves)',
          );
          movable[bi]!.push({ id: m.id, version: m.version, zone: b.zone, startAt: later, endAt: later + 60 * MINUTE, moved: false });
        }
      }
    },
  );
  o.log(`mixed: booked after ${((performance.now() - setupStart) / 1000).toFixed(0)} s`);
  await pool(
    techs.filter((t) => t.j === 0),
    4,
    async ({ client, tech }) => {
      const v = openVisit.get(tech.id)!;
      await client.call(null, 'PATCH', `/api/visits/${v.visitId}`, { state: 'en_route' });
      const detail = await client.call<{ units: { id: string; circuits: { id: string }[] }[] }>(null, 'PATCH', `/api/visits/${v.visitId}`, {
        state: 'on_site',
      });
      const unit = detail!.units.find((u) => u.id === circuitsOf.get(tech.id)) ?? detail!.units[0];
      const circuit = unit?.circuits[0];
      if (!circuit) throw new Error(`visit ${v.visitId} shows no circuit`);
      v.circuitId = circuit.id;
    },
  );
  // The day once before the window, in every session: the Route screen opened at sign-in.
  await pool(techs, 4, ({ client }) => client.get(null, `/api/day?date=${DAY}`));
  const setupSeconds = (performance.now() - setupStart) / 1000;

  // The roster's week as the screen asks for it: Monday to Sunday in the branch's zone.
  const monday = new Date(Date.parse(`${DAY}T00:00:00Z`) - 4 * 1440 * MINUTE).toISOString().slice(0, 10);
  const sunday = new Date(Date.parse(`${monday}T00:00:00Z`) + 6 * 1440 * MINUTE).toISOString().slice(0, 10);
  const weekOf = (zone: string) => {
    const from = localAt(monday, 0, 0, zone);
    return { from: new Date(from).toISOString(), to: new Date(from + 7 * 1440 * MINUTE).toISOString() };
  };
  const year = { from: new Date(Date.parse(`${DAY}T00:00:00Z`) - 364 * 1440 * MINUTE).toISOString().slice(0, 10), to: DAY };

  const readingsBody = (circuitId: string) => ({
    units: { pressure: 'psig', temperature: 'F' },
    readings: [
      {
        circuitId,
        suctionPressure: Math.round(rng.range(110, 130) * 10) / 10,
        liquidPressure: Math.round(rng.range(320, 380) * 10) / 10,
        suctionLineTemp: Math.round(rng.range(50, 60) * 10) / 10,
        liquidLineTemp: Math.round(rng.range(90, 100) * 10) / 10,
        outdoorTemp: Math.round(rng.range(70, 90) * 10) / 10,
      },
    ],
  });

  const ms = o.seconds * 1000;
  // Closed loop: the read rounds follow one another without a pause (the writes keep their rates).
  const spread = (interval: number) => (o.closedLoop ? 0 : rng.next() * interval);
  const pace = (interval: number) => (o.closedLoop ? 0 : interval);
  const clientLoop = monitorEventLoopDelay({ resolution: 10 });
  await o.apiLoop?.reset();
  clientLoop.enable();
  rec.measuring = true;
  const t0 = performance.now();
  const stopAt = t0 + ms;
  o.log(
    `mixed: ${techs.length} technician, ${dispatchers.flat().length} dispatcher, ${managers.length} manager and ${owners.length} owner sessions for ${o.seconds} s${o.closedLoop ? ', closed loop' : ''}`,
  );

  const loops: Promise<void>[] = [];
  for (const t of techs) {
    const visit = openVisit.get(t.tech.id)!;
    const maybeReadings = async () => {
      if (rng.chance(0.1) && performance.now() < stopAt)
        await t.client.call('readings', 'POST', `/api/visits/${visit.visitId}/readings`, readingsBody(visit.circuitId));
    };
    loops.push(
      every(t0, spread(30_000), pace(30_000), stopAt, async () => {
        const day = await t.client.get<DayAnswer>('day', `/api/day?date=${DAY}`);
        await maybeReadings();
        for (const stop of day?.stops ?? []) {
          const unit = stop.units[0];
          if (!unit) continue;
          if (performance.now() >= stopAt) break;
          await t.client.get('briefing', `/api/units/${unit.id}/briefing`);
          await maybeReadings();
        }
      }),
    );
  }
  for (const [bi, sessionsOfBranch] of dispatchers.entries())
    for (const [j, d] of sessionsOfBranch.entries()) {
      const b = plan.branches[bi]!;
      const w = weekOf(b.zone);
      loops.push(
        every(t0, spread(5_000), pace(5_000), stopAt, async () => {
          await Promise.all([
            d.get('rosterWeek', `/api/bookings?branchId=${b.id}&from=${encodeURIComponent(w.from)}&to=${encodeURIComponent(w.to)}`),
            d.get('rosterLoad', `/api/roster/load?branchId=${b.id}&from=${monday}&to=${sunday}`),
          ]);
        }),
      );
      const m = movable[bi]![j];
      if (m) {
        loops.push(
          every(t0, spread(30_000), 30_000, stopAt, async () => {
            // Half an hour later, then back: never onto the technician's visit before it.
            const shift = (m.moved ? -30 : 30) * MINUTE;
            const startAt = m.startAt + shift;
            const endAt = m.endAt + shift;
            const res = await d.call<BookingAnswer>('move', 'PATCH', `/api/bookings/${m.id}`, {
              version: m.version,
              startAt: new Date(startAt).toISOString(),
              endAt: new Date(endAt).toISOString(),
              ...hoursOverride(endAt, m.zone),
            });
            if (res) Object.assign(m, { version: res.booking.version, startAt, endAt, moved: !m.moved });
          }),
        );
      }
    }
  for (const mgr of managers) {
    loops.push(
      every(t0, spread(15_000), pace(15_000), stopAt, async () => {
        await Promise.all([
          mgr.get('watchlist', '/api/leak-cases'),
          mgr.get('watchlist', '/api/watchlist/repeat-alarms'),
          mgr.get('watchlist', '/api/watchlist/return-visits'),
          mgr.get('watchlist', '/api/alarms?limit=20'),
        ]);
      }),
    );
  }
  for (const owner of owners) {
    loops.push(
      every(
        t0,
        rng.next() * Math.min(60_000, ms / 2),
        60_000,
        stopAt,
        async () => void (await owner.get('fixQuality', `/api/reports/fix-quality?from=${year.from}&to=${year.to}`)),
      ),
    );
  }

  await Promise.all(loops);
  const elapsed = (performance.now() - t0) / 1000;
  rec.measuring = false;
  clientLoop.disable();
  const apiLoopDelay = (await o.apiLoop?.read()) ?? null;

  const classes = {} as Record<RouteClass, ClassFigures>;
  const errors: Record<string, number> = {};
  for (const cls of ROUTE_CLASSES) {
    const mine = rec.samples.filter((s) => s.cls === cls);
    const sorted = mine.map((s) => s.ms).sort((a, b) => a - b);
    const at = (q: number) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))]! : NaN);
    const errs: Record<string, number> = {};
    for (const s of mine) {
      if (typeof s.status === 'number' && s.status >= 200 && s.status < 300) continue;
      errs[String(s.status)] = (errs[String(s.status)] ?? 0) + 1;
      errors[String(s.status)] = (errors[String(s.status)] ?? 0) + 1;
    }
    classes[cls] = {
      requests: mine.length,
      p50: at(0.5),
      p95: at(0.95),
      p99: at(0.99),
      max: sorted.length ? sorted[sorted.length - 1]! : NaN,
      errors: errs,
    };
  }
  const nsMs = (ns: number) => ns / 1e6;
  return {
    seconds: Math.round(elapsed * 10) / 10,
    clients: { technicians: techs.length, dispatchers: dispatchers.flat().length, managers: managers.length, owners: owners.length },
    clientsScale: K,
    closedLoop: o.closedLoop ?? false,
    setupSeconds: Math.round(setupSeconds * 10) / 10,
    requests: rec.samples.length,
    rps: rec.samples.length / elapsed,
    errors,
    over1s: rec.samples.filter((s) => s.ms > 1000).length,
    classes,
    apiLoopDelay,
    clientLoopDelay: {
      mean: nsMs(clientLoop.mean),
      p50: nsMs(clientLoop.percentile(50)),
      p99: nsMs(clientLoop.percentile(99)),
      max: nsMs(clientLoop.max),
    },
  };
}

/** Runs `fn` over `items`, at most `n` at a time. */
async function pool<T>(items: T[], n: number, fn: (item: T) => Promise<unknown>) {
  let i = 0;
  await Promise.all(
    Array.from({ length: Math.min(n, items.length) }, async () => {
      while (i < items.length) await fn(items[i++]!);
    }),
  );
}

// ---------------------------------------------------------------------------------------------
// The table
// ---------------------------------------------------------------------------------------------

export const MIXED_BUDGETS = { readP95: 100, readP99: 250, writeP95: 150, maxMs: 1000 };

/** One row per route class and database: p50/p95/p99/max, errors, and whether the class keeps its budgets. */
export function mixedRows(label: string, f: MixedFigures): string[][] {
  const fmt = (v: number) => (Number.isNaN(v) ? '—' : v >= 100 ? v.toFixed(0) : v.toFixed(1));
  const rows: string[][] = [];
  for (const cls of ROUTE_CLASSES) {
    const c = f.classes[cls];
    const write = WRITE_CLASSES.includes(cls);
    const errs = Object.values(c.errors).reduce((s, n) => s + n, 0);
    const target = write ? `p95 < ${MIXED_BUDGETS.writeP95}` : `p95 < ${MIXED_BUDGETS.readP95}, p99 < ${MIXED_BUDGETS.readP99}`;
    const failed: string[] = [];
    if (c.requests === 0) failed.push('no sample');
    else {
      if (write ? c.p95 >= MIXED_BUDGETS.writeP95 : c.p95 >= MIXED_BUDGETS.readP95) failed.push('p95');
      if (!write && c.p99 >= MIXED_BUDGETS.readP99) failed.push('p99');
      if (c.max > MIXED_BUDGETS.maxMs) failed.push('> 1 s');
      if (errs) failed.push('errors');
    }
    rows.push([
      `${label}: ${CLASS_LABELS[cls]}`,
      target,
      String(c.requests),
      fmt(c.p50),
      fmt(c.p95),
      fmt(c.p99),
      fmt(c.max),
      errs
        ? Object.entries(c.errors)
            .map(([s, n]) => `${n}× ${s}`)
            .join(', ')
        : '0',
      c.requests === 0 ? '—' : failed.length ? `FAIL (${failed.join(', ')})` : 'pass',
    ]);
  }
  return rows;
}
