import { describe, expect, it } from 'vitest';
import { circuitTargetsInputSchema } from './sites';

const parse = (body: Record<string, unknown>) => circuitTargetsInputSchema.safeParse({ temperature: 'F', ...body });
const issues = (body: Record<string, unknown>) => {
  const r = parse(body);
  return r.success ? [] : r.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
};

describe('circuitTargetsInputSchema', () => {
  it('takes both ranges, from numbers or a form’s strings, and the source', () => {
    const r = parse({ superheatMin: '8', superheatMax: 12, subcoolingMin: ' 10 ', subcoolingMax: '15', source: ' Nameplate ' });
    expect(r.success && r.data).toEqual({
      temperature: 'F',
      superheatMin: 8,
      superheatMax: 12,
      subcoolingMin: 10,
      subcoolingMax: 15,
      source: 'Nameplate',
    });
  });

  it('blank fields clear a range; each range is optional', () => {
    const r = parse({ superheatMin: '', superheatMax: '', subcoolingMin: 9, subcoolingMax: 11, source: '' });
    expect(r.success && r.data).toEqual({
      temperature: 'F',
      superheatMin: null,
      superheatMax: null,
      subcoolingMin: 9,
      subcoolingMax: 11,
      source: null,
    });
    expect(parse({}).success).toBe(true);
  });

  it('min = max is a range; min > max is refused on the max', () => {
    expect(parse({ superheatMin: 10, superheatMax: 10 }).success).toBe(true);
    expect(issues({ superheatMin: 12, superheatMax: 8 })).toEqual([
      'superheatMax: The highest superheat cannot be below the lowest (12 °F)',
    ]);
    expect(issues({ subcoolingMin: 10.1, subcoolingMax: 10 })).toEqual([
      'subcoolingMax: The highest subcooling cannot be below the lowest (10.1 °F)',
    ]);
  });

  it('a range needs both ends', () => {
    expect(issues({ superheatMin: 8 })).toEqual(['superheatMax: Enter both ends of the range, or clear both']);
    expect(issues({ subcoolingMax: 8, subcoolingMin: '' })).toEqual(['subcoolingMin: Enter both ends of the range, or clear both']);
  });

  it('plausible bounds per unit: 0–50 °F, 0–27.7 K (inclusive)', () => {
    expect(parse({ superheatMin: 0, superheatMax: 50 }).success).toBe(true);
    expect(issues({ superheatMin: -0.1, superheatMax: 5 })).toEqual(['superheatMin: Between 0 and 50 °F']);
    expect(issues({ superheatMin: 5, superheatMax: 50.1 })).toEqual(['superheatMax: Between 0 and 50 °F']);
    expect(circuitTargetsInputSchema.safeParse({ temperature: 'C', subcoolingMin: 0, subcoolingMax: 27.7 }).success).toBe(true);
    const si = circuitTargetsInputSchema.safeParse({ temperature: 'C', subcoolingMin: 5, subcoolingMax: 28 });
    expect(si.success ? [] : si.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`)).toEqual([
      'subcoolingMax: Between 0 and 27.7 K',
    ]);
  });

  it('refuses text that is not a number, an unknown unit and unknown fields', () => {
    expect(issues({ superheatMin: 'eight', superheatMax: 12 })).toContain('superheatMin: Enter a number');
    expect(circuitTargetsInputSchema.safeParse({ temperature: 'K' }).success).toBe(false);
    expect(parse({ superheatTarget: 10 }).success).toBe(false);
  });
});
