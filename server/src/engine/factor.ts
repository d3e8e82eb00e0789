/**
 * Factorization of a polynomial over Q into monic irreducible factors with exponents, by
 * numeric root grouping confirmed with exact division.
 *
 * Method (a numeric form of the classical "combine modular/numeric factors and test by
 * trial division" scheme, cf. H. Zassenhaus, "On Hensel factorization I", J. Number Theory
 * 1, 1969, and J. von zur Gathen & J. Gerhard, "Modern Computer Algebra", ch. 15–16,
 * from memory):
 *  1. Scale the monic input p to a monic integer polynomial f(y) = L^n·p(y/L); monic
 *     factors of a monic integer polynomial have integer coefficients (Gauss's lemma), so
 *     every factor we look for has integer coefficients.
 *  2. Square-free parts by Yun's algorithm (squarefree.ts).
 *  3. For each square-free part: numeric roots (polyRoots.ts); rational roots are integers
 *     here, found by rounding each root and checking f(k) = 0 exactly; then factors of
 *     degree d = 2, 3, … ≤ deg/2 by trying every conjugate-closed set of the remaining
 *     roots whose degree is d, rounding the coefficients of Π(y − root) to integers and
 *     confirming by exact division.
 *  4. Map each factor g(y) back to q(x) = g(Lx)/L^{deg g}.
 *
 * Invariant: every returned factor divides p exactly and the product of the factors with
 * their exponents equals p — a bad rounding can only fail to split, never produce a wrong
 * factor. Limit: if the numeric roots are too inaccurate to round a true factor's
 * coefficients (very large coefficients, or degree well beyond the exact-path cap of 12),
 * the part is reported as irreducible although it is not. Degree-2 parts are decided
 * exactly (discriminant perfect-square test) without numerics.
 */
import { Rational, lcm } from './rational';
import {
  PolyQ, polyDegree, polyEvalRational, polyExactQuotient, polyMonic, polyTrim,
} from './polynomial';
import { squareFreeFactorization } from './squarefree';
import { polynomialRoots } from './polyRoots';
import { integerSqrt } from './format';
import type { Complex } from './polynomial';

export interface FactorPower {
  /** Monic, irreducible over Q (within the limit in the header), ascending coefficients. */
  factor: PolyQ;
  multiplicity: number;
}

/** Monic irreducible factors with exponents; a constant polynomial has none. */
export function factorOverQ(p: PolyQ): FactorPower[] {
  const trimmed = polyTrim(p);
  // x^k divides p exactly when its k lowest coefficients vanish: split that off first, so a
  // zero root never depends on numeric root finding (a tiny computed root once hid one).
  let k = 0;
  while (k < trimmed.length - 1 && trimmed[k].isZero()) k++;
  if (k > 0) {
    const rest = factorOverQ(trimmed.slice(k));
    return [{ factor: [Rational.ZERO, Rational.ONE], multiplicity: k }, ...rest];
  }
  const monic = polyMonic(trimmed);
  const n = polyDegree(monic);
  if (n < 1) return [];
  const L = scaleToMonicInteger(monic);
  const f = monic.map((c, i) => c.mul(Rational.of(L ** BigInt(n - i))));
  const out: FactorPower[] = [];
  for (const part of squareFreeFactorization(f)) {
    for (const g of splitSquareFree(part.poly)) {
      const d = polyDegree(g);
      const back = L === 1n ? g : g.map((c, i) => c.mul(Rational.of(L ** BigInt(i), L ** BigInt(d))));
      out.push({ factor: back, multiplicity: part.multiplicity });
    }
  }
  return out;
}

/**
 * Smallest practical L with c_i·L^{n−i} integral for all i: start from the lcm of the
 * denominators (always works) and lower the exponent of each small prime while it still
 * works; a smaller L keeps the integer coefficients (and the numeric roots) small.
 */
function scaleToMonicInteger(monic: PolyQ): bigint {
  const n = monic.length - 1;
  let L = 1n;
  for (const c of monic) if (c.den !== 1n) L = lcm(L, c.den);
  if (L === 1n) return L;
  const works = (cand: bigint): boolean =>
    monic.every((c, i) => i === n || (c.num * cand ** BigInt(n - i)) % c.den === 0n);
  for (const prime of [2n, 3n, 5n, 7n]) {
    while (L % prime === 0n && works(L / prime)) L /= prime;
  }
  return L;
}

/** One real root or one conjugate pair: the units a real factor's root set is made of. */
interface RootUnit {
  roots: Complex[];
}

