/** Ordering a technician's stops for a day. */
import { instantMs, type Instant } from './dates';
import { assertLatLon, greatCircleDistance, resolveDrive, type LatLon } from './geo';

export interface RouteStop {
  id: string;
  lat: number;
  lon: number;
  /** Time on site, minutes. */
  serviceMinutes: number;
  /** Appointment window: the arrival should fall in [from, to], minutes after dayStart. */
  window?: { from: number; to: number };
}

export interface PlanRouteInput {
  /** Where the day starts (home or shop). */
  start: LatLon;
  /** Where the day ends; omitted → the route ends at the last stop. */
  end?: LatLon;
  stops: readonly RouteStop[];
  /** The instant the technician leaves `start` (ISO-8601 or Date); times are minutes after it. */
  dayStart: Instant;
  /** Default 30 mph (common practice, no source). */
  speedMph?: number;
  /** Default 1.3 (common practice, no source). */
  roadFactor?: number;
  /** A fixed order of stop ids (hand reordering): evaluated as given, not optimised. */
  order?: readonly string[];
}

export interface RouteArrival {
  id: string;
  /** Minutes after dayStart. */
  arrive: number;
  /** Minutes after dayStart (after any wait and the service time). */
  depart: number;
  /** Minutes waiting for the window to open. */
  waitMinutes: number;
  /** Minutes after the window closed (0 when on time). */
  lateMinutes: number;
  /** `arrive` and `depart` as ISO-8601 instants. */
  arriveAt: string;
  departAt: string;
}

export interface PlannedRoute {
  /** Stop ids in visiting order. */
  order: string[];
  /** Estimated road miles (great-circle × road factor), start to the last stop (or to `end`). */
  totalMiles: number;
  /** Estimated drive minutes over the same legs. */
  driveMinutes: number;
  arrivals: RouteArrival[];
  /** Ids of stops reached after their window closed. */
  lateStops: string[];
  /** Sum of minutes late over all stops. */
  lateMinutes: number;
}

/** Each minute late weighs as much as this many minutes of driving. */
const LATE_WEIGHT = 1000;
/** Up to this many stops the order is exact (exhaustive search with pruning). */
const EXACT_MAX = 9;

interface Model {
  n: number;
  /** Drive minutes; nodes 0..n-1 stops, n = start, n+1 = end (when hasEnd). */
  drive: Float64Array;
  miles: Float64Array;
  size: number;
  hasEnd: boolean;
  service: Float64Array;
  from: Float64Array;
  to: Float64Array;
}

function buildModel(input: PlanRouteInput): Model {
  const { speedMph, roadFactor } = resolveDrive(input);
  const stops = input.stops;
  const n = stops.length;
  const hasEnd = input.end !== undefined;
  const pts: LatLon[] = [...stops, input.start, ...(hasEnd ? [input.end as LatLon] : [])];
  const size = pts.length;
  const miles = new Float64Array(size * size);
  const drive = new Float64Array(size * size);
  for (let i = 0; i < size; i++) {
    for (let j = i + 1; j < size; j++) {
      const m = greatCircleDistance(pts[i] as LatLon, pts[j] as LatLon, 'mi') * roadFactor;
      miles[i * size + j] = miles[j * size + i] = m;
      drive[i * size + j] = drive[j * size + i] = (m / speedMph) * 60;
    }
  }
  const service = new Float64Array(n);
  const from = new Float64Array(n);
  const to = new Float64Array(n);
  stops.forEach((s, i) => {
    service[i] = s.serviceMinutes;
    from[i] = s.window ? s.window.from : -Infinity;
    to[i] = s.window ? s.window.to : Infinity;
  });
  return { n, drive, miles, size, hasEnd, service, from, to };
}

/** Cost of an order: drive minutes + LATE_WEIGHT × late minutes. */
function cost(m: Model, order: ArrayLike<number>): number {
  const { drive, size, service, from, to } = m;
  let prev = m.n;
  let t = 0;
  let d = 0;
  let late = 0;
  for (let k = 0; k < order.length; k++) {
    const s = order[k] as number;
    const leg = drive[prev * size + s] as number;
    d += leg;
    t += leg;
    const f = from[s] as number;
    if (t < f) t = f;
    const l = to[s] as number;
    if (t > l) late += t - l;
    t += service[s] as number;
    prev = s;
  }
  if (m.hasEnd) d += drive[prev * size + m.n + 1] as number;
  return d + LATE_WEIGHT * late;
}

