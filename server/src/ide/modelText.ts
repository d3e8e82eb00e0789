/**
 * Model-level wording for the state-matrix hover (compact) and the full report (complete):
 * controllability and observability (Kalman rank test, with the modes that the input cannot
 * move or the outputs cannot see), the same for the sampled model, the transfer function
 * with its poles and zeros, sample-period advice with each rule's source and the
 * recommended range, and how far rounding the discrete state matrix to float32 or fixed
 * point moves its poles. Our own wording; the numbers come from the analysis layer.
 */
import type { DocumentReport, MatrixReport, ModelReport } from '../analysis/report';
import type { ModeEigenvalue, ReachabilityResult } from '../engine/controllability';
import type { QuantizationSuccess } from '../engine/quantize';
import type { TransferEntry } from '../engine/transferFunction';
import { formatDuration, formatNumber, prettyRootText, lambdaIs } from './format';

export function modelOfMatrix(report: DocumentReport, matrix: MatrixReport): ModelReport | null {
  return report.models.find((m) => m.id === matrix.modelId) ?? null;
}

function nameAt(report: DocumentReport, index: number | null, fallback: string): string {
  if (index === null) return fallback;
  return report.matrices.find((m) => m.index === index)?.name ?? fallback;
}

/** "λ = −1 (×2), λ = 0" for a list of mode eigenvalues. */
export function modeListText(modes: ModeEigenvalue[]): string {
  return modes
    .map((m) => {
      const text = prettyRootText(m.text).trim();
      // Numerical roots come as "≈ −1": read "λ ≈ −1", not "λ = ≈ −1".
      const head = lambdaIs(text);
      return `${head}${m.multiplicity > 1 ? ` (×${m.multiplicity})` : ''}`;
    })
    .join(', ');
}

/** "controllable (rank 2 of 2, exact)" or "**not controllable** (rank 1 of 2): cannot move λ = −1". */
export function reachabilityText(r: ReachabilityResult, property: 'controllable' | 'observable'): string {
  const how = r.exact ? 'exact' : 'numerical';
  if (r.controllable) return `${property} (rank ${r.rank} of ${r.n}, ${how})`;
  const verb = property === 'controllable' ? 'the input cannot move' : 'the outputs do not see';
  const modes = r.uncontrollableEigenvalues.length ? `: ${verb} ${modeListText(r.uncontrollableEigenvalues)}` : '';
  return `**not ${property}** (rank ${r.rank} of ${r.n}, ${how})${modes}`;
}

function transferLabel(entry: TransferEntry, tf: { entries: TransferEntry[][] }): string {
  const many = tf.entries.length > 1 || (tf.entries[0]?.length ?? 0) > 1;
  return many ? `G${entry.output + 1}${entry.input + 1}` : 'G';
}

function rootsText(roots: ModeEigenvalue[]): string {
  return roots.length ? roots.map((r) => `${prettyRootText(r.text)}${r.multiplicity > 1 ? ` (×${r.multiplicity})` : ''}`).join(', ') : 'none';
}

/** Ascending exact (or numeric) coefficients as a polynomial in `v`. */
function polynomialIn(coeffs: (string | number)[], v: string, precision: number): string {
  const terms: string[] = [];
  for (let i = coeffs.length - 1; i >= 0; i--) {
    const raw = coeffs[i];
    const text = typeof raw === 'number' ? formatNumber(raw, precision) : raw.replace(/-/g, '−');
    if (text === '0') continue;
    const negative = text.startsWith('−');
    const magnitude = negative ? text.slice(1) : text;
    const power = i === 0 ? '' : i === 1 ? v : `${v}^${i}`;
    const body = power === '' ? magnitude : magnitude === '1' ? power : `${/[/\s]/.test(magnitude) ? `(${magnitude})` : magnitude}·${power}`;
    terms.push(terms.length === 0 ? `${negative ? '−' : ''}${body}` : `${negative ? '−' : '+'} ${body}`);
  }
  return terms.length ? terms.join(' ') : '0';
}

function quantizationText(q: QuantizationSuccess, precision: number): string {
  const format = q.format.kind === 'float32' ? 'float32' : `Q${q.format.integerBits}.${q.format.fractionalBits} fixed point`;
  const verdict = q.crossedUnitCircle ? '**a pole crossed onto or outside the unit circle**' : q.sensitive ? '**sensitive**' : 'fine';
  const saturated = q.saturated.length ? `, ${q.saturated.length} entr${q.saturated.length === 1 ? 'y saturates' : 'ies saturate'}` : '';
  return `${format}: poles move by at most ${formatNumber(q.maxMovement, Math.min(precision, 3))} (time constants and frequencies change by up to ${formatNumber(100 * q.maxEquivalentShift, Math.min(precision, 3))} %, threshold ${formatNumber(100 * q.threshold, 3)} %) — ${verdict}${saturated}`;
}

function rangeText(advice: NonNullable<ModelReport['periodAdvice']>, precision: number): string | null {
  const r = advice.recommended;
  if (!r) return null;
  return `${formatDuration(r.min, precision)} – ${formatDuration(r.max, precision)}`;
}

/**
 * Model lines for the state-matrix hover (compact) or the report (full). Empty when the
 * matrix belongs to no model with anything to say.
 */
