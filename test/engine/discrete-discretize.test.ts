/**
 * Discretization (discretize.ts) against published values.
 * Sources are named beside each check; reference floats marked "SciPy 1.17.1" were computed
 * with scipy.signal.cont2discrete (a general-purpose library) for this file.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { Q, Rational } from '../../server/src/engine/rational';
import { fromIntsQ } from '../../server/src/engine/matrixQ';
import { discretize, type DiscretizeResult, type DiscretizeSuccess } from '../../server/src/engine/discretize';
import { closeTo, matricesClose } from '../../server/src/engine/tolerance';

function ok(r: DiscretizeResult): DiscretizeSuccess {
  if (!r.ok) throw new Error(`expected success, got: ${r.error}`);
  return r;
}

const q = (rows: (number | string)[][]): Rational[][] =>
  rows.map((r) => r.map((x) => (typeof x === 'number' ? Rational.parse(String(x))! : Rational.parse(x)!)));

describe('zero-order hold', () => {
  it('#13 double integrator: Ad = [[1,T],[0,1]], Bd = [[T²/2],[T]] exactly (Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., ch. 4, from memory)', () => {
    const r = ok(discretize({ A: fromIntsQ([[0, 1], [0, 0]]), B: fromIntsQ([[0], [1]]) }, Q(1, 10), 'zoh'));
    expect(r.exact!.Ad).toEqual([['1', '1/10'], ['0', '1']]);
    expect(r.exact!.Bd).toEqual([['1/200'], ['1/10']]);
  });
  it('#13 double integrator with float entries goes through the block exponential and agrees', () => {
    const r = ok(discretize({ A: [[0, 1], [0, 0]], B: [[0], [1]] }, 0.5, 'zoh'));
    expect(r.exact).toBeNull();
    expect(matricesClose(r.Ad, [[1, 0.5], [0, 1]])).toBe(true);
    expect(matricesClose(r.Bd!, [[0.125], [0.5]])).toBe(true);
  });
  it('#14 first-order lag a = b = 1, T = 0.5: Ad = e^{-1/2}, Bd = 1 − e^{-1/2} (standard result; CHECKS #14)', () => {
    const r = ok(discretize({ A: q([[-1]]), B: q([[1]]) }, 0.5, 'zoh'));
    expect(closeTo(r.Ad[0][0], 0.60653065971263342)).toBe(true);
    expect(closeTo(r.Bd![0][0], 0.39346934028736658)).toBe(true);
  });
  it('#14 SciPy cont2discrete test_zoh: A = I₂, B = 0.5·[1,1]ᵀ, T = 0.5', () => {
    const r = ok(discretize({ A: [[1, 0], [0, 1]], B: [[0.5], [0.5]], C: [[0.75, 1], [1, 1], [1, 0.25]], D: [[0], [0], [-0.33]] }, 0.5, 'zoh'));
    expect(matricesClose(r.Ad, [[1.648721270700128, 0], [0, 1.648721270700128]])).toBe(true);
    expect(matricesClose(r.Bd!, [[0.324360635350064], [0.324360635350064]])).toBe(true);
    expect(r.Cd).toEqual([[0.75, 1], [1, 1], [1, 0.25]]);
    expect(r.Dd).toEqual([[0], [0], [-0.33]]);
  });
  it('companion system [[0,1],[-2,-3]], T = 0.1 matches SciPy 1.17.1 cont2discrete zoh', () => {
    const r = ok(discretize({ A: q([[0, 1], [-2, -3]]), B: q([[0], [1]]), C: q([[1, 0]]), D: q([[0]]) }, 0.1, 'zoh'));
    expect(matricesClose(r.Ad, [[0.9909440829939373, 0.0861066649579777], [-0.17221332991595545, 0.7326240881200041]])).toBe(true);
    expect(matricesClose(r.Bd!, [[0.004527958503031356], [0.08610666495797772]])).toBe(true);
  });
  it('#22 ZOH of [[0,1],[-4,-2]] at T = 0.1 has poles 0.891298754… ± 0.155940000…j (Franklin, Powell & Workman, ch. 4, from memory)', () => {
    const r = ok(discretize({ A: q([[0, 1], [-4, -2]]), B: q([[0], [1]]) }, 0.1, 'zoh'));
    const evd = new EigenvalueDecomposition(new Matrix(r.Ad));
    const re = evd.realEigenvalues;
    const im = evd.imaginaryEigenvalues.map(Math.abs);
    expect(closeTo(re[0], 0.89129875425536483, 1e-13)).toBe(true);
    expect(closeTo(im[0], 0.15594000045150901, 1e-13)).toBe(true);
    expect(closeTo(Math.hypot(re[0], im[0]), 0.90483741803595957, 1e-13)).toBe(true);
  });
  it('property: eigenvalues of Ad are e^{λT} (standard identity: e^{AT} has eigenvalues e^{λT})', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -9, max: -1 }), { minLength: 3, maxLength: 3 }),
        fc.array(fc.integer({ min: -2, max: 2 }), { minLength: 3, maxLength: 3 }),
        fc.integer({ min: 1, max: 9 }),
        (diag, upper, tenths) => {
          // Upper triangular: the eigenvalues are the diagonal (distinct or not).
          const A = [[diag[0], upper[0], upper[1]], [0, diag[1], upper[2]], [0, 0, diag[2]]];
          const T = tenths / 10;
          const r = ok(discretize({ A: A.map((row) => row.map((x) => x + 0)), B: [[1], [0], [1]] }, T, 'zoh'));
          const got = new EigenvalueDecomposition(new Matrix(r.Ad)).realEigenvalues.slice().sort((a, b) => a - b);
          const want = diag.map((l) => Math.exp(l * T)).sort((a, b) => a - b);
          // Repeated eigenvalues of a defective Ad are computed to about √ε only.
          got.forEach((z, i) => expect(Math.abs(z - want[i])).toBeLessThan(1e-6));
        },
      ),
      { seed: 1306, numRuns: 60 },
    );
  });
});

describe('Tustin (SciPy generalized bilinear convention, α = ½)', () => {
  it('#15 SciPy cont2discrete test_bilinear, exact over Q', () => {
    const r = ok(discretize({ A: q([[1, 0], [0, 1]]), B: q([[0.5], [0.5]]), C: q([[0.75, 1], [1, 1], [1, 0.25]]), D: q([[0], [0], [-0.33]]) }, 0.5, 'tustin'));
    expect(r.exact!.Ad).toEqual([['5/3', '0'], ['0', '5/3']]);
    expect(r.exact!.Bd).toEqual([['1/3'], ['1/3']]);
    expect(r.exact!.Cd).toEqual([['1', '4/3'], ['4/3', '4/3'], ['4/3', '1/3']]);
    // Dd = D + C·Bd/2: −0.33 + (1 + 1/4)/3/2 = −0.33 + 5/24 = −73/600 = −0.121666…
    expect(r.exact!.Dd).toEqual([['7/24'], ['1/3'], ['-73/600']]);
    expect(r.convention).toContain('(I − AT/2)⁻¹');
  });
  it('#16 scalar lag a = b = c = 1, d = 0, T = 0.1: 19/21, 2/21, 20/21, 1/21 (CHECKS #16)', () => {
    const r = ok(discretize({ A: q([[-1]]), B: q([[1]]), C: q([[1]]), D: q([[0]]) }, 0.1, 'tustin'));
    expect(r.exact).toEqual({ Ad: [['19/21']], Bd: [['2/21']], Cd: [['20/21']], Dd: [['1/21']] });
  });
  it('float input agrees with SciPy 1.17.1 bilinear on [[0,1],[-2,-3]], T = 0.1', () => {
    const r = ok(discretize({ A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]], D: [[0]] }, 0.1, 'tustin'));
    expect(r.exact).toBeNull();
    expect(matricesClose(r.Ad, [[0.9913419913419913, 0.08658008658008659], [-0.17316017316017318, 0.7316017316017317]])).toBe(true);
    expect(matricesClose(r.Bd!, [[0.004329004329004331], [0.0865800865800866]])).toBe(true);
    expect(matricesClose(r.Cd!, [[0.9956709956709957, 0.0432900432900433]])).toBe(true);
    expect(closeTo(r.Dd![0][0], 0.0021645021645021654)).toBe(true);
  });
  it('singular I − AT/2 (A has the eigenvalue 2/T) is an error result, not a throw', () => {
    const r = discretize({ A: q([[20]]), B: q([[1]]) }, 0.1, 'tustin');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatch(/singular/);
    const f = discretize({ A: [[20]], B: [[1]] }, 0.1, 'tustin');
    expect(f.ok).toBe(false);
  });
  it('pre-warping: the pole s = jω0 maps to z = e^{jω0T} exactly (Franklin, Powell & Workman, ch. 6, from memory)', () => {
    const w0 = 30;
    const T = 0.05;
    const r = ok(discretize({ A: [[0, w0], [-w0, 0]], B: [[0], [1]] }, T, 'tustin', { prewarp: w0 }));
    const evd = new EigenvalueDecomposition(new Matrix(r.Ad));
    const angle = Math.abs(Math.atan2(evd.imaginaryEigenvalues[0], evd.realEigenvalues[0]));
    expect(closeTo(angle, w0 * T, 1e-12)).toBe(true);
    // Without pre-warping the angle is 2·atan(ω0T/2) < ω0T and a caveat says so.
    const plain = ok(discretize({ A: [[0, w0], [-w0, 0]], B: [[0], [1]] }, T, 'tustin'));
    const e2 = new EigenvalueDecomposition(new Matrix(plain.Ad));
    expect(closeTo(Math.abs(Math.atan2(e2.imaginaryEigenvalues[0], e2.realEigenvalues[0])), 2 * Math.atan((w0 * T) / 2), 1e-12)).toBe(true);
    expect(plain.caveats.join(' ')).toMatch(/compresses/);
  });
  it('pre-warping at or above Nyquist is refused', () => {
    expect(discretize({ A: [[-1]], B: [[1]] }, 0.1, 'tustin', { prewarp: 40 }).ok).toBe(false);
    expect(discretize({ A: [[-1]], B: [[1]] }, 0.1, 'zoh', { prewarp: 4 }).ok).toBe(false);
  });
  it('property: Tustin maps every stable A to a Schur-stable Ad (bilinear map sends Re s < 0 into |z| < 1; standard result, from memory)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 9, maxLength: 9 }), fc.integer({ min: 1, max: 50 }), (xs, hundredths) => {
        const M = [xs.slice(0, 3), xs.slice(3, 6), xs.slice(6, 9)];
        // Shift to make it stable: A = M − (ρ(M) + 1)·I.
        const rho = Math.max(...new EigenvalueDecomposition(new Matrix(M)).realEigenvalues);
        const shift = Math.ceil(rho) + 1;
        const A = M.map((row, i) => row.map((x, j) => x - (i === j ? shift : 0)));
        const r = ok(discretize({ A: fromIntsQ(A), B: fromIntsQ([[1], [0], [0]]) }, Q(hundredths, 100), 'tustin'));
        const evd = new EigenvalueDecomposition(new Matrix(r.Ad));
        evd.realEigenvalues.forEach((re, i) => expect(Math.hypot(re, evd.imaginaryEigenvalues[i])).toBeLessThan(1));
      }),
      { seed: 1516, numRuns: 60 },
    );
  });
});

describe('Euler methods', () => {
  it('forward Euler Ad = I + AT, Bd = BT, exact; matches SciPy 1.17.1 euler', () => {
    const r = ok(discretize({ A: q([[0, 1], [-2, -3]]), B: q([[0], [1]]), C: q([[1, 0]]) }, 0.1, 'euler'));
    expect(r.exact!.Ad).toEqual([['1', '1/10'], ['-1/5', '7/10']]);
    expect(r.exact!.Bd).toEqual([['0'], ['1/10']]);
  });
  it('forward Euler caveat: a stable pole λ = −30 at T = 0.1 maps to z = −2 (outside the unit circle; z = 1 + λT, standard result)', () => {
    const r = ok(discretize({ A: q([[-30]]), B: q([[1]]) }, 0.1, 'euler'));
    expect(r.exact!.Ad).toEqual([['-2']]);
    expect(r.caveats.length).toBe(1);
    expect(r.caveats[0]).toMatch(/outside the unit circle/);
    const fine = ok(discretize({ A: q([[-3]]), B: q([[1]]) }, 0.1, 'euler'));
    expect(fine.caveats).toEqual([]);
  });
  it('backward Euler matches SciPy 1.17.1 backward_diff (same Cd, Dd convention)', () => {
    const r = ok(discretize({ A: q([[0, 1], [-2, -3]]), B: q([[0], [1]]), C: q([[1, 0]]), D: q([[0]]) }, 0.1, 'backward-euler'));
    expect(matricesClose(r.Ad, [[0.9848484848484849, 0.07575757575757576], [-0.15151515151515152, 0.7575757575757576]])).toBe(true);
    expect(matricesClose(r.Bd!, [[0.007575757575757576], [0.07575757575757576]])).toBe(true);
    expect(matricesClose(r.Cd!, [[0.9848484848484849, 0.07575757575757576]])).toBe(true);
    expect(closeTo(r.Dd![0][0], 0.007575757575757576)).toBe(true);
    expect(r.exact!.Ad[0][0]).toBe('65/66');
  });
  it('backward Euler caveat: an unstable pole λ = 30 at T = 0.1 maps inside the unit circle (z = 1/(1 − λT) = −1/2)', () => {
    const r = ok(discretize({ A: q([[30]]), B: q([[1]]) }, 0.1, 'backward-euler'));
    expect(r.exact!.Ad).toEqual([['-1/2']]);
    expect(r.caveats[0]).toMatch(/looks stable/);
  });
});

describe('first-order (triangle) hold', () => {
  it('double integrator: Bd = [[T²],[T]], Dd = T²/6, i.e. H(z) = T²(z²+4z+1)/(6(z−1)²) (Franklin, Powell & Workman, 3rd ed., ch. 6, from memory)', () => {
    const r = ok(discretize({ A: fromIntsQ([[0, 1], [0, 0]]), B: fromIntsQ([[0], [1]]), C: fromIntsQ([[1, 0]]), D: fromIntsQ([[0]]) }, Q(1, 2), 'foh'));
    expect(r.exact!.Ad).toEqual([['1', '1/2'], ['0', '1']]);
    expect(r.exact!.Bd).toEqual([['1/4'], ['1/2']]);
    expect(r.exact!.Dd).toEqual([['1/24']]);
    const f = ok(discretize({ A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]], D: [[0]] }, 0.5, 'foh'));
    expect(matricesClose(f.Bd!, [[0.25], [0.5]])).toBe(true);
    expect(closeTo(f.Dd![0][0], 1 / 24)).toBe(true);
  });
  it('matches SciPy 1.17.1 cont2discrete foh on [[0,1],[-2,-3]], T = 0.1', () => {
    const r = ok(discretize({ A: q([[0, 1], [-2, -3]]), B: q([[0], [1]]), C: q([[1, 0]]), D: q([[0]]) }, 0.1, 'foh'));
    expect(matricesClose(r.Ad, [[0.9909440829939373, 0.0861066649579777], [-0.17221332991595545, 0.7326240881200041]])).toBe(true);
    expect(matricesClose(r.Bd!, [[0.008412820361438164], [0.0737335293377508]], 1e-13)).toBe(true);
    expect(closeTo(r.Dd![0][0], 0.0015472976646410844, 1e-13)).toBe(true);
  });
});

describe('bad input', () => {
  it('gives clear errors, never throws', () => {
    expect(discretize({ A: [[1, 2]], B: [[1]] }, 0.1, 'zoh')).toMatchObject({ ok: false, error: expect.stringMatching(/square/) });
    expect(discretize({ A: [[1]], B: [[1], [2]] }, 0.1, 'zoh')).toMatchObject({ ok: false, error: expect.stringMatching(/rows/) });
    expect(discretize({ A: [[1]], B: [[1]] }, -1, 'zoh')).toMatchObject({ ok: false });
    expect(discretize({ A: [[1]], B: [[1]] }, Number.NaN, 'tustin')).toMatchObject({ ok: false });
    expect(discretize({ A: [[Number.POSITIVE_INFINITY]], B: [[1]] }, 0.1, 'zoh')).toMatchObject({ ok: false });
    // e^{1000} overflows a double.
    const big = discretize({ A: [[1000]], B: [[1]] }, 1, 'zoh');
    expect(big.ok).toBe(false);
  });
});
