/**
 * Hover at a document offset, in editor-neutral terms: Markdown plus the span it covers.
 * On a state matrix (its name or anywhere in its literal): verdict first, then each mode as
 * a sentence, structure notes, the closed-form transition matrix, its numeric check, a small
 * plot of the modal responses, and the caution that a linear model is not proof of safety.
 * On an entry: its evaluated value. On input/output/feedthrough matrices: shape, role,
 * the state matrix of their model and its controllability / observability. The state hover
 * also has a compact model section (transfer function, ranks, period advice, rounding).
 */
import type { DocumentReport, MatrixReport } from '../analysis/report';
import type { AnalysisSettings } from '../analysis/settings';
import type { Span } from '../syntax/types';
import { SAFETY_CAUTION_SHORT } from '../analysis/caution';
import { entryText, escapeTableCell, eigenvalueText, eigenvalueWithDecimal, formatNumber, transitionTitle } from './format';
import { behaviourText, multiplicityText, verdictHeadline } from './summary';
import { modalResponseSvg, svgDataUri } from './plot';
import { lambdaIs } from './format';
import { modelLines, partnerModelLine } from './modelText';

export interface HoverResult {
  markdown: string;
  span: Span;
}

export type HoverSettings = Pick<AnalysisSettings, 'precision'>;

const contains = (span: Span | null | undefined, offset: number) => !!span && offset >= span.start && offset <= span.end;

const ROLE_WORDS: Record<string, string> = {
  state: 'state matrix',
  input: 'input matrix',
  output: 'output matrix',
  feedthrough: 'feedthrough matrix',
  'noise-input': 'noise input matrix',
  'noise-covariance': 'process noise covariance',
  unknown: 'matrix',
};

/** The matrix whose name or literal contains the offset (innermost literal wins). */
export function matrixAt(report: DocumentReport, offset: number): { matrix: MatrixReport; onName: boolean } | null {
  let found: { matrix: MatrixReport; onName: boolean } | null = null;
  for (const matrix of report.matrices) {
    if (contains(matrix.nameSpan, offset)) return { matrix, onName: true };
    if (contains(matrix.span, offset)) {
      if (!found || matrix.span.end - matrix.span.start < found.matrix.span.end - found.matrix.span.start) found = { matrix, onName: false };
    }
  }
  return found;
}

export interface HoverOptions {
  /** 'compact' (the hover) or 'none' (the full report writes its own complete model section). */
  model?: 'compact' | 'none';
}

export function hoverAt(report: DocumentReport, text: string, offset: number, settings: HoverSettings, options: HoverOptions = {}): HoverResult | null {
  void text;
  const hit = matrixAt(report, offset);
  if (!hit) return null;
  const { matrix, onName } = hit;
  const precision = settings.precision;
  if (!onName && matrix.entrySpans) {
    for (let row = 0; row < matrix.entrySpans.length; row++) {
      for (let col = 0; col < matrix.entrySpans[row].length; col++) {
        const span = matrix.entrySpans[row][col];
        if (contains(span, offset) && span.end > span.start) return { markdown: entryMarkdown(matrix, row, col, precision), span };
      }
    }
  }
  const span = onName && matrix.nameSpan ? matrix.nameSpan : matrix.span;
  const model = options.model === 'none' ? [] : matrix.role === 'state' ? modelLines(report, matrix, precision, false) : [];
  const markdown = matrix.role === 'state' ? stateMarkdown(matrix, precision, model) : companionMarkdown(report, matrix);
  return { markdown, span };
}

function label(matrix: MatrixReport): string {
  return matrix.name ?? `the matrix at line ${matrix.line}`;
}

function domainWords(matrix: MatrixReport, precision: number): string {
  if (matrix.domain === 'continuous') return 'continuous time';
  return matrix.period !== null ? `discrete time, period ${formatNumber(matrix.period, precision)} s` : 'discrete time (period not given)';
}

function entryMarkdown(matrix: MatrixReport, row: number, col: number, precision: number): string {
  const value = matrix.values[row]?.[col] ?? null;
  const where = `**${label(matrix)}**[${row + 1}, ${col + 1}]`;
  if (value === null) return `${where} could not be evaluated; see the problem reported on it.`;
  if (value.kind === 'exact') {
    const exact = value.value.toString();
    const decimal = formatNumber(value.value.toNumber(), 17);
    return exact === decimal.replace('−', '-') || !exact.includes('/')
      ? `${where} = ${exact.replace(/^-/, '−')} (exact)`
      : `${where} = ${exact.replace(/^-/, '−')} (exact) ≈ ${formatNumber(value.value.toNumber(), precision)}`;
  }
  return `${where} ≈ ${formatNumber(value.value, precision)} (floating point: the entry uses a function or constant with no exact value)`;
}

/** Φ as a table while it fits the hover's width, else one entry per line (wraps instead of scrolling sideways). */
const TABLE_MAX_CELL = 46;

