// Hand-built reports for ide/ tests: the closed forms are the published ones named beside
// each builder, typed in as transition terms, so the ide layer is tested without the engine.
import type { MatrixReport, DocumentReport } from '../../server/src/analysis/report';
import type { ContinuousTerm, DiscreteTerm, Eigenvalue, Mode, TransitionClosedForm } from '../../server/src/engine/types';
import { Rational } from '../../server/src/engine/rational';

export const c = (coef: number, rate: number, power = 0, freq = 0, wave: 'cos' | 'sin' = 'cos'): ContinuousTerm => ({ coef, power, rate, freq, wave });
export const d = (coef: number, radius: number, power = 0): DiscreteTerm => ({ coef, power, radius, angle: 0, wave: 'cos' });

function ev(re: number, im: number, text: string, algebraic = 1, blocks = [1]): Eigenvalue {
  return { re, im, exact: null, text, algebraic, geometric: blocks.length, blocks };
}

function transition(variable: 't' | 'k', entries: (ContinuousTerm | DiscreteTerm)[][][]): TransitionClosedForm {
  return { variable, entries, exactCoefficients: true, check: { samples: [0.5, 1], residual: 2e-16, passed: true }, conditioning: 1 };
}

export function matrixReport(name: string, A: number[][], statement: { start: number; end: number }, literal: { start: number; end: number }, partial: Partial<MatrixReport>): MatrixReport {
  return {
    index: 0,
    name,
    line: 1,
    column: 1,
    span: literal,
    nameSpan: { start: statement.start, end: statement.start + name.length },
    statementSpan: statement,
    rows: A.length,
    cols: A[0].length,
    role: 'state',
    modelId: null,
    domain: 'continuous',
    period: null,
    exact: true,
    values: A.map((row) => row.map((x) => ({ kind: 'exact' as const, value: Rational.fromNumber(x) }))),
    spectrum: null,
    stability: null,
    modes: [],
    transition: null,
    discrete: null,
    findings: [],
    skipped: [],
    hash: name,
    ...partial,
    // As the analysis sets it: a closed form is available exactly when one is given.
    closedFormAvailable: partial.closedFormAvailable ?? (partial.transition !== undefined && partial.transition !== null),
  };
}

export function documentOf(...matrices: MatrixReport[]): DocumentReport {
  return { language: 'python', matrices, models: [], findings: [] };
}

function spectrumOf(eigenvalues: Eigenvalue[], defective = false) {
  return {
    n: eigenvalues.reduce((s, e) => s + e.algebraic * (e.im !== 0 ? 2 : 1), 0),
    exact: true,
    charPoly: { coeffs: [], exactCoeffs: null },
    minimalPoly: null,
    factors: null,
    eigenvalues,
    defective,
    clusterTolerance: null,
    nearRepeated: [],
    notes: [],
  };
}

function decaying(index: number, tau: number): Mode {
  return { eigenvalueIndex: index, s: null, behaviour: 'decays', timeConstant: tau, naturalFrequency: 1 / tau, dampingRatio: 1, period: null, settlingTime2pct: 4 * tau, doublingTime: null };
}

/**
 * Moler & Van Loan, "Nineteen Dubious Ways to Compute the Exponential of a Matrix", SIAM
 * Review 20(4), 1978 (from memory; CHECKS.md #1): A = [[-49,24],[-64,31]],
 * e^{At} = [[3e^{-17t}−2e^{-t}, 1.5(e^{-t}−e^{-17t})], [4e^{-17t}−4e^{-t}, 3e^{-t}−2e^{-17t}]].
 */
export const MOLER_A = [[-49, 24], [-64, 31]];
export function molerVanLoanTransition(): TransitionClosedForm {
  return transition('t', [
    [[c(3, -17), c(-2, -1)], [c(1.5, -1), c(-1.5, -17)]],
    [[c(4, -17), c(-4, -1)], [c(3, -1), c(-2, -17)]],
  ]);
}
export function molerVanLoanExtras(): Partial<MatrixReport> {
  return {
    spectrum: spectrumOf([ev(-1, 0, '-1'), ev(-17, 0, '-17')]),
    stability: 'asymptotically-stable',
    modes: [decaying(0, 1), decaying(1, 1 / 17)],
    transition: molerVanLoanTransition(),
  };
}

/** SciPy expm tests `test_burkardt_8` (CHECKS.md #4): defective 3×3, eigenvalues 4 and 16 (block 2). */
export const BURKARDT8_A = [[21, 17, 6], [-5, -1, -6], [4, 4, 16]];
export function burkardt8Transition(): TransitionClosedForm {
  return transition('t', [
    [[c(5 / 4, 16), c(2, 16, 1), c(-1 / 4, 4)], [c(5 / 4, 16), c(2, 16, 1), c(-5 / 4, 4)], [c(1 / 2, 16), c(-1 / 2, 4)]],
    [[c(1 / 4, 4), c(-1 / 4, 16), c(-2, 16, 1)], [c(5 / 4, 4), c(-1 / 4, 16), c(-2, 16, 1)], [c(1 / 2, 4), c(-1 / 2, 16)]],
    [[c(4, 16, 1)], [c(4, 16, 1)], [c(1, 16)]],
  ]);
}

/** Rotation with decay, standard identity (CHECKS.md #3): A = [[-1,2],[-2,-1]]. */
export const ROTATION_A = [[-1, 2], [-2, -1]];
export function rotationTransition(): TransitionClosedForm {
  return transition('t', [
    [[c(1, -1, 0, 2, 'cos')], [c(1, -1, 0, 2, 'sin')]],
    [[c(-1, -1, 0, 2, 'sin')], [c(1, -1, 0, 2, 'cos')]],
  ]);
}

/** [[λ,1],[0,λ]]^k = [[λ^k, kλ^{k−1}],[0,λ^k]] with λ = 1/2, standard identity (CHECKS.md #11). */
export const JORDAN_HALF_A = [[0.5, 1], [0, 0.5]];
export function jordanHalfPowers(): TransitionClosedForm {
  // k·λ^{k−1} = (1/λ)·k·λ^k = 2·k·0.5^k
  return transition('k', [[[d(1, 0.5)], [d(2, 0.5, 1)]], [[], [d(1, 0.5)]]]);
}

/** Nilpotent [[0,1],[0,0]]: A^0 = I, A^1 = A, A^k = 0 for k ≥ 2 (standard identity). */
export const NILPOTENT_A = [[0, 1], [0, 0]];
export function nilpotentPowers(): TransitionClosedForm {
  return transition('k', [[[{ coef: 1, at: 0 }], [{ coef: 1, at: 1 }]], [[], [{ coef: 1, at: 0 }]]]);
}
