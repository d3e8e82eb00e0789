/**
 * Exact text for rationals and quadratic surds p + r·√d, and their numeric values.
 *
 * Our notation (one, used everywhere): the imaginary unit is a leading "j" ("-1+j√3",
 * "-1/2-j√3/2"), real surds put a common denominator outside a parenthesis ("(1+√5)/2"),
 * no spaces inside a number, numeric-only values start with "≈ ". Normal form of a
 * QuadraticNumber: d is a square-free integer ≠ 1 (or d = 1 with r = 0 for a rational),
 * so equal numbers have equal fields.
 */
import { Rational } from './rational';
import { isqrt } from './quadField';
import type { QuadraticNumber } from './types';

/** ⌊√n⌋ for n ≥ 0; one implementation (quadField's), safe beyond the double range. */
export function integerSqrt(n: bigint): bigint {
  if (n < 0n) throw new RangeError('integerSqrt of a negative number');
  return isqrt(n);
}

/**
 * n = s²·f with f square-free (sign kept in f). Trial division by primes up to 10⁵ and a
 * perfect-square test of the cofactor; a cofactor with a repeated prime factor > 10⁵ would
 * stay inside f (only possible for |n| > 10²⁰, far beyond typical model entries).
 */
export function splitSquareFactor(n: bigint): { s: bigint; f: bigint } {
  if (n === 0n) return { s: 0n, f: 1n };
  let sign = 1n;
  let m = n;
  if (m < 0n) { sign = -1n; m = -m; }
  let s = 1n;
  let f = 1n;
  for (let p = 2n; p <= 100_000n && p * p <= m; p += p === 2n ? 1n : 2n) {
    if (m % p !== 0n) continue;
    let e = 0;
    while (m % p === 0n) { m /= p; e++; }
    s *= p ** BigInt(e >> 1);
    if (e & 1) f *= p;
  }
  if (m > 1n) {
    const r = integerSqrt(m);
    if (r * r === m) s *= r;
    else f *= m;
  }
  return { s, f: sign * f };
}

/** p + r·√D normalised so that D becomes a square-free integer d (r absorbs the rest). */
export function quadraticFromSurd(p: Rational, r: Rational, D: Rational): QuadraticNumber {
  if (r.isZero() || D.isZero()) return { p, r: Rational.ZERO, d: Rational.ONE };
  // √(u/v) = √(u·v)/v, then u·v = s²·f.
  const { s, f } = splitSquareFactor(D.num * D.den);
  const rr = r.mul(Rational.of(s, D.den));
  if (f === 1n) return { p: p.add(rr), r: Rational.ZERO, d: Rational.ONE };
  return { p, r: rr, d: Rational.fromInt(f) };
}

/** Numeric value {re, im} of p + r·√d. */
export function quadraticNumberValue(q: QuadraticNumber): { re: number; im: number } {
  const p = q.p.toNumber();
  if (q.r.isZero()) return { re: p, im: 0 };
  const d = q.d.toNumber();
  const rs = q.r.toNumber() * Math.sqrt(Math.abs(d));
  if (d < 0) return { re: p, im: rs };
  // When p and r·√d nearly cancel, use (p² − r²d)/(p − r√d) with an exact numerator.
  if (q.p.sign() * q.r.sign() < 0) {
    const norm = q.p.mul(q.p).sub(q.r.mul(q.r).mul(q.d)).toNumber();
    return { re: norm / (p - rs), im: 0 };
  }
  return { re: p + rs, im: 0 };
}

/** "3", "-5/2". */
export function rationalToText(x: Rational): string {
  return x.toString();
}

/** |r|·√m as text without sign: "√5", "2√5", "√5/2", "3√5/2"; m = 1 gives the rational. */
function surdMagnitude(r: Rational, m: bigint): string {
  const a = r.abs();
  if (m === 1n) return a.toString();
  const root = `√${m}`;
  const numText = a.num === 1n ? root : `${a.num}${root}`;
  return a.den === 1n ? numText : `${numText}/${a.den}`;
}

/**
 * Exact text of p + r·√d in our notation: "-1", "3/2", "√3/2", "(1+√5)/2", "1-√2",
 * "-1+j√3", "-1/2-j√3/2", "j", "2-j".
 */
export function quadraticNumberToString(q: QuadraticNumber): string {
  if (q.r.isZero()) return rationalToText(q.p);
  const d = q.d.num; // normal form: integer
  if (d < 0n) {
    const mag = surdMagnitude(q.r, -d);
    const imag = mag === '1' ? 'j' : `j${mag}`;
    const sign = q.r.sign() < 0 ? '-' : '+';
    if (q.p.isZero()) return sign === '-' ? `-${imag}` : imag;
    return `${rationalToText(q.p)}${sign}${imag}`;
  }
  if (q.p.isZero()) return `${q.r.sign() < 0 ? '-' : ''}${surdMagnitude(q.r, d)}`;
  // Common denominator: (P ± R√d)/c.
  const c = lcmDen(q.p.den, q.r.den);
  const P = q.p.num * (c / q.p.den);
  const R = q.r.num * (c / q.r.den);
  const absR = R < 0n ? -R : R;
  const surd = absR === 1n ? `√${d}` : `${absR}√${d}`;
  const body = `${P}${R < 0n ? '-' : '+'}${surd}`;
  return c === 1n ? body : `(${body})/${c}`;
}

function lcmDen(a: bigint, b: bigint): bigint {
  let x = a;
  let y = b;
  while (y !== 0n) [x, y] = [y, x % y];
  return (a / x) * b;
}

/** "≈ 1.2599", "≈ -0.62996+j1.0911": 5 significant digits, our j-notation. */
export function numericRootText(re: number, im: number): string {
  const fmt = (x: number): string => {
    if (x === 0) return '0';
    const t = Number(x.toPrecision(5)).toString();
    return t;
  };
  if (im === 0) return `≈ ${fmt(re)}`;
  const imag = `j${fmt(Math.abs(im))}`;
  const sign = im < 0 ? '-' : '+';
  if (re === 0) return `≈ ${sign === '-' ? '-' : ''}${imag}`;
  return `≈ ${fmt(re)}${sign}${imag}`;
}
