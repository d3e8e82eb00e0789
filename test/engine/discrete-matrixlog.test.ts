/**
 * Continuous model from a zero-order-hold model (matrixLog.ts). Sources beside each check.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { continuousFromZoh, equivalentContinuousPoles, type ContinuousFromZohResult, type ContinuousFromZohSuccess } from '../../server/src/engine/matrixLog';
import { discretize } from '../../server/src/engine/discretize';
import { closeTo, relativeError } from '../../server/src/engine/tolerance';

function ok(r: ContinuousFromZohResult): ContinuousFromZohSuccess {
  if (!r.ok) throw new Error(r.reason);
  return r;
}

describe('continuous model from ZOH', () => {
  it('#22 z = 0.89129875425536483 ± 0.15594000045150901j at T = 0.1 gives s = −1 ± j√3, ω_n = 2, ζ = 0.5 (Franklin, Powell & Workman, ch. 4, from memory)', () => {
    const re = 0.89129875425536483;
    const im = 0.15594000045150901;
    const poles = equivalentContinuousPoles([[re, im], [-im, re]], 0.1);
    const s = poles.find((p) => p.z.im > 0)!.s!;
    expect(closeTo(s.re, -1, 1e-12)).toBe(true);
    expect(closeTo(s.im, Math.sqrt(3), 1e-12)).toBe(true);
    const wn = Math.hypot(s.re, s.im);
    expect(closeTo(wn, 2, 1e-12)).toBe(true);
    expect(closeTo(-s.re / wn, 0.5, 1e-12)).toBe(true);
  });
  it('recovers [[0,1],[-4,-2]] and B = [0;1] from its ZOH at T = 0.1 (CHECKS #22 model)', () => {
    const d = discretize({ A: [[0, 1], [-4, -2]], B: [[0], [1]] }, 0.1, 'zoh');
    if (!d.ok) throw new Error(d.error);
    const c = ok(continuousFromZoh(d.Ad, d.Bd, 0.1));
    expect(relativeError(c.A, [[0, 1], [-4, -2]])).toBeLessThan(1e-12);
    expect(relativeError(c.B!, [[0], [1]])).toBeLessThan(1e-12);
    expect(c.residual).toBeLessThan(1e-13);
  });
  it('#13 double integrator Ad = [[1,T],[0,1]], Bd = [[T²/2],[T]] maps back to [[0,1],[0,0]], [0;1] (Franklin, Powell & Workman, ch. 4, from memory)', () => {
    const T = 0.25;
    const c = ok(continuousFromZoh([[1, T], [0, 1]], [[T * T / 2], [T]], T));
    expect(relativeError(c.A, [[0, 1], [0, 0]])).toBeLessThan(1e-13);
    expect(relativeError(c.B!, [[0], [1]])).toBeLessThan(1e-13);
  });
  it('no real logarithm for an eigenvalue on the negative real axis or at 0 (Higham, Functions of Matrices, 2008, Thm 1.31, from memory)', () => {
    const neg = continuousFromZoh([[-0.5, 0], [0, 0.5]], null, 0.1);
    expect(neg.ok).toBe(false);
    if (!neg.ok) expect(neg.reason).toMatch(/negative real axis/);
    const zero = continuousFromZoh([[0, 1], [0, 0]], null, 0.1);
    expect(zero.ok).toBe(false);
    if (!zero.ok) {
      expect(zero.reason).toMatch(/eigenvalue 0/);
      expect(zero.poles.every((p) => p.s === null)).toBe(true);
    }
  });
  it('bad input is a result, not a throw', () => {
    expect(continuousFromZoh([[1, 2]], null, 0.1).ok).toBe(false);
    expect(continuousFromZoh([[1]], [[1], [2]], 0.1).ok).toBe(false);
    expect(continuousFromZoh([[1]], null, 0).ok).toBe(false);
    expect(continuousFromZoh([[Number.NaN]], null, 0.1).ok).toBe(false);
  });
  it('property: ZOH then logarithm returns the original (A, B) for random stable A with real eigenvalues (log(e^{AT}) = AT on the principal strip; Higham 2008 ch. 11, from memory)', () => {
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.integer({ min: -40, max: -1 }), { minLength: 3, maxLength: 3 }),
        fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 3, maxLength: 3 }),
        fc.array(fc.integer({ min: -2, max: 2 }), { minLength: 6, maxLength: 6 }),
        fc.integer({ min: 1, max: 20 }),
        (diag, upper, bs, hundredths) => {
          // A = S·U·S⁻¹ with U upper triangular (eigenvalues diag/4) and S unit lower triangular.
          const U = [[diag[0] / 4, upper[0], upper[1]], [0, diag[1] / 4, upper[2]], [0, 0, diag[2] / 4]];
          const S = [[1, 0, 0], [1, 1, 0], [-1, 2, 1]];
          const Sinv = [[1, 0, 0], [-1, 1, 0], [3, -2, 1]];
          const mm = (a: number[][], b: number[][]) => a.map((r) => b[0].map((_, j) => r.reduce((s, x, k) => s + x * b[k][j], 0)));
          const A = mm(mm(S, U), Sinv);
          // An all-zero B would make Bc trivially right; put a 1 in the corner then.
          const allZero = bs.every((x) => x === 0);
          const B: number[][] = [[allZero ? 1 : bs[0], bs[1]], bs.slice(2, 4), bs.slice(4, 6)];
          const T = hundredths / 100;
          const d = discretize({ A, B }, T, 'zoh');
          if (!d.ok) throw new Error(d.error);
          const c = ok(continuousFromZoh(d.Ad, d.Bd, T));
          expect(relativeError(c.A, A)).toBeLessThan(1e-9);
          expect(relativeError(c.B!, B)).toBeLessThan(1e-9);
        },
      ),
      { seed: 2222, numRuns: 80 },
    );
  });
});
