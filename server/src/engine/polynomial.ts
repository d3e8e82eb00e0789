/**
 * Polynomials over Q as arrays of ascending Rational coefficients: p(x) = Σ c[i]·x^i.
 *
 * Invariant of every returned polynomial: trimmed (no trailing zero coefficients); the zero
 * polynomial is []. Inputs are never mutated. Division is classical long division over Q
 * (exact); gcd is Euclid's algorithm made monic at the end (D. E. Knuth, TAOCP vol. 2,
 * §4.6.1, from memory). Coefficient growth is not an issue for the degrees used here
 * (≤ 12), so no subresultant machinery.
 */
import { Rational } from './rational';

export type PolyQ = Rational[];

export interface Complex {
  re: number;
  im: number;
}

export function polyTrim(p: PolyQ): PolyQ {
  let n = p.length;
  while (n > 0 && p[n - 1].isZero()) n--;
  return n === p.length ? p : p.slice(0, n);
}

export function polyFromInts(coeffs: (number | bigint)[]): PolyQ {
  return polyTrim(coeffs.map((c) => Rational.fromInt(c)));
}

/** Degree; −1 for the zero polynomial. */
export function polyDegree(p: PolyQ): number {
  return polyTrim(p).length - 1;
}

export function polyIsZero(p: PolyQ): boolean {
  return polyTrim(p).length === 0;
}

export function polyEquals(a: PolyQ, b: PolyQ): boolean {
  const x = polyTrim(a);
  const y = polyTrim(b);
  return x.length === y.length && x.every((c, i) => c.eq(y[i]));
}

export function polyAdd(a: PolyQ, b: PolyQ): PolyQ {
  const n = Math.max(a.length, b.length);
  const out: Rational[] = [];
  for (let i = 0; i < n; i++) out.push((a[i] ?? Rational.ZERO).add(b[i] ?? Rational.ZERO));
  return polyTrim(out);
}

export function polySub(a: PolyQ, b: PolyQ): PolyQ {
  const n = Math.max(a.length, b.length);
  const out: Rational[] = [];
  for (let i = 0; i < n; i++) out.push((a[i] ?? Rational.ZERO).sub(b[i] ?? Rational.ZERO));
  return polyTrim(out);
}

export function polyScale(a: PolyQ, s: Rational): PolyQ {
  if (s.isZero()) return [];
  return polyTrim(a.map((c) => c.mul(s)));
}

export function polyMul(a: PolyQ, b: PolyQ): PolyQ {
  const x = polyTrim(a);
  const y = polyTrim(b);
  if (x.length === 0 || y.length === 0) return [];
  const out = new Array<Rational>(x.length + y.length - 1).fill(Rational.ZERO);
  for (let i = 0; i < x.length; i++) {
    if (x[i].isZero()) continue;
    for (let j = 0; j < y.length; j++) out[i + j] = out[i + j].add(x[i].mul(y[j]));
  }
  return polyTrim(out);
}

export function polyPow(a: PolyQ, k: number): PolyQ {
  if (!Number.isInteger(k) || k < 0) throw new RangeError('polyPow: exponent must be an integer ≥ 0');
  let result: PolyQ = [Rational.ONE];
  let base = a;
  let e = k;
  while (e > 0) {
    if (e & 1) result = polyMul(result, base);
    e >>= 1;
    if (e > 0) base = polyMul(base, base);
  }
  return result;
}

/** Leading coefficient; throws on the zero polynomial. */
export function polyLeading(p: PolyQ): Rational {
  const t = polyTrim(p);
  if (t.length === 0) throw new RangeError('zero polynomial has no leading coefficient');
  return t[t.length - 1];
}

/** p divided by its leading coefficient; the zero polynomial stays zero. */
export function polyMonic(p: PolyQ): PolyQ {
  const t = polyTrim(p);
  if (t.length === 0) return t;
  const lc = t[t.length - 1];
  return lc.isOne() ? t : polyScale(t, lc.inv());
}

/** Long division: a = q·b + r with deg r < deg b. Throws when b is zero. */
export function polyDivmod(a: PolyQ, b: PolyQ): { quotient: PolyQ; remainder: PolyQ } {
  const d = polyTrim(b);
  if (d.length === 0) throw new RangeError('polynomial division by zero');
  const r = polyTrim(a).slice(); // working copy, mutated in place below
  const db = d.length - 1;
  if (r.length - 1 < db) return { quotient: [], remainder: r };
  const lcInv = d[db].inv();
  const monicDivisor = d[db].isOne();
  const q = new Array<Rational>(r.length - db).fill(Rational.ZERO);
  for (let k = r.length - 1; k >= db; k--) {
    if (r[k].isZero()) continue;
    const f = monicDivisor ? r[k] : r[k].mul(lcInv);
    q[k - db] = f;
    for (let j = 0; j <= db; j++) r[k - db + j] = r[k - db + j].sub(f.mul(d[j]));
  }
  return { quotient: polyTrim(q), remainder: polyTrim(r.slice(0, db)) };
}

/** The exact quotient a/b when b divides a, otherwise null. */
export function polyExactQuotient(a: PolyQ, b: PolyQ): PolyQ | null {
  const { quotient, remainder } = polyDivmod(a, b);
  return remainder.length === 0 ? quotient : null;
}

/**
 * Monic gcd (gcd(0, 0) = 0). Runs the primitive polynomial remainder sequence over Z
 * (pseudo-division, then removal of the content; Knuth, TAOCP vol. 2, §4.6.1, Algorithm
 * E, from memory): Euclid over Q lets the remainders' fractions explode, the primitive
 * sequence keeps integers about the size of the inputs'. The result is the same gcd.
 */
