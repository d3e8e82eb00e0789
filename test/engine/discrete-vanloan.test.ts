/**
 * Discrete process noise by Van Loan's block exponential (vanLoan.ts).
 * Sources beside each check (CHECKS #17–#19).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { Q } from '../../server/src/engine/rational';
import { fromIntsQ } from '../../server/src/engine/matrixQ';
import { processNoise, type ProcessNoiseResult, type ProcessNoiseSuccess } from '../../server/src/engine/vanLoan';
import { closeTo, matricesClose } from '../../server/src/engine/tolerance';

function ok(r: ProcessNoiseResult): ProcessNoiseSuccess {
  if (!r.ok) throw new Error(r.error);
  return r;
}

describe('Van Loan process noise', () => {
  it('#17 white-noise acceleration, q = 2, T = 1/2: Qd = q[[T³/3, T²/2],[T²/2, T]] = [[1/12, 1/4],[1/4, 1]] (Bar-Shalom, Li & Kirubarajan, Estimation with Applications to Tracking and Navigation, 2001, §6.2.2, from memory)', () => {
    const r = ok(processNoise(fromIntsQ([[0, 1], [0, 0]]), fromIntsQ([[2]]), Q(1, 2), fromIntsQ([[0], [1]])));
    expect(r.exact!.Qd).toEqual([['1/12', '1/4'], ['1/4', '1']]);
    expect(r.exact!.Ad).toEqual([['1', '1/2'], ['0', '1']]);
    // Float input takes the block exponential and agrees.
    const f = ok(processNoise([[0, 1], [0, 0]], [[2]], 0.5, [[0], [1]]));
    expect(f.exact).toBeNull();
    expect(matricesClose(f.Qd, [[1 / 12, 0.25], [0.25, 1]])).toBe(true);
    expect(matricesClose(f.Ad, [[1, 0.5], [0, 1]])).toBe(true);
  });
  it('#18 constant-acceleration model: Qd = q[[T⁵/20, T⁴/8, T³/6],[T⁴/8, T³/3, T²/2],[T³/6, T²/2, T]] (same source, from memory)', () => {
    const A = [[0, 1, 0], [0, 0, 1], [0, 0, 0]];
    const T = 0.2;
    const qn = 3;
    const want = [
      [T ** 5 / 20, T ** 4 / 8, T ** 3 / 6],
      [T ** 4 / 8, T ** 3 / 3, T ** 2 / 2],
      [T ** 3 / 6, T ** 2 / 2, T],
    ].map((r) => r.map((x) => qn * x));
    const e = ok(processNoise(fromIntsQ(A), fromIntsQ([[qn]]), Q(1, 5), fromIntsQ([[0], [0], [1]])));
    expect(e.exact!.Qd[0][0]).toBe('3/62500'); // 3·(1/5)^5/20 = 3/(3125·20)
    expect(matricesClose(e.Qd, want)).toBe(true);
    expect(e.exact!.Ad).toEqual([['1', '1/5', '1/50'], ['0', '1', '1/5'], ['0', '0', '1']]);
    const f = ok(processNoise(A, [[qn]], T, [[0], [0], [1]]));
    expect(matricesClose(f.Qd, want, 1e-13)).toBe(true);
  });
  it('#19 first-order Gauss–Markov β = 2, σ² = 3, T = 0.25: Ad = e^{−1/2}, Qd = σ²(1 − e^{−2βT}) = 1.896361676485673 (standard result, from memory)', () => {
    const beta = 2;
    const sigma2 = 3;
    const r = ok(processNoise([[-beta]], [[1]], 0.25, [[Math.sqrt(2 * sigma2 * beta)]]));
    expect(closeTo(r.Ad[0][0], 0.60653065971263342)).toBe(true);
    expect(closeTo(r.Qd[0][0], 1.896361676485673, 1e-13)).toBe(true);
  });
  it('property: Qd is symmetric positive semidefinite (it is an integral of M·Mᵀ terms; Van Loan 1978)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -5, max: 5 }), { minLength: 9, maxLength: 9 }),
        fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 6, maxLength: 6 }),
        fc.integer({ min: 1, max: 20 }),
        (xs, gs, tenths) => {
          const A = [xs.slice(0, 3), xs.slice(3, 6), xs.slice(6, 9)].map((r, i) => r.map((x, j) => (i === j ? x - 6 : x) / 2));
          const G = [gs.slice(0, 2), gs.slice(2, 4), gs.slice(4, 6)];
          const r = ok(processNoise(A, [[2, 1], [1, 3]], tenths / 10, G));
          r.Qd.forEach((row, i) => row.forEach((x, j) => expect(x).toBe(r.Qd[j][i])));
          const evd = new EigenvalueDecomposition(new Matrix(r.Qd), { assumeSymmetric: true });
          const scale = Math.max(1e-300, ...evd.realEigenvalues.map(Math.abs));
          // Rounding can push a zero eigenvalue slightly negative: allow 1e-12 of the largest.
          evd.realEigenvalues.forEach((l) => expect(l).toBeGreaterThanOrEqual(-1e-12 * scale));
        },
      ),
      { seed: 1719, numRuns: 80 },
    );
  });
  it('bad input is an error result', () => {
    expect(processNoise([[0, 1]], [[1]], 0.1).ok).toBe(false);
    expect(processNoise([[0]], [[1, 2], [3, 4]], 0.1).ok).toBe(false);
    expect(processNoise([[0, 1], [0, 0]], [[1, 2], [3, 4]], 0.1).ok).toBe(false); // not symmetric
    expect(processNoise([[0]], [[-1]], 0.1).ok).toBe(false);
    expect(processNoise([[0]], [[1]], 0).ok).toBe(false);
  });
});
