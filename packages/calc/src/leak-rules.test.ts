import { describe, expect, it } from 'vitest';
import { leakRate, leakRepairObligation } from './leak-ledger';
import { LEAK_RULES, repairDaysFor, ruleInForce, verificationDeadlines } from './leak-rules';

describe('leakRate — annualizing', () => {
  it('uses the latest addition and the days since the previous one', () => {
    const r = leakRate({
      method: 'annualizing',
      fullCharge: 100,
      additions: [
        { date: '2027-01-01', pounds: 4 },
        { date: '2027-03-02', pounds: 5 }, // 60 days later
      ],
      asOf: '2027-03-02',
    });
    expect(r).toBeCloseTo((5 / 100) * (365 / 60) * 100, 10);
  });

  it('uses 365 days when there is no previous addition, and caps the day count at 365', () => {
    expect(
      leakRate({ method: 'annualizing', fullCharge: 200, additions: [{ date: '2027-05-01', pounds: 10 }], asOf: '2027-05-01' }),
    ).toBeCloseTo(5, 10);
    const capped = leakRate({
      method: 'annualizing',
      fullCharge: 200,
      additions: [
        { date: '2025-01-01', pounds: 3 },
        { date: '2027-05-01', pounds: 10 },
      ],
      asOf: '2027-06-01',
    });
    expect(capped).toBeCloseTo(5, 10);
  });

  it('ignores additions after asOf and sums several additions on the same day', () => {
    const r = leakRate({
      method: 'annualizing',
      fullCharge: 100,
      additions: [
        { date: '2027-03-02', pounds: 2 },
        { date: '2027-01-01', pounds: 4 },
        { date: '2027-03-02', pounds: 3 },
        { date: '2027-04-01', pounds: 50 },
      ],
      asOf: '2027-03-15',
    });
    expect(r).toBeCloseTo((5 / 100) * (365 / 60) * 100, 10);
  });

  it('returns 0 with no additions, and honours countFrom', () => {
    expect(leakRate({ method: 'annualizing', fullCharge: 100, additions: [], asOf: '2027-01-01' })).toBe(0);
    const r = leakRate({
      method: 'annualizing',
      fullCharge: 100,
      additions: [
        { date: '2025-12-20', pounds: 5 },
        { date: '2026-01-10', pounds: 5 },
      ],
      asOf: '2026-01-10',
      countFrom: '2026-01-01',
    });
    expect(r).toBeCloseTo(5, 10);
  });
});

describe('leakRate — rolling average', () => {
  const additions = [
    { date: '2026-03-02', pounds: 1 }, // 365 days before asOf: the 366th day counting asOf, outside
    { date: '2026-03-03', pounds: 2 }, // 364 days before asOf: the 365th day, inside
    { date: '2026-09-01', pounds: 3 },
    { date: '2027-03-02', pounds: 4 },
    { date: '2027-03-03', pounds: 100 }, // after asOf
  ];
  it('sums the 365 days ending asOf', () => {
    expect(leakRate({ method: 'rolling-average', fullCharge: 90, additions, asOf: '2027-03-02' })).toBeCloseTo((9 / 90) * 100, 10);
  });
  it('counts only additions after a later verification test (since)', () => {
    expect(leakRate({ method: 'rolling-average', fullCharge: 90, additions, asOf: '2027-03-02', since: '2026-09-01' })).toBeCloseTo(
      (4 / 90) * 100,
      10,
    );
    // an older `since` changes nothing
    expect(leakRate({ method: 'rolling-average', fullCharge: 90, additions, asOf: '2027-03-02', since: '2020-01-01' })).toBeCloseTo(
      (9 / 90) * 100,
      10,
    );
  });
  it('rejects bad input', () => {
    expect(() => leakRate({ method: 'rolling-average', fullCharge: 0, additions, asOf: '2027-03-02' })).toThrow(RangeError);
    expect(() =>
      leakRate({ method: 'rolling-average', fullCharge: 10, additions: [{ date: '2027-13-01', pounds: 1 }], asOf: '2027-03-02' }),
    ).toThrow(RangeError);
    expect(() =>
      leakRate({ method: 'rolling-average', fullCharge: 10, additions: [{ date: '2027-01-01', pounds: -1 }], asOf: '2027-03-02' }),
    ).toThrow(RangeError);
    expect(() => leakRate({ method: 'weekly' as 'annualizing', fullCharge: 10, additions, asOf: '2027-03-02' })).toThrow(
      /valid: annualizing, rolling-average/,
    );
  });
});

