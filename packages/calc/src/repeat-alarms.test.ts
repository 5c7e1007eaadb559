import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { repeatAlarms, type UnitAlarm } from './repeat-alarms';

const DAY = 86_400_000;
const t0 = Date.UTC(2027, 5, 1, 8, 0, 0);
const at = (ms: number) => new Date(t0 + ms).toISOString();

describe('repeatAlarms', () => {
  it('counts exactly N alarms in exactly M days, but not N in M days + 1 ms', () => {
    const exact: UnitAlarm[] = [
      { unitId: 'RTU-1', circuit: 1, code: 'LP', raisedAt: at(0) },
      { unitId: 'RTU-1', circuit: 1, code: 'LP', raisedAt: at(15 * DAY) },
      { unitId: 'RTU-1', circuit: 1, code: 'LP', raisedAt: at(30 * DAY) },
    ];
    expect(repeatAlarms(exact, { windowDays: 30, minCount: 3 })).toHaveLength(1);
    const over = exact.map((a, i) => (i === 2 ? { ...a, raisedAt: at(30 * DAY + 1) } : a));
    expect(repeatAlarms(over, { windowDays: 30, minCount: 3 })).toHaveLength(0);
  });

  it('groups by unit and code, reports first/last/circuits and flags differing circuits', () => {
    const alarms: UnitAlarm[] = [
      { unitId: 'RTU-1', circuit: 2, code: 'LP', raisedAt: at(2 * DAY) },
      { unitId: 'RTU-1', circuit: 1, code: 'LP', raisedAt: new Date(t0) },
      { unitId: 'RTU-1', circuit: 1, code: 'HP', raisedAt: at(DAY) },
      { unitId: 'RTU-2', circuit: 1, code: 'LP', raisedAt: at(DAY) },
      { unitId: 'RTU-2', circuit: 1, code: 'LP', raisedAt: at(3 * DAY) },
    ];
    const r = repeatAlarms(alarms);
    expect(r).toEqual([
      { unitId: 'RTU-1', code: 'LP', count: 2, first: at(0), last: at(2 * DAY), circuits: [1, 2], circuitsDiffer: true, totalCount: 2 },
      { unitId: 'RTU-2', code: 'LP', count: 2, first: at(DAY), last: at(3 * DAY), circuits: [1], circuitsDiffer: false, totalCount: 2 },
    ]);
  });

  it('reports the densest span when there are several bursts', () => {
    const times = [0, 1, 50, 51, 52].map((d) => at(d * DAY));
    const r = repeatAlarms(
      times.map((raisedAt) => ({ unitId: 'U', circuit: null, code: 'E1', raisedAt })),
      { windowDays: 7 },
    );
    expect(r[0]).toMatchObject({ count: 3, first: at(50 * DAY), last: at(52 * DAY), totalCount: 5, circuits: [], circuitsDiffer: false });
  });

  it('reports the latest span when two spans hold as many alarms (product rule: act on the most recent burst)', () => {
    const times = [0, 1, 50, 51].map((d) => at(d * DAY));
    const r = repeatAlarms(
      times.map((raisedAt) => ({ unitId: 'U', circuit: null, code: 'E1', raisedAt })),
      { windowDays: 7 },
    );
    expect(r).toHaveLength(1);
    expect(r[0]).toMatchObject({ count: 2, first: at(50 * DAY), last: at(51 * DAY), totalCount: 4 });
    // Three equal spans in input order that is not time order: still the latest.
    const shuffled = [90, 0, 45, 1, 91, 46].map((d) => ({ unitId: 'U', circuit: null, code: 'E1', raisedAt: at(d * DAY) }));
    expect(repeatAlarms(shuffled, { windowDays: 7 })[0]).toMatchObject({ count: 2, first: at(90 * DAY), last: at(91 * DAY) });
  });

  it("compares alarm codes without regard to case and reports the spelling of the span's last alarm", () => {
    const alarms: UnitAlarm[] = [
      { unitId: 'RTU-1', circuit: 1, code: 'lp1', raisedAt: at(0) },
      { unitId: 'RTU-1', circuit: 1, code: 'LP1', raisedAt: at(2 * DAY) },
      { unitId: 'RTU-1', circuit: 1, code: 'Lp1 ', raisedAt: at(DAY) },
      { unitId: 'RTU-1', circuit: 1, code: 'HP1', raisedAt: at(DAY) },
    ];
    const r = repeatAlarms(alarms, { minCount: 3 });
    expect(r).toEqual([
      { unitId: 'RTU-1', code: 'LP1', count: 3, first: at(0), last: at(2 * DAY), circuits: [1], circuitsDiffer: false, totalCount: 3 },
    ]);
    // Two spellings alone would not have crossed a rule of 3 before: now they do, and HP1 stays apart.
    expect(repeatAlarms(alarms, { minCount: 2 }).map((g) => g.code)).toEqual(['LP1']);
  });

  it('asks "in the last M days" with asOf (inclusive at both ends)', () => {
    const alarms = [0, 10, 20, 40].map((d) => ({ unitId: 'U', circuit: 'A', code: 'E', raisedAt: at(d * DAY) }));
    const r = repeatAlarms(alarms, { windowDays: 30, asOf: at(40 * DAY) });
    expect(r[0]).toMatchObject({ count: 3, first: at(10 * DAY), last: at(40 * DAY) });
    expect(repeatAlarms(alarms, { windowDays: 30, asOf: at(40 * DAY + 1), minCount: 3 })).toHaveLength(0);
  });

  it('rejects bad options and instants', () => {
    expect(() => repeatAlarms([], { minCount: 0 })).toThrow(RangeError);
    expect(() => repeatAlarms([{ unitId: 'U', circuit: 1, code: 'E', raisedAt: 'soon' }])).toThrow(RangeError);
  });

  it('property: matches a brute-force count of the densest span', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 90 * DAY }), { maxLength: 30 }),
        fc.integer({ min: 1, max: 40 }),
        (offsets, windowDays) => {
          const alarms = offsets.map((o) => ({ unitId: 'U', circuit: 1, code: 'E', raisedAt: at(o) }));
          let best = 0;
          for (const a of offsets) best = Math.max(best, offsets.filter((b) => b >= a && b - a <= windowDays * DAY).length);
          const r = repeatAlarms(alarms, { windowDays, minCount: 1 });
          return (r[0]?.count ?? 0) === best;
        },
      ),
    );
  });

  it('handles 120,000 alarms', () => {
    const alarms: UnitAlarm[] = [];
    for (let i = 0; i < 120_000; i++)
      alarms.push({ unitId: `U${i % 2000}`, circuit: i % 3, code: `E${i % 7}`, raisedAt: at((i * 37) % (365 * DAY)) });
    const r = repeatAlarms(alarms);
    expect(r.reduce((s, g) => s + g.totalCount, 0)).toBeLessThanOrEqual(120_000);
    expect(r.length).toBeGreaterThan(0);
  });
});