export function modelLines(report: DocumentReport, matrix: MatrixReport, precision: number, full: boolean): string[] {
  const model = modelOfMatrix(report, matrix);
  if (!model) return [];
  const out: string[] = [];
  const a = matrix.name ?? 'A';
  const b = nameAt(report, model.input, 'B');
  const c = nameAt(report, model.output, 'C');
  const items: string[] = [];
  if (model.controllability) items.push(`(${a}, ${b}) ${reachabilityText(model.controllability, 'controllable')}`);
  if (model.observability) items.push(`(${a}, ${c}) ${reachabilityText(model.observability, 'observable')}`);
  const disc = matrix.discrete;
  const sampledAt = disc ? ` at T = ${formatNumber(disc.period, precision)} s (${disc.method})` : '';
  if (model.sampledControllability) {
    const changed = model.controllability && model.controllability.rank !== model.sampledControllability.rank;
    if (full || changed) items.push(`Sampled${sampledAt}: ${reachabilityText(model.sampledControllability, 'controllable')}${changed ? ' — sampling lost controllability' : ''}`);
  }
  if (model.sampledObservability) {
    const changed = model.observability && model.observability.rank !== model.sampledObservability.rank;
    if (full || changed) items.push(`Sampled${sampledAt}: ${reachabilityText(model.sampledObservability, 'observable')}${changed ? ' — sampling lost observability' : ''}`);
  }
  const tf = model.transferFunction;
  if (tf) {
    const v = tf.variable;
    const entries = tf.entries.flat();
    const shown = full ? entries : entries.slice(0, 1);
    for (const e of shown) {
      const name = transferLabel(e, tf);
      items.push(`${name}(${v}) = ${e.text.replace(/-/g, '−')}; poles ${rootsText(e.poles)}; zeros ${rootsText(e.zeros)}${e.cancelledDegree > 0 ? ` (${e.cancelledDegree} pole–zero pair${e.cancelledDegree === 1 ? '' : 's'} cancelled)` : ''}`);
      if (full) {
        const num = e.numerator.exact ?? e.numerator.coeffs;
        const den = e.denominator.exact ?? e.denominator.coeffs;
        items.push(`  numerator ${polynomialIn(num, v, precision)}, denominator ${polynomialIn(den, v, precision)}${tf.exact ? ' (exact)' : ''}`);
      }
    }
    if (!full && entries.length > 1) items.push(`… ${entries.length - 1} more transfer-function entr${entries.length === 2 ? 'y' : 'ies'} in the full analysis`);
  }
  const advice = model.periodAdvice;
  if (advice && model.period !== null) {
    const range = rangeText(advice, precision);
    const broken = advice.findings.filter((f) => f.severity !== 'info');
    const head = `Sample period T = ${formatDuration(model.period, precision)}${range ? `; recommended ${range}` : ''}${broken.length === 0 ? ' — no rule broken' : ''}`;
    items.push(head);
    for (const f of full ? advice.findings : broken) items.push(`  ${f.severity === 'info' ? 'ℹ' : '⚠'} ${f.rule}: ${f.message} (${f.source})`);
    if (full) for (const note of advice.notes) items.push(`  ${note}`);
  }
  const ce = model.continuousEquivalent;
  if (ce && full) {
    const mat = (M: number[][]) => `[${M.map((r) => r.map((x) => formatNumber(x, precision)).join(', ')).join('; ')}]`;
    if (ce.ok) items.push(`Zero-order hold of the continuous model A = ${mat(ce.A)}${ce.B ? `, B = ${mat(ce.B)}` : ''} (matrix logarithm, residual ${formatNumber(ce.residual, 2)})`);
    else items.push(`No continuous model has this as its zero-order hold: ${ce.reason}`);
  } else if (ce && !ce.ok) {
    items.push(`No continuous model has this as its zero-order hold (${ce.reason.replace(/\.$/, '')})`);
  }
  for (const q of model.quantization) {
    if (full || q.sensitive) items.push(`Rounding ${matrix.domain === 'discrete' ? a : 'the discrete state matrix'} to ${quantizationText(q, precision)}`);
  }
  if (!full && model.quantization.length && model.quantization.every((q) => !q.sensitive)) {
    items.push(`Rounding to ${model.quantization.map((q) => (q.format.kind === 'float32' ? 'float32' : `Q${q.format.integerBits}.${q.format.fractionalBits}`)).join(' / ')} moves no pole noticeably`);
  }
  if (full) for (const note of model.notes) items.push(`_Not computed:_ ${note}`);
  if (items.length === 0) return [];
  out.push(`**Model \`${model.id}\`**${full ? '' : ' (full analysis has every detail)'}:`);
  out.push('');
  for (const item of items) out.push(item.startsWith('  ') ? `  - ${item.trim()}` : `- ${item}`);
  return out;
}

/** One line for a B/C/D hover: what the model's controllability or observability is. */
export function partnerModelLine(report: DocumentReport, matrix: MatrixReport): string | null {
  const model = modelOfMatrix(report, matrix);
  if (!model) return null;
  const state = report.matrices.find((m) => m.index === model.state);
  const a = state?.name ?? 'A';
  const parts: string[] = [];
  if ((matrix.role === 'input' || matrix.role === 'feedthrough') && model.controllability) {
    parts.push(`(${a}, ${nameAt(report, model.input, 'B')}) is ${reachabilityText(model.controllability, 'controllable')}`);
    if (model.sampledControllability && model.sampledControllability.rank !== model.controllability.rank) parts.push(`sampled: ${reachabilityText(model.sampledControllability, 'controllable')}`);
  }
  if ((matrix.role === 'output' || matrix.role === 'feedthrough') && model.observability) {
    parts.push(`(${a}, ${nameAt(report, model.output, 'C')}) is ${reachabilityText(model.observability, 'observable')}`);
    if (model.sampledObservability && model.sampledObservability.rank !== model.observability.rank) parts.push(`sampled: ${reachabilityText(model.sampledObservability, 'observable')}`);
  }
  return parts.length ? `${parts.join('; ')}.` : null;
}
