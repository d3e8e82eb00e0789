/**
 * Square-free factorization over Q by Yun's algorithm.
 *
 * Source: D. Y. Y. Yun, "On square-free decomposition algorithms", Proc. ACM Symposium on
 * Symbolic and Algebraic Computation (SYMSAC '76), 1976. For monic f = Π a_i^i with the a_i
 * square-free and pairwise coprime: b_0 = f/g, c_0 = f'/g − b_0' with g = gcd(f, f');
 * then a_i = gcd(b, c), b ← b/a_i, c ← c/a_i − b'. In characteristic 0 this is exact.
 *
 * Output: the nontrivial a_i (degree ≥ 1) with their multiplicity i, each monic.
 *
 * Fast path: most characteristic polynomials are square-free, and Euclid over Q on them
 * suffers coefficient explosion. So f is first tested modulo a few word-size primes p not
 * dividing the leading coefficient of its integer form F: if gcd(F mod p, F' mod p) = 1 for
 * one p, then gcd(F, F') = 1 over Q (a common factor G, primitive by Gauss's lemma, keeps
 * its degree mod p because lc(G) | lc(F)), and f is its own square-free part. Exact; the
 * general algorithm runs only when every prime tried shares a factor.
 */
import { lcm } from './rational';
import {
  PolyQ, polyDegree, polyDerivative, polyExactQuotient, polyGcd, polyMonic, polySub,
} from './polynomial';

export interface SquareFreePart {
  poly: PolyQ;
  multiplicity: number;
}

export function squareFreeFactorization(f: PolyQ): SquareFreePart[] {
  const monic = polyMonic(f);
  if (polyDegree(monic) < 1) return [];
  if (squareFreeModular(monic)) return [{ poly: monic, multiplicity: 1 }];
  const df = polyDerivative(monic);
  const g = polyGcd(monic, df);
  let b = exactDiv(monic, g);
  let c = polySub(exactDiv(df, g), polyDerivative(b));
  const parts: SquareFreePart[] = [];
  let i = 1;
  while (polyDegree(b) >= 1) {
    const a = polyGcd(b, c);
    b = exactDiv(b, a);
    c = polySub(exactDiv(c, a), polyDerivative(b));
    if (polyDegree(a) >= 1) parts.push({ poly: polyMonic(a), multiplicity: i });
    i++;
  }
  return parts;
}

function exactDiv(a: PolyQ, b: PolyQ): PolyQ {
  const q = polyExactQuotient(a, b);
  if (q === null) throw new Error('internal: Yun step division was not exact');
  return q;
}

/** Primes just below 2^25: products of two residues stay below 2^50 (exact in doubles). */
const MODULAR_PRIMES: number[] = (() => {
  const out: number[] = [];
  for (let c = 2 ** 25 - 1; out.length < 3; c -= 2) {
    let prime = true;
    for (let d = 3; d * d <= c; d += 2) if (c % d === 0) { prime = false; break; }
    if (prime) out.push(c);
  }
  return out;
})();

/** True when f is provably square-free by a gcd modulo some prime (see header). */
export function squareFreeModular(f: PolyQ): boolean {
  let den = 1n;
  for (const c of f) if (c.den !== 1n) den = lcm(den, c.den);
  const ints = f.map((c) => c.num * (den / c.den));
  const n = ints.length - 1;
  if (n < 1) return true;
  for (const p of MODULAR_PRIMES) {
    const P = BigInt(p);
    if (ints[n] % P === 0n) continue;
    const F = ints.map((c) => Number(((c % P) + P) % P));
    const dF = F.slice(1).map((c, i) => mulMod(c, (i + 1) % p, p));
    if (gcdDegreeMod(F, dF, p) === 0) return true;
  }
  return false;
}

function mulMod(a: number, b: number, p: number): number {
  return (a * b) % p;
}

function invMod(a: number, p: number): number {
  // Extended Euclid on numbers < 2^25.
  let [r0, r1, s0, s1] = [a, p, 1, 0];
  while (r1 !== 0) {
    const q = Math.floor(r0 / r1);
    [r0, r1] = [r1, r0 - q * r1];
    [s0, s1] = [s1, s0 - q * s1];
  }
  return ((s0 % p) + p) % p;
}

function trimMod(a: number[]): number[] {
  let n = a.length;
  while (n > 0 && a[n - 1] === 0) n--;
  return a.slice(0, n);
}

/** Degree of gcd(a, b) over Z/p (−1 if both are zero). */
function gcdDegreeMod(a0: number[], b0: number[], p: number): number {
  let a = trimMod(a0);
  let b = trimMod(b0);
  while (b.length > 0) {
    const degB = b.length - 1;
    const r = a.slice(); // working copy, reduced in place to a mod b
    const inv = invMod(b[degB], p);
    for (let k = r.length - 1; k >= degB; k--) {
      if (r[k] === 0) continue;
      const f = mulMod(r[k], inv, p);
      const shift = k - degB;
      for (let j = 0; j <= degB; j++) r[shift + j] = (r[shift + j] - mulMod(f, b[j], p) + p) % p;
    }
    a = b;
    b = trimMod(r.slice(0, degB));
  }
  return a.length - 1;
}
