/**
 * Reference check: Coilpath's leak-rate and leak-repair logic against the US EPA rules as extracted
 * in shared/reference/LEAK-RULES.md. Each expectation names the section and that file's tag:
 * [P] read in an official text or mirror, [S] seen only in a secondary source, [M] from memory.
 * LEAK-RULES.md §3: no EPA worked numeric example exists, so the checks follow from the wording.
 */
import { describe, expect, it } from 'vitest';
import { leakRate, leakRepairObligation, listRefrigerants } from '@coilpath/calc';

const one = (date: string, pounds: number) => [{ date, pounds }];

describe('40 CFR 82 Subpart F (ODS)', () => {
  it('82.157(a) [P]: a full charge of 50 lb is in scope (50 or more pounds), 49 lb is not', () => {
    const at50 = leakRepairObligation({ appliance: { category: 'comfort_cooling', fullCharge: 50, refrigerant: 'R-22' }, additions: one('2027-03-01', 1), asOf: '2027-03-01' });
    expect(at50.inScope).toBe(true);
    expect(at50.rule).toBe('40 CFR 82.157');
    const at49 = leakRepairObligation({ appliance: { category: 'comfort_cooling', fullCharge: 49, refrigerant: 'R-22' }, additions: one('2027-03-01', 1), asOf: '2027-03-01' });
    expect(at49.inScope).toBe(false);
  });

  it('82.157(a) [P] (85 FR 14150): since 10 Apr 2020 an appliance with solely a substitute (HFC) is out of Part 82', () => {
    const before = leakRepairObligation({ appliance: { category: 'comfort_cooling', fullCharge: 60, refrigerant: 'R-410A' }, additions: one('2020-04-09', 1), asOf: '2020-04-09' });
    const after = leakRepairObligation({ appliance: { category: 'comfort_cooling', fullCharge: 60, refrigerant: 'R-410A' }, additions: one('2020-04-10', 1), asOf: '2020-04-10' });
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
    const at50 = leakRepairObligation({ appliance: { category: 'comfort_cooling', fullCharge: 50, refrigerant: 'R-22' }, additions: one('2018-06-01', 10), asOf: '2018-06-01' });
    expect(at50.inScope).toBe(false);
    for (const [category, t] of [['commercial_refrigeration', 35], ['industrial_process', 35], ['comfort_cooling', 15], ['other', 15]] as const) {
      const r = leakRepairObligation({ appliance: { category, fullCharge: 51, refrigerant: 'R-22' }, additions: one('2018-06-01', 1), asOf: '2018-06-01' });
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
    const r = leakRepairObligation({ appliance: { category: 'comfort_cooling', fullCharge: 100, refrigerant: 'R-22' }, additions: one('2027-06-01', 11), asOf: '2027-06-05' });
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
    expect(leakRepairObligation({ appliance: { ...appliance, fullCharge: 14.9 }, additions: one('2026-03-01', 1), asOf: '2026-03-01' }).inScope).toBe(false);
  });

  it('84.106(a) [S] and LEAK-RULES.md: R-1234yf (GWP below 53 [M]) is outside Part 84; every other HFC listed is above 53', () => {
    for (const r of listRefrigerants()) {
      const o = leakRepairObligation({ appliance: { category: 'other', fullCharge: 100, refrigerant: r.id }, additions: one('2027-01-10', 1), asOf: '2027-01-10' });
      if (r.id === 'R-1234yf') expect(o.inScope).toBe(false);
      else if (r.id === 'R-22') expect(o.rule).toBe('40 CFR 82.157');
      else expect(o.rule).toBe('40 CFR 84.106');
    }
  });

  it('84.106(c)(2) [S]: IPR 30 %, commercial refrigeration 20 %, comfort cooling and other 10 %', () => {
    for (const [category, t] of [['industrial_process', 30], ['commercial_refrigeration', 20], ['comfort_cooling', 10], ['other', 10]] as const) {
      const r = leakRepairObligation({ appliance: { category, fullCharge: 40, refrigerant: 'R-448A' }, additions: one('2026-05-01', 1), asOf: '2026-05-01' });
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
    const base = { appliance: { category: 'industrial_process' as const, fullCharge: 100, refrigerant: 'R-134a' }, additions: one('2026-03-01', 31), asOf: '2026-03-01' };
    expect(leakRepairObligation(base).repairDueDate).toBe('2026-03-31');
    expect(leakRepairObligation({ ...base, industrialShutdown: true }).repairDueDate).toBe('2026-06-29');
  });
});
