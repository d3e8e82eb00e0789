/**
 * Exact arithmetic in a quadratic number field Q(√d).
 *
 * Method: every element of Q(√d) has the unique form a + b·√d with a, b rational when d is
 * not a perfect square (standard algebra, e.g. Stewart & Tall, Algebraic Number Theory,
 * §3.1, from memory). Products use (√d)² = d; inverses use the conjugate:
 * (a + b√d)⁻¹ = (a − b√d) / (a² − d·b²), whose denominator is non-zero for a non-zero
 * element because d is not a square.
 *
 * Invariants: a field is built with an integer d that is not a perfect square, or with
 * d = 1, which stands for Q itself (then every element has b = 0, enforced by `elem`).
 * Squares are divided out of d by trial division so texts read "2√3" rather than "√12";
 * a big square factor that escapes trial division only makes a text longer, never wrong.
 * Elements are immutable plain objects.
 */
import { Rational, bitLength } from './rational';

export interface QuadElement {
  readonly a: Rational;
  readonly b: Rational;
}

/** Largest prime tried when dividing squares out of d (keeps normalization O(1000)). */
const SQUARE_TRIAL_LIMIT = 1000n;

/** Writes |x| = s²·core with core free of squares of primes ≤ SQUARE_TRIAL_LIMIT. */
export function splitSquare(x: bigint): { s: bigint; core: bigint } {
  const neg = x < 0n;
  let m = neg ? -x : x;
  let s = 1n;
  if (m === 0n) return { s: 0n, core: 0n };
  for (let p = 2n; p <= SQUARE_TRIAL_LIMIT && p * p <= m; p += p === 2n ? 1n : 2n) {
    while (m % (p * p) === 0n) {
      m /= p * p;
      s *= p;
    }
  }
  const r = isqrt(m);
  if (r * r === m) {
    s *= r;
    m = 1n;
  }
  return { s, core: neg ? -m : m };
}

/** Integer square root floor(√m) for m ≥ 0 (Newton's iteration on BigInt). */
export function isqrt(m: bigint): bigint {
  if (m < 0n) throw new RangeError('isqrt of a negative number');
  if (m < 2n) return m;
  const approx = Number(m);
  // Newton from a float guess (or a power of two above √m when m overflows a double).
  let x = Number.isFinite(approx) ? BigInt(Math.floor(Math.sqrt(approx))) + 1n : 1n << BigInt((bitLength(m) >> 1) + 1);
  // One unconditional step lands at or above floor(√m) (AM–GM), then Newton decreases.
  x = (x + m / x) >> 1n;
  for (;;) {
    const y = (x + m / x) >> 1n;
    if (y >= x) break;
    x = y;
  }
  while (x * x > m) x -= 1n;
  while ((x + 1n) * (x + 1n) <= m) x += 1n;
  return x;
}

/** The exact square root of a non-negative rational when it is rational, else null. */
export function rationalSqrt(q: Rational): Rational | null {
  if (q.sign() < 0) return null;
  const rn = isqrt(q.num);
  const rd = isqrt(q.den);
  return rn * rn === q.num && rd * rd === q.den ? Rational.of(rn, rd) : null;
}

export class QuadField {
  /** Square-free-ish integer radicand; 1 means the field is Q. */
  readonly d: bigint;
  readonly dRational: Rational;
  readonly zero: QuadElement;
  readonly one: QuadElement;

  constructor(d: bigint) {
    if (d === 0n) throw new RangeError('Q(√0) is not a quadratic field');
    const { s, core } = splitSquare(d);
    if (core !== d && core !== 1n) throw new RangeError(`radicand ${d} is not normalized; use QuadField.normalize`);
    if (core === 1n && d !== 1n) throw new RangeError(`radicand ${d} is a perfect square`);
    void s;
    this.d = d;
    this.dRational = Rational.fromInt(d);
    this.zero = { a: Rational.ZERO, b: Rational.ZERO };
    this.one = { a: Rational.ONE, b: Rational.ZERO };
  }

