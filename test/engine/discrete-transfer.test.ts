/**
 * Transfer functions (transferFunction.ts). Sources beside each check; "SymPy 1.14 / SciPy
 * 1.17.1" marks values computed for this file with those general-purpose libraries
 * (sympy.cancel of C(sI − A)⁻¹B + D; scipy.signal.ss2tf).
 */
import { describe, expect, it } from 'vitest';
import { Q, Rational } from '../../server/src/engine/rational';
import { fromIntsQ } from '../../server/src/engine/matrixQ';
import { transferFunction, type TransferFunctionResult, type TransferFunctionSuccess } from '../../server/src/engine/transferFunction';
import { discretize } from '../../server/src/engine/discretize';
import { closeTo } from '../../server/src/engine/tolerance';

function ok(r: TransferFunctionResult): TransferFunctionSuccess {
  if (!r.ok) throw new Error(r.error);
  return r;
}

describe('transfer function, exact', () => {
  it('companion form [[0,1],[-2,-3]], B = [0;1], C = [1 0]: G = 1/(s² + 3s + 2) (controllable canonical form; K. Ogata, Modern Control Engineering, state-space chapter, from memory)', () => {
    const g = ok(transferFunction({ A: fromIntsQ([[0, 1], [-2, -3]]), B: fromIntsQ([[0], [1]]), C: fromIntsQ([[1, 0]]) }));
    const e = g.entries[0][0];
    expect(e.text).toBe('1/(s^2 + 3s + 2)');
    expect(e.denominator.exact).toEqual(['2', '3', '1']);
    expect(e.poles.map((p) => p.text)).toEqual(['-1', '-2']);
    expect(e.zeros).toEqual([]);
    expect(e.cancelledDegree).toBe(0);
  });
  it('pole–zero cancellation: C = [1 1] gives (s + 1)/((s + 1)(s + 2)) = 1/(s + 2) (same form, from memory); the cancelled mode is unobservable', () => {
    const g = ok(transferFunction({ A: fromIntsQ([[0, 1], [-2, -3]]), B: fromIntsQ([[0], [1]]), C: fromIntsQ([[1, 1]]) }));
    expect(g.entries[0][0].text).toBe('1/(s + 2)');
    expect(g.entries[0][0].cancelledDegree).toBe(1);
  });
  it('2×2 MIMO with feedthrough matches SymPy 1.14 cancel(C(sI − A)⁻¹B + D)', () => {
    const model = {
      A: fromIntsQ([[-1, 2, 0], [0, -3, 1], [1, 0, -2]]),
      B: fromIntsQ([[1, 0], [0, 1], [1, 1]]),
      C: fromIntsQ([[1, 1, 0], [0, 0, 1]]),
      D: [[Q(0), Q(1, 2)], [Q(0), Q(0)]],
    };
    const g = ok(transferFunction(model));
    expect(g.entries[0][0].text).toBe('(s^2 + 6s + 10)/(s^3 + 6s^2 + 11s + 4)');
    // SymPy: (s³ + 8s² + 23s + 22)/(2s³ + 12s² + 22s + 8), made monic in the denominator.
    expect(g.entries[0][1].numerator.exact).toEqual(['11', '23/2', '4', '1/2']);
    expect(g.entries[0][1].denominator.exact).toEqual(['4', '11', '6', '1']);
    expect(g.entries[1][0].text).toBe('(s^2 + 5s + 6)/(s^3 + 6s^2 + 11s + 4)');
    expect(g.entries[1][1].text).toBe('(s^2 + 4s + 5)/(s^3 + 6s^2 + 11s + 4)');
    expect(g.entries[1][0].zeros.map((z) => z.text)).toEqual(['-2', '-3']);
    expect(g.entries[1][1].zeros.map((z) => z.text)).toEqual(['-2+j', '-2-j']);
  });
  it('same model in floats agrees with SciPy 1.17.1 ss2tf', () => {
    const g = ok(
      transferFunction({
        A: [[-1, 2, 0], [0, -3, 1], [1, 0, -2]],
        B: [[1, 0], [0, 1], [1, 1]],
        C: [[1, 1, 0], [0, 0, 1]],
        D: [[0, 0.5], [0, 0]],
      }),
    );
    expect(g.exact).toBe(false);
    const den = [4, 11, 6, 1];
    g.entries[0][0].denominator.coeffs.forEach((c, k) => expect(closeTo(c, den[k], 1e-12)).toBe(true));
    const num01 = [11, 11.5, 4, 0.5]; // ascending; SciPy prints descending [0.5, 4, 11.5, 11]
    g.entries[0][1].numerator.coeffs.forEach((c, k) => expect(closeTo(c, num01[k], 1e-12)).toBe(true));
    expect(g.notes.join(' ')).toMatch(/not cancelled/);
  });
  it('discrete H(z): triangle-hold double integrator at T = 1/2 gives T²(z² + 4z + 1)/(6(z − 1)²) (Franklin, Powell & Workman, 3rd ed., ch. 6, from memory)', () => {
    const d = discretize({ A: fromIntsQ([[0, 1], [0, 0]]), B: fromIntsQ([[0], [1]]), C: fromIntsQ([[1, 0]]), D: fromIntsQ([[0]]) }, Q(1, 2), 'foh');
    if (!d.ok || !d.exact) throw new Error('discretize failed');
    const toQ = (m: string[][]): Rational[][] => m.map((r) => r.map((x) => Rational.parse(x)!));
    const h = ok(transferFunction({ A: toQ(d.exact.Ad), B: toQ(d.exact.Bd!), C: toQ(d.exact.Cd!), D: toQ(d.exact.Dd!) }, 'z'));
    // (1/24)(z² + 4z + 1)/(z² − 2z + 1)
    expect(h.entries[0][0].numerator.exact).toEqual(['1/24', '1/6', '1/24']);
    expect(h.entries[0][0].denominator.exact).toEqual(['1', '-2', '1']);
    expect(h.entries[0][0].text).toBe('((1/24)z^2 + (1/6)z + 1/24)/(z^2 - 2z + 1)');
    expect(h.entries[0][0].poles).toEqual([{ text: '1', re: 1, im: 0, multiplicity: 2 }]);
  });
  it('zero channel and bad shapes', () => {
    const g = ok(transferFunction({ A: fromIntsQ([[-1, 0], [0, -2]]), B: fromIntsQ([[1], [0]]), C: fromIntsQ([[0, 1]]) }));
    expect(g.entries[0][0].text).toBe('0');
    expect(transferFunction({ A: [[1, 2]], B: [[1]], C: [[1]] }).ok).toBe(false);
    expect(transferFunction({ A: [[1]], B: [[1]], C: [[1, 2]] }).ok).toBe(false);
    expect(transferFunction({ A: [[1]], B: [[1]], C: [[1]], D: [[1, 2]] }).ok).toBe(false);
  });
});