/** Exhaustive depth-first search with pruning (costs only grow along a path). */
function exact(m: Model): number[] {
  const n = m.n;
  const { drive, size, service, from, to } = m;
  let best = Infinity;
  let bestOrder: number[] = [];
  const path: number[] = [];
  const used = new Uint8Array(n);
  const dfs = (prev: number, t: number, c: number): void => {
    if (c >= best) return;
    if (path.length === n) {
      const total = m.hasEnd ? c + (drive[prev * size + n + 1] as number) : c;
      if (total < best) {
        best = total;
        bestOrder = path.slice();
      }
      return;
    }
    for (let s = 0; s < n; s++) {
      if (used[s]) continue;
      const leg = drive[prev * size + s] as number;
      let at = t + leg;
      const f = from[s] as number;
      if (at < f) at = f;
      const l = to[s] as number;
      const late = at > l ? at - l : 0;
      used[s] = 1;
      path.push(s);
      dfs(s, at + (service[s] as number), c + leg + LATE_WEIGHT * late);
      path.pop();
      used[s] = 0;
    }
  };
  dfs(n, 0, 0);
  return bestOrder;
}

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function nearestNeighbour(m: Model): number[] {
  const n = m.n;
  const used = new Uint8Array(n);
  const order: number[] = [];
  let prev = n;
  let t = 0;
  for (let k = 0; k < n; k++) {
    let best = -1;
    let bestScore = Infinity;
    for (let s = 0; s < n; s++) {
      if (used[s]) continue;
      const at = Math.max(t + (m.drive[prev * m.size + s] as number), m.from[s] as number);
      const late = Math.max(0, at - (m.to[s] as number));
      const score = at - t + LATE_WEIGHT * late;
      if (score < bestScore) {
        bestScore = score;
        best = s;
      }
    }
    used[best] = 1;
    order.push(best);
    t = Math.max(t + (m.drive[prev * m.size + best] as number), m.from[best] as number) + (m.service[best] as number);
    prev = best;
  }
  return order;
}

/**
 * Cost of `cand` given that its first `p` stops equal the current order's (whose running state after
 * p stops is pT/pD/pL, prev node pPrev). Stops early once the partial cost reaches `limit` (costs
 * only grow along a path) and then returns Infinity.
 */
function suffixCost(m: Model, cand: Int32Array, p: number, pPrev: number, pT: number, pD: number, pL: number, limit: number): number {
  const { drive, size, service, from, to } = m;
  let prev = pPrev;
  let t = pT;
  let d = pD;
  let late = pL;
  const n = cand.length;
  for (let k = p; k < n; k++) {
    const s = cand[k] as number;
    const leg = drive[prev * size + s] as number;
    d += leg;
    t += leg;
    const f = from[s] as number;
    if (t < f) t = f;
    const l = to[s] as number;
    if (t > l) late += t - l;
    if (d + LATE_WEIGHT * late >= limit) return Infinity;
    t += service[s] as number;
    prev = s;
  }
  if (m.hasEnd) d += drive[prev * size + m.n + 1] as number;
  return d + LATE_WEIGHT * late;
}

