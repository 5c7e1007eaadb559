/**
 * The refrigerant ledger. Rule values are those of LEAK_RULES (docs/reference/LEAK-RULES.md):
 * thresholds 82.157(c)(2) [P] (20/30/10) and pre-2019 35/35/15/15 [P]; repair 30 days and 120 with
 * an industrial-process shutdown, 82.157(d) [M] / 84.106(d) [S]; chronic leaker 125 %, 82.157(j) [S]
 * and EPA fact sheet P100PI79 [P]; Part 84 from 2026-01-01, 15 lb, residential and light-commercial
 * AC excluded, 84.106(a) [S].
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { addDays } from './dates';
import { leakObligations, leakRate, leakRepairObligation, type LedgerEvent, type LeakObligationsInput } from './leak-ledger';
import type { Appliance } from './leak-rules';

const r22 = (category: Appliance['category'], fullCharge = 100): Appliance => ({ category, fullCharge, refrigerant: 'R-22' });
const comfort = r22('comfort_cooling');
const add = (
  date: string,
  pounds: number,
  extra: { leakId?: string; exempt?: 'installation' | 'retrofit' | 'seasonal-variance' } = {},
): LedgerEvent => ({ kind: 'addition', date, pounds, ...extra });
const repair = (date: string): LedgerEvent => ({ kind: 'repair', date });
const test = (date: string, stage: 'initial' | 'follow-up', passed: boolean): LedgerEvent => ({
  kind: 'verification',
  date,
  stage,
  passed,
});
const plan = (date: string): LedgerEvent => ({ kind: 'retrofit-or-retirement-plan', date });

describe('leakObligations — a small addition after a big one', () => {
  const events = [
    add('2027-01-01', 2),
    add('2027-04-01', 20), // 90 days: 20/100 × 365/90 × 100 = 81 % > 10 %
    add('2027-12-01', 1), // 244 days: 1.5 %, under the threshold
  ];

  it('keeps the obligation the big one opened (the old one-addition view forgot it)', () => {
    const r = leakObligations({ appliance: comfort, events, asOf: '2027-12-01' });
    expect(r.leakRate).toBeCloseTo((1 / 100) * (365 / 244) * 100, 10);
    expect(r.obligations).toHaveLength(1);
    expect(r.obligations[0]).toMatchObject({ triggeredOn: '2027-04-01', repairDueDate: '2027-05-01', repairedOn: null, state: 'overdue' });
    expect(r.obligations[0]!.leakRate).toBeCloseTo((20 / 100) * (365 / 90) * 100, 10);
    expect(r.openObligation).toEqual(r.obligations[0]);
    // leakRepairObligation answers for the latest addition only, as it always did.
    expect(
      leakRepairObligation({ appliance: comfort, additions: events.map((e) => e as { date: string; pounds: number }), asOf: '2027-12-01' })
        .exceeds,
    ).toBe(false);
  });

  it('is open up to and including its due date, overdue the day after', () => {
    expect(leakObligations({ appliance: comfort, events, asOf: '2027-05-01' }).openObligation?.state).toBe('open');
    expect(leakObligations({ appliance: comfort, events, asOf: '2027-05-02' }).openObligation?.state).toBe('overdue');
  });

  it('opens no second obligation while one waits for its repair', () => {
    const r = leakObligations({ appliance: comfort, events: [...events, add('2027-12-02', 30)], asOf: '2027-12-02' });
    expect(r.obligations).toHaveLength(1);
  });

  it('ignores events after asOf', () => {
    const r = leakObligations({ appliance: comfort, events, asOf: '2027-03-31' });
    expect(r.obligations).toEqual([]);
    expect(r.leakRate).toBeCloseTo(2, 10);
  });
});

describe('leakObligations — one leak topped off over several days (leakId)', () => {
  // 2027-01-01: 1 lb; then the same leak topped off with 5 lb on 2027-04-01 and 5 lb on 2027-04-02.
  const base = [add('2027-01-01', 1)];

  it('without a leakId the second top-off reads as one day of loss: 5 % × 365 = 1825 %/yr', () => {
    const r = leakObligations({ appliance: comfort, events: [...base, add('2027-04-01', 5), add('2027-04-02', 5)], asOf: '2027-04-02' });
    expect(r.leakRate).toBeCloseTo(1825, 8);
  });

  it('with a shared leakId both are summed over the interval from the last addition before the first (91 days)', () => {
    const events = [...base, add('2027-04-01', 5, { leakId: 'L1' }), add('2027-04-02', 5, { leakId: 'L1' })];
    const r = leakObligations({ appliance: comfort, events, asOf: '2027-04-02' });
    expect(r.leakRate).toBeCloseTo((10 / 100) * (365 / 91) * 100, 10);
    expect(r.obligations.map((o) => o.triggeredOn)).toEqual(['2027-04-01']);
  });

  it('another leak between the first and last top-off is neither summed nor the start of the interval', () => {
    const events = [
      ...base,
      add('2027-04-01', 5, { leakId: 'A' }),
      add('2027-04-10', 3, { leakId: 'B' }),
      add('2027-04-20', 2, { leakId: 'A' }),
    ];
    const r = leakObligations({ appliance: comfort, events, asOf: '2027-04-20' });
    expect(r.leakRate).toBeCloseTo((7 / 100) * (365 / 109) * 100, 10); // 2027-01-01 → 2027-04-20
  });

  it('a recharge with the leakId of a repaired and verified leak does not open a second obligation; a new leak does', () => {
    const events = [
      add('2027-01-01', 1),
      add('2027-04-01', 15, { leakId: 'A' }),
      repair('2027-04-05'),
      test('2027-04-05', 'initial', true),
      test('2027-04-12', 'follow-up', true),
      add('2027-04-13', 4, { leakId: 'A' }),
    ];
    const same = leakObligations({ appliance: comfort, events, asOf: '2027-04-13' });
    expect(same.obligations.map((o) => o.state)).toEqual(['verified']);
    const other = leakObligations({
      appliance: comfort,
      events: [...events.slice(0, -1), add('2027-04-13', 4, { leakId: 'B' })],
      asOf: '2027-04-13',
    });
    expect(other.obligations.map((o) => [o.triggeredOn, o.state])).toEqual([
      ['2027-04-01', 'verified'],
      ['2027-04-13', 'open'],
    ]);
  });
});

describe('leakObligations — exact comparison at the threshold', () => {
  const ipr = r22('industrial_process', 72);

  it('21.6 lb in a 72 lb charge over 365 days is exactly 30 %: not over (floating point says 30.000000000000004)', () => {
    expect((21.6 / 72) * (365 / 365) * 100).toBeGreaterThan(30); // the trap this guards against
    const r = leakObligations({ appliance: ipr, events: [add('2027-06-01', 21.6)], asOf: '2027-06-01' });
    expect(r.thresholdPercent).toBe(30);
    expect(r.leakRate).toBe(30);
    expect(r.obligations).toEqual([]);
    expect(leakRepairObligation({ appliance: ipr, additions: [{ date: '2027-06-01', pounds: 21.6 }], asOf: '2027-06-01' }).exceeds).toBe(
      false,
    );
  });

  it('one ten-thousandth of a pound more is over', () => {
    const r = leakObligations({ appliance: ipr, events: [add('2027-06-01', 21.6001)], asOf: '2027-06-01' });
    expect(r.obligations).toHaveLength(1);
  });

  it('a rate over the threshold by less than floating point can show is still over (21.6 lb + 1e-20 lb)', () => {
    const r = leakObligations({ appliance: ipr, events: [add('2027-06-01', 21.6), add('2027-06-01', 1e-20)], asOf: '2027-06-01' });
    expect(r.leakRate).toBe(30); // the nearest number to 30.000…0014 %
    expect(r.obligations).toHaveLength(1);
  });

  it('a subnormal top-off beside a real one still gives a finite rate (a stored 5e-324 lb once answered NaN)', () => {
    // 1.5 lb of 100 lb in a day with nothing before: 1.5 % × 365 ÷ 365 = 1.5 %/yr; 5e-324 lb changes nothing a number can show.
    for (const tiny of [5e-324, 1e-310, 2.2e-308]) {
      const r = leakObligations({ appliance: comfort, events: [add('2027-06-01', 1.5), add('2027-06-01', tiny)], asOf: '2027-06-01' });
      expect(r.leakRate, `with ${tiny} lb`).toBe(1.5);
      const o = leakRepairObligation({
        appliance: comfort,
        additions: [
          { date: '2027-06-01', pounds: 1.5 },
          { date: '2027-06-01', pounds: tiny },
        ],
        asOf: '2027-06-01',
      });
      expect(o.leakRate, `with ${tiny} lb`).toBe(1.5);
    }
  });

  it('is exact through the annualizing interval too: 3.24 lb of 54 lb after 73 days is exactly 30 %', () => {
    const appliance = r22('industrial_process', 54);
    expect((3.24 / 54) * (365 / 73) * 100).not.toBe(30);
    const at = leakObligations({ appliance, events: [add('2027-01-01', 1), add('2027-03-15', 3.24)], asOf: '2027-03-15' });
    expect(at.obligations).toEqual([]);
    expect(at.leakRate).toBe(30);
    const overIt = leakObligations({ appliance, events: [add('2027-01-01', 1), add('2027-03-15', 3.2401)], asOf: '2027-03-15' });
    expect(overIt.obligations).toHaveLength(1);
  });

  it('chronic at exactly 125 % of full charge (≥), not at a hair under', () => {
    const appliance = r22('comfort_cooling', 0.8 * 100);
    const exactly = leakObligations({ appliance, events: [add('2027-02-01', 70.1), add('2027-09-01', 29.9)], asOf: '2027-12-31' });
    expect(exactly.chronicYears).toEqual([2027]);
    const under = leakObligations({ appliance, events: [add('2027-02-01', 70.1), add('2027-09-01', 29.8999)], asOf: '2027-12-31' });
    expect(under.chronicYears).toEqual([]);
  });
});

describe('leakObligations — repair window', () => {
  const big = [add('2027-04-01', 40)];

  it('120 days for industrial-process refrigeration with a shutdown', () => {
    const r = leakObligations({ appliance: r22('industrial_process'), events: big, asOf: '2027-04-01', industrialShutdown: true });
    expect(r.obligations[0]?.repairDueDate).toBe('2027-07-30');
  });

  it('30 days for comfort cooling (and commercial refrigeration, other) even when a shutdown is claimed', () => {
    for (const category of ['comfort_cooling', 'commercial_refrigeration', 'other'] as const) {
      const r = leakObligations({ appliance: r22(category), events: big, asOf: '2027-04-01', industrialShutdown: true });
      expect(r.obligations[0]?.repairDueDate, category).toBe('2027-05-01');
      expect(
        leakRepairObligation({
          appliance: r22(category),
          additions: [{ date: '2027-04-01', pounds: 40 }],
          asOf: '2027-04-01',
          industrialShutdown: true,
        }).repairDueDate,
      ).toBe('2027-05-01');
    }
  });

  it('30 days for industrial-process refrigeration without a shutdown', () => {
    expect(leakObligations({ appliance: r22('industrial_process'), events: big, asOf: '2027-04-01' }).obligations[0]?.repairDueDate).toBe(
      '2027-05-01',
    );
  });
});

describe('leakObligations — exempt additions', () => {
  it('an installation charge is not counted, opens nothing, and starts the next interval', () => {
    const events = [add('2027-03-01', 100, { exempt: 'installation' }), add('2027-05-30', 3)];
    const atInstall = leakObligations({ appliance: comfort, events, asOf: '2027-03-01' });
    expect(atInstall.leakRate).toBe(0);
    expect(atInstall.obligations).toEqual([]);
    const r = leakObligations({ appliance: comfort, events, asOf: '2027-05-30' });
    expect(r.leakRate).toBeCloseTo((3 / 100) * (365 / 90) * 100, 10); // 90 days since the installation charge
    expect(r.obligations).toHaveLength(1);
  });

  it.each(['installation', 'retrofit', 'seasonal-variance'] as const)(
    '%s: not counted by the rolling average or the chronic-leaker sum',
    (exempt) => {
      const events = [add('2027-03-01', 130, { exempt }), add('2027-06-01', 5)];
      const r = leakObligations({ appliance: comfort, events, asOf: '2027-12-31', method: 'rolling-average' });
      expect(r.leakRate).toBeCloseTo(5, 10);
      expect(r.chronicYears).toEqual([]);
      expect(r.obligations).toEqual([]);
    },
  );

  it('leakRate and leakRepairObligation accept the mark too', () => {
    const additions = [{ date: '2027-03-01', pounds: 100, exempt: 'installation' as const }];
    expect(leakRate({ method: 'annualizing', fullCharge: 100, additions, asOf: '2027-03-01' })).toBe(0);
    expect(leakRepairObligation({ appliance: comfort, additions, asOf: '2027-03-01' }).exceeds).toBe(false);
  });
});

describe('leakObligations — scope', () => {
  const hfc = { category: 'comfort_cooling' as const, fullCharge: 20, refrigerant: 'R-410A' };
  const events = [add('2026-03-01', 5)];

  it('Part 84 applies to a 20 lb R-410A rooftop unit from 2026, not to residential or light-commercial AC', () => {
    expect(leakObligations({ appliance: hfc, events, asOf: '2026-03-01' })).toMatchObject({ inScope: true, rule: '40 CFR 84.106' });
    const home = leakObligations({ appliance: { ...hfc, residentialOrLightCommercial: true }, events, asOf: '2026-03-01' });
    expect(home).toMatchObject({ inScope: false, rule: null, thresholdPercent: null, obligations: [], chronicYears: [] });
    expect(home.leakRate).toBeCloseTo(25, 10);
    expect(
      leakRepairObligation({
        appliance: { ...hfc, residentialOrLightCommercial: true },
        additions: [{ date: '2026-03-01', pounds: 5 }],
        asOf: '2026-03-01',
      }).inScope,
    ).toBe(false);
  });

  it('the flag does not take an R-22 appliance of 50 lb or more out of Part 82', () => {
    const r = leakObligations({
      appliance: { ...comfort, residentialOrLightCommercial: true },
      events: [add('2027-03-01', 20)],
      asOf: '2027-03-01',
    });
    expect(r.rule).toBe('40 CFR 82.157');
    expect(r.obligations).toHaveLength(1);
  });

  it('each addition is judged under the rule of its own day: 12 % was under 15 % in 2018, over 10 % in 2019', () => {
    const appliance = r22('comfort_cooling', 100);
    const r = leakObligations({ appliance, events: [add('2018-06-01', 12), add('2019-06-01', 12)], asOf: '2019-06-01' });
    expect(r.obligations.map((o) => o.triggeredOn)).toEqual(['2019-06-01']);
  });

  it('Part 84 counts from 2026-01-01: a 2025 addition neither counts nor starts the first interval', () => {
    const r = leakObligations({
      appliance: { ...hfc, fullCharge: 40 },
      events: [add('2025-12-15', 2), add('2026-01-14', 2)],
      asOf: '2026-01-14',
    });
    expect(r.leakRate).toBeCloseTo(5, 10); // 2/40 over 365 days, not 2/40 × 365/30
    expect(r.obligations).toEqual([]);
  });
});

describe('leakObligations — chronic-leaker years', () => {
  it('none before 2019 (no report under the old rule), then from 2019 under 82.157(j)', () => {
    const events = [add('2018-02-01', 70), add('2018-09-01', 60), add('2019-02-01', 70), add('2019-09-01', 60)];
    expect(leakObligations({ appliance: comfort, events, asOf: '2019-12-31' }).chronicYears).toEqual([2019]);
  });

  it('an HFC in 2020 counts only what was added while 82.157 still covered it (to 2020-04-09)', () => {
    const appliance = { category: 'comfort_cooling' as const, fullCharge: 100, refrigerant: 'R-410A' };
    const split = [add('2020-02-01', 70), add('2020-05-01', 60)];
    expect(leakObligations({ appliance, events: split, asOf: '2020-12-31' }).chronicYears).toEqual([]);
    const early = [add('2020-02-01', 70), add('2020-04-09', 60)];
    expect(leakObligations({ appliance, events: early, asOf: '2020-12-31' }).chronicYears).toEqual([2020]);
  });

  it('lists every year that reached 125 %, oldest first, the current one as soon as it does', () => {
    const events = [add('2027-01-10', 130), add('2029-03-01', 100), add('2029-05-01', 25), add('2028-01-01', 10)];
    expect(leakObligations({ appliance: comfort, events, asOf: '2029-04-30' }).chronicYears).toEqual([2027]);
    expect(leakObligations({ appliance: comfort, events, asOf: '2029-05-01' }).chronicYears).toEqual([2027, 2029]);
  });
});

describe('leakObligations — repair, verification and plan', () => {
  const opened = [add('2027-01-01', 1), add('2027-04-01', 20)]; // due 2027-05-01

  it('repaired after a repair; verified after a passed initial and a passed follow-up test', () => {
    const a = leakObligations({ appliance: comfort, events: [...opened, repair('2027-04-10')], asOf: '2027-06-01' });
    expect(a.obligations[0]).toMatchObject({ state: 'repaired', repairedOn: '2027-04-10' });
    expect(a.openObligation).toBeNull();
    const b = leakObligations({
      appliance: comfort,
      events: [...opened, repair('2027-04-10'), test('2027-04-10', 'initial', true), test('2027-04-18', 'follow-up', true)],
      asOf: '2027-06-01',
    });
    expect(b.obligations[0]).toMatchObject({ state: 'verified', repairedOn: '2027-04-10' });
  });

  it('a passed follow-up test without a passed initial test does not verify', () => {
    const r = leakObligations({
      appliance: comfort,
      events: [...opened, repair('2027-04-10'), test('2027-04-18', 'follow-up', true)],
      asOf: '2027-06-01',
    });
    expect(r.obligations[0]?.state).toBe('repaired');
  });

  it('a verification test before any repair changes nothing', () => {
    const r = leakObligations({
      appliance: comfort,
      events: [...opened, test('2027-04-05', 'initial', true), test('2027-04-06', 'follow-up', true)],
      asOf: '2027-04-20',
    });
    expect(r.obligations[0]?.state).toBe('open');
  });

  it('a failed test reopens the obligation with the rule’s deadline: open before it, overdue after', () => {
    const failedInitial = [...opened, repair('2027-04-10'), test('2027-04-10', 'initial', false)];
    const before = leakObligations({ appliance: comfort, events: failedInitial, asOf: '2027-04-20' });
    expect(before.openObligation).toMatchObject({
      triggeredOn: '2027-04-01',
      repairDueDate: '2027-05-01',
      repairedOn: null,
      state: 'open',
    });
    const failedFollowUp = [...opened, repair('2027-04-10'), test('2027-04-10', 'initial', true), test('2027-05-15', 'follow-up', false)];
    const after = leakObligations({ appliance: comfort, events: failedFollowUp, asOf: '2027-05-15' });
    expect(after.openObligation).toMatchObject({ repairDueDate: '2027-05-01', repairedOn: null, state: 'overdue' });
    // repaired again and verified
    const again = leakObligations({
      appliance: comfort,
      events: [...failedFollowUp, repair('2027-05-16'), test('2027-05-16', 'initial', true), test('2027-05-20', 'follow-up', true)],
      asOf: '2027-06-01',
    });
    expect(again.obligations[0]).toMatchObject({ state: 'verified', repairedOn: '2027-05-16' });
  });

  it('a failed and a passed follow-up test on the same day: the failure stands, in either input order', () => {
    const base = [...opened, repair('2027-04-10'), test('2027-04-10', 'initial', true)];
    for (const pair of [
      [test('2027-04-18', 'follow-up', true), test('2027-04-18', 'follow-up', false)],
      [test('2027-04-18', 'follow-up', false), test('2027-04-18', 'follow-up', true)],
    ]) {
      const r = leakObligations({ appliance: comfort, events: [...base, ...pair], asOf: '2027-04-20' });
      expect(r.openObligation).toMatchObject({ state: 'open', repairedOn: null });
    }
  });

  it('a retrofit or retirement plan moves an open or overdue obligation to plan', () => {
    const r = leakObligations({ appliance: comfort, events: [...opened, plan('2027-05-20')], asOf: '2027-06-01' });
    expect(r.obligations[0]?.state).toBe('plan');
    expect(r.openObligation).toBeNull();
  });

  it('after a repair, a new rate over the threshold opens a new obligation', () => {
    const r = leakObligations({
      appliance: comfort,
      events: [
        ...opened,
        repair('2027-04-10'),
        test('2027-04-10', 'initial', true),
        test('2027-04-18', 'follow-up', true),
        add('2027-06-01', 10),
      ],
      asOf: '2027-06-01',
    });
    expect(r.obligations.map((o) => [o.triggeredOn, o.state])).toEqual([
      ['2027-04-01', 'verified'],
      ['2027-06-01', 'open'],
    ]);
  });

  it('on one day the addition comes before the repair, whatever the input order', () => {
    const r = leakObligations({ appliance: comfort, events: [repair('2027-04-01'), ...opened], asOf: '2027-04-02' });
    expect(r.obligations[0]).toMatchObject({ triggeredOn: '2027-04-01', state: 'repaired', repairedOn: '2027-04-01' });
  });

  it('the rolling average starts again after a passed follow-up test', () => {
    const appliance = r22('commercial_refrigeration');
    const events = [
      add('2027-01-10', 15),
      add('2027-03-01', 10),
      repair('2027-03-05'),
      test('2027-03-05', 'initial', true),
      test('2027-03-10', 'follow-up', true),
      add('2027-06-01', 6),
    ];
    const r = leakObligations({ appliance, events, asOf: '2027-06-01', method: 'rolling-average' });
    expect(r.obligations.map((o) => [o.triggeredOn, o.state])).toEqual([['2027-03-01', 'verified']]); // 25 % > 20 %
    expect(r.obligations[0]?.leakRate).toBeCloseTo(25, 10);
    expect(r.leakRate).toBeCloseTo(6, 10); // only what came after 2027-03-10
  });
});

describe('leakObligations — input', () => {
  it('has no obligations and a 0 rate for an empty ledger', () => {
    expect(leakObligations({ appliance: comfort, events: [], asOf: '2027-01-01' })).toEqual({
      inScope: true,
      rule: '40 CFR 82.157',
      thresholdPercent: 10,
      leakRate: 0,
      obligations: [],
      openObligation: null,
      chronicYears: [],
    });
  });

  it('rejects bad events naming what is wrong', () => {
    const base: LeakObligationsInput = { appliance: comfort, events: [], asOf: '2027-01-01' };
    expect(() => leakObligations({ ...base, events: [{ kind: 'topup', date: '2027-01-01' } as unknown as LedgerEvent] })).toThrow(
      /events\[0\]\.kind must be one of addition, repair/,
    );
    expect(() => leakObligations({ ...base, events: [add('2027-02-30', 1)] })).toThrow(RangeError);
    expect(() => leakObligations({ ...base, events: [add('2027-01-01', -1)] })).toThrow(/pounds/);
    expect(() => leakObligations({ ...base, events: [add('2027-01-01', 1, { leakId: '' })] })).toThrow(/leakId/);
    expect(() =>
      leakObligations({
        ...base,
        events: [{ kind: 'addition', date: '2027-01-01', pounds: 1, exempt: 'warranty' } as unknown as LedgerEvent],
      }),
    ).toThrow(/exempt must be one of installation, retrofit, seasonal-variance/);
    expect(() =>
      leakObligations({
        ...base,
        events: [{ kind: 'verification', date: '2027-01-01', stage: 'final', passed: true } as unknown as LedgerEvent],
      }),
    ).toThrow(/stage/);
    expect(() =>
      leakObligations({
        ...base,
        events: [{ kind: 'verification', date: '2027-01-01', stage: 'initial', passed: 'yes' } as unknown as LedgerEvent],
      }),
    ).toThrow(/passed/);
    expect(() => leakObligations({ ...base, method: 'monthly' as 'annualizing' })).toThrow(/valid: annualizing, rolling-average/);
    expect(() => leakObligations({ ...base, appliance: { ...comfort, fullCharge: 0 } })).toThrow(/fullCharge/);
    expect(() => leakObligations({ ...base, appliance: { ...comfort, refrigerant: 'R-12' } })).toThrow(/valid ids/);
  });

  it('a 0 lb entry is no addition: it neither counts nor starts an interval', () => {
    const r = leakObligations({ appliance: comfort, events: [add('2027-01-01', 0), add('2027-03-02', 5)], asOf: '2027-03-02' });
    expect(r.leakRate).toBeCloseTo(5, 10);
  });
});

// ---------------------------------------------------------------------------------------------
// Properties

const DAYS = ['2027-01-01', '2027-02-15', '2027-03-01', '2027-03-02', '2027-06-30'];
const eventArb: fc.Arbitrary<LedgerEvent> = fc.oneof(
  fc
    .record({
      kind: fc.constant('addition' as const),
      date: fc.constantFrom(...DAYS),
      pounds: fc.integer({ min: 0, max: 4000 }).map((n) => n / 100),
      leakId: fc.option(fc.constantFrom('A', 'B'), { nil: undefined }),
      exempt: fc.option(fc.constantFrom('installation' as const, 'seasonal-variance' as const), { nil: undefined, freq: 4 }),
    })
    .map((e) => {
      const out: LedgerEvent = { kind: 'addition', date: e.date, pounds: e.pounds };
      if (e.leakId !== undefined) out.leakId = e.leakId;
      if (e.exempt !== undefined) out.exempt = e.exempt;
      return out;
    }),
  fc.record({ kind: fc.constant('repair' as const), date: fc.constantFrom(...DAYS) }),
  fc.record({
    kind: fc.constant('verification' as const),
    date: fc.constantFrom(...DAYS),
    stage: fc.constantFrom('initial' as const, 'follow-up' as const),
    passed: fc.boolean(),
  }),
  fc.record({ kind: fc.constant('retrofit-or-retirement-plan' as const), date: fc.constantFrom(...DAYS) }),
);

describe('leakObligations — properties (fast-check)', () => {
  it('the order of the events does not matter', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(eventArb, fc.integer()), { maxLength: 14 }),
        fc.constantFrom('annualizing' as const, 'rolling-average' as const),
        fc.constantFrom('comfort_cooling' as const, 'industrial_process' as const),
        (keyed, method, category) => {
          const events = keyed.map(([e]) => e);
          const shuffled = [...keyed].sort((a, b) => a[1] - b[1]).map(([e]) => e);
          const input = { appliance: r22(category, 60), asOf: '2027-06-30', method };
          const forward = leakObligations({ ...input, events });
          expect(leakObligations({ ...input, events: shuffled })).toEqual(forward);
          expect(leakObligations({ ...input, events: [...events].reverse() })).toEqual(forward);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('a rate exactly at the threshold never opens an obligation, and one ten-thousandth of a pound more does', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(['comfort_cooling', 10] as const, ['commercial_refrigeration', 20] as const, ['industrial_process', 30] as const),
        fc.integer({ min: 5000, max: 200000 }), // full charge in hundredths of a pound, 50.00 … 2000.00 lb
        fc.integer({ min: 1, max: 5 }), // interval 73 × k days, so the exact pounds are a terminating decimal
        ([category, threshold], chargeHundredths, k) => {
          const fullCharge = chargeHundredths / 100;
          const days = 73 * k;
          // threshold % × full charge × days / 365 → threshold × chargeHundredths × k / 50000 lb, exactly
          const pounds = Number(`${threshold * chargeHundredths * k * 2}e-5`);
          const first = '2027-01-01';
          const second = addDays(first, days);
          const appliance = r22(category, fullCharge);
          const at = leakObligations({
            appliance,
            events: [add(first, 0.01, { exempt: 'installation' }), add(second, pounds)],
            asOf: second,
          });
          expect(at.obligations).toEqual([]);
          expect(
            leakRepairObligation({
              appliance,
              additions: [
                { date: first, pounds: 0.01, exempt: 'installation' },
                { date: second, pounds },
              ],
              asOf: second,
            }).exceeds,
          ).toBe(false);
          const more = leakObligations({
            appliance,
            events: [add(first, 0.01, { exempt: 'installation' }), add(second, Number((pounds + 0.0001).toFixed(6)))],
            asOf: second,
          });
          expect(more.obligations).toHaveLength(1);
        },
      ),
      { numRuns: 400 },
    );
  });

  it('the rolling average at the threshold, split into several additions, never opens one either', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(['comfort_cooling', 10] as const, ['commercial_refrigeration', 20] as const, ['industrial_process', 30] as const),
        fc.integer({ min: 5000, max: 200000 }),
        fc.array(fc.integer({ min: 1, max: 100 }), { minLength: 1, maxLength: 6 }),
        ([category, threshold], chargeHundredths, weights) => {
          // total = threshold % of the charge, in units of 1e-4 lb, split by the weights
          const total = threshold * chargeHundredths; // × 1e-4 lb
          const sum = weights.reduce((s, w) => s + w, 0);
          const parts = weights.map((w) => Math.floor((total * w) / sum));
          parts[0]! += total - parts.reduce((s, p) => s + p, 0);
          const events = parts.filter((p) => p > 0).map((p, i) => add(addDays('2027-01-01', i * 30), Number(`${p}e-4`)));
          const asOf = addDays('2027-01-01', (events.length - 1) * 30);
          const r = leakObligations({ appliance: r22(category, chargeHundredths / 100), events, asOf, method: 'rolling-average' });
          expect(r.obligations).toEqual([]);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('leakRepairObligation and leakObligations agree on the rule and the rate', () => {
    fc.assert(
      fc.property(fc.array(eventArb, { maxLength: 10 }), (events) => {
        const additions = events.filter((e): e is Extract<LedgerEvent, { kind: 'addition' }> => e.kind === 'addition');
        const input = { appliance: r22('commercial_refrigeration', 60), asOf: '2027-06-30' };
        const a = leakObligations({ ...input, events });
        const b = leakRepairObligation({ ...input, additions });
        expect(b.rule).toBe(a.rule);
        // Annualizing (the default) reads only the additions, so the two rates are the same number.
        expect(b.leakRate).toBe(a.leakRate);
      }),
      { numRuns: 200 },
    );
  });
});
