import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { expm, expmBlock, expmTimes } from '../../server/src/engine/expm';
import { EPS, relativeError } from '../../server/src/engine/tolerance';
import reference from '../reference/expm_reference.json';

const E = Math.E;
/** Accuracy asked of expm on well-conditioned published cases: float64 level, ≤ 1e-13 norm-relative. */
const TIGHT = 1e-13;

function matmul(A: number[][], B: number[][]): number[][] {
  return A.map((row) => B[0].map((_, j) => row.reduce((s, a, k) => s + a * B[k][j], 0)));
}
const identity = (n: number) => Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));

describe('expm on published closed forms', () => {
  it('#1 two real modes (Moler & Van Loan, "Nineteen Dubious Ways to Compute the Exponential of a Matrix", SIAM Review 20(4), 1978, Taylor-series section, from memory; SciPy test_burkardt_4)', () => {
    const ref = [
      [3 * Math.exp(-17) - 2 * Math.exp(-1), 1.5 * (Math.exp(-1) - Math.exp(-17))],
      [4 * Math.exp(-17) - 4 * Math.exp(-1), 3 * Math.exp(-1) - 2 * Math.exp(-17)],
    ];
    expect(relativeError(expm([[-49, 24], [-64, 31]]), ref)).toBeLessThanOrEqual(TIGHT);
    // Printed digits of the same source.
    expect(expm([[-49, 24], [-64, 31]])[0][0]).toBeCloseTo(-0.735759, 6);
  });

  it('#2 companion form, modes -1 and -39 (SciPy expm tests, test_burkardt_3, attributed to Laub)', () => {
    const a = Math.exp(-1);
    const b = Math.exp(-39);
    const ref = [
      [(39 * a - b) / 38, (a - b) / 38],
      [(-39 * (a - b)) / 38, (39 * b - a) / 38],
    ];
    expect(relativeError(expm([[0, 1], [-39, -40]]), ref)).toBeLessThanOrEqual(TIGHT);
  });

  it('#3 rotation with decay, e^{σt}[[cos ωt, sin ωt],[−sin ωt, cos ωt]] (standard identity)', () => {
    const c = Math.exp(-0.5) * Math.cos(1);
    const s = Math.exp(-0.5) * Math.sin(1);
    expect(relativeError(expmTimes([[-1, 2], [-2, -1]], 0.5), [[c, s], [-s, c]])).toBeLessThanOrEqual(TIGHT);
  });

  it('#4 defective 3×3, eigenvalue 16 with a Jordan block (SciPy expm tests, test_burkardt_8)', () => {
    const A = [[21, 17, 6], [-5, -1, -6], [4, 4, 16]];
    for (const t of [0.1, 0.5, 1]) {
      const e4 = Math.exp(4 * t);
      const e16 = Math.exp(16 * t);
      const ref = [
        [((5 + 8 * t) * e16 - e4) / 4, ((5 + 8 * t) * e16 - 5 * e4) / 4, (e16 - e4) / 2],
        [(e4 - (1 + 8 * t) * e16) / 4, (5 * e4 - (1 + 8 * t) * e16) / 4, (e4 - e16) / 2],
        [4 * t * e16, 4 * t * e16, e16],
      ];
      expect(relativeError(expmTimes(A, t), ref)).toBeLessThanOrEqual(TIGHT);
    }
  });

  it('#5 defective non-derogatory 3×3 (Ward, "Numerical computation of the matrix exponential with accuracy estimate", SIAM J. Numer. Anal. 14(4), 1977, example 1, from memory; SciPy test_burkardt_10)', () => {
    const e6 = Math.exp(6);
    const e3 = Math.exp(3);
    const t = 1;
    const ref = [
      [3 * e6 + 6 * e3, 4 * e6 + (6 * t - 4) * e3, 2 * e6 - (6 * t + 2) * e3],
      [3 * e6 - 3 * e3, 4 * e6 + (5 - 3 * t) * e3, 2 * e6 + (3 * t - 2) * e3],
      [3 * e6 - 3 * e3, 4 * e6 - (3 * t + 4) * e3, 2 * e6 + (3 * t + 7) * e3],
    ].map((row) => row.map((x) => x / 9));
    const got = expm([[4, 2, 0], [1, 4, 1], [1, 1, 4]]);
    expect(relativeError(got, ref)).toBeLessThanOrEqual(TIGHT);
    expect(relativeError([got[0]], [[147.86662244637015, 183.76513864636843, 71.797032399996545]])).toBeLessThanOrEqual(TIGHT);
  });

  it('#6 critically damped pair e^{−ωt}[[1+ωt, t],[−ω²t, 1−ωt]] (standard result)', () => {
    const w = 2;
    const t = 0.5;
    const f = Math.exp(-w * t);
    const ref = [[f * (1 + w * t), f * t], [-f * w * w * t, f * (1 - w * t)]];
    expect(relativeError(expmTimes([[0, 1], [-w * w, -2 * w]], t), ref)).toBeLessThanOrEqual(TIGHT);
  });

  it('#7 nilpotent 4×4 (Moler & Van Loan 1978, from memory; SciPy test_burkardt_5)', () => {
    const A = [[0, 6, 0, 0], [0, 0, 6, 0], [0, 0, 0, 6], [0, 0, 0, 0]];
    for (const t of [0.25, 1, 3]) {
      const ref = [[1, 6 * t, 18 * t * t, 36 * t ** 3], [0, 1, 6 * t, 18 * t * t], [0, 0, 1, 6 * t], [0, 0, 0, 1]];
      expect(relativeError(expmTimes(A, t), ref)).toBeLessThanOrEqual(TIGHT);
    }
  });

  it('#8 identity: e^{t}·I, no t·e^{t} term (standard identity)', () => {
    expect(relativeError(expmTimes(identity(2), 2), [[Math.exp(2), 0], [0, Math.exp(2)]])).toBeLessThanOrEqual(TIGHT);
  });

  it('#9 near-defective [[1+ε,1],[0,1−ε]], ε = 2^-52: expm itself stays accurate (Moler & Van Loan 1978, from memory; SciPy test_burkardt_7)', () => {
    const eps = 2 ** -52;
    const got = expm([[1 + eps, 1], [0, 1 - eps]]);
    expect(relativeError(got, [[2.7182818284590458, 2.7182818284590452], [0, 2.7182818284590446]])).toBeLessThanOrEqual(1e-14);
  });

  it('#10 overscaling [[1,b],[0,−1]], b = 1e8: (1,2) = b·sinh 1 (Al-Mohy & Higham, SIAM J. Matrix Anal. Appl. 31(3), 2009, §1, from memory)', () => {
    const got = expm([[1, 1e8], [0, -1]]);
    expect(relativeError(got, [[E, 117520119.36438015], [0, 1 / E]])).toBeLessThanOrEqual(TIGHT);
    expect(Math.abs(got[0][1] - 117520119.36438015) / 117520119.36438015).toBeLessThanOrEqual(TIGHT);
    expect(Math.abs(got[1][1] - 1 / E) * E).toBeLessThanOrEqual(TIGHT);
    // The same matrix made lower triangular goes through the transpose route.
    const lower = expm([[1, 0], [1e8, -1]]);
    expect(relativeError(lower, [[E, 0], [117520119.36438015, 1 / E]])).toBeLessThanOrEqual(TIGHT);
  });
});

