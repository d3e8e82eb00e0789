// Discretization through `eigenlens check --period T --discretize … --format json`, against
// published values. The matrices are written in source files as a user would write them.
import { describe, expect, it } from 'vitest';
import { cliJson, normRelError } from '../support/jsonTerms';

function stateOf(json: any): any {
  const m = json.files[0].matrices.find((x: any) => x.role === 'state');
  expect(m).toBeTruthy();
  return m;
}

describe('zero-order hold', () => {
  it('double integrator', () => {
    // Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., ch. 4 (from memory):
    // Ad = [[1,T],[0,1]], Bd = [[T²/2],[T]].
    const T = 0.25;
    const m = stateOf(cliJson('A = [[0, 1], [0, 0]]\nB = [[0], [1]]\n', '.py', ['--period', String(T), '--discretize', 'zoh']));
    expect(m.discrete.method).toBe('zoh');
    expect(m.discrete.period).toBe(T);
    expect(normRelError(m.discrete.Ad, [[1, T], [0, 1]])).toBeLessThan(1e-15);
    expect(normRelError(m.discrete.Bd, [[T * T / 2], [T]])).toBeLessThan(1e-15);
  });

  it('first-order lag and the SciPy cont2discrete case', () => {
    // Standard result Ad = e^{−aT}, Bd = (b/a)(1 − e^{−aT}); a = b = 1, T = 0.5.
    const m = stateOf(cliJson('A = [[-1]]\nB = [[1]]\n', '.py', ['--period', '0.5']));
    expect(m.discrete.Ad[0][0]).toBeCloseTo(0.60653065971263342, 15);
    expect(m.discrete.Bd[0][0]).toBeCloseTo(0.39346934028736658, 15);
    // SciPy cont2discrete tests (test_zoh): A = I₂, B = 0.5·[1,1]ᵀ, T = 0.5.
    const s = stateOf(cliJson('A = [[1, 0], [0, 1]]\nB = [[0.5], [0.5]]\n', '.py', ['--period', '0.5', '--discretize', 'zoh']));
    expect(normRelError(s.discrete.Ad, [[1.648721270700128, 0], [0, 1.648721270700128]])).toBeLessThan(1e-15);
    expect(normRelError(s.discrete.Bd, [[0.324360635350064], [0.324360635350064]])).toBeLessThan(1e-15);
  });
});

describe('Tustin (bilinear, α = ½ convention of SciPy)', () => {
  it('SciPy cont2discrete test_bilinear case, exact', () => {
    // SciPy cont2discrete tests (test_bilinear): Ad = (5/3)I, Bd = [[1/3],[1/3]],
    // Cd = [[1,4/3],[4/3,4/3],[4/3,1/3]], Dd = [[7/24],[1/3],[−0.121666…]].
    const src = [
      'A = [[1, 0], [0, 1]]',
      'B = [[0.5], [0.5]]',
      'C = [[0.75, 1], [1, 1], [1, 0.25]]',
      'D = [[0], [0], [-0.33]]',
      '',
    ].join('\n');
    const m = stateOf(cliJson(src, '.py', ['--period', '0.5', '--discretize', 'tustin']));
    const d = m.discrete;
    expect(d.method).toBe('tustin');
    expect(d.exact.Ad).toEqual([['5/3', '0'], ['0', '5/3']]);
    expect(d.exact.Bd).toEqual([['1/3'], ['1/3']]);
    expect(d.exact.Cd).toEqual([['1', '4/3'], ['4/3', '4/3'], ['4/3', '1/3']]);
    expect(d.exact.Dd[0][0]).toBe('7/24');
    expect(d.exact.Dd[1][0]).toBe('1/3');
    expect(d.Dd[2][0]).toBeCloseTo(-0.12166666666666667, 15);
  });

  it('scalar lag', () => {
    // a = b = c = 1, d = 0, T = 0.1 ⇒ Ad = 19/21, Bd = 2/21, Cd = 20/21, Dd = 1/21 (CHECKS, check 16; exact).
    const m = stateOf(cliJson('const A = [[-1]];\nconst B = [[1]];\nconst C = [[1]];\nconst D = [[0]];\n', '.ts', ['--period', '0.1', '--discretize', 'tustin']));
    expect(m.discrete.exact).toMatchObject({ Ad: [['19/21']], Bd: [['2/21']], Cd: [['20/21']], Dd: [['1/21']] });
  });
});

