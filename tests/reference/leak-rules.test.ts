/**
 * Reference check: Coilpath's leak-rate and leak-repair logic against the US EPA rules as extracted
 * in docs/reference/LEAK-RULES.md. Each expectation names the section and that file's tag:
 * [P] read in an official text or mirror, [S] seen only in a secondary source, [M] from memory.
 * LEAK-RULES.md §3: no EPA worked numeric example exists, so the checks follow from the wording.
 */
import { describe, expect, it } from 'vitest';
import { leakObligations, leakRate, leakRepairObligation, listRefrigerants, type LedgerEvent } from '@coilpath/calc';

const one = (date: string, pounds: number) => [{ date, pounds }];

describe('40 CFR 82 Subpart F (ODS)', () => {
  it('82.157(a) [P]: a full charge of 50 lb is in scope (50 or more pounds), 49 lb is not', () => {
    const at50 = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 50, refrigerant: 'R-22' },
      additions: one('2027-03-01', 1),
      asOf: '2027-03-01',
    });
    expect(at50.inScope).toBe(true);
    expect(at50.rule).toBe('40 CFR 82.157');
    const at49 = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 49, refrigerant: 'R-22' },
      additions: one('2027-03-01', 1),
      asOf: '2027-03-01',
    });
    expect(at49.inScope).toBe(false);
  });

  it('82.157(a) [P] (85 FR 14150): since 10 Apr 2020 an appliance with solely a substitute (HFC) is out of Part 82', () => {
    const before = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 60, refrigerant: 'R-410A' },
      additions: one('2020-04-09', 1),
      asOf: '2020-04-09',
    });
    const after = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 60, refrigerant: 'R-410A' },
      additions: one('2020-04-10', 1),
      asOf: '2020-04-10',
    });
    expect(before.rule).toBe('40 CFR 82.157');
    expect(after.inScope).toBe(false);
  });

  it.each([
    ['commercial_refrigeration', 20],
    ['industrial_process', 30],
    ['comfort_cooling', 10],
    ['other', 10],
  ] as const)('82.157(c)(2) [P]: %s threshold %i %%; a rate exactly at it is not "over" it (c)(1) [P]', (category, threshold) => {
    // 365 days (no previous addition): rate = pounds / full charge × 100.
    const base = { appliance: { category, fullCharge: 100, refrigerant: 'R-22' }, asOf: '2027-06-01' };
    const at = leakRepairObligation({ ...base, additions: one('2027-06-01', threshold) });
    expect(at.thresholdPercent).toBe(threshold);
    expect(at.leakRate).toBe(threshold);
    expect(at.exceeds).toBe(false);
    const over = leakRepairObligation({ ...base, additions: one('2027-06-01', threshold + 0.01) });
    expect(over.exceeds).toBe(true);
  });

  it('before 2019 [P] (www3.epa.gov/ozone/title6/608/leak.html): "more than 50 pounds"; commercial 35 %, IPR 35 %, comfort 15 %, other 15 %', () => {
    const at50 = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 50, refrigerant: 'R-22' },
      additions: one('2018-06-01', 10),
      asOf: '2018-06-01',
    });
    expect(at50.inScope).toBe(false);
    for (const [category, t] of [
      ['commercial_refrigeration', 35],
      ['industrial_process', 35],
      ['comfort_cooling', 15],
      ['other', 15],
    ] as const) {
      const r = leakRepairObligation({
        appliance: { category, fullCharge: 51, refrigerant: 'R-22' },
        additions: one('2018-06-01', 1),
        asOf: '2018-06-01',
      });
      expect(r.thresholdPercent).toBe(t);
    }
  });

  it('82.152 "leak rate" annualizing [S; step wording M]: the day count is capped at 365', () => {
    const additions = [
      { date: '2024-01-01', pounds: 5 },
      { date: '2027-01-01', pounds: 5 }, // 1096 days later → 365
    ];
    expect(leakRate({ method: 'annualizing', fullCharge: 100, additions, asOf: '2027-01-01' })).toBeCloseTo(5, 12);
  });

  it('82.152 rolling average [S/M]: lb added over the previous 365 days ÷ full charge × 100', () => {
    const additions = [
      { date: '2026-01-01', pounds: 30 },
      { date: '2026-07-01', pounds: 4 },
      { date: '2026-12-01', pounds: 6 },
    ];
    expect(leakRate({ method: 'rolling-average', fullCharge: 200, additions, asOf: '2027-01-15' })).toBeCloseTo(5, 12);
  });

  it('82.157(d) [M]: repair within 30 days of the addition that showed the rate over the threshold', () => {
    const r = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 100, refrigerant: 'R-22' },
      additions: one('2027-06-01', 11),
      asOf: '2027-06-05',
    });
    expect(r.repairDueDate).toBe('2027-07-01');
    expect(r.verificationRequired).toBe(true); // 82.157(e) [M]
  });

  it('82.157(j) [S] / EPA fact sheet P100PI79 [P]: exactly 125 % of full charge in a calendar year is chronic', () => {
    const appliance = { category: 'comfort_cooling' as const, fullCharge: 80, refrigerant: 'R-22' };
    const exactly = [
      { date: '2027-02-01', pounds: 50 },
      { date: '2027-09-01', pounds: 50 }, // 100 lb = 125 % of 80
    ];
    expect(leakRepairObligation({ appliance, additions: exactly, asOf: '2027-12-31' }).chronic).toBe(true);
    const under = [exactly[0]!, { date: '2027-09-01', pounds: 49.9 }];
    expect(leakRepairObligation({ appliance, additions: under, asOf: '2027-12-31' }).chronic).toBe(false);
  });
});