describe('expmBlock gives the zero-order hold', () => {
  it('#13 double integrator: Ad = [[1,T],[0,1]], Bd = [[T²/2],[T]] (Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., ch. 4, from memory)', () => {
    const T = 0.3;
    const { Ad, Bd } = expmBlock([[0, 1], [0, 0]], [[0], [1]], T);
    expect(relativeError(Ad, [[1, T], [0, 1]])).toBeLessThanOrEqual(TIGHT);
    expect(relativeError(Bd, [[(T * T) / 2], [T]])).toBeLessThanOrEqual(TIGHT);
  });

  it('#14 first-order lag a = b = 1, T = 0.5, and SciPy cont2discrete test_zoh (A = I, B = 0.5·[1,1]ᵀ)', () => {
    const lag = expmBlock([[-1]], [[1]], 0.5);
    expect(relativeError(lag.Ad, [[0.60653065971263342]])).toBeLessThanOrEqual(TIGHT);
    expect(relativeError(lag.Bd, [[0.39346934028736658]])).toBeLessThanOrEqual(TIGHT);
    const scipyCase = expmBlock(identity(2), [[0.5], [0.5]], 0.5);
    expect(relativeError(scipyCase.Ad, [[1.648721270700128, 0], [0, 1.648721270700128]])).toBeLessThanOrEqual(TIGHT);
    expect(relativeError(scipyCase.Bd, [[0.324360635350064], [0.324360635350064]])).toBeLessThanOrEqual(TIGHT);
  });

  it('several inputs and no inputs', () => {
    const { Ad, Bd } = expmBlock([[-2]], [[1, 4]], 0.25);
    const ad = Math.exp(-0.5);
    expect(relativeError(Ad, [[ad]])).toBeLessThanOrEqual(TIGHT);
    expect(relativeError(Bd, [[(1 - ad) / 2, (4 * (1 - ad)) / 2]])).toBeLessThanOrEqual(TIGHT);
    const none = expmBlock([[-2]], [[]], 0.25);
    expect(none.Bd).toEqual([[]]);
  });
});

