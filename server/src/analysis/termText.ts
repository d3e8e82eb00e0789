/**
 * Closed-form transition entries as text for people: "3·e^(−17t) − 2·e^(−t)",
 * "e^(−t)·(cos(√3·t) + √3/3·sin(√3·t))" is written term by term as
 * "e^(−t)·cos(√3·t) + √3/3·e^(−t)·sin(√3·t)", and A^k entries as "k·0.5^k", "[k=1]".
 * Exact coefficient texts are used when the engine supplied them.
 */
import type { ContinuousTerm, DiscreteTerm, TransitionTerm } from '../engine/types';
import { formatNumber } from './numberText';

const SUPERSCRIPT: Record<string, string> = { '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

function superscript(n: number): string {
  return String(n)
    .split('')
    .map((c) => SUPERSCRIPT[c] ?? c)
    .join('');
}

const minus = (s: string): string => s.replace(/-/g, '−');

/** Is the text a single signed factor (no top-level + or −) so it can multiply without parentheses? */
function isAtom(s: string): boolean {
  const body = s.replace(/^[−-]/, '');
  let depth = 0;
  for (const c of body) {
    if (c === '(') depth++;
    else if (c === ')') depth--;
    else if (depth === 0 && (c === '+' || c === '−' || c === '-' || c === ' ')) return false;
  }
  return true;
}

/** "rate·t" for the exponent: "−17t", "−t/2", "(−1+√5)t/2" style kept simple. */
function scaledVariable(valueText: string, variable: string): string {
  const t = minus(valueText.trim());
  if (t === '1') return variable;
  if (t === '−1') return `−${variable}`;
  const frac = /^(−?)(\d+)\/(\d+)$/.exec(t);
  if (frac) return `${frac[1]}${frac[2] === '1' ? '' : frac[2]}${variable}/${frac[3]}`;
  if (/^−?\d+(\.\d+)?(e[−+]?\d+)?$/.test(t)) return `${t}${variable}`;
  return isAtom(t) ? `${t}·${variable}` : `(${t})·${variable}`;
}

function coefficientText(term: TransitionTerm, digits: number): string {
  return term.exact !== undefined ? minus(term.exact) : formatNumber(term.coef, digits);
}

function isContinuous(term: TransitionTerm): term is ContinuousTerm {
  return 'rate' in term;
}

/** The factors of one term other than its coefficient, e.g. ["t²", "e^(−t)", "sin(2t)"]. */
function factorsOf(term: TransitionTerm, variable: 't' | 'k', digits: number): string[] {
  const f: string[] = [];
  if (isContinuous(term)) {
    if (term.power > 0) f.push(term.power === 1 ? 't' : `t${superscript(term.power)}`);
    if (term.rate !== 0) f.push(`e^(${scaledVariable(term.rateExact ?? formatNumber(term.rate, digits), 't')})`);
    if (term.freq !== 0) f.push(`${term.wave}(${scaledVariable(term.freqExact ?? formatNumber(term.freq, digits), 't')})`);
    else if (term.wave === 'sin') f.push('0');
    return f;
  }
  const d = term as DiscreteTerm;
  if ('at' in d) {
    f.push(`[${variable}=${d.at}]`);
    return f;
  }
  if (d.power > 0) f.push(d.power === 1 ? 'k' : `k${superscript(d.power)}`);
  if (d.radius !== 1) {
    const r = d.radiusExact !== undefined ? minus(d.radiusExact) : formatNumber(d.radius, digits);
    f.push(isAtom(r) && !r.includes('/') ? `${r}^k` : `(${r})^k`);
  }
  if (d.angle !== 0) {
    const isPi = Math.abs(d.angle - Math.PI) < 1e-15;
    if (isPi && d.wave === 'cos') f.push('(−1)^k');
    else f.push(`${d.wave}(${isPi ? 'π' : formatNumber(d.angle, digits)}·k)`);
  } else if (d.wave === 'sin') f.push('0');
  return f;
}

export function termText(term: TransitionTerm, variable: 't' | 'k', digits = 6): string {
  const coef = coefficientText(term, digits);
  const factors = factorsOf(term, variable, digits);
  if (factors.length === 0) return coef;
  if (coef === '1') return factors.join('·');
  if (coef === '−1') return `−${factors.join('·')}`;
  return `${isAtom(coef) ? coef : `(${coef})`}·${factors.join('·')}`;
}

/** A whole entry: terms joined with + and −; "0" for an empty sum. */
export function entryText(terms: TransitionTerm[], variable: 't' | 'k', digits = 6): string {
  if (terms.length === 0) return '0';
  let out = '';
  terms.forEach((term, i) => {
    let t = termText(term, variable, digits);
    if (i === 0) {
      out = t;
      return;
    }
    if (t.startsWith('−')) out += ` − ${t.slice(1)}`;
    else out += ` + ${t}`;
  });
  return out;
}
