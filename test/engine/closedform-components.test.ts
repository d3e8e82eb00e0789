/**
 * Component matrices Z_{λ,k} = (A − λI)^k·P_λ (componentMatrices.ts), checked by the
 * identities that define them (Horn & Johnson, Topics in Matrix Analysis, §6.1, from memory;
 * Higham, Functions of Matrices, 2008, §1.2, from memory):
 *   Σ_λ P_λ = I,  P_λ² = P_λ,  A·Z_{λ,k} = λ·Z_{λ,k} + Z_{λ,k+1},  Z_{λ,m} = 0,
 * exactly over Q(√d) and, for the numeric path, to DEFAULT_REL·‖A‖ (tolerance.ts).
 */
import { describe, expect, it } from 'vitest';
import { Rational, Q } from '../../server/src/engine/rational';
import { QuadField, type QuadElement } from '../../server/src/engine/quadField';
import {
  exactComponentMatrices,
  integerPowers,
  numericComponentMatrices,
  complexMatMul,
  type ComplexMatrix,
} from '../../server/src/engine/componentMatrices';
import { DEFAULT_REL } from '../../server/src/engine/tolerance';

type FMatrix = QuadElement[][];

function toField(F: QuadField, X: Rational[][], Y: Rational[][]): FMatrix {
  return X.map((row, r) => row.map((x, c) => F.elem(x, Y[r][c])));
}
function mulF(F: QuadField, a: FMatrix, b: FMatrix): FMatrix {
  return a.map((row) => b[0].map((_, j) => row.reduce((acc, x, k) => F.add(acc, F.mul(x, b[k][j])), F.zero)));
}
function eqF(F: QuadField, a: FMatrix, b: FMatrix): boolean {
  return a.every((row, r) => row.every((x, c) => F.eq(x, b[r][c])));
}
function liftF(F: QuadField, A: Rational[][]): FMatrix {
  return A.map((row) => row.map((x) => F.fromRational(x)));
}

/** ψ(x) = Π (x − λ_i)^{m_i} over Q for rational roots, ascending coefficients. */
function polyFromRationalRoots(roots: [Rational, number][]): Rational[] {
  let p = [Rational.ONE];
  for (const [l, m] of roots) for (let i = 0; i < m; i++) {
    const next = new Array<Rational>(p.length + 1).fill(Rational.ZERO);
    p.forEach((c, k) => {
      next[k + 1] = next[k + 1].add(c);
      next[k] = next[k].sub(c.mul(l));
    });
    p = next;
  }
  return p;
}

