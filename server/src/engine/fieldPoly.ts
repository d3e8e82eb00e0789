/**
 * Univariate polynomials over a field: long division, extended Euclid, Taylor shifts and
 * truncated series inverses.
 *
 * Methods: Euclidean division and the extended Euclidean algorithm for F[x]
 * (Knuth, TAOCP vol. 2, §4.6.1, Algorithms D and the extended form, from memory);
 * the truncated inverse of a power series by the recurrence c_0 = 1/g_0,
 * c_i = −(Σ_{j=1..i} g_j·c_{i−j})/g_0 (same source, §4.7, from memory).
 *
 * Invariant: a polynomial is an array of coefficients in ascending powers with no trailing
 * zero (the zero polynomial is []). Every function returns a fresh trimmed array and never
 * mutates its arguments.
 *
 * Two fields are provided: exact Q(√d) (quadField.ts) and complex doubles. Over the
 * doubles `isZero` is the exact test, so Euclid is only meaningful for exact fields; the
 * numeric path uses Taylor shifts and series inverses, which need no zero tests.
 */
import { QuadField, type QuadElement } from './quadField';

export interface Field<T> {
  zero: T;
  one: T;
  add(x: T, y: T): T;
  sub(x: T, y: T): T;
  mul(x: T, y: T): T;
  neg(x: T): T;
  inv(x: T): T;
  isZero(x: T): boolean;
}

export type Poly<T> = T[];

export interface Complex {
  re: number;
  im: number;
}

/** Complex doubles as a Field (the numeric path). */
export const complexField: Field<Complex> = {
  zero: { re: 0, im: 0 },
  one: { re: 1, im: 0 },
  add: (x, y) => ({ re: x.re + y.re, im: x.im + y.im }),
  sub: (x, y) => ({ re: x.re - y.re, im: x.im - y.im }),
  mul: (x, y) => ({ re: x.re * y.re - x.im * y.im, im: x.re * y.im + x.im * y.re }),
  neg: (x) => ({ re: -x.re, im: -x.im }),
  inv: (x) => {
    // Smith's scaling avoids overflow in re² + im² (Smith, CACM 5(8), 1962, from memory).
    if (x.re === 0 && x.im === 0) throw new RangeError('division by zero (complex)');
    if (Math.abs(x.re) >= Math.abs(x.im)) {
      const r = x.im / x.re;
      const den = x.re + x.im * r;
      return { re: 1 / den, im: -r / den };
    }
    const r = x.re / x.im;
    const den = x.re * r + x.im;
    return { re: r / den, im: -1 / den };
  },
  isZero: (x) => x.re === 0 && x.im === 0,
};

/** A QuadField seen through the generic Field interface. */
export function quadAsField(f: QuadField): Field<QuadElement> {
  return {
    zero: f.zero,
    one: f.one,
    add: (x, y) => f.add(x, y),
    sub: (x, y) => f.sub(x, y),
    mul: (x, y) => f.mul(x, y),
    neg: (x) => f.neg(x),
    inv: (x) => f.inv(x),
    isZero: (x) => f.isZero(x),
  };
}

export function trim<T>(F: Field<T>, p: readonly T[]): Poly<T> {
  let end = p.length;
  while (end > 0 && F.isZero(p[end - 1])) end--;
  return p.slice(0, end);
}

export function degree<T>(p: Poly<T>): number {
  return p.length - 1;
}

export function polyAdd<T>(F: Field<T>, p: Poly<T>, q: Poly<T>): Poly<T> {
  const out: T[] = [];
  for (let i = 0; i < Math.max(p.length, q.length); i++) {
    out.push(i >= p.length ? q[i] : i >= q.length ? p[i] : F.add(p[i], q[i]));
  }
  return trim(F, out);
}

export function polySub<T>(F: Field<T>, p: Poly<T>, q: Poly<T>): Poly<T> {
  const out: T[] = [];
  for (let i = 0; i < Math.max(p.length, q.length); i++) {
    out.push(i >= p.length ? F.neg(q[i]) : i >= q.length ? p[i] : F.sub(p[i], q[i]));
  }
  return trim(F, out);
}

export function polyScale<T>(F: Field<T>, p: Poly<T>, c: T): Poly<T> {
  return trim(F, p.map((x) => F.mul(x, c)));
}

export function polyMul<T>(F: Field<T>, p: Poly<T>, q: Poly<T>): Poly<T> {
  if (p.length === 0 || q.length === 0) return [];
  const out: T[] = new Array(p.length + q.length - 1).fill(F.zero);
  for (let i = 0; i < p.length; i++) {
    if (F.isZero(p[i])) continue;
    for (let j = 0; j < q.length; j++) out[i + j] = F.add(out[i + j], F.mul(p[i], q[j]));
  }
  return trim(F, out);
}

