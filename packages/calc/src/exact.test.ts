import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { add, compare, div, exactDecimal, fraction, mul, toNumber } from './exact';

describe('exactDecimal', () => {
  it('reads a number as the decimal it prints as', () => {
    expect(compare(exactDecimal(0.1), fraction(1, 10))).toBe(0);
    expect(compare(exactDecimal(21.6), fraction(216, 10))).toBe(0);
    expect(compare(exactDecimal(1e-20), fraction(1n, 10n ** 20n))).toBe(0);
    expect(compare(exactDecimal(1.5e21), fraction(15n * 10n ** 20n))).toBe(0);
    expect(compare(exactDecimal(-2.5), fraction(-5, 2))).toBe(0);
    expect(compare(exactDecimal(0), fraction(0))).toBe(0);
    expect(() => exactDecimal(Number.NaN)).toThrow(RangeError);
  });

  it('0.1 + 0.2 is exactly 0.3 (as floating point is not)', () => {
    expect(0.1 + 0.2).not.toBe(0.3);
    expect(compare(add(exactDecimal(0.1), exactDecimal(0.2)), exactDecimal(0.3))).toBe(0);
  });
});

describe('fractions', () => {
  it('multiply, divide and compare without rounding', () => {
    const thirty = div(mul(exactDecimal(21.6), fraction(36500)), mul(exactDecimal(72), fraction(365)));
    expect(compare(thirty, fraction(30))).toBe(0);
    expect(compare(fraction(1, 3), fraction(1, 2))).toBe(-1);
    expect(compare(fraction(1, -2), fraction(-1, 2))).toBe(0);
    expect(() => fraction(1, 0)).toThrow(RangeError);
  });

  it('toNumber gives the nearest number for small fractions', () => {
    expect(toNumber(fraction(788400, 26280))).toBe(30);
    expect(toNumber(fraction(1, 3))).toBe(1 / 3);
  });

  it('toNumber stays finite beyond the range of a number (numerator or denominator alone outside it)', () => {
    // The decimal 5e-324 is 5 / 10^324; 10^324 alone is Infinity as a number.
    expect(toNumber(exactDecimal(5e-324))).toBe(5e-324);
    expect(toNumber(exactDecimal(2.2e-308))).toBe(2.2e-308);
    expect(toNumber(fraction(10n ** 400n, 10n ** 399n))).toBe(10);
    expect(toNumber(fraction(-(10n ** 330n), 3n))).toBe(-Infinity); // truly beyond the largest number
    expect(toNumber(fraction(1n, 10n ** 400n))).toBe(0); // truly below the smallest
  });

  it('toNumber reads back every number the way exactDecimal read it (fast-check)', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        expect(toNumber(exactDecimal(x))).toBe(x === 0 ? 0 : x);
      }),
    );
  });

  it('compare agrees with cross-multiplication in BigInt, and with the numbers when they are exact (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer(), fc.integer({ min: 1 }), fc.integer(), fc.integer({ min: 1 }), (a, b, c, d) => {
        const diff = BigInt(a) * BigInt(d) - BigInt(c) * BigInt(b);
        const got = compare(fraction(a, b), fraction(c, d));
        expect(got).toBe(diff < 0n ? -1 : diff > 0n ? 1 : 0);
        if (Math.abs(a * d) < 2 ** 53 && Math.abs(c * b) < 2 ** 53) expect(got).toBe(Math.sign(a * d - c * b) || 0);
      }),
    );
  });
});