describe('forward Euler', () => {
  it('Ad = I + AT, Bd = BT exactly', () => {
    // Definition of the forward-difference approximation x_{k+1} = x_k + T(Ax_k + Bu_k).
    const m = stateOf(cliJson('A = [[0, 1], [-4, -2]]\nB = [[0], [1]]\n', '.py', ['--period', '0.1', '--discretize', 'euler']));
    expect(m.discrete.exact.Ad).toEqual([['1', '1/10'], ['-2/5', '4/5']]);
    expect(m.discrete.exact.Bd).toEqual([['0'], ['1/10']]);
  });
});

describe('process noise by Van Loan', () => {
  it('white-noise acceleration model', () => {
    // Van Loan, "Computing integrals involving the matrix exponential", IEEE TAC AC-23(3), 1978;
    // Bar-Shalom, Li & Kirubarajan, Estimation with Applications to Tracking and Navigation, 2001,
    // §6.2.2 (from memory): Qd = q[[T³/3, T²/2],[T²/2, T]]; q = 2, T = 0.5 ⇒ [[1/12, 1/4],[1/4, 1]].
    const src = 'A = [[0, 1], [0, 0]]\nB = [[0], [1]]\nG = [[0], [1]]\nQ = [[2]]\n';
    const m = stateOf(cliJson(src, '.py', ['--period', '0.5', '--discretize', 'zoh']));
    expect(normRelError(m.discrete.Qd, [[1 / 12, 0.25], [0.25, 1]])).toBeLessThan(1e-14);
  });
});

describe('sample-period advice', () => {
  it('an aliased oscillatory mode is reported on the state matrix', () => {
    // Common practice (CHECKS, check 25): a mode with |Im λ|·T ≥ π is aliased. λ = ±j10, T = 0.5 ⇒ 5 ≥ π.
    const m = stateOf(cliJson('A = [[0, 1], [-100, 0]]\nB = [[0], [1]]\n', '.py', ['--period', '0.5']));
    expect(m.diagnostics.map((d: any) => d.code)).toContain('aliasing');
  });
});

describe('controllability through the CLI', () => {
  it('Kalman rank test on the double integrator', () => {
    // Kalman rank test (CHECKS, check 20): B = [[0],[1]] controllable, B = [[1],[0]] not; C = [0,1] not observable.
    const good = cliJson('A = [[0, 1], [0, 0]]\nB = [[0], [1]]\nC = [[1, 0]]\n', '.py');
    expect(good.files[0].matrices.flatMap((m: any) => m.diagnostics.map((d: any) => d.code))).not.toContain('uncontrollable-mode');
    const bad = cliJson('A = [[0, 1], [0, 0]]\nB = [[1], [0]]\nC = [[0, 1]]\n', '.py');
    const b = bad.files[0].matrices.find((m: any) => m.name === 'B');
    const c = bad.files[0].matrices.find((m: any) => m.name === 'C');
    expect(b.diagnostics.map((d: any) => d.code)).toContain('uncontrollable-mode');
    expect(c.diagnostics.map((d: any) => d.code)).toContain('unobservable-mode');
  });
});

describe('the reverse of zero-order hold', () => {
  it('a discrete model typed in code gives back the continuous model it samples', () => {
    // CHECKS check 22 (Franklin, Powell & Workman, ch. 4, from memory): the ZOH of [[0,1],[−4,−2]]
    // at T = 0.1. Round trip: ZOH through the CLI, then the discrete matrices in a new file.
    const forward = stateOf(cliJson('A = [[0, 1], [-4, -2]]\nB = [[0], [1]]\n', '.py', ['--period', '0.1', '--discretize', 'zoh']));
    const { Ad, Bd } = forward.discrete;
    const src = `# eigenlens: discrete period=0.1\nA_d = ${JSON.stringify(Ad)}\nB_d = ${JSON.stringify(Bd)}\n`;
    const back = stateOf(cliJson(src, '.py'));
    expect(normRelError(back.model.continuousEquivalent.A, [[0, 1], [-4, -2]])).toBeLessThan(1e-12);
    expect(normRelError(back.model.continuousEquivalent.B, [[0], [1]])).toBeLessThan(1e-12);
  });

  it('says why there is none for a negative real eigenvalue', () => {
    // e^{λT} > 0 for real λ, so z = −1/2 is no zero-order hold of a real first-order model (standard fact).
    const back = stateOf(cliJson('# eigenlens: discrete period=0.1\nA = [[-0.5]]\n', '.py'));
    expect(back.model.continuousEquivalent.error).toMatch(/negative/);
  });
});