/** (x − root)^power, expanded. */
export function linearPower<T>(F: Field<T>, root: T, power: number): Poly<T> {
  let out: Poly<T> = [F.one];
  const lin = trim(F, [F.neg(root), F.one]);
  for (let i = 0; i < power; i++) out = polyMul(F, out, lin);
  return out;
}

/** Euclidean division p = quotient·q + remainder with deg remainder < deg q. */
export function polyDivmod<T>(F: Field<T>, p: Poly<T>, q: Poly<T>): { quotient: Poly<T>; remainder: Poly<T> } {
  const divisor = trim(F, q);
  if (divisor.length === 0) throw new RangeError('polynomial division by zero');
  const rem = trim(F, p).slice();
  const dq = divisor.length - 1;
  if (rem.length - 1 < dq) return { quotient: [], remainder: rem };
  const leadInv = F.inv(divisor[dq]);
  const quot: T[] = new Array(rem.length - dq).fill(F.zero);
  for (let i = rem.length - 1; i >= dq; i--) {
    const c = F.mul(rem[i], leadInv);
    quot[i - dq] = c;
    if (F.isZero(c)) continue;
    for (let j = 0; j <= dq; j++) rem[i - dq + j] = F.sub(rem[i - dq + j], F.mul(c, divisor[j]));
  }
  return { quotient: trim(F, quot), remainder: trim(F, rem.slice(0, dq)) };
}

export function polyMod<T>(F: Field<T>, p: Poly<T>, q: Poly<T>): Poly<T> {
  return polyDivmod(F, p, q).remainder;
}

/**
 * Extended Euclid: returns monic g = gcd(p, q) and s, t with s·p + t·q = g.
 * Invariant kept by the loop: s_i·p + t_i·q = r_i for both rows.
 */
export function polyExtendedGcd<T>(F: Field<T>, p: Poly<T>, q: Poly<T>): { gcd: Poly<T>; s: Poly<T>; t: Poly<T> } {
  let r0 = trim(F, p);
  let r1 = trim(F, q);
  let s0: Poly<T> = [F.one];
  let s1: Poly<T> = [];
  let t0: Poly<T> = [];
  let t1: Poly<T> = [F.one];
  while (r1.length > 0) {
    const { quotient, remainder } = polyDivmod(F, r0, r1);
    [r0, r1] = [r1, remainder];
    [s0, s1] = [s1, polySub(F, s0, polyMul(F, quotient, s1))];
    [t0, t1] = [t1, polySub(F, t0, polyMul(F, quotient, t1))];
  }
  if (r0.length === 0) return { gcd: [], s: s0, t: t0 };
  const leadInv = F.inv(r0[r0.length - 1]);
  return { gcd: polyScale(F, r0, leadInv), s: polyScale(F, s0, leadInv), t: polyScale(F, t0, leadInv) };
}

/** Horner evaluation p(x). */
export function polyEval<T>(F: Field<T>, p: Poly<T>, x: T): T {
  let acc = F.zero;
  for (let i = p.length - 1; i >= 0; i--) acc = F.add(F.mul(acc, x), p[i]);
  return acc;
}

/**
 * Taylor shift: coefficients of p(c + y) in powers of y (repeated synthetic division,
 * Horner's scheme for all derivatives at once).
 */
export function taylorShift<T>(F: Field<T>, p: Poly<T>, c: T): Poly<T> {
  const a = trim(F, p).slice();
  const n = a.length;
  for (let k = 0; k < n; k++) {
    for (let i = n - 2; i >= k; i--) a[i] = F.add(a[i], F.mul(c, a[i + 1]));
  }
  return trim(F, a);
}

/** First `terms` coefficients of 1/g(y) as a power series in y; needs g(0) ≠ 0. */
export function seriesInverse<T>(F: Field<T>, g: Poly<T>, terms: number): Poly<T> {
  if (g.length === 0 || F.isZero(g[0])) throw new RangeError('series inverse needs a non-zero constant term');
  const g0inv = F.inv(g[0]);
  const c: T[] = [g0inv];
  for (let i = 1; i < terms; i++) {
    let acc = F.zero;
    for (let j = 1; j <= i && j < g.length; j++) acc = F.add(acc, F.mul(g[j], c[i - j]));
    c.push(F.neg(F.mul(acc, g0inv)));
  }
  return trim(F, c);
}