/** Local search: relocate segments of 1–3 stops, then 2-opt reversals, until no move improves. */
function improve(m: Model, start: number[]): { order: number[]; cost: number } {
  const n = start.length;
  const order = Int32Array.from(start);
  let best = cost(m, order);
  const cand = new Int32Array(n);
  // Running state after the first k stops of `order` (k = 0 … n).
  const PT = new Float64Array(n + 1);
  const PD = new Float64Array(n + 1);
  const PL = new Float64Array(n + 1);
  const PP = new Int32Array(n + 1);
  const prefix = (): void => {
    let prev = m.n;
    let t = 0;
    let d = 0;
    let late = 0;
    PP[0] = prev;
    for (let k = 0; k < n; k++) {
      const s = order[k] as number;
      const leg = m.drive[prev * m.size + s] as number;
      d += leg;
      t += leg;
      if (t < (m.from[s] as number)) t = m.from[s] as number;
      if (t > (m.to[s] as number)) late += t - (m.to[s] as number);
      t += m.service[s] as number;
      prev = s;
      PT[k + 1] = t;
      PD[k + 1] = d;
      PL[k + 1] = late;
      PP[k + 1] = prev;
    }
  };
  prefix();
  const tryCand = (p: number): boolean => {
    const c = suffixCost(m, cand, p, PP[p] as number, PT[p] as number, PD[p] as number, PL[p] as number, best - 1e-9);
    if (c < best - 1e-9) {
      best = c;
      order.set(cand);
      prefix();
      return true;
    }
    return false;
  };
  let improved = true;
  while (improved) {
    improved = false;
    // Or-opt: move order[i..i+len-1] to position j of the remaining sequence.
    for (let len = 1; len <= 3 && len < n; len++) {
      for (let i = 0; i + len <= n; i++) {
        for (let j = 0; j <= n - len; j++) {
          if (j === i) continue;
          // Evaluate the moved order without building it, from the first changed position.
          const p = Math.min(i, j);
          let prev = PP[p] as number;
          let t = PT[p] as number;
          let d = PD[p] as number;
          let late = PL[p] as number;
          const limit = best - 1e-9;
          let k = p;
          for (; k < n; k++) {
            // Element k of the candidate: the reduced order with the segment inserted at j.
            const r = k < j ? k : k < j + len ? -1 : k - len;
            const sIdx = r === -1 ? i + (k - j) : r < i ? r : r + len;
            const st = order[sIdx] as number;
            const leg = m.drive[prev * m.size + st] as number;
            d += leg;
            t += leg;
            const f = m.from[st] as number;
            if (t < f) t = f;
            const l = m.to[st] as number;
            if (t > l) late += t - l;
            if (d + LATE_WEIGHT * late >= limit) break;
            t += m.service[st] as number;
            prev = st;
          }
          if (k < n) continue;
          const c = (m.hasEnd ? d + (m.drive[prev * m.size + m.n + 1] as number) : d) + LATE_WEIGHT * late;
          if (!(c < limit)) continue;
          let w = 0;
          for (let q = 0; q < n - len; q++) {
            if (q === j) for (let z = 0; z < len; z++) cand[w++] = order[i + z] as number;
            cand[w++] = order[q < i ? q : q + len] as number;
          }
          if (j === n - len) for (let z = 0; z < len; z++) cand[w++] = order[i + z] as number;
          if (tryCand(Math.min(i, j))) improved = true;
        }
      }
    }
    // 2-opt: reverse order[i..j].
    for (let i = 0; i < n - 1; i++) {
      for (let j = i + 1; j < n; j++) {
        cand.set(order);
        for (let a = i, b = j; a < b; a++, b--) {
          const tmp = cand[a] as number;
          cand[a] = cand[b] as number;
          cand[b] = tmp;
        }
        if (tryCand(i)) improved = true;
      }
    }
  }
  return { order: Array.from(order), cost: best };
}

function heuristic(m: Model): number[] {
  const n = m.n;
  const starts: number[][] = [nearestNeighbour(m)];
  // Earliest-deadline order as a second start when windows exist.
  const byDeadline = Array.from({ length: n }, (_, i) => i).sort(
    (a, b) => (m.to[a] as number) - (m.to[b] as number) || (m.from[a] as number) - (m.from[b] as number),
  );
  starts.push(byDeadline);
  const rand = mulberry32(0xc011 + n);
  const restarts = n <= 15 ? 8 : n <= 30 ? 6 : 1;
  for (let r = 0; r < restarts; r++) {
    const p = Array.from({ length: n }, (_, i) => i);
    for (let i = n - 1; i > 0; i--) {
      const j = Math.floor(rand() * (i + 1));
      const t = p[i] as number;
      p[i] = p[j] as number;
      p[j] = t;
    }
    starts.push(p);
  }
  let best: { order: number[]; cost: number } | null = null;
  for (const s of starts) {
    const r = improve(m, s);
    if (!best || r.cost < best.cost - 1e-9) best = r;
  }
  return (best as { order: number[] }).order;
}

