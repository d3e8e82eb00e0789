/**
 * Exact rational numbers backed by BigInt.
 *
 * Invariant after every constructor: den > 0 and gcd(|num|, den) = 1, so equality is
 * structural and `toString` is canonical. Instances are immutable.
 *
 * Written here rather than taken from fraction.js because the engine needs a small,
 * allocation-light type it controls (hot loops in Berkowitz and Gaussian elimination),
 * and the engine imports no other module of ours or of the editor.
 */

function gcdBig(a: bigint, b: bigint): bigint {
  if (a < 0n) a = -a;
  if (b < 0n) b = -b;
  while (b !== 0n) {
    const r = a % b;
    a = b;
    b = r;
  }
  return a;
}

export class Rational {
  readonly num: bigint;
  readonly den: bigint;

  private constructor(num: bigint, den: bigint) {
    this.num = num;
    this.den = den;
  }

  /** Builds num/den in lowest terms. Throws RangeError on a zero denominator. */
  static of(num: bigint | number, den: bigint | number = 1n): Rational {
    let n = typeof num === 'bigint' ? num : BigInt(num);
    let d = typeof den === 'bigint' ? den : BigInt(den);
    if (d === 0n) throw new RangeError('Rational with zero denominator');
    if (d < 0n) {
      n = -n;
      d = -d;
    }
    if (d === 1n) return new Rational(n, 1n);
    const g = gcdBig(n, d);
    return g === 1n ? new Rational(n, d) : new Rational(n / g, d / g);
  }

  static readonly ZERO = new Rational(0n, 1n);
  static readonly ONE = new Rational(1n, 1n);
  static readonly MINUS_ONE = new Rational(-1n, 1n);

  static fromInt(n: number | bigint): Rational {
    return new Rational(typeof n === 'bigint' ? n : BigInt(n), 1n);
  }

  /**
   * Parses a decimal literal exactly: "12", "-0.1", "1e-3", "2.5E+4", "3/4", ".5".
   * Returns null for anything else (the caller reports the error with its range).
   */
  static parse(text: string): Rational | null {
    const s = text.trim().replace(/_/g, '');
    const frac = /^([+-]?\d+)\s*\/\s*(\d+)$/.exec(s);
    if (frac) {
      const d = BigInt(frac[2]);
      return d === 0n ? null : Rational.of(BigInt(frac[1]), d);
    }
    const m = /^([+-])?(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(s);
    if (!m) return null;
    const intPart = m[2] ?? '';
    const fracPart = m[3] ?? '';
    if (intPart === '' && fracPart === '') return null;
    const exp = m[4] ? Number(m[4]) : 0;
    if (!Number.isSafeInteger(exp) || Math.abs(exp) > 10_000) return null;
    let n = BigInt((intPart || '0') + fracPart);
    if (m[1] === '-') n = -n;
    const shift = exp - fracPart.length;
    return shift >= 0 ? Rational.of(n * 10n ** BigInt(shift), 1n) : Rational.of(n, 10n ** BigInt(-shift));
  }

  /** The exact value of a finite double (every double is a dyadic rational). */
  static fromNumber(x: number): Rational {
    if (!Number.isFinite(x)) throw new RangeError(`not a finite number: ${x}`);
    if (Number.isInteger(x)) return Rational.fromInt(BigInt(x));
    let den = 1n;
    let v = x;
    while (!Number.isInteger(v)) {
      v *= 2;
      den *= 2n;
    }
    return Rational.of(BigInt(v), den);
  }

  add(o: Rational): Rational {
    if (this.den === 1n && o.den === 1n) return new Rational(this.num + o.num, 1n);
    return Rational.of(this.num * o.den + o.num * this.den, this.den * o.den);
  }
  sub(o: Rational): Rational {
    if (this.den === 1n && o.den === 1n) return new Rational(this.num - o.num, 1n);
    return Rational.of(this.num * o.den - o.num * this.den, this.den * o.den);
  }
  mul(o: Rational): Rational {
    if (this.num === 0n || o.num === 0n) return Rational.ZERO;
    if (this.den === 1n && o.den === 1n) return new Rational(this.num * o.num, 1n);
    return Rational.of(this.num * o.num, this.den * o.den);
  }
  div(o: Rational): Rational {
    if (o.num === 0n) throw new RangeError('division by zero');
    return Rational.of(this.num * o.den, this.den * o.num);
  }
  neg(): Rational {
    return new Rational(-this.num, this.den);
  }
  inv(): Rational {
    return Rational.of(this.den, this.num);
  }
  abs(): Rational {
    return this.num < 0n ? this.neg() : this;
  }
  pow(k: number): Rational {
    if (!Number.isInteger(k)) throw new RangeError('integer powers only');
    if (k < 0) return this.inv().pow(-k);
    return Rational.of(this.num ** BigInt(k), this.den ** BigInt(k));
  }

  isZero(): boolean {
    return this.num === 0n;
  }
  isOne(): boolean {
    return this.num === 1n && this.den === 1n;
  }
  isInteger(): boolean {
    return this.den === 1n;
  }
  sign(): -1 | 0 | 1 {
    return this.num === 0n ? 0 : this.num < 0n ? -1 : 1;
  }
  cmp(o: Rational): -1 | 0 | 1 {
    const d = this.num * o.den - o.num * this.den;
    return d === 0n ? 0 : d < 0n ? -1 : 1;
  }
  eq(o: Rational): boolean {
    return this.num === o.num && this.den === o.den;
  }

  /** Nearest double; exact for |num|, den < 2^53, correctly rounded enough otherwise. */
  toNumber(): number {
    const n = this.num;
    const d = this.den;
    const nf = Number(n);
    const df = Number(d);
    if (Number.isFinite(nf) && Number.isFinite(df) && Math.abs(nf) < 2 ** 53 && df < 2 ** 53) return nf / df;
    // Scale to keep ~64 significant bits in the quotient before converting.
    const shift = BigInt(Math.max(0, bitLength(d) - bitLength(n < 0n ? -n : n) + 64));
    const q = (n << shift) / d;
    return Number(q) / 2 ** Number(shift);
  }

  /** Number of decimal digits in numerator plus denominator; used by size caps. */
  digits(): number {
    return (this.num < 0n ? -this.num : this.num).toString().length + this.den.toString().length;
  }

  /** Canonical text: "3", "-5/2". */
  toString(): string {
    return this.den === 1n ? this.num.toString() : `${this.num}/${this.den}`;
  }
}

export function bitLength(x: bigint): number {
  return x === 0n ? 0 : x.toString(2).length;
}

export function gcd(a: bigint, b: bigint): bigint {
  return gcdBig(a, b);
}

export function lcm(a: bigint, b: bigint): bigint {
  if (a === 0n || b === 0n) return 0n;
  const g = gcdBig(a, b);
  const r = (a / g) * b;
  return r < 0n ? -r : r;
}

export const Q = (num: bigint | number, den: bigint | number = 1n): Rational => Rational.of(num, den);
