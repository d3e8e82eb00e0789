/**
 * Numeric evaluation of a closed-form transition matrix (DESIGN.md §6 term encoding).
 *
 * A continuous term is c·t^m·e^{σt}·cos|sin(ωt); a discrete term is c·k^m·r^k·cos|sin(θk)
 * or c at k = j only. Invariant: evaluation is a pure function of the terms; the angle π of
 * a negative real eigenvalue is evaluated as (−1)^k exactly (cos(π·k) in doubles is not
 * exactly ±1 and sin(π·k) is not exactly 0), and angle 0 as 1.
 */
import type { ContinuousTerm, DiscreteTerm, TransitionClosedForm, TransitionTerm } from './types';

function isContinuous(term: TransitionTerm): term is ContinuousTerm {
  return 'rate' in term;
}

function discreteWave(angle: number, wave: 'cos' | 'sin', k: number): number {
  if (angle === 0) return wave === 'cos' ? 1 : 0;
  if (angle === Math.PI && Number.isInteger(k)) return wave === 'cos' ? (k % 2 === 0 ? 1 : -1) : 0;
  return wave === 'cos' ? Math.cos(angle * k) : Math.sin(angle * k);
}

/** Value of one term at time t (continuous) or step k (discrete). */
export function evaluateTerm(term: TransitionTerm, tOrK: number): number {
  if (isContinuous(term)) {
    const wave = term.freq === 0 ? (term.wave === 'cos' ? 1 : 0) : term.wave === 'cos' ? Math.cos(term.freq * tOrK) : Math.sin(term.freq * tOrK);
    if (wave === 0) return 0;
    // 0^0 = 1 in JS, as the t^0 of the constant term needs.
    return term.coef * tOrK ** term.power * Math.exp(term.rate * tOrK) * wave;
  }
  const d = term as DiscreteTerm;
  if ('at' in d) return tOrK === d.at ? d.coef : 0;
  const wave = discreteWave(d.angle, d.wave, tOrK);
  if (wave === 0) return 0;
  return d.coef * tOrK ** d.power * d.radius ** tOrK * wave;
}

/** Φ(t) or Φ(k) as a numeric matrix: each entry is the sum of its terms. */
export function evaluateTransition(cf: TransitionClosedForm, tOrK: number): number[][] {
  return cf.entries.map((row) => row.map((terms) => terms.reduce((acc, term) => acc + evaluateTerm(term, tOrK), 0)));
}
