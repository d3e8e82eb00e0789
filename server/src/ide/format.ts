/**
 * Text helpers for the editor features. Numbers, durations and transition entries reuse the
 * analysis layer's renderers (the CLI prints the same text), so an entry reads the same in a
 * hover, a lens, a report and the terminal; this file adds eigenvalue wording and the
 * matrix layout used for the clipboard.
 */
import type { Eigenvalue, TransitionClosedForm } from '../engine/types';
import { formatNumber, formatSeconds } from '../analysis/numberText';
import { entryText } from '../analysis/termText';

export { formatNumber, formatSeconds, entryText };

const MINUS = '−';

/** ASCII-minus variant for text meant to be pasted into code or a terminal. */
export function asciiMinus(text: string): string {
  return text.replace(/−/g, '-');
}

/** A duration in seconds with a readable unit (3 significant digits at most). */
export function formatDuration(seconds: number, precision: number): string {
  return formatSeconds(seconds, Math.min(precision, 3));
}

/** Engine text such as "-1+j√3" made readable: Unicode minus, spaces around the sign. */
export function prettyRootText(text: string): string {
  return text.replace(/-/g, MINUS).replace(/(\S)([+−])j/, '$1 $2 j');
}

/** An eigenvalue, with "±" for a conjugate pair (one Mode stands for both members). */
export function eigenvalueText(ev: Eigenvalue, precision: number, asPair: boolean): string {
  const text = ev.text && ev.text.trim() !== '' ? ev.text : numericText(ev, precision);
  const pretty = prettyRootText(text);
  if (ev.im === 0 || !asPair) return pretty;
  // "-1 + j√3" → "−1 ± j√3"; "j2" → "± j2"
  const paired = pretty.replace(/ [+−] j/, ' ± j');
  if (paired !== pretty) return paired;
  if (/^(≈\s*)?j/.test(pretty)) return pretty.replace(/j/, '±j');
  return `${pretty} (and its conjugate)`;
}

function numericText(ev: Eigenvalue, precision: number): string {
  if (ev.im === 0) return formatNumber(ev.re, precision);
  const sign = ev.im < 0 ? '-' : '+';
  return `${ev.re === 0 ? '' : formatNumber(ev.re, precision)}${ev.re === 0 && sign === '+' ? '' : sign}j${formatNumber(Math.abs(ev.im), precision)}`;
}

/** Does the exact text need a decimal beside it to be read at a glance (surds; plain fractions read fine)? */
export function needsDecimal(ev: Eigenvalue): boolean {
  return ev.text.includes('√') && !ev.text.trim().startsWith('≈');
}

/** Decimal form of an eigenvalue (pair written with ±). */
export function eigenvalueDecimal(ev: Eigenvalue, precision: number, asPair: boolean): string {
  const re = formatNumber(ev.re, precision);
  if (ev.im === 0) return re;
  const im = formatNumber(Math.abs(ev.im), precision);
  const sign = asPair ? '±' : ev.im < 0 ? '−' : '+';
  return ev.re === 0 ? `${asPair ? '±' : ev.im < 0 ? '−' : ''}j${im}` : `${re} ${sign} j${im}`;
}

/** Exact text, followed by "≈ decimal" when the exact text has surds or fractions. */
export function eigenvalueWithDecimal(ev: Eigenvalue, precision: number, asPair: boolean): string {
  const exact = eigenvalueText(ev, precision, asPair);
  return needsDecimal(ev) ? `${exact} ≈ ${eigenvalueDecimal(ev, Math.min(precision, 5), asPair)}` : exact;
}

/** The whole matrix as aligned plain text, one row a line, for a fenced block or the clipboard. */
export function transitionText(transition: TransitionClosedForm, precision: number): string {
  const cells = transition.entries.map((row) => row.map((terms) => entryText(terms, transition.variable, precision)));
  const widths = cells[0]?.map((_, col) => Math.max(...cells.map((row) => row[col].length))) ?? [];
  return cells.map((row) => `[ ${row.map((cell, col) => cell.padEnd(widths[col])).join('  |  ')} ]`).join('\n');
}

/** Pipes inside Markdown table cells would split the cell. */
export function escapeTableCell(text: string): string {
  return text.replace(/\|/g, '\\|');
}

/** "Φ(t) = e^{At}" or "Φ(k) = A^k" with the matrix's own name. */
export function transitionTitle(name: string, variable: 't' | 'k'): string {
  return variable === 't' ? `Φ(t) = e^(${name}·t)` : `Φ(k) = ${name}^k`;
}

/** "λ = -1+j√3" for exact values, "λ ≈ -4.369 ± j8.7139" for numeric ones (never "λ = ≈ …"). */
export function lambdaIs(text: string): string {
  return text.startsWith('≈') ? `λ ${text}` : `λ = ${text}`;
}