function stateMarkdown(matrix: MatrixReport, precision: number, model: string[]): string {
  const out: string[] = [];
  const exactness = matrix.exact && matrix.spectrum?.exact ? 'exact arithmetic' : 'floating point';
  out.push(`**${label(matrix)}** · ${matrix.rows}×${matrix.cols} state matrix · ${domainWords(matrix, precision)} · ${exactness}`);
  out.push('');
  out.push(verdictHeadline(matrix));
  // The caution sits right under the verdict: hovers scroll, and a caution below the fold is none.
  out.push('');
  out.push(`_${SAFETY_CAUTION_SHORT}_`);
  const spectrum = matrix.spectrum;
  if (spectrum) {
    out.push('');
    for (const mode of matrix.modes) {
      const ev = spectrum.eigenvalues[mode.eigenvalueIndex];
      if (!ev) continue;
      const pair = ev.im !== 0;
      out.push(`- ${lambdaIs(eigenvalueWithDecimal(ev, precision, true))}${pair ? ' (conjugate pair)' : ''}, ${multiplicityText(ev)}: ${behaviourText(matrix, mode, precision)}.`);
    }
    const notes: string[] = [];
    if (spectrum.defective) {
      const terms = matrix.domain === 'continuous' ? 't^m·e^(λt)' : 'k^m·λ^k';
      notes.push(`The matrix is **defective** (fewer independent eigenvectors than its size): the response has ${terms} terms, and eigenvector-based methods do not apply.`);
    }
    for (const near of spectrum.nearRepeated) {
      const a = spectrum.eigenvalues[near.a];
      const b = spectrum.eigenvalues[near.b];
      const pairText = a && b ? `${lambdaIs(eigenvalueText(a, precision, false))} and ${lambdaIs(eigenvalueText(b, precision, false))}` : 'Two eigenvalues';
      notes.push(`${pairText} are **nearly repeated** (relative separation ${formatNumber(near.separation, 2)}): a closed form built from them is ill-conditioned.`);
    }
    if (!spectrum.exact) notes.push(`Multiplicities are numerical${spectrum.clusterTolerance !== null ? ` (eigenvalues within ${formatNumber(spectrum.clusterTolerance, 2)} counted as one)` : ''}.`);
    for (const note of spectrum.notes) notes.push(note);
    if (notes.length) {
      out.push('');
      for (const note of notes) out.push(`> ${note}`);
    }
    if (matrix.modes.length) {
      const svg = modalResponseSvg(spectrum, matrix.modes, matrix.domain, matrix.period, precision);
      if (svg) {
        out.push('');
        out.push(`![Modal responses, each scaled to peak 1](${svgDataUri(svg)})`);
      }
    }
  }
  const transition = matrix.transition;
  if (transition && transition.entries.length > 0) {
    const name = matrix.name ?? 'A';
    out.push('');
    out.push(`${transitionTitle(name, transition.variable)}${transition.exactCoefficients ? ' (exact coefficients)' : ''}:`);
    out.push('');
    const n = transition.entries[0].length;
    const cells = transition.entries.map((row) => row.map((terms) => entryText(terms, transition.variable, precision)));
    if (n <= 4 && cells.every((row) => row.every((c) => c.length <= TABLE_MAX_CELL))) {
      out.push(`| | ${Array.from({ length: n }, (_, c) => `col ${c + 1}`).join(' | ')} |`);
      out.push(`|---|${Array.from({ length: n }, () => '---').join('|')}|`);
      cells.forEach((row, r) => out.push(`| **row ${r + 1}** | ${row.map(escapeTableCell).join(' | ')} |`));
    } else {
      cells.forEach((row, r) => row.forEach((c, k) => out.push(`- Φ[${r + 1},${k + 1}] = ${escapeTableCell(c)}`)));
    }
    out.push('');
    const { check } = transition;
    const at = check.samples.map((s) => formatNumber(s, 3)).join(', ');
    const reference = transition.variable === 't' ? 'an independent numeric matrix exponential' : 'repeated multiplication';
    out.push(
      check.passed
        ? `Check: agrees with ${reference} at ${transition.variable} = ${at} (largest relative difference ${formatNumber(check.residual, 2)}).`
        : `**Check failed**: differs from ${reference} by ${formatNumber(check.residual, 2)} (relative) at ${transition.variable} = ${at} — do not rely on this closed form.`,
    );
  }
  if (model.length) {
    out.push('');
    out.push(...model);
  }
  if (matrix.skipped.length) {
    out.push('');
    for (const reason of matrix.skipped) out.push(`_Not computed:_ ${reason}`);
  }
  return out.join('\n');
}

function companionMarkdown(report: DocumentReport, matrix: MatrixReport): string {
  const role = ROLE_WORDS[matrix.role] ?? 'matrix';
  const out: string[] = [`**${label(matrix)}** · ${matrix.rows}×${matrix.cols} ${role}`];
  const model = report.models.find((m) => m.id === matrix.modelId) ?? null;
  const state = model ? report.matrices.find((m) => m.index === model.state) ?? null : null;
  if (!model || !state) {
    out.push('', 'Not attached to any state matrix in this file (name it after one, e.g. B with A, or B_cl with A_cl).');
    return out.join('\n');
  }
  const n = state.rows;
  out.push('', `Part of model \`${model.id}\`, whose state matrix is **${label(state)}** (${n} states, ${model.domain} time).`);
  const expected: Record<string, string> = {
    input: `${n} rows (one per state), one column per input`,
    output: `${n} columns (one per state), one row per output`,
    'noise-input': `${n} rows (one per state)`,
    'noise-covariance': 'square, one row and column per noise input',
    feedthrough: 'one row per output and one column per input',
  };
  const fits =
    matrix.role === 'input' || matrix.role === 'noise-input'
      ? matrix.rows === n
      : matrix.role === 'output'
        ? matrix.cols === n
        : matrix.role === 'noise-covariance'
          ? matrix.rows === matrix.cols
          : true;
  if (expected[matrix.role]) out.push('', `${fits ? 'Shape fits' : '**Shape does not fit**'}: expected ${expected[matrix.role]}.`);
  const reach = partnerModelLine(report, matrix);
  if (reach) out.push('', reach);
  return out.join('\n');
}
