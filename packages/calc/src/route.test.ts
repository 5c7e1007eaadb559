import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { driveMinutes } from './geo';
import { planRoute, routeCost, type RouteStop } from './route';

const start = { lat: 41.8781, lon: -87.6298 };
const dayStart = '2027-03-15T13:00:00Z';

function lcg(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (Math.imul(a, 1664525) + 1013904223) >>> 0;
    return a / 2 ** 32;
  };
}

function makeStops(n: number, seed: number, windows: boolean): RouteStop[] {
  const r = lcg(seed);
  return Array.from({ length: n }, (_, i) => {
    const s: RouteStop = {
      id: `s${i}`,
      lat: start.lat + (r() - 0.5) * 0.5,
      lon: start.lon + (r() - 0.5) * 0.7,
      serviceMinutes: 20 + Math.floor(r() * 60),
    };
    if (windows && i % 3 === 0) {
      const from = Math.floor(r() * 240);
      s.window = { from, to: from + 90 };
    }
    return s;
  });
}

function permutations<T>(xs: T[]): T[][] {
  if (xs.length <= 1) return [xs];
  const out: T[][] = [];
  xs.forEach((x, i) => {
    for (const p of permutations([...xs.slice(0, i), ...xs.slice(i + 1)])) out.push([x, ...p]);
  });
  return out;
}

