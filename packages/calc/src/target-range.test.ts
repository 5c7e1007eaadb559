import { describe, expect, it } from 'vitest';
import { isTargetRange, targetVerdict } from './target-range';
import { fDeltaToK } from './units';

describe('targetVerdict', () => {
  const range = { min: 8, max: 12 };

  it('bounds are inclusive', () => {
    expect(targetVerdict(8, range)).toBe('within');
    expect(targetVerdict(12, range)).toBe('within');
    expect(targetVerdict(10, range)).toBe('within');
  });

  it('one shown step outside a bound is outside', () => {
    expect(targetVerdict(7.9, range)).toBe('below');
    expect(targetVerdict(12.1, range)).toBe('above');
    expect(targetVerdict(-3, range)).toBe('below');
    expect(targetVerdict(40, range)).toBe('above');
  });

  it('compares as shown (one decimal): 7.95 shows as 8.0 and is within, 7.94 shows as 7.9 and is below', () => {
    expect(targetVerdict(7.95, range)).toBe('within');
    expect(targetVerdict(7.94, range)).toBe('below');
    expect(targetVerdict(12.04, range)).toBe('within');
    expect(targetVerdict(12.05, range)).toBe('above');
  });

  it('a range stored in °F and shown in K keeps the verdict of the figures on screen', () => {
    // 10–15 °F is 5.56–8.33 K, shown as 5.6–8.3 K; a superheat of 5.56 K shows as 5.6 K and is within.
    const k = { min: fDeltaToK(10), max: fDeltaToK(15) };
    expect(targetVerdict(5.56, k)).toBe('within');
    expect(targetVerdict(5.54, k)).toBe('below');
    expect(targetVerdict(8.34, k)).toBe('within');
    expect(targetVerdict(8.36, k)).toBe('above');
  });

  it('a range of one value (min = max) is within only at that value', () => {
    expect(targetVerdict(10, { min: 10, max: 10 })).toBe('within');
    expect(targetVerdict(10.1, { min: 10, max: 10 })).toBe('above');
    expect(targetVerdict(9.9, { min: 10, max: 10 })).toBe('below');
  });

  it('no range or no value: no verdict', () => {
    expect(targetVerdict(10, null)).toBeNull();
    expect(targetVerdict(null, range)).toBeNull();
    expect(targetVerdict(Number.NaN, range)).toBeNull();
  });

  it('refuses a range whose min is above its max', () => {
    expect(() => targetVerdict(10, { min: 12, max: 8 })).toThrow(RangeError);
    expect(isTargetRange({ min: 12, max: 8 })).toBe(false);
    expect(isTargetRange({ min: 8, max: 8 })).toBe(true);
    expect(isTargetRange({ min: Number.NaN, max: 8 })).toBe(false);
  });
});