describe('ruleInForce', () => {
  it('picks the rule by refrigerant, charge and date', () => {
    expect(ruleInForce('R-22', 50, '2027-01-01')?.rule).toBe('40 CFR 82.157');
    expect(ruleInForce('R-22', 49.9, '2027-01-01')).toBeNull();
    expect(ruleInForce('R-22', 50, '2018-06-01')).toBeNull(); // "more than 50" before 2019
    expect(ruleInForce('R-22', 51, '2018-06-01')?.rule).toBe('40 CFR 82.156(i)');
    expect(ruleInForce('R-410A', 15, '2026-01-01')?.rule).toBe('40 CFR 84.106');
    expect(ruleInForce('R-410A', 15, '2025-12-31')).toBeNull();
    expect(ruleInForce('R-410A', 60, '2019-06-01')?.rule).toBe('40 CFR 82.157');
    expect(ruleInForce('R-410A', 60, '2020-04-10')).toBeNull();
    expect(ruleInForce('R-1234yf', 100, '2027-01-01')).toBeNull();
    expect(ruleInForce('R-454B', 20, '2027-01-01')?.rule).toBe('40 CFR 84.106');
  });
  it('keeps at most one rule in force for any refrigerant and date', () => {
    for (const date of ['2018-12-31', '2019-01-01', '2020-04-09', '2020-04-10', '2026-01-01']) {
      for (const r of LEAK_RULES) expect(typeof r.rule).toBe('string');
      const inForce = LEAK_RULES.filter((r) => date >= r.from && (r.until === null || date <= r.until));
      const coversOds = inForce.filter((r) => r.covers !== 'hfc-gwp-over-53');
      expect(coversOds.length).toBeLessThanOrEqual(1);
    }
  });
});

describe('the rule table', () => {
  it('has the chronic-leaker report only from 2019 (82.157(j) [S], EPA fact sheet P100PI79 [P]) and in Part 84 (84.106(j) [S/M])', () => {
    for (const r of LEAK_RULES) expect(r.chronicPercent, `${r.rule} from ${r.from}`).toBe(r.from >= '2019-01-01' ? 125 : null);
  });

  it('gives the 120-day shutdown window to industrial-process refrigeration only (82.157(d) [M], 84.106(d) [S])', () => {
    for (const r of LEAK_RULES) {
      expect(r.shutdownCategories).toEqual(['industrial_process']);
      expect(repairDaysFor(r, 'industrial_process', true)).toBe(120);
      expect(repairDaysFor(r, 'industrial_process', false)).toBe(30);
      expect(repairDaysFor(r, 'industrial_process', undefined)).toBe(30);
      for (const c of ['comfort_cooling', 'commercial_refrigeration', 'other'] as const) expect(repairDaysFor(r, c, true)).toBe(30);
    }
  });

  it('leaves residential and light-commercial air conditioning out of Part 84 only (84.106(a) [S])', () => {
    expect(LEAK_RULES.filter((r) => r.excludesResidentialOrLightCommercial).map((r) => r.rule)).toEqual(['40 CFR 84.106']);
    expect(ruleInForce('R-410A', 20, '2026-06-01', { residentialOrLightCommercial: true })).toBeNull();
    expect(ruleInForce('R-410A', 20, '2026-06-01', { residentialOrLightCommercial: false })?.rule).toBe('40 CFR 84.106');
    expect(ruleInForce('R-22', 60, '2026-06-01', { residentialOrLightCommercial: true })?.rule).toBe('40 CFR 82.157');
    expect(ruleInForce('R-410A', 60, '2019-06-01', { residentialOrLightCommercial: true })?.rule).toBe('40 CFR 82.157');
  });
});