  static readonly RATIONALS = new QuadField(1n);

  /**
   * Rewrites r·√d (d rational, not a square) as r'·√core over a normalized field:
   * √(u/v) = √(u·v)/v and √(s²·core) = s·√core.
   */
  static normalize(r: Rational, d: Rational): { field: QuadField; r: Rational } {
    if (r.isZero()) return { field: QuadField.RATIONALS, r: Rational.ZERO };
    if (d.isZero()) return { field: QuadField.RATIONALS, r: Rational.ZERO };
    const { s, core } = splitSquare(d.num * d.den);
    const scaled = r.mul(Rational.of(s, d.den));
    if (core === 1n) return { field: QuadField.RATIONALS, r: scaled };
    return { field: new QuadField(core), r: scaled };
  }

  get isRational(): boolean {
    return this.d === 1n;
  }

  elem(a: Rational, b: Rational = Rational.ZERO): QuadElement {
    // In Q itself √1 = 1, so a stray b folds into a and b = 0 stays an invariant.
    if (this.d === 1n && !b.isZero()) return { a: a.add(b), b: Rational.ZERO };
    return { a, b };
  }
  fromRational(a: Rational): QuadElement {
    return { a, b: Rational.ZERO };
  }
  add(x: QuadElement, y: QuadElement): QuadElement {
    return { a: x.a.add(y.a), b: x.b.add(y.b) };
  }
  sub(x: QuadElement, y: QuadElement): QuadElement {
    return { a: x.a.sub(y.a), b: x.b.sub(y.b) };
  }
  neg(x: QuadElement): QuadElement {
    return { a: x.a.neg(), b: x.b.neg() };
  }
  mul(x: QuadElement, y: QuadElement): QuadElement {
    if (x.b.isZero() && y.b.isZero()) return { a: x.a.mul(y.a), b: Rational.ZERO };
    return {
      a: x.a.mul(y.a).add(x.b.mul(y.b).mul(this.dRational)),
      b: x.a.mul(y.b).add(x.b.mul(y.a)),
    };
  }
  scale(x: QuadElement, q: Rational): QuadElement {
    return { a: x.a.mul(q), b: x.b.mul(q) };
  }
  /** Galois conjugate a − b√d (complex conjugate when d < 0). */
  conj(x: QuadElement): QuadElement {
    return { a: x.a, b: x.b.neg() };
  }
  /** Field norm a² − d·b² (a rational; zero only for the zero element). */
  norm(x: QuadElement): Rational {
    return x.a.mul(x.a).sub(this.dRational.mul(x.b).mul(x.b));
  }
  inv(x: QuadElement): QuadElement {
    if (this.isZero(x)) throw new RangeError('division by zero in Q(√d)');
    if (x.b.isZero()) return { a: x.a.inv(), b: Rational.ZERO };
    const n = this.norm(x);
    return { a: x.a.div(n), b: x.b.neg().div(n) };
  }
  div(x: QuadElement, y: QuadElement): QuadElement {
    return this.mul(x, this.inv(y));
  }
  pow(x: QuadElement, k: number): QuadElement {
    if (!Number.isInteger(k)) throw new RangeError('integer powers only');
    if (k < 0) return this.pow(this.inv(x), -k);
    let result = this.one;
    let base = x;
    let e = k;
    while (e > 0) {
      if (e & 1) result = this.mul(result, base);
      base = this.mul(base, base);
      e >>= 1;
    }
    return result;
  }
  isZero(x: QuadElement): boolean {
    return x.a.isZero() && x.b.isZero();
  }
  eq(x: QuadElement, y: QuadElement): boolean {
    return x.a.eq(y.a) && x.b.eq(y.b);
  }