describe('expm against 50+-digit mpmath references (test/reference/make_expm_reference.py)', () => {
  for (const [idx, c] of reference.cases.entries()) {
    it(`case ${idx} (${c.kind}, ${c.A.length}×${c.A.length})`, () => {
      // The relative condition number of e^A is at least ‖A‖ (Higham, "Functions of
      // Matrices", SIAM 2008, §10.2, from memory), so stiff cases cannot beat ~u·‖A‖₁ in
      // float64; below that, float64 level (1e-13) is asked.
      const norm1 = Math.max(...c.A[0].map((_, j) => c.A.reduce((s, row) => s + Math.abs(row[j]), 0)));
      const bound = Math.max(TIGHT, 4 * EPS * norm1);
      expect(relativeError(expm(c.A), c.expA)).toBeLessThanOrEqual(bound);
    });
  }
});

describe('expm identities (property tests, seeded)', () => {
  const matrixArb = (n: number, scale: number) =>
    fc.array(fc.array(fc.double({ min: -scale, max: scale, noNaN: true }), { minLength: n, maxLength: n }), { minLength: n, maxLength: n });

  it('e^{A}·e^{−A} = I (common practice identity check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 6 }).chain((n) => matrixArb(n, 2)), (A) => {
        const n = A.length;
        const P = matmul(expm(A), expm(A.map((r) => r.map((x) => -x))));
        // ‖e^A‖·‖e^{-A}‖ bounds the round-off of the product; entries ≤ 2 keep that ≤ ~e^{24}.
        const cond = Math.exp(2 * 2 * n);
        return relativeError(P, identity(n)) <= 1e-15 * cond * n * 10;
      }),
      { seed: 1234, numRuns: 200 },
    );
  });

  it('e^{A(s+t)} = e^{As}·e^{At}', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 5 }).chain((n) => matrixArb(n, 1)),
        fc.double({ min: 0, max: 2, noNaN: true }),
        fc.double({ min: 0, max: 2, noNaN: true }),
        (A, s, t) => relativeError(matmul(expmTimes(A, s), expmTimes(A, t)), expmTimes(A, s + t)) <= 1e-12,
      ),
      { seed: 4321, numRuns: 200 },
    );
  });
});

describe('expm input handling', () => {
  it('rejects non-square and non-finite input with a message', () => {
    expect(() => expm([[1, 2]])).toThrow(/square/);
    expect(() => expm([[NaN]])).toThrow(/finite/);
    expect(() => expmTimes([[1]], Infinity)).toThrow(/finite/);
    expect(() => expmBlock([[1]], [[1], [2]], 0.1)).toThrow(/rows/);
  });
  it('reports overflow instead of returning Infinity', () => {
    expect(() => expm([[800]])).toThrow(RangeError);
  });
  it('empty matrix gives empty matrix', () => {
    expect(expm([])).toEqual([]);
  });
  it('handles n = 200 (dense random, seeded) and agrees with e^{A/2}·e^{A/2}', () => {
    let seed = 7;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) - 0.5;
    const A = Array.from({ length: 200 }, () => Array.from({ length: 200 }, rand));
    const half = expmTimes(A, 0.5);
    expect(relativeError(matmul(half, half), expm(A))).toBeLessThanOrEqual(1e-11);
  });
});

describe('regressions found by fuzzing', () => {
  it('a norm beyond the double range is refused instead of squaring forever', async () => {
    // ‖A‖₁ = 1e308 + 1e308 overflows to Infinity (IEEE 754), so no finite number of squarings exists.
    const { expm } = await import('../../server/src/engine/expm');
    expect(() => expm([[1e308, 1e308], [1e308, 1e308]])).toThrow(RangeError);
  });
});