describe('leakRepairObligation', () => {
  const comfort = { category: 'comfort_cooling' as const, fullCharge: 100, refrigerant: 'R-22' };

  it('owes a repair 30 days after the addition that pushed the rate over the threshold', () => {
    const r = leakRepairObligation({
      appliance: comfort,
      additions: [
        { date: '2027-01-01', pounds: 2 },
        { date: '2027-04-01', pounds: 5 }, // 90 days: 5/100*365/90 = 20.3 %
      ],
      asOf: '2027-04-01',
    });
    expect(r).toMatchObject({
      inScope: true,
      rule: '40 CFR 82.157',
      thresholdPercent: 10,
      exceeds: true,
      repairDueDate: '2027-05-01',
      verificationRequired: true,
      chronic: false,
    });
    expect(r.leakRate).toBeCloseTo((5 / 100) * (365 / 90) * 100, 10);
  });

  it('gives 120 days with an industrial-process shutdown', () => {
    const r = leakRepairObligation({
      appliance: { ...comfort, category: 'industrial_process' },
      additions: [{ date: '2027-04-01', pounds: 40 }],
      asOf: '2027-04-10',
      industrialShutdown: true,
    });
    expect(r.exceeds).toBe(true);
    expect(r.repairDueDate).toBe('2027-07-30');
  });

  it('does not owe a repair below or at the threshold', () => {
    const at = leakRepairObligation({ appliance: comfort, additions: [{ date: '2027-04-01', pounds: 10 }], asOf: '2027-04-01' });
    expect(at.leakRate).toBe(10);
    expect(at.exceeds).toBe(false);
    expect(at.repairDueDate).toBeNull();
    expect(at.verificationRequired).toBe(false);
  });

  it('uses the rolling average on request', () => {
    const r = leakRepairObligation({
      appliance: { ...comfort, category: 'commercial_refrigeration' },
      additions: [
        { date: '2026-06-01', pounds: 12 },
        { date: '2027-01-15', pounds: 9 },
      ],
      asOf: '2027-02-01',
      method: 'rolling-average',
    });
    expect(r.leakRate).toBeCloseTo(21, 10);
    expect(r.thresholdPercent).toBe(20);
    expect(r.exceeds).toBe(true);
    expect(r.repairDueDate).toBe('2027-02-14');
  });

  it('flags a chronic leaker at 125 % of full charge in the calendar year', () => {
    const adds = [
      { date: '2027-01-10', pounds: 60 },
      { date: '2027-06-10', pounds: 65 },
    ];
    expect(leakRepairObligation({ appliance: comfort, additions: adds, asOf: '2027-12-31' }).chronic).toBe(true);
    expect(leakRepairObligation({ appliance: comfort, additions: adds, asOf: '2027-06-09' }).chronic).toBe(false);
    const lastYear = [{ date: '2026-12-31', pounds: 60 }, adds[1]!];
    expect(leakRepairObligation({ appliance: comfort, additions: lastYear, asOf: '2027-12-31' }).chronic).toBe(false);
  });

  it('is out of scope below the size limit, for HFCs between 2020-04-10 and 2025-12-31, and for R-1234yf', () => {
    const big = [{ date: '2025-06-01', pounds: 50 }];
    for (const appliance of [
      { ...comfort, fullCharge: 49 },
      { ...comfort, refrigerant: 'R-410A' },
      { ...comfort, refrigerant: 'R-1234yf', fullCharge: 500 },
    ]) {
      const r = leakRepairObligation({ appliance, additions: big, asOf: '2025-06-01' });
      expect(r).toMatchObject({ inScope: false, rule: null, thresholdPercent: null, exceeds: false, repairDueDate: null, chronic: false });
      expect(r.leakRate).toBeGreaterThan(0);
    }
  });

  it('applies Part 84 to HFCs from 2026 and counts additions only from 2026-01-01', () => {
    const r = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 20, refrigerant: 'R-410A' },
      additions: [
        { date: '2025-12-01', pounds: 1 },
        { date: '2026-02-01', pounds: 1.5 },
      ],
      asOf: '2026-02-01',
    });
    expect(r.rule).toBe('40 CFR 84.106');
    expect(r.leakRate).toBeCloseTo(7.5, 10); // 365 days: the 2025 addition does not count
    expect(r.exceeds).toBe(false);
  });

  it('rejects an unknown category or refrigerant', () => {
    expect(() =>
      leakRepairObligation({ appliance: { ...comfort, category: 'home' as 'other' }, additions: [], asOf: '2027-01-01' }),
    ).toThrow(RangeError);
    expect(() => leakRepairObligation({ appliance: { ...comfort, refrigerant: 'R-12' }, additions: [], asOf: '2027-01-01' })).toThrow(
      /valid ids/,
    );
  });
});

describe('verificationDeadlines', () => {
  it('puts the follow-up test 10 days after a successful initial test', () => {
    expect(verificationDeadlines({ repairDueDate: '2027-05-01' })).toEqual({ initialTestDue: '2027-05-01', followUpDue: null });
    expect(verificationDeadlines({ repairDueDate: '2027-05-01', initialTestDate: '2027-04-25' })).toEqual({
      initialTestDue: '2027-05-01',
      followUpDue: '2027-05-05',
    });
  });
});
