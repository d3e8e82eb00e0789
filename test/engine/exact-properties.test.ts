/**
 * Identities the exact spectrum must satisfy on seeded random input (fast-check):
 * Cayley–Hamilton p(A) = 0 (Horn & Johnson, Matrix Analysis, 2nd ed., §2.4.2, from memory);
 * the minimal polynomial divides p, annihilates A and no proper divisor of it does (ibid.
 * §3.3, from memory); Π q^algebraic = p; the Jordan structure of S·J·S⁻¹ is that of the
 * chosen J (similarity invariance, ibid. §3.1); block sizes agree with the ranks of
 * (A − λI)^k (Weyr characteristic, ibid. §3.1); trace = Σ algebraic·λ; numeric eigenvalues
 * from ml-matrix (a general-purpose library) agree for simple spectra.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { Rational, Q } from '../../server/src/engine/rational';
import { exactSpectrum } from '../../server/src/engine/spectrumExact';
import { characteristicPolynomial } from '../../server/src/engine/charpoly';
import {
  identityQ, inverseQ, isZeroQ, mulQ, nullityQ, polyAtMatrixQ, powerQ, subQ, scaleQ, zerosQ, type MatrixQ,
} from '../../server/src/engine/matrixQ';
import { polyExactQuotient, polyMul, polyPow, polyEquals, polyFromInts, type PolyQ } from '../../server/src/engine/polynomial';
import { closeTo } from '../../server/src/engine/tolerance';
import { squareFreeModular } from '../../server/src/engine/squarefree';
import { polyGcd, polyDerivative, polyDegree } from '../../server/src/engine/polynomial';

const parse = (xs: string[]): PolyQ => xs.map((x) => Rational.parse(x)!);

/** Checks shared by every property below. */
function checkIdentities(A: MatrixQ): void {
  const n = A.length;
  const s = exactSpectrum(A);
  const p = characteristicPolynomial(A);
  expect(isZeroQ(polyAtMatrixQ(p, A))).toBe(true); // Cayley–Hamilton
  const minimal = parse(s.minimalPoly!.exactCoeffs);
  expect(isZeroQ(polyAtMatrixQ(minimal, A))).toBe(true);
  expect(polyExactQuotient(p, minimal)).not.toBeNull();
  let product: PolyQ = [Rational.ONE];
  let degreeSum = 0;
  for (const f of s.factors!) {
    product = polyMul(product, polyPow(f.coeffs, f.algebraic));
    degreeSum += f.degree * f.algebraic;
    expect(f.blocks.reduce((x, y) => x + y, 0)).toBe(f.algebraic);
    expect(f.blocks.length).toBe(f.geometric);
    expect(f.blocks[0]).toBe(f.index);
    // Minimality: lowering this factor's exponent by one no longer annihilates A.
    const lowered = polyExactQuotient(minimal, f.coeffs)!;
    expect(isZeroQ(polyAtMatrixQ(lowered, A))).toBe(false);
    // Rational roots: blocks from ranks of (A − λI)^k directly.
    if (f.degree === 1) {
      const shifted = subQ(A, scaleQ(identityQ(n), f.coeffs[0].neg()));
      for (let k = 1; k <= f.index; k++) {
        const atLeastK = f.blocks.filter((b) => b >= k).length;
        const expected = nullityQ(powerQ(shifted, k)) - nullityQ(powerQ(shifted, k - 1));
        expect(atLeastK).toBe(expected);
      }
    }
  }
  expect(polyEquals(product, p)).toBe(true);
  expect(degreeSum).toBe(n);
  expect(s.eigenvalues.length).toBe(s.factors!.reduce((x, f) => x + f.degree, 0));
  // trace = Σ algebraic·λ (real part; imaginary parts cancel in conjugate pairs).
  let trace = 0;
  for (let i = 0; i < n; i++) trace += A[i][i].toNumber();
  const sum = s.eigenvalues.reduce((x, e) => x + e.algebraic * e.re, 0);
  const scale = Math.max(1, ...s.eigenvalues.map((e) => Math.hypot(e.re, e.im) * e.algebraic));
  expect(Math.abs(sum - trace)).toBeLessThan(1e-9 * scale * n);
  // Sorted by descending real part, then descending imaginary part.
  for (let i = 1; i < s.eigenvalues.length; i++) {
    const a = s.eigenvalues[i - 1];
    const b = s.eigenvalues[i];
    expect(a.re > b.re || (a.re === b.re && a.im >= b.im)).toBe(true);
  }
}

