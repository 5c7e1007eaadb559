/**
 * Exact rational arithmetic for decisions at a regulatory boundary (a leak rate "over" 30 %, a
 * chronic leaker at 125 %). A JavaScript number is read as the decimal it prints as (its shortest
 * round-trip form, so 0.1 is exactly one tenth and 21.6 exactly 216/10), and every sum, product and
 * comparison after that is done on BigInt fractions, without rounding. Internal to @coilpath/calc.
 */

/** A fraction n / d with d > 0 (not necessarily reduced). */
export interface Fraction {
  readonly n: bigint;
  readonly d: bigint;
}

const DECIMAL_RE = /^(-?)(\d+)(?:\.(\d+))?(?:e([+-]?\d+))?$/i;

/** The exact decimal a finite number prints as, e.g. 0.1 → 1/10, 1e-7 → 1/10000000. */
export function exactDecimal(value: number): Fraction {
  if (!Number.isFinite(value)) throw new RangeError(`Not a finite number: ${String(value)}`);
  const m = DECIMAL_RE.exec(String(value));
  if (!m) throw new RangeError(`Cannot read ${String(value)} as a decimal`);
  const sign = m[1] === '-' ? -1n : 1n;
  const frac = m[3] ?? '';
  const exp = m[4] === undefined ? 0 : Number(m[4]);
  let n = BigInt((m[2] ?? '0') + frac) * sign;
  const scale = frac.length - exp;
  if (scale <= 0) {
    n *= 10n ** BigInt(-scale);
    return { n, d: 1n };
  }
  return { n, d: 10n ** BigInt(scale) };
}

export function fraction(n: bigint | number, d: bigint | number = 1n): Fraction {
  const nn = typeof n === 'bigint' ? n : BigInt(n);
  const dd = typeof d === 'bigint' ? d : BigInt(d);
  if (dd === 0n) throw new RangeError('Division by zero');
  return dd < 0n ? { n: -nn, d: -dd } : { n: nn, d: dd };
}

export function add(a: Fraction, b: Fraction): Fraction {
  if (a.d === b.d) return { n: a.n + b.n, d: a.d };
  return { n: a.n * b.d + b.n * a.d, d: a.d * b.d };
}

export function mul(a: Fraction, b: Fraction): Fraction {
  return { n: a.n * b.n, d: a.d * b.d };
}

export function div(a: Fraction, b: Fraction): Fraction {
  return fraction(a.n * b.d, a.d * b.n);
}

/** −1, 0 or 1 as a is less than, equal to or greater than b. */
export function compare(a: Fraction, b: Fraction): -1 | 0 | 1 {
  const l = a.n * b.d;
  const r = b.n * a.d;
  return l < r ? -1 : l > r ? 1 : 0;
}

function gcd(a: bigint, b: bigint): bigint {
  let x = a < 0n ? -a : a;
  let y = b < 0n ? -b : b;
  while (y !== 0n) [x, y] = [y, x % y];
  return x;
}

function bitLength(v: bigint): number {
  return v === 0n ? 0 : v.toString(2).length;
}

const EXACT_LIMIT = 2n ** 53n;

/**
 * The nearest number to the fraction when numerator and denominator (reduced) fit in 2^53, as for
 * every realistic leak rate; otherwise a close approximation (128 significant bits, then rounded), which
 * stays finite and non-zero wherever the value is, even when numerator or denominator alone lies outside
 * the range of a number (a subnormal pound count read as 5/10^324).
 */
export function toNumber(f: Fraction): number {
  const g = gcd(f.n, f.d) || 1n;
  const n = f.n / g;
  const d = f.d / g;
  const size = n < 0n ? -n : n;
  if (size <= EXACT_LIMIT && d <= EXACT_LIMIT) return Number(n) / Number(d);
  // q ≈ n / d × 2^k with about 128 significant bits; the result is q × 2^−k.
  const k = 128 + bitLength(d) - bitLength(size);
  const q = k >= 0 ? (n << BigInt(k)) / d : n / (d << BigInt(-k));
  // 2^−k in two halves: either half alone may leave the range of a number when the product does not.
  const half = Math.trunc(k / 2);
  return Number(q) * 2 ** -half * 2 ** -(k - half);
}
