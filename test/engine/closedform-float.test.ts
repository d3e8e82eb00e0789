/**
 * The numeric path of the closed form through the real float pipeline
 * floatSpectrum → transitionClosedForm (number[][] input). Expected values are computed from
 * each source's formula with Math.exp etc., never from our own code.
 *
 * Tolerance: relativeError (tolerance.ts, Frobenius-norm-relative) ≤ DEFAULT_REL ≈ 1.4e-14
 * for simple, well-separated eigenvalues. For a defective eigenvalue the float spectrum gives
 * the cluster mean, accurate to ~SPECTRUM_BACKWARD_ERROR·‖A‖ (tolerance.ts), which enters
 * t·e^{λt} terms as a relative error of about δλ·t: there 1e-9 is used.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { floatSpectrum } from '../../server/src/engine/spectrumFloat';
import { transitionClosedForm } from '../../server/src/engine/closedForm';
import { evaluateTransition } from '../../server/src/engine/transitionEval';
import { expmTimes } from '../../server/src/engine/expm';
import { DEFAULT_REL, relativeError } from '../../server/src/engine/tolerance';

const DEFECTIVE_REL = 1e-9;

function closedFloat(A: number[][], domain: 'continuous' | 'discrete' = 'continuous') {
  return transitionClosedForm(A, floatSpectrum(A), domain);
}

describe('numeric closed form (float input)', () => {
  it('#1 two real modes (Moler & Van Loan, "Nineteen Dubious Ways…", SIAM Review 20(4), 1978, from memory; SciPy test_burkardt_4)', () => {
    const cf = closedFloat([[-49, 24], [-64, 31]]);
    expect(cf.exactCoefficients).toBe(false);
    expect(cf.entries[0][0].every((t) => t.exact === undefined)).toBe(true);
    const at1 = [[-0.73575875814475308, 0.5518190996580977], [-1.4715175990882605, 1.1036382407155726]];
    expect(relativeError(evaluateTransition(cf, 1), at1)).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
    expect(cf.check.reference).toBe('double');
  });

  it('#3 rotation with decay as a numeric complex pair gives one cos/sin term per entry (standard identity)', () => {
    const cf = closedFloat([[-1, 2], [-2, -1]]);
    expect(cf.entries.flat().map((ts) => ts.length)).toEqual([1, 1, 1, 1]);
    const at = [[0.32770991402245983, 0.51037795154457281], [-0.51037795154457281, 0.32770991402245983]];
    expect(relativeError(evaluateTransition(cf, 0.5), at)).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#6 critically damped pair (defective, numeric cluster) e^{−2t}[[1+2t, t], [−4t, 1−2t]] (standard result)', () => {
    const cf = closedFloat([[0, 1], [-4, -4]]);
    const at = [[0.73575888234288464, 0.18393972058572116], [-0.73575888234288464, 0]];
    expect(relativeError(evaluateTransition(cf, 0.5), at)).toBeLessThanOrEqual(DEFECTIVE_REL);
    // The t·e^{−2t} term is present: power 1 in entry (1,2).
    expect(cf.entries[0][1].some((t) => 'power' in t && t.power === 1)).toBe(true);
    expect(cf.check.passed).toBe(true);
  });

  it('#4 defective 3×3 in doubles (SciPy expm tests, test_burkardt_8)', () => {
    const cf = closedFloat([[21, 17, 6], [-5, -1, -6], [4, 4, 16]]);
    const t = 0.25;
    const a = Math.exp(4 * t);
    const b = Math.exp(16 * t);
    const ref = [
      [((5 + 8 * t) * b - a) / 4, ((5 + 8 * t) * b - 5 * a) / 4, (b - a) / 2],
      [(a - (1 + 8 * t) * b) / 4, (5 * a - (1 + 8 * t) * b) / 4, (a - b) / 2],
      [4 * t * b, 4 * t * b, b],
    ];
    expect(relativeError(evaluateTransition(cf, t), ref)).toBeLessThanOrEqual(DEFECTIVE_REL);
  });

  it('#7 nilpotent in doubles: the float zero eigenvalue gives exact polynomial terms and at-k terms (Moler & Van Loan 1978, from memory)', () => {
    const A = [[0, 6, 0, 0], [0, 0, 6, 0], [0, 0, 0, 6], [0, 0, 0, 0]];
    const cont = closedFloat(A);
    const t = 1.5;
    const ref = [[1, 6 * t, 18 * t ** 2, 36 * t ** 3], [0, 1, 6 * t, 18 * t ** 2], [0, 0, 1, 6 * t], [0, 0, 0, 1]];
    expect(relativeError(evaluateTransition(cont, t), ref)).toBeLessThanOrEqual(DEFAULT_REL);
    const disc = closedFloat(A, 'discrete');
    expect(disc.entries[0][3].map((x) => ('at' in x ? [x.at, x.coef] : null))).toEqual([[3, 216]]);
  });

  it('#12 Fibonacci powers in doubles (Knuth, TAOCP vol. 1, §1.2.8, from memory)', () => {
    const cf = closedFloat([[1, 1], [1, 0]], 'discrete');
    expect(relativeError(evaluateTransition(cf, 10), [[89, 55], [55, 34]])).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#9 near-defective in doubles: the float spectrum clusters 1 ± 2⁻⁵² into a Jordan block, so the closed form is t·e^t-shaped and accurate (Moler & Van Loan 1978, from memory; SciPy test_burkardt_7)', () => {
    const eps = 2 ** -52;
    const cf = closedFloat([[1 + eps, 1], [0, 1 - eps]]);
    const corner = cf.entries[0][1];
    expect(corner.length).toBe(1);
    expect('power' in corner[0] && corner[0].power === 1).toBe(true);
    expect(relativeError(evaluateTransition(cf, 1), [[2.7182818284590458, 2.7182818284590452], [0, 2.7182818284590446]])).toBeLessThanOrEqual(DEFECTIVE_REL);
    expect(cf.check.passed).toBe(true);
  });

  it('random 1..6 × 1..6 matrices with entries k/8: the check passes and matches expm at t = 0.3 (reference: Padé scaling and squaring, Higham 2005, in expm.ts)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 6 }).chain((n) =>
          fc.array(fc.array(fc.integer({ min: -40, max: 40 }).map((x) => x / 8), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }),
        ),
        (A) => {
          const cf = closedFloat(A);
          expect(cf.check.passed).toBe(true);
          expect(relativeError(evaluateTransition(cf, 0.3), expmTimes(A, 0.3))).toBeLessThanOrEqual(Math.max(1e-12, 64 * 2 ** -52 * cf.conditioning));
        },
      ),
      { seed: 7, numRuns: 150 },
    );
  });
});