  /** √|d| as a double. */
  sqrtAbsD(): number {
    return Math.sqrt(Math.abs(Number(this.d)));
  }
  /** Real value; only for real fields (d > 0 or Q). */
  toNumber(x: QuadElement): number {
    if (this.d < 0n) throw new RangeError('toNumber on a complex field element; use toComplex');
    return quadToNumber(x.a, x.b, this.d);
  }
  toComplex(x: QuadElement): { re: number; im: number } {
    if (this.d > 0n) return { re: this.toNumber(x), im: 0 };
    return { re: x.a.toNumber(), im: x.b.toNumber() * this.sqrtAbsD() };
  }
  /** Exact text: "3/2", "-2√3/3", "1/2 + √5/10", "-1 - j√3" (d < 0 written with j). */
  toText(x: QuadElement): string {
    return quadText(x.a, x.b, this.d);
  }
}

/**
 * a + b√d as a double for d > 0, guarding against cancellation: when a and b√d nearly
 * cancel, a − b√d is formed instead and the value recovered from the norm a² − d·b²
 * (computed exactly), so surd roots like (3 − √5)/2 keep full relative accuracy.
 */
export function quadToNumber(a: Rational, b: Rational, d: bigint): number {
  if (b.isZero()) return a.toNumber();
  const s = Math.sqrt(Number(d));
  const av = a.toNumber();
  const bv = b.toNumber() * s;
  const sum = av + bv;
  if (Math.sign(av) === Math.sign(bv) || Math.abs(sum) > 0.5 * Math.max(Math.abs(av), Math.abs(bv))) return sum;
  const norm = a.mul(a).sub(Rational.fromInt(d).mul(b).mul(b)).toNumber();
  return norm / (av - bv);
}

/** "√d" text part with the sign/magnitude of a rational factor b: "√5/10", "-2√3", "√2". */
function surdText(b: Rational, radicand: string): string {
  const numAbs = b.num < 0n ? -b.num : b.num;
  const body = (numAbs === 1n ? '' : numAbs.toString()) + '√' + radicand;
  return b.den === 1n ? body : `${body}/${b.den}`;
}

export function quadText(a: Rational, b: Rational, d: bigint): string {
  if (b.isZero() || d === 1n) return (d === 1n ? a.add(b) : a).toString();
  const complex = d < 0n;
  const absD = complex ? -d : d;
  const unit = complex ? (absD === 1n ? 'j' : `j√${absD}`) : `√${absD}`;
  let s: string;
  if (complex) {
    const numAbs = b.num < 0n ? -b.num : b.num;
    const body = (numAbs === 1n ? '' : numAbs.toString()) + unit;
    s = b.den === 1n ? body : `${body}/${b.den}`;
  } else {
    s = surdText(b, absD.toString());
  }
  const neg = b.sign() < 0;
  if (a.isZero()) return neg ? `-${s}` : s;
  return `${a.toString()} ${neg ? '-' : '+'} ${s}`;
}

/**
 * Parses a text written by `quadText` for a real field ("3/2", "-2√3/3", "1/2 + √5/10")
 * back into a + b√d. Returns null for anything else. Used to check exact texts round-trip.
 */
export function parseQuadText(text: string): { a: Rational; b: Rational; d: bigint } | null {
  const t = text.trim();
  const surd = /^([+-]?)(\d*)√(\d+)(?:\/(\d+))?$/;
  const ratOnly = Rational.parse(t);
  if (ratOnly && !t.includes('√')) return { a: ratOnly, b: Rational.ZERO, d: 1n };
  const parseSurd = (s: string, sign: string): { b: Rational; d: bigint } | null => {
    const m = surd.exec(s);
    if (!m) return null;
    const num = BigInt(m[2] === '' ? '1' : m[2]);
    const den = BigInt(m[4] ?? '1');
    const signed = (m[1] === '-') !== (sign === '-') ? -num : num;
    return { b: Rational.of(signed, den), d: BigInt(m[3]) };
  };
  const pure = parseSurd(t, '+');
  if (pure) return { a: Rational.ZERO, b: pure.b, d: pure.d };
  const m = /^(\S+) ([+-]) (\S+)$/.exec(t);
  if (!m) return null;
  const a = Rational.parse(m[1]);
  const sb = parseSurd(m[3], m[2]);
  if (!a || !sb) return null;
  return { a, b: sb.b, d: sb.d };
}