describe('planRoute', () => {
  it('evaluates a fixed order: arrivals, waits, lateness, miles and minutes', () => {
    const stops: RouteStop[] = [
      { id: 'a', lat: 41.9, lon: -87.63, serviceMinutes: 30, window: { from: 60, to: 120 } },
      { id: 'b', lat: 41.95, lon: -87.63, serviceMinutes: 45, window: { from: 0, to: 10 } },
    ];
    const r = planRoute({ start, stops, dayStart, order: ['a', 'b'] });
    const leg1 = driveMinutes(start, stops[0]!);
    const leg2 = driveMinutes(stops[0]!, stops[1]!);
    expect(r.order).toEqual(['a', 'b']);
    expect(r.arrivals[0]).toMatchObject({ id: 'a', waitMinutes: 60 - leg1, depart: 90, lateMinutes: 0 });
    expect(r.arrivals[0]!.arrive).toBeCloseTo(leg1, 9);
    expect(r.arrivals[1]!.arrive).toBeCloseTo(90 + leg2, 9);
    expect(r.lateStops).toEqual(['b']);
    expect(r.driveMinutes).toBeCloseTo(leg1 + leg2, 9);
    expect(r.totalMiles).toBeCloseTo(((leg1 + leg2) / 60) * 30, 9);
    expect(r.arrivals[0]!.departAt).toBe('2027-03-15T14:30:00.000Z');
  });

  it('honours a window over a shorter drive when it can', () => {
    const stops: RouteStop[] = [
      { id: 'near', lat: 41.89, lon: -87.63, serviceMinutes: 60 },
      { id: 'far', lat: 41.99, lon: -87.63, serviceMinutes: 30, window: { from: 0, to: 30 } },
    ];
    const r = planRoute({ start, stops, dayStart });
    expect(r.order).toEqual(['far', 'near']);
    expect(r.lateStops).toEqual([]);
  });

  it('includes the leg to an end point when given', () => {
    const stops = makeStops(3, 7, false);
    const open = planRoute({ start, stops, dayStart });
    const closed = planRoute({ start, end: start, stops, dayStart, order: open.order });
    const last = stops.find((s) => s.id === open.order[2])!;
    expect(closed.driveMinutes).toBeCloseTo(open.driveMinutes + driveMinutes(last, start), 9);
  });

  it.each([
    [5, 1, false],
    [7, 2, true],
    [8, 3, true],
    [9, 4, false],
  ] as const)('equals the brute-force optimum for %i stops (seed %i, windows %s)', (n, seed, windows) => {
    const stops = makeStops(n, seed, windows);
    const input = { start, stops, dayStart };
    const r = planRoute(input);
    let best = Infinity;
    // Brute force over every order (9! = 362,880 for the largest case), using the evaluation path.
    const ids = stops.map((s) => s.id);
    if (n <= 8) {
      for (const p of permutations(ids)) best = Math.min(best, routeCost(input, p));
    } else {
      // 9 stops: brute force with a local cost function over the same drive model.
      const m = stops.map((a) => stops.map((b) => driveMinutes(a, b)));
      const s0 = stops.map((b) => driveMinutes(start, b));
      const idx = stops.map((_, i) => i);
      const perm = (rest: number[], prev: number, c: number): void => {
        if (c >= best) return;
        if (rest.length === 0) {
          best = c;
          return;
        }
        for (let k = 0; k < rest.length; k++) {
          const s = rest[k]!;
          perm([...rest.slice(0, k), ...rest.slice(k + 1)], s, c + (prev < 0 ? s0[s]! : m[prev]![s]!));
        }
      };
      perm(idx, -1, 0);
    }
    expect(routeCost(input, r.order)).toBeCloseTo(best, 6);
  });

  it('for 25 stops is within 3 % of the best of many random-restart local searches', () => {
    const stops = makeStops(25, 11, false);
    const r = planRoute({ start, stops, dayStart });
    const n = stops.length;
    const d = stops.map((a) => stops.map((b) => driveMinutes(a, b)));
    const s0 = stops.map((b) => driveMinutes(start, b));
    const len = (o: number[]) => o.reduce((c, s, k) => c + (k === 0 ? s0[s]! : d[o[k - 1]!]![s]!), 0);
    const rand = lcg(99);
    let best = Infinity;
    for (let restart = 0; restart < 60; restart++) {
      let o = Array.from({ length: n }, (_, i) => i).sort(() => rand() - 0.5);
      let c = len(o);
      let improved = true;
      while (improved) {
        improved = false;
        for (let i = 0; i < n - 1; i++) {
          for (let j = i + 1; j < n; j++) {
            const cand = [...o.slice(0, i), ...o.slice(i, j + 1).reverse(), ...o.slice(j + 1)];
            const cc = len(cand);
            if (cc < c - 1e-9) [o, c, improved] = [cand, cc, true];
          }
        }
        for (let i = 0; i < n; i++) {
          for (let j = 0; j < n; j++) {
            if (i === j) continue;
            const rest = o.filter((_, k) => k !== i);
            const cand = [...rest.slice(0, j), o[i]!, ...rest.slice(j)];
            const cc = len(cand);
            if (cc < c - 1e-9) [o, c, improved] = [cand, cc, true];
          }
        }
      }
      best = Math.min(best, c);
    }
    expect(r.driveMinutes).toBeLessThanOrEqual(best * 1.03);
  });

  it('plans 40 stops', () => {
    const r = planRoute({ start, stops: makeStops(40, 5, true), dayStart });
    expect(new Set(r.order).size).toBe(40);
  });

  it('property: a planned route visits every stop exactly once', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 16 }), fc.integer({ min: 1, max: 1e6 }), fc.boolean(), (n, seed, windows) => {
        const stops = makeStops(n, seed, windows);
        const r = planRoute({ start, stops, dayStart });
        return r.order.length === n && new Set(r.order).size === n && stops.every((s) => r.order.includes(s.id)) && r.arrivals.length === n;
      }),
      { numRuns: 40 },
    );
  });

  it('rejects bad input', () => {
    const stops = makeStops(2, 1, false);
    expect(() => planRoute({ start, stops: [...stops, stops[0]!], dayStart })).toThrow(/duplicate/);
    expect(() => planRoute({ start, stops, dayStart, order: ['s0'] })).toThrow(RangeError);
    expect(() => planRoute({ start, stops, dayStart, order: ['s0', 'zz'] })).toThrow(RangeError);
    expect(() => planRoute({ start, stops, dayStart: 'morning' })).toThrow(RangeError);
    expect(() => planRoute({ start, stops: [{ ...stops[0]!, window: { from: 10, to: 5 } }], dayStart })).toThrow(RangeError);
  });
});