/** Split a monic, square-free, integer-coefficient polynomial into irreducible factors. */
function splitSquareFree(s: PolyQ): PolyQ[] {
  const deg = polyDegree(s);
  if (deg === 1) return [s];
  if (deg === 2) return splitQuadratic(s);
  const factors: PolyQ[] = [];
  let rest = s;
  const roots = polynomialRoots(s);
  const units: RootUnit[] = [];
  for (let i = 0; i < roots.length; i++) {
    const z = roots[i];
    if (z.im === 0) units.push({ roots: [z] });
    else {
      units.push({ roots: [z, roots[i + 1]] });
      i++;
    }
  }
  // Integer roots (the only rational roots of a monic integer polynomial).
  const remaining: RootUnit[] = [];
  for (const u of units) {
    let taken = false;
    if (u.roots.length === 1 && polyDegree(rest) > 1) {
      const k = Math.round(u.roots[0].re);
      if (Number.isSafeInteger(k) && polyEvalRational(rest, Rational.fromInt(k)).isZero()) {
        const lin = [Rational.fromInt(-k), Rational.ONE];
        rest = polyExactQuotient(rest, lin)!;
        factors.push(lin);
        taken = true;
      }
    }
    if (!taken) remaining.push(u);
  }
  // Higher-degree factors from conjugate-closed subsets of the remaining roots.
  let d = 2;
  while (2 * d <= polyDegree(rest)) {
    const found = findFactorOfDegree(rest, remaining, d);
    if (found) {
      factors.push(found.factor);
      rest = polyExactQuotient(rest, found.factor)!;
      for (const idx of found.used.sort((a, b) => b - a)) remaining.splice(idx, 1);
    } else d++;
  }
  if (polyDegree(rest) === 2) factors.push(...splitQuadratic(rest));
  else if (polyDegree(rest) >= 1) factors.push(rest);
  return factors;
}

/** x² + bx + c with integer b, c: reducible iff b² − 4c is a perfect square. */
function splitQuadratic(q: PolyQ): PolyQ[] {
  const b = q[1].num;
  const c = q[0].num;
  const disc = b * b - 4n * c;
  if (disc < 0n) return [q];
  const r = integerSqrt(disc);
  if (r * r !== disc) return [q];
  // Roots (−b ± r)/2 are integers because disc ≡ b² (mod 4) forces r ≡ b (mod 2).
  const r1 = (-b + r) / 2n;
  const r2 = (-b - r) / 2n;
  return [[Rational.fromInt(-r1), Rational.ONE], [Rational.fromInt(-r2), Rational.ONE]];
}

function findFactorOfDegree(rest: PolyQ, units: RootUnit[], d: number): { factor: PolyQ; used: number[] } | null {
  const chosen: number[] = [];
  const search = (start: number, degLeft: number): { factor: PolyQ; used: number[] } | null => {
    if (degLeft === 0) {
      const cand = roundedProduct(chosen.flatMap((i) => units[i].roots));
      if (cand && integerValuesDivide(cand, rest) && polyExactQuotient(rest, cand) !== null) return { factor: cand, used: chosen.slice() };
      return null;
    }
    for (let i = start; i < units.length; i++) {
      const ud = units[i].roots.length;
      if (ud > degLeft) continue;
      chosen.push(i);
      const r = search(i + 1, degLeft - ud);
      chosen.pop();
      if (r) return r;
    }
    return null;
  };
  return search(0, d);
}

/**
 * Necessary condition for g | f over Z[y]: g(0) | f(0) and g(1) | f(1) (values of integer
 * polynomials). Two BigInt remainders reject most wrong candidates before a division.
 */
function integerValuesDivide(g: PolyQ, f: PolyQ): boolean {
  for (const at of [0n, 1n]) {
    const gv = evalInt(g, at);
    const fv = evalInt(f, at);
    if (gv === 0n ? fv !== 0n : fv % gv !== 0n) return false;
  }
  return true;
}

function evalInt(p: PolyQ, x: bigint): bigint {
  let acc = 0n;
  for (let i = p.length - 1; i >= 0; i--) acc = acc * x + p[i].num;
  return acc;
}

/**
 * Coefficients of Π(y − z) rounded to integers, or null when they are visibly not
 * integers. The filter only saves exact divisions; the exact division decides. Slack:
 * coefficient k is an elementary symmetric function of the roots, whose rounding error is
 * bounded by about (roots' relative error)·e_k(|z|); 1e-8·e_k(|z|) allows root errors a
 * million times above the ~1e-14 that polishing reaches, plus an absolute 1e-6.
 */
function roundedProduct(roots: Complex[]): PolyQ | null {
  let re = [1];
  let im = [0];
  let mag = [1]; // coefficients of Π(y + |z|): error scale per coefficient
  for (const z of roots) {
    const abs = Math.hypot(z.re, z.im);
    const nm = new Array<number>(mag.length + 1).fill(0);
    for (let i = 0; i < mag.length; i++) {
      nm[i + 1] += mag[i];
      nm[i] += mag[i] * abs;
    }
    mag = nm;
    const nr = new Array<number>(re.length + 1).fill(0);
    const ni = new Array<number>(re.length + 1).fill(0);
    for (let i = 0; i < re.length; i++) {
      nr[i + 1] += re[i];
      ni[i + 1] += im[i];
      nr[i] -= re[i] * z.re - im[i] * z.im;
      ni[i] -= re[i] * z.im + im[i] * z.re;
    }
    re = nr;
    im = ni;
  }
  const out: Rational[] = [];
  for (let i = 0; i < re.length; i++) {
    const c = re[i];
    const k = Math.round(c);
    if (!Number.isSafeInteger(k) || Math.abs(c - k) > 1e-6 + 1e-8 * mag[i]) return null;
    out.push(Rational.fromInt(k));
  }
  return out;
}