export function polyGcd(a: PolyQ, b: PolyQ): PolyQ {
  let x = primitiveInt(polyTrim(a));
  let y = primitiveInt(polyTrim(b));
  if (x.length < y.length) [x, y] = [y, x];
  while (y.length > 0) {
    const r = primitiveInt(pseudoRemainder(x, y));
    x = y;
    y = r;
  }
  return polyMonic(x.map((c) => Rational.fromInt(c)));
}

function gcdInt(a: bigint, b: bigint): bigint {
  if (a < 0n) a = -a;
  if (b < 0n) b = -b;
  while (b !== 0n) [a, b] = [b, a % b];
  return a;
}

/** Integer polynomial with content 1 and the same roots; [] for zero. */
function primitiveInt(p: PolyQ | bigint[]): bigint[] {
  let ints: bigint[];
  if (p.length > 0 && typeof p[0] !== 'bigint') {
    const q = p as PolyQ;
    let den = 1n;
    for (const c of q) if (c.den !== 1n) den = (den / gcdInt(den, c.den)) * c.den;
    ints = q.map((c) => c.num * (den / c.den));
  } else ints = (p as bigint[]).slice();
  let n = ints.length;
  while (n > 0 && ints[n - 1] === 0n) n--;
  ints = ints.slice(0, n);
  let g = 0n;
  for (const c of ints) if (c !== 0n) g = gcdInt(g, c);
  return g > 1n ? ints.map((c) => c / g) : ints;
}

/** lc(b)^(deg a − deg b + 1)·a mod b over Z, ascending coefficients (untrimmed). */
function pseudoRemainder(a: bigint[], b: bigint[]): bigint[] {
  const r = a.slice(); // working copy, reduced in place
  const db = b.length - 1;
  const lc = b[db];
  for (let k = r.length - 1; k >= db; k--) {
    const f = r[k];
    for (let i = 0; i <= k; i++) r[i] *= lc;
    if (f !== 0n) for (let j = 0; j <= db; j++) r[k - db + j] -= f * b[j];
  }
  return r.slice(0, db);
}

/** Extended Euclid: s·a + t·b = g with g the monic gcd. */
export function polyExtendedGcd(a: PolyQ, b: PolyQ): { gcd: PolyQ; s: PolyQ; t: PolyQ } {
  let r0 = polyTrim(a);
  let r1 = polyTrim(b);
  let s0: PolyQ = [Rational.ONE];
  let s1: PolyQ = [];
  let t0: PolyQ = [];
  let t1: PolyQ = [Rational.ONE];
  while (r1.length > 0) {
    const { quotient, remainder } = polyDivmod(r0, r1);
    [r0, r1] = [r1, remainder];
    [s0, s1] = [s1, polySub(s0, polyMul(quotient, s1))];
    [t0, t1] = [t1, polySub(t0, polyMul(quotient, t1))];
  }
  if (r0.length === 0) return { gcd: [], s: [], t: [] };
  const inv = polyLeading(r0).inv();
  return { gcd: polyScale(r0, inv), s: polyScale(s0, inv), t: polyScale(t0, inv) };
}

export function polyDerivative(p: PolyQ): PolyQ {
  const t = polyTrim(p);
  const out: Rational[] = [];
  for (let i = 1; i < t.length; i++) out.push(t[i].mul(Rational.fromInt(i)));
  return polyTrim(out);
}

export function polyEvalRational(p: PolyQ, x: Rational): Rational {
  let acc = Rational.ZERO;
  for (let i = p.length - 1; i >= 0; i--) acc = acc.mul(x).add(p[i]);
  return acc;
}

/** Horner in double precision on the rounded coefficients. */
export function polyEvalNumber(p: PolyQ | number[], x: number): number {
  let acc = 0;
  for (let i = p.length - 1; i >= 0; i--) {
    const c = p[i];
    acc = acc * x + (typeof c === 'number' ? c : c.toNumber());
  }
  return acc;
}

/** Horner in complex double precision. */
export function polyEvalComplex(p: PolyQ | number[], z: Complex): Complex {
  let re = 0;
  let im = 0;
  for (let i = p.length - 1; i >= 0; i--) {
    const c = p[i];
    const nr = re * z.re - im * z.im + (typeof c === 'number' ? c : c.toNumber());
    im = re * z.im + im * z.re;
    re = nr;
  }
  return { re, im };
}

/** p(q(x)) by Horner in the polynomial ring. */
export function polyCompose(p: PolyQ, q: PolyQ): PolyQ {
  let acc: PolyQ = [];
  for (let i = p.length - 1; i >= 0; i--) acc = polyAdd(polyMul(acc, q), [p[i]]);
  return acc;
}

/**
 * Readable math text in descending powers, e.g. "s^2 + 3s + 2", "x^3 - (1/2)x + 4".
 * The variable name is the caller's choice ("s", "z", "λ", "x").
 */
export function polyToString(p: PolyQ, variable = 'x'): string {
  const t = polyTrim(p);
  if (t.length === 0) return '0';
  const parts: string[] = [];
  for (let i = t.length - 1; i >= 0; i--) {
    const c = t[i];
    if (c.isZero()) continue;
    const negative = c.sign() < 0;
    const mag = c.abs();
    let body: string;
    const power = i === 0 ? '' : i === 1 ? variable : `${variable}^${i}`;
    if (i === 0) body = mag.toString();
    else if (mag.isOne()) body = power;
    else body = mag.isInteger() ? `${mag.toString()}${power}` : `(${mag.toString()})${power}`;
    if (parts.length === 0) parts.push(negative ? `-${body}` : body);
    else parts.push(negative ? `- ${body}` : `+ ${body}`);
  }
  return parts.join(' ');
}
