/**
 * Exact matrix operations over Q (matrixQ.ts).
 * References: identities of linear algebra (rank–nullity, A·A⁻¹ = I, rank A = rank Aᵀ) as in
 * G. Strang, "Linear Algebra and Its Applications", ch. 2–3 (from memory); independent
 * numeric ranks from ml-matrix's SVD (a general-purpose library).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { SingularValueDecomposition, Matrix } from 'ml-matrix';
import { Rational, Q } from '../../server/src/engine/rational';
import {
  equalsQ, fromIntsQ, identityQ, inverseQ, mulQ, nullityQ, nullspaceQ, polyAtMatrixQ, powerQ, rankQ, rrefQ, transposeQ, isZeroQ,
} from '../../server/src/engine/matrixQ';

describe('rankQ / nullityQ', () => {
  it('rank of small hand-checkable matrices (Strang ch. 2, from memory)', () => {
    expect(rankQ(fromIntsQ([[1, 2], [2, 4]]))).toBe(1);
    expect(rankQ(fromIntsQ([[1, 2, 3], [4, 5, 6], [7, 8, 9]]))).toBe(2);
    expect(rankQ(fromIntsQ([[0, 0], [0, 0]]))).toBe(0);
    expect(nullityQ(fromIntsQ([[1, 2, 3], [4, 5, 6], [7, 8, 9]]))).toBe(1);
    expect(rankQ(identityQ(5))).toBe(5);
  });
  it('exact on rationals where a tolerance would be fooled', () => {
    // [[1, 1], [1, 1 + 1e-20]] is nonsingular exactly (det = 1e-20).
    const m = [[Q(1), Q(1)], [Q(1), Q(1).add(Q(1, 10n ** 20n))]];
    expect(rankQ(m)).toBe(2);
    const s = [[Q(1, 3), Q(2, 7)], [Q(7, 3), Q(2)]]; // row 2 = 7·row 1
    expect(rankQ(s)).toBe(1);
  });
  it('agrees with the numeric SVD rank and with the transpose on random small integer matrices', () => {
    const entry = fc.integer({ min: -3, max: 3 });
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.integer({ min: 1, max: 5 }), fc.array(entry, { minLength: 25, maxLength: 25 }), (r, c, xs) => {
        const ints = Array.from({ length: r }, (_, i) => Array.from({ length: c }, (_, j) => xs[i * 5 + j]));
        // Make some rows dependent so low ranks occur.
        if (r > 2) ints[r - 1] = ints[0].map((x, j) => x - 2 * ints[1][j]);
        const m = fromIntsQ(ints);
        const svd = new SingularValueDecomposition(new Matrix(ints), { autoTranspose: true });
        expect(rankQ(m)).toBe(svd.rank);
        expect(rankQ(transposeQ(m))).toBe(rankQ(m));
        expect(nullityQ(m)).toBe(c - rankQ(m));
      }),
      { seed: 42, numRuns: 200 },
    );
  });
});

describe('inverse, rref, null space, powers', () => {
  it('inverse of [[2,1],[1,1]] is [[1,-1],[-1,2]] (det 1; adjugate formula, Strang ch. 4)', () => {
    expect(equalsQ(inverseQ(fromIntsQ([[2, 1], [1, 1]]))!, fromIntsQ([[1, -1], [-1, 2]]))).toBe(true);
    expect(inverseQ(fromIntsQ([[1, 2], [2, 4]]))).toBeNull();
  });
  it('A·A⁻¹ = I and A·v = 0 for null vectors on random integer matrices (rank–nullity)', () => {
    const entry = fc.integer({ min: -4, max: 4 });
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.array(entry, { minLength: 25, maxLength: 25 }), (n, xs) => {
        const m = fromIntsQ(Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => xs[i * 5 + j])));
        const inv = inverseQ(m);
        const basis = nullspaceQ(m);
        expect(basis.length).toBe(nullityQ(m));
        if (inv) expect(equalsQ(mulQ(m, inv), identityQ(n))).toBe(true);
        else expect(basis.length).toBeGreaterThan(0);
        for (const v of basis) {
          const mv = mulQ(m, v.map((x) => [x]));
          expect(isZeroQ(mv)).toBe(true);
        }
      }),
      { seed: 7, numRuns: 200 },
    );
  });
  it('rref pivots of a rank-2 3×3', () => {
    const { pivots, rref } = rrefQ(fromIntsQ([[1, 2, 3], [4, 5, 6], [7, 8, 9]]));
    expect(pivots).toEqual([0, 1]);
    expect(rref[0].map(String)).toEqual(['1', '0', '-1']);
    expect(rref[1].map(String)).toEqual(['0', '1', '2']);
  });
  it('Fibonacci powers [[1,1],[1,0]]^10 = [[89,55],[55,34]] (Knuth, TAOCP vol. 1, §1.2.8, from memory)', () => {
    expect(equalsQ(powerQ(fromIntsQ([[1, 1], [1, 0]]), 10), fromIntsQ([[89, 55], [55, 34]]))).toBe(true);
  });
  it('polyAtMatrixQ: x² − x − 1 annihilates [[1,1],[1,0]] (its characteristic polynomial; Cayley–Hamilton)', () => {
    const p = [Q(-1), Q(-1), Q(1)];
    expect(isZeroQ(polyAtMatrixQ(p, fromIntsQ([[1, 1], [1, 0]])))).toBe(true);
    const half = [[Q(1, 2), Q(0)], [Q(0), Q(1, 3)]];
    // (x − 1/2)(x − 1/3) = x² − 5/6 x + 1/6
    expect(isZeroQ(polyAtMatrixQ([Q(1, 6), Q(-5, 6), Rational.ONE], half))).toBe(true);
  });
});