function validate(input: PlanRouteInput): void {
  assertLatLon(input.start, 'start');
  if (input.end !== undefined) assertLatLon(input.end, 'end');
  if (!Array.isArray(input.stops)) throw new RangeError('stops must be an array');
  const seen = new Set<string>();
  input.stops.forEach((s, i) => {
    assertLatLon(s, `stops[${i}]`);
    if (seen.has(s.id)) throw new RangeError(`duplicate stop id ${JSON.stringify(s.id)}`);
    seen.add(s.id);
    if (typeof s.serviceMinutes !== 'number' || !Number.isFinite(s.serviceMinutes) || s.serviceMinutes < 0) {
      throw new RangeError(`stops[${i}].serviceMinutes must be a finite number of 0 or more`);
    }
    if (s.window && !(Number.isFinite(s.window.from) && Number.isFinite(s.window.to) && s.window.from <= s.window.to)) {
      throw new RangeError(`stops[${i}].window must have finite from ≤ to (minutes after dayStart)`);
    }
  });
}

/**
 * Orders a technician's stops to minimise drive time while honouring appointment windows.
 *
 * The day starts at `dayStart` at `start`; each leg takes great-circle miles × roadFactor ÷ speed.
 * Arriving before a window opens means waiting; arriving after it closes makes the stop late.
 * The order minimises total late minutes first, then drive minutes. Up to 9 stops the result is the
 * exact optimum; above that, the best of several local searches (segment moves and 2-opt) from a
 * nearest-neighbour start, an earliest-deadline start and seeded random starts (deterministic).
 * With `order` the given order is evaluated as is.
 */
export function planRoute(input: PlanRouteInput): PlannedRoute {
  validate(input);
  const day0 = instantMs(input.dayStart, 'dayStart');
  const m = buildModel(input);
  const index = new Map(input.stops.map((s, i) => [s.id, i]));
  let order: number[];
  if (input.order) {
    if (input.order.length !== m.n || new Set(input.order).size !== m.n) throw new RangeError('order must list every stop id exactly once');
    order = input.order.map((id) => {
      const i = index.get(id);
      if (i === undefined) throw new RangeError(`order names an unknown stop id ${JSON.stringify(id)}`);
      return i;
    });
  } else if (m.n <= EXACT_MAX) {
    order = exact(m);
  } else {
    order = heuristic(m);
  }
  // Evaluate the chosen order in detail.
  const arrivals: RouteArrival[] = [];
  const lateStops: string[] = [];
  let prev = m.n;
  let t = 0;
  let drive = 0;
  let miles = 0;
  let lateTotal = 0;
  const iso = (min: number) => new Date(day0 + min * 60_000).toISOString();
  for (const s of order) {
    const leg = m.drive[prev * m.size + s] as number;
    drive += leg;
    miles += m.miles[prev * m.size + s] as number;
    const arrive = t + leg;
    const start = Math.max(arrive, m.from[s] as number);
    const late = Math.max(0, arrive - (m.to[s] as number));
    const depart = start + (m.service[s] as number);
    const id = (input.stops[s] as RouteStop).id;
    if (late > 0) lateStops.push(id);
    lateTotal += late;
    arrivals.push({ id, arrive, depart, waitMinutes: start - arrive, lateMinutes: late, arriveAt: iso(arrive), departAt: iso(depart) });
    t = depart;
    prev = s;
  }
  if (m.hasEnd) {
    drive += m.drive[prev * m.size + m.n + 1] as number;
    miles += m.miles[prev * m.size + m.n + 1] as number;
  }
  return {
    order: order.map((i) => (input.stops[i] as RouteStop).id),
    totalMiles: miles,
    driveMinutes: drive,
    arrivals,
    lateStops,
    lateMinutes: lateTotal,
  };
}

/** @internal Exposed for tests: the objective planRoute minimises for a given order of ids. */
export function routeCost(input: PlanRouteInput, order: readonly string[]): number {
  const r = planRoute({ ...input, order });
  return r.driveMinutes + LATE_WEIGHT * r.lateMinutes;
}