describe('exact component matrices', () => {
  it('defective #4 matrix (SciPy test_burkardt_8): projectors sum to I, are idempotent, and the chain closes', () => {
    const A = [[21, 17, 6], [-5, -1, -6], [4, 4, 16]].map((r) => r.map((x) => Q(x)));
    const F = QuadField.RATIONALS;
    const psi = polyFromRationalRoots([[Q(16), 2], [Q(4), 1]]);
    const powers = integerPowers(A, psi.length - 1);
    const AF = liftF(F, A);
    let sum: FMatrix = A.map((row) => row.map(() => F.zero));
    for (const [lambda, m] of [[Q(16), 2], [Q(4), 1]] as [Rational, number][]) {
      const { X, Y } = exactComponentMatrices(psi, { field: F, lambda: F.fromRational(lambda), m }, powers, 3);
      const Z = X.map((Xk, k) => toField(F, Xk, Y[k]));
      expect(eqF(F, mulF(F, Z[0], Z[0]), Z[0])).toBe(true);
      for (let k = 0; k < m; k++) {
        const next = k + 1 < m ? Z[k + 1] : A.map((row) => row.map(() => F.zero));
        const lhs = mulF(F, AF, Z[k]);
        const rhs = Z[k].map((row, r) => row.map((x, c) => F.add(F.mul(F.fromRational(lambda), x), next[r][c])));
        expect(eqF(F, lhs, rhs)).toBe(true);
      }
      sum = sum.map((row, r) => row.map((x, c) => F.add(x, Z[0][r][c])));
    }
    expect(eqF(F, sum, liftF(F, [[1, 0, 0], [0, 1, 0], [0, 0, 1]].map((r) => r.map((x) => Q(x)))))).toBe(true);
  });

  it('Fibonacci matrix over Q(√5): P_φ + P_ψ = I and A·P_φ = φ·P_φ (Knuth, TAOCP vol. 1, §1.2.8, from memory)', () => {
    const A = [[Q(1), Q(1)], [Q(1), Q(0)]];
    const F = new QuadField(5n);
    const psi = [Q(-1), Q(-1), Q(1)]; // x² − x − 1
    const powers = integerPowers(A, 2);
    const phi = F.elem(Q(1, 2), Q(1, 2));
    const { X, Y } = exactComponentMatrices(psi, { field: F, lambda: phi, m: 1 }, powers, 2);
    const P = toField(F, X[0], Y[0]);
    const Pconj = P.map((row) => row.map((x) => F.conj(x)));
    const sum = P.map((row, r) => row.map((x, c) => F.add(x, Pconj[r][c])));
    expect(eqF(F, sum, [[F.one, F.zero], [F.zero, F.one]])).toBe(true);
    expect(eqF(F, mulF(F, liftF(F, A), P), P.map((row) => row.map((x) => F.mul(phi, x))))).toBe(true);
    // P_φ = (A − ψI)/(φ − ψ) = (A − ψI)/√5: entry (1,2) is 1/√5 = √5/5.
    expect(F.toText(P[0][1])).toBe('√5/5');
  });

  it('rejects a root whose stated exponent does not divide ψ', () => {
    const A = [[Q(2)]];
    const F = QuadField.RATIONALS;
    expect(() => exactComponentMatrices([Q(-2), Q(1)], { field: F, lambda: F.fromRational(Q(2)), m: 2 }, integerPowers(A, 1), 1)).toThrow(RangeError);
  });
});

describe('numeric component matrices', () => {
  const close = (a: ComplexMatrix, b: ComplexMatrix, scale: number): boolean =>
    a.every((row, r) => row.every((x, c) => Math.hypot(x.re - b[r][c].re, x.im - b[r][c].im) <= DEFAULT_REL * scale));

  it('rotation [[−1, 2], [−2, −1]] with λ = −1 ± 2j: P₊ + P₋ = I and A·P₊ = λ₊·P₊ (standard identity)', () => {
    const A = [[-1, 2], [-2, -1]];
    const roots = [{ lambda: { re: -1, im: 2 }, m: 1 }, { lambda: { re: -1, im: -2 }, m: 1 }];
    const [Pp] = numericComponentMatrices(A, roots, 0);
    const [Pm] = numericComponentMatrices(A, roots, 1);
    const I: ComplexMatrix = [[{ re: 1, im: 0 }, { re: 0, im: 0 }], [{ re: 0, im: 0 }, { re: 1, im: 0 }]];
    expect(close(Pp.map((row, r) => row.map((x, c) => ({ re: x.re + Pm[r][c].re, im: x.im + Pm[r][c].im }))), I, 1)).toBe(true);
    const Ac: ComplexMatrix = A.map((row) => row.map((x) => ({ re: x, im: 0 })));
    const lhs = complexMatMul(Ac, Pp);
    const rhs = Pp.map((row) => row.map((x) => ({ re: -x.re - 2 * x.im, im: -x.im + 2 * x.re })));
    expect(close(lhs, rhs, 3)).toBe(true);
  });

  it('defective #4 matrix numerically: Z_{16,1} = (A − 16I)·P_16 and the corner entry of Z_{16,1} is 4 (SciPy test_burkardt_8)', () => {
    const A = [[21, 17, 6], [-5, -1, -6], [4, 4, 16]];
    const roots = [{ lambda: { re: 16, im: 0 }, m: 2 }, { lambda: { re: 4, im: 0 }, m: 1 }];
    const Z = numericComponentMatrices(A, roots, 0);
    expect(Z.length).toBe(2);
    // From the source's closed form: the t·e^{16t} coefficient of entry (3,1) is 4.
    expect(Math.abs(Z[1][2][0].re - 4)).toBeLessThanOrEqual(DEFAULT_REL * 64);
  });
});
