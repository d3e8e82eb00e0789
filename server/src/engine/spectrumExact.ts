/**
 * Exact spectrum of a rational matrix: characteristic polynomial (charpoly.ts, Berkowitz),
 * factorization over Q (factor.ts), roots in exact form for factors of degree ≤ 2 and
 * numeric form otherwise (polyRoots.ts), Jordan structure of every root decided exactly
 * (jordan.ts), minimal polynomial, defectiveness and nearly repeated pairs.
 *
 * Invariants of the result: Σ algebraic·degree over factors = n; eigenvalues lists every
 * root (each conjugate separately) sorted by descending real part, then descending
 * imaginary part; for every eigenvalue sum(blocks) = algebraic, blocks.length = geometric.
 */
import { Rational } from './rational';
import type { Eigenvalue, IrreducibleFactor, QuadraticNumber, Root, Spectrum } from './types';
import { characteristicPolynomial } from './charpoly';
import { factorOverQ } from './factor';
import { polynomialRoots } from './polyRoots';
import { jordanStructure } from './jordan';
import { PolyQ, polyMul, polyPow, polyToString } from './polynomial';
import { NEAR_REPEAT_REL } from './tolerance';
import { numericRootText, quadraticFromSurd, quadraticNumberToString, quadraticNumberValue } from './format';

export interface ExactSpectrumOptions {
  /**
   * Distinct eigenvalues with |λi − λj| ≤ threshold·max(1, |λi|, |λj|) are reported as
   * nearly repeated. Default NEAR_REPEAT_REL (1e-6, justified in tolerance.ts): closed
   * forms built on such a pair lose about log10(1/separation) digits.
   */
  nearRepeatThreshold?: number;
  /** Largest n accepted (default 12, the exact-path cap of the design). */
  maxSize?: number;
}

const DEFAULT_NEAR_REPEAT = NEAR_REPEAT_REL;
const DEFAULT_MAX_SIZE = 12;

export function exactSpectrum(a: Rational[][], opts: ExactSpectrumOptions = {}): Spectrum {
  const threshold = opts.nearRepeatThreshold ?? DEFAULT_NEAR_REPEAT;
  const maxSize = opts.maxSize ?? DEFAULT_MAX_SIZE;
  validate(a, maxSize);
  const n = a.length;
  const notes: string[] = [];
  const charPoly = characteristicPolynomial(a);

  const factors: IrreducibleFactor[] = [];
  let minimal: PolyQ = [Rational.ONE];
  for (const { factor, multiplicity } of factorOverQ(charPoly)) {
    const degree = factor.length - 1;
    const structure = jordanStructure(a, factor, multiplicity);
    if (!structure.consistent) {
      notes.push(`The factor ${polyToString(factor, 'x')} may not be irreducible; its block sizes are uncertain.`);
    }
    const roots = rootsOf(factor);
    if (degree >= 3) {
      notes.push(`Roots of the irreducible factor ${polyToString(factor, 'x')} are numeric (degree ${degree}).`);
    }
    factors.push({
      coeffs: factor,
      degree,
      algebraic: multiplicity,
      index: structure.index,
      blocks: structure.blocks,
      geometric: structure.geometric,
      roots,
    });
    minimal = polyMul(minimal, polyPow(factor, structure.index));
  }
  const byValue = (x: Root, y: Root): number => y.re - x.re || y.im - x.im;
  factors.sort((f, g) => byValue(f.roots[0], g.roots[0]));

  const eigenvalues: Eigenvalue[] = [];
  for (const f of factors) {
    for (const r of f.roots) eigenvalues.push({ ...r, algebraic: f.algebraic, geometric: f.geometric, blocks: f.blocks.slice() });
  }
  eigenvalues.sort(byValue);

  return {
    n,
    exact: true,
    charPoly: { coeffs: charPoly.map((c) => c.toNumber()), exactCoeffs: charPoly.map((c) => c.toString()) },
    minimalPoly: { coeffs: minimal.map((c) => c.toNumber()), exactCoeffs: minimal.map((c) => c.toString()) },
    factors,
    eigenvalues,
    defective: factors.some((f) => f.geometric < f.algebraic),
    clusterTolerance: null,
    nearRepeated: nearRepeatedPairs(eigenvalues, threshold),
    notes,
  };
}

function validate(a: unknown, maxSize: number): asserts a is Rational[][] {
  if (!Array.isArray(a) || a.length === 0) throw new RangeError('exact spectrum needs a non-empty square matrix');
  const n = a.length;
  if (n > maxSize) throw new RangeError(`exact spectrum is limited to n ≤ ${maxSize}; this matrix is ${n}×${n}`);
  a.forEach((row, i) => {
    if (!Array.isArray(row) || row.length !== n) {
      throw new RangeError(`exact spectrum needs a square matrix: row ${i + 1} has ${Array.isArray(row) ? row.length : 'no'} entries, expected ${n}`);
    }
    row.forEach((x, j) => {
      if (!(x instanceof Rational)) throw new TypeError(`entry (${i + 1}, ${j + 1}) is not an exact rational`);
    });
  });
}

function exactRoot(q: QuadraticNumber): Root {
  const v = quadraticNumberValue(q);
  return { re: v.re, im: v.im, exact: q, text: quadraticNumberToString(q) };
}

/** Roots of a monic irreducible factor: conjugates adjacent, upper half-plane (or larger) first. */
function rootsOf(f: PolyQ): Root[] {
  const degree = f.length - 1;
  if (degree === 1) return [exactRoot({ p: f[0].neg(), r: Rational.ZERO, d: Rational.ONE })];
  if (degree === 2) {
    // x² + bx + c: roots −b/2 ± √(b²/4 − c); r > 0 comes first (upper half-plane / larger real).
    const half = f[1].div(Rational.fromInt(2));
    const disc = half.mul(half).sub(f[0]);
    const plus = quadraticFromSurd(half.neg(), Rational.ONE, disc);
    const minus: QuadraticNumber = { p: plus.p, r: plus.r.neg(), d: plus.d };
    return [exactRoot(plus), exactRoot(minus)];
  }
  return polynomialRoots(f).map((z) => ({ re: z.re, im: z.im, exact: null, text: numericRootText(z.re, z.im) }));
}

function nearRepeatedPairs(ev: Eigenvalue[], threshold: number): { a: number; b: number; separation: number }[] {
  const out: { a: number; b: number; separation: number }[] = [];
  for (let i = 0; i < ev.length; i++) {
    for (let j = i + 1; j < ev.length; j++) {
      const sep = Math.hypot(ev[i].re - ev[j].re, ev[i].im - ev[j].im);
      const scale = Math.max(1, Math.hypot(ev[i].re, ev[i].im), Math.hypot(ev[j].re, ev[j].im));
      if (sep <= threshold * scale) out.push({ a: i, b: j, separation: sep });
    }
  }
  return out;
}
