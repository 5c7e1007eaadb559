import { describe, expect, it } from 'vitest';
import { agreementInputSchema, buildAgreementRrule, parseAgreementRrule, recurrencePresets, type Recurrence } from './agreements';

const base: Recurrence = { preset: 'quarterly', startMonth: 2, dayOfMonth: 10, springMonth: 4, autumnMonth: 10 };

describe('agreement recurrence (RFC 5545 RRULE text)', () => {
  it('builds explicit months for each preset', () => {
    expect(buildAgreementRrule({ ...base, preset: 'monthly' })).toBe('FREQ=MONTHLY;BYMONTHDAY=10');
    expect(buildAgreementRrule({ ...base, preset: 'every_2_months' })).toBe('FREQ=YEARLY;BYMONTH=2,4,6,8,10,12;BYMONTHDAY=10');
    expect(buildAgreementRrule(base)).toBe('FREQ=YEARLY;BYMONTH=2,5,8,11;BYMONTHDAY=10');
    expect(buildAgreementRrule({ ...base, preset: 'every_6_months', startMonth: 9 })).toBe('FREQ=YEARLY;BYMONTH=3,9;BYMONTHDAY=10');
    expect(buildAgreementRrule({ ...base, preset: 'yearly', startMonth: 5 })).toBe('FREQ=YEARLY;BYMONTH=5;BYMONTHDAY=10');
    expect(buildAgreementRrule({ ...base, preset: 'spring_autumn', springMonth: 3, autumnMonth: 10 })).toBe(
      'FREQ=YEARLY;BYMONTH=3,10;BYMONTHDAY=10',
    );
  });

  it('reads back every rule it builds to the same rule', () => {
    for (const preset of recurrencePresets) {
      for (const startMonth of [1, 4, 12]) {
        const rule = buildAgreementRrule({ ...base, preset, startMonth });
        const back = parseAgreementRrule(rule);
        expect(back, rule).not.toBeNull();
        expect(buildAgreementRrule(back!)).toBe(rule);
      }
    }
    expect(parseAgreementRrule('FREQ=WEEKLY;BYDAY=MO')).toBeNull();
  });

  it('refuses a term that ends before it starts, naming termEnd', () => {
    const r = agreementInputSchema.safeParse({
      siteId: '0f9c7b4e-8a2d-4c1e-9b3a-5d6e7f8a9b0c',
      name: 'PM',
      unitIds: ['0f9c7b4e-8a2d-4c1e-9b3a-5d6e7f8a9b0d'],
      recurrence: { preset: 'quarterly' },
      termStart: '2027-01-01',
      termEnd: '2026-12-31',
      slaHours: 4,
      priceCents: 100,
      visitMinutes: 60,
    });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.path).toEqual(['termEnd']);
  });
});