describe('40 CFR 84 Subpart C (AIM Act, HFCs)', () => {
  it('84.106(a) [S]: from 1 Jan 2026, a full charge of 15 lb or more of an HFC with GWP > 53 is in scope', () => {
    const appliance = { category: 'commercial_refrigeration' as const, fullCharge: 15, refrigerant: 'R-404A' };
    expect(leakRepairObligation({ appliance, additions: one('2026-01-01', 1), asOf: '2026-01-01' }).rule).toBe('40 CFR 84.106');
    expect(leakRepairObligation({ appliance, additions: one('2025-12-31', 1), asOf: '2025-12-31' }).inScope).toBe(false);
    expect(
      leakRepairObligation({ appliance: { ...appliance, fullCharge: 14.9 }, additions: one('2026-03-01', 1), asOf: '2026-03-01' }).inScope,
    ).toBe(false);
  });

  it('84.106(a) [S] and LEAK-RULES.md: R-1234yf (GWP below 53 [M]) is outside Part 84; every other HFC listed is above 53', () => {
    for (const r of listRefrigerants()) {
      const o = leakRepairObligation({
        appliance: { category: 'other', fullCharge: 100, refrigerant: r.id },
        additions: one('2027-01-10', 1),
        asOf: '2027-01-10',
      });
      if (r.id === 'R-1234yf') expect(o.inScope).toBe(false);
      else if (r.id === 'R-22') expect(o.rule).toBe('40 CFR 82.157');
      else expect(o.rule).toBe('40 CFR 84.106');
    }
  });

  it('84.106(c)(2) [S]: IPR 30 %, commercial refrigeration 20 %, comfort cooling and other 10 %', () => {
    for (const [category, t] of [
      ['industrial_process', 30],
      ['commercial_refrigeration', 20],
      ['comfort_cooling', 10],
      ['other', 10],
    ] as const) {
      const r = leakRepairObligation({
        appliance: { category, fullCharge: 40, refrigerant: 'R-448A' },
        additions: one('2026-05-01', 1),
        asOf: '2026-05-01',
      });
      expect(r.thresholdPercent).toBe(t);
    }
  });

  it('84.106(b) [S/M]: the first annualizing calculation after 1 Jan 2026 uses 365 days', () => {
    const r = leakRepairObligation({
      appliance: { category: 'comfort_cooling', fullCharge: 40, refrigerant: 'R-410A' },
      additions: [
        { date: '2025-12-15', pounds: 2 },
        { date: '2026-01-14', pounds: 2 }, // 30 days after, but the first calculation under Part 84
      ],
      asOf: '2026-01-14',
    });
    expect(r.leakRate).toBeCloseTo(5, 12);
    expect(r.exceeds).toBe(false);
  });

  it('84.106(d) [S]: repair within 30 days; 120 days with an industrial shutdown', () => {
    const base = {
      appliance: { category: 'industrial_process' as const, fullCharge: 100, refrigerant: 'R-134a' },
      additions: one('2026-03-01', 31),
      asOf: '2026-03-01',
    };
    expect(leakRepairObligation(base).repairDueDate).toBe('2026-03-31');
    expect(leakRepairObligation({ ...base, industrialShutdown: true }).repairDueDate).toBe('2026-06-29');
  });
});