const smallInt = fc.integer({ min: -3, max: 3 });
const randomMatrix = fc
  .integer({ min: 1, max: 6 })
  .chain((n) => fc.array(fc.array(smallInt, { minLength: n, maxLength: n }), { minLength: n, maxLength: n }));

/** A chosen Jordan structure: blocks on rational eigenvalues or real blocks on x²+1, x²−2, x²+x+1. */
type BlockSpec = { kind: 'rational'; lambda: number; size: number } | { kind: 'quadratic'; c0: number; c1: number; size: number };
const quadraticCoeffs = fc.constantFrom({ c0: 1, c1: 0 }, { c0: -2, c1: 0 }, { c0: 1, c1: 1 });
const blockSpecs: fc.Arbitrary<BlockSpec[]> = fc
  .array(
    fc.oneof(
      fc.record({ lambda: fc.integer({ min: -2, max: 2 }), size: fc.integer({ min: 1, max: 3 }) }).map((r) => ({ kind: 'rational' as const, ...r })),
      fc.record({ c: quadraticCoeffs, size: fc.integer({ min: 1, max: 2 }) }).map((r) => ({ kind: 'quadratic' as const, c0: r.c.c0, c1: r.c.c1, size: r.size })),
    ),
    { minLength: 1, maxLength: 4 },
  )
  .filter((bs) => bs.reduce((x, b) => x + (b.kind === 'rational' ? b.size : 2 * b.size), 0) <= 6);

/** Block-diagonal (real) Jordan matrix for the specs. */
function jordanMatrix(specs: BlockSpec[]): MatrixQ {
  const n = specs.reduce((x, b) => x + (b.kind === 'rational' ? b.size : 2 * b.size), 0);
  const J = zerosQ(n, n);
  let at = 0;
  for (const b of specs) {
    if (b.kind === 'rational') {
      for (let i = 0; i < b.size; i++) {
        J[at + i][at + i] = Q(b.lambda);
        if (i + 1 < b.size) J[at + i][at + i + 1] = Q(1);
      }
      at += b.size;
    } else {
      for (let i = 0; i < b.size; i++) {
        const r = at + 2 * i;
        // Companion block of x² + c1·x + c0, identity coupling to the next block.
        J[r][r + 1] = Q(1);
        J[r + 1][r] = Q(-b.c0);
        J[r + 1][r + 1] = Q(-b.c1);
        if (i + 1 < b.size) {
          J[r][r + 2] = Q(1);
          J[r + 1][r + 3] = Q(1);
        }
      }
      at += 2 * b.size;
    }
  }
  return J;
}

/** Unimodular integer S as a product of elementary row additions. */
function unimodular(n: number, ops: { i: number; j: number; c: number }[]): MatrixQ {
  let S = identityQ(n);
  for (const op of ops) {
    const i = op.i % n;
    const j = op.j % n;
    if (i === j) continue;
    const E = identityQ(n);
    E[i][j] = Q(op.c);
    S = mulQ(E, S);
  }
  return S;
}

/** Expected descending block sizes per factor key ("x-λ" or "q:c0,c1"). */
function expectedBlocks(specs: BlockSpec[]): Map<string, number[]> {
  const m = new Map<string, number[]>();
  for (const b of specs) {
    const key = b.kind === 'rational' ? `${-b.lambda},1` : `${b.c0},${b.c1},1`;
    m.set(key, [...(m.get(key) ?? []), b.size]);
  }
  for (const v of m.values()) v.sort((a, b) => b - a);
  return m;
}

const elementaryOps = fc.array(
  fc.record({ i: fc.nat(5), j: fc.nat(5), c: fc.integer({ min: -2, max: 2 }) }),
  { minLength: 0, maxLength: 12 },
);