describe('the refrigerant ledger (leakObligations) against the rules', () => {
  const add = (date: string, pounds: number, extra: Partial<Extract<LedgerEvent, { kind: 'addition' }>> = {}): LedgerEvent => ({
    kind: 'addition',
    date,
    pounds,
    ...extra,
  });
  const r22 = (category: 'comfort_cooling' | 'commercial_refrigeration' | 'industrial_process' | 'other', fullCharge: number) => ({
    category,
    fullCharge,
    refrigerant: 'R-22',
  });

  it('82.157(b) [P]: an addition immediately following installation, a retrofit, or a seasonal variance is not counted', () => {
    for (const exempt of ['installation', 'retrofit', 'seasonal-variance'] as const) {
      const r = leakObligations({
        appliance: r22('comfort_cooling', 100),
        events: [add('2027-03-01', 60, { exempt })],
        asOf: '2027-03-01',
      });
      expect(r.leakRate).toBe(0);
      expect(r.obligations).toEqual([]);
    }
  });

  it('82.157(b) [P]: the rate is calculated at every counted addition, so a later small one does not undo an earlier one over the threshold', () => {
    const r = leakObligations({
      appliance: r22('comfort_cooling', 100),
      events: [add('2027-01-01', 1), add('2027-02-01', 12), add('2027-12-01', 0.5)],
      asOf: '2027-12-01',
    });
    expect(r.obligations.map((o) => o.triggeredOn)).toEqual(['2027-02-01']);
    expect(r.openObligation?.state).toBe('overdue');
  });

  it('82.152 "leak rate" (1) [S; step wording M]: "one addition or several for the same leak" are summed over one interval', () => {
    // 2 lb on 2027-06-01 and 2 lb on 2027-06-02 for the same leak, the last earlier addition on 2027-03-03 (90 days before the first)
    const events = [add('2027-03-03', 1), add('2027-06-01', 2, { leakId: 'evap-coil' }), add('2027-06-02', 2, { leakId: 'evap-coil' })];
    const r = leakObligations({ appliance: r22('comfort_cooling', 100), events, asOf: '2027-06-02' });
    expect(r.leakRate).toBeCloseTo((4 / 100) * (365 / 91) * 100, 10);
  });

  it('82.157(c)(1) [P]: repair is owed only "over" the rate — 21.6 lb of a 72 lb industrial-process charge in 365 days is exactly 30 %, not over (c)(2) [P]', () => {
    const appliance = r22('industrial_process', 72);
    expect(leakObligations({ appliance, events: [add('2027-06-01', 21.6)], asOf: '2027-06-01' }).obligations).toEqual([]);
    expect(leakObligations({ appliance, events: [add('2027-06-01', 21.61)], asOf: '2027-06-01' }).obligations).toHaveLength(1);
  });

  it('82.157(d) [M] / 84.106(d) [S]: 120 days only when an industrial-process shutdown is needed; comfort cooling keeps 30', () => {
    const events = [add('2027-04-01', 40)];
    expect(
      leakObligations({ appliance: r22('industrial_process', 100), events, asOf: '2027-04-01', industrialShutdown: true }).obligations[0]
        ?.repairDueDate,
    ).toBe('2027-07-30');
    expect(
      leakObligations({ appliance: r22('comfort_cooling', 100), events, asOf: '2027-04-01', industrialShutdown: true }).obligations[0]
        ?.repairDueDate,
    ).toBe('2027-05-01');
  });

  it('82.157(e) [M]: verified after a passed initial and a passed follow-up verification test; a failed one leaves the repair owed (within the original window [M])', () => {
    const events: LedgerEvent[] = [
      add('2027-04-01', 40),
      { kind: 'repair', date: '2027-04-20' },
      { kind: 'verification', date: '2027-04-20', stage: 'initial', passed: true },
    ];
    const appliance = r22('comfort_cooling', 100);
    const passed = leakObligations({
      appliance,
      events: [...events, { kind: 'verification', date: '2027-04-28', stage: 'follow-up', passed: true }],
      asOf: '2027-05-10',
    });
    expect(passed.obligations[0]?.state).toBe('verified');
    const failed = leakObligations({
      appliance,
      events: [...events, { kind: 'verification', date: '2027-04-28', stage: 'follow-up', passed: false }],
      asOf: '2027-05-10',
    });
    expect(failed.obligations[0]).toMatchObject({ state: 'overdue', repairDueDate: '2027-05-01', repairedOn: null });
  });

  it('82.157(h) [S/M]: a retrofit or retirement plan takes the place of the repair', () => {
    const r = leakObligations({
      appliance: r22('commercial_refrigeration', 100),
      events: [add('2027-04-01', 40), { kind: 'retrofit-or-retirement-plan', date: '2027-04-25' }],
      asOf: '2027-06-01',
    });
    expect(r.obligations[0]?.state).toBe('plan');
    expect(r.openObligation).toBeNull();
  });

  it('82.152 rolling average (2) [S/M]: counts only what was added since the last successful follow-up verification test', () => {
    const events: LedgerEvent[] = [
      add('2027-01-05', 30),
      { kind: 'repair', date: '2027-01-10' },
      { kind: 'verification', date: '2027-01-10', stage: 'initial', passed: true },
      { kind: 'verification', date: '2027-01-15', stage: 'follow-up', passed: true },
      add('2027-05-01', 8),
    ];
    const r = leakObligations({ appliance: r22('commercial_refrigeration', 100), events, asOf: '2027-05-01', method: 'rolling-average' });
    expect(r.leakRate).toBeCloseTo(8, 12);
  });

  it('82.157(j) [S] / EPA fact sheet P100PI79 [P]: the chronic-leaker report starts with the 2019 rule — 2018 is never listed', () => {
    const events = [add('2018-03-01', 130), add('2019-03-01', 130)];
    expect(leakObligations({ appliance: r22('comfort_cooling', 100), events, asOf: '2019-12-31' }).chronicYears).toEqual([2019]);
    expect(
      leakRepairObligation({ appliance: r22('comfort_cooling', 100), additions: [{ date: '2018-03-01', pounds: 130 }], asOf: '2018-12-31' })
        .chronic,
    ).toBe(false);
  });

  it('84.106(a) [S]: residential and light-commercial air conditioning and heat pumps are excluded from Part 84', () => {
    const appliance = { category: 'comfort_cooling' as const, fullCharge: 25, refrigerant: 'R-454B', residentialOrLightCommercial: true };
    const r = leakObligations({ appliance, events: [add('2026-07-01', 10)], asOf: '2026-07-01' });
    expect(r.inScope).toBe(false);
    expect(r.obligations).toEqual([]);
  });

  it('84.106(b) [S/M]: the first annualizing calculation after 1 Jan 2026 uses 365 days (the ledger agrees with the one-addition view)', () => {
    const appliance = { category: 'comfort_cooling' as const, fullCharge: 40, refrigerant: 'R-410A' };
    const r = leakObligations({ appliance, events: [add('2025-12-15', 2), add('2026-01-14', 4.4)], asOf: '2026-01-14' });
    expect(r.leakRate).toBeCloseTo(11, 12); // 4.4/40 over 365 days: 11 % > 10 %
    expect(r.obligations.map((o) => o.repairDueDate)).toEqual(['2026-02-13']);
  });
});