describe('exact spectrum identities (property tests)', () => {
  it('random integer matrices n ≤ 6: Cayley–Hamilton, minimal polynomial, factor product, ranks', () => {
    fc.assert(fc.property(randomMatrix, (ints) => checkIdentities(ints.map((r) => r.map((x) => Q(x))))), { seed: 42, numRuns: 200 });
  });

  it('S·J·S⁻¹ with unimodular S has exactly the chosen Jordan blocks (similarity invariance)', () => {
    fc.assert(
      fc.property(blockSpecs, elementaryOps, (specs, ops) => {
        const J = jordanMatrix(specs);
        const n = J.length;
        const S = unimodular(n, ops);
        const Sinv = inverseQ(S)!;
        expect(Sinv.every((row) => row.every((x) => x.isInteger()))).toBe(true);
        const A = mulQ(mulQ(S, J), Sinv);
        checkIdentities(A);
        const s = exactSpectrum(A);
        const got = new Map(s.factors!.map((f) => [f.coeffs.map(String).join(','), f.blocks]));
        expect(got).toEqual(expectedBlocks(specs));
        expect(s.defective).toBe(specs.some((b) => b.size > 1));
      }),
      { seed: 42, numRuns: 200 },
    );
  });

  it('scaling by 1/L keeps the blocks and scales the eigenvalues (rational path)', () => {
    fc.assert(
      fc.property(blockSpecs, elementaryOps, fc.constantFrom(2, 3, 10), (specs, ops, L) => {
        const J = jordanMatrix(specs);
        const S = unimodular(J.length, ops);
        const A = mulQ(mulQ(S, J), inverseQ(S)!);
        const scaled = scaleQ(A, Q(1, L));
        checkIdentities(scaled);
        const a = exactSpectrum(A);
        const b = exactSpectrum(scaled);
        expect(b.eigenvalues.map((e) => e.blocks)).toEqual(a.eigenvalues.map((e) => e.blocks));
        a.eigenvalues.forEach((e, i) => {
          expect(closeTo(b.eigenvalues[i].re * L, e.re, 1e-12, 1e-12)).toBe(true);
          expect(closeTo(b.eigenvalues[i].im * L, e.im, 1e-12, 1e-12)).toBe(true);
        });
      }),
      { seed: 7, numRuns: 100 },
    );
  });

  it('simple spectra agree with ml-matrix eigenvalues to 1e-8 relative', () => {
    fc.assert(
      fc.property(randomMatrix, (ints) => {
        const s = exactSpectrum(ints.map((r) => r.map((x) => Q(x))));
        fc.pre(s.eigenvalues.every((e) => e.algebraic === 1) && s.nearRepeated.length === 0);
        const evd = new EigenvalueDecomposition(new Matrix(ints));
        const numeric = evd.realEigenvalues.map((re, i) => ({ re, im: evd.imaginaryEigenvalues[i] }));
        for (const e of s.eigenvalues) {
          const dist = Math.min(...numeric.map((z) => Math.hypot(z.re - e.re, z.im - e.im)));
          expect(dist).toBeLessThan(1e-8 * Math.max(1, Math.hypot(e.re, e.im)));
        }
      }),
      { seed: 42, numRuns: 200 },
    );
  });

  it('charpoly of a companion matrix is its polynomial (companion-matrix identity, from memory)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 1, maxLength: 8 }), (coeffs) => {
        const n = coeffs.length;
        const C = zerosQ(n, n);
        for (let i = 0; i + 1 < n; i++) C[i][i + 1] = Q(1);
        for (let j = 0; j < n; j++) C[n - 1][j] = Q(-coeffs[j]);
        expect(polyEquals(characteristicPolynomial(C), polyFromInts([...coeffs, 1]))).toBe(true);
      }),
      { seed: 42, numRuns: 200 },
    );
  });

  it('modular square-free test agrees with gcd(p, p′) over Q (definition of square-free; Yun 1976)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -6, max: 6 }), { minLength: 1, maxLength: 4 }),
        fc.array(fc.integer({ min: -6, max: 6 }), { minLength: 1, maxLength: 4 }),
        fc.boolean(),
        fc.integer({ min: 1, max: 9 }),
        (a, b, square, den) => {
          const f = polyFromInts([...a, 1]);
          const g = polyFromInts([...b, 1]);
          const p = polyMul(square ? polyMul(f, f) : f, g).map((c) => c.div(Q(den)));
          const sqFree = polyDegree(polyGcd(p, polyDerivative(p))) === 0;
          // The modular test may only say "square-free" when it is; with three primes it
          // also finds every square-free case of this size.
          expect(squareFreeModular(p)).toBe(sqFree);
          if (square) expect(squareFreeModular(p)).toBe(false);
        },
      ),
      { seed: 42, numRuns: 300 },
    );
  });
});
