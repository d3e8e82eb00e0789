/**
 * Findings (diagnostics in editor terms) for one analysed state matrix, with our stable
 * codes. Whole-matrix findings sit on the literal; the wording names the eigenvalue and
 * what it does, so the message is useful without opening the hover.
 */
import type { Eigenvalue } from '../engine/types';
import type { MatrixLiteral } from '../syntax/types';
import type { MatrixCore } from './analyze';
import type { Finding, MatrixReport } from './report';
import type { AnalysisSettings } from './settings';
import { eigenvalueLabel, formatNumber, formatSeconds, polynomialGrowth } from './numberText';

/** How analyze.ts starts the skip note of a matrix a pass left for later. */
export const NOT_YET_PREFIX = "Not analysed: the document's time budget";

/** Cancellation factor above which a closed form loses more than 6 of 16 digits (our choice). */
const CANCELLATION_LIMIT = 1e6;

export const FINDING_CODES = [
  'closed-form-cancellation',
  'unstable-mode',
  'marginally-stable',
  'defective-matrix',
  'near-repeated-eigenvalues',
  'closed-form-unverified',
  'light-damping',
  'analysis-limit',
] as const;

/** "one Jordan block of size 2", "Jordan blocks of sizes 2, 1". */
export function jordanText(blocks: number[]): string {
  return blocks.length === 1 ? `one Jordan block of size ${blocks[0]}` : `Jordan blocks of sizes ${blocks.join(', ')}`;
}

function multiplicityText(e: Eigenvalue): string {
  if (e.algebraic === 1) return '';
  const blocks = e.blocks.some((b) => b > 1) ? `, ${jordanText(e.blocks)}` : '';
  return ` (algebraic ${e.algebraic}, geometric ${e.geometric}${blocks})`;
}

export function findingsForMatrix(report: MatrixReport, core: MatrixCore, lit: MatrixLiteral, settings: AnalysisSettings): Finding[] {
  const out: Finding[] = [];
  const span = lit.span;
  const label = lit.name ?? 'this matrix';
  const p = settings.precision;
  // A matrix a slice has not reached yet gets no diagnostic of its own: the document-level
  // note says that passes continue (thousands of "not yet" squiggles would only flicker).
  for (const note of core.skipped) if (!note.startsWith(NOT_YET_PREFIX)) out.push({ span, severity: 'information', code: 'analysis-limit', message: note });
  for (const note of core.notes) out.push({ span, severity: 'information', code: 'analysis-limit', message: note });
  const spec = core.spectrum;
  if (!spec) return out;

  const continuous = report.domain === 'continuous';
  const boundaryWord = continuous ? 'imaginary axis' : 'unit circle';
  if (core.stability === 'unstable') {
    const growing = core.modes
      .map((m) => ({ m, e: spec.eigenvalues[m.eigenvalueIndex] }))
      .filter(({ m }) => m.behaviour === 'grows' || m.behaviour === 'growing-oscillation' || m.behaviour === 'polynomial-growth');
    const parts = growing.map(({ m, e }) => {
      const name = eigenvalueLabel(e);
      if (m.behaviour === 'polynomial-growth') return `${name} sits on the ${boundaryWord} with a Jordan block of size ${Math.max(...e.blocks)}, so it grows ${polynomialGrowth(continuous ? 't' : 'k', Math.max(...e.blocks))}`;
      const dbl = m.doublingTime !== null ? `, doubling every ${continuous || report.period !== null ? formatSeconds(m.doublingTime) : `${formatNumber(m.doublingTime, 3)} steps`}` : '';
      return `${name} grows${dbl}`;
    });
    out.push({
      span,
      severity: 'warning',
      code: 'unstable-mode',
      message: `${label} is unstable: ${parts.length ? parts.join('; ') : core.stabilityReasons.join('; ')}.`,
    });
  } else if (core.stability === 'marginally-stable') {
    const boundary = spec.eigenvalues.filter((e) => (continuous ? Math.abs(e.re) <= 1e-12 * Math.max(1, Math.abs(e.im)) : Math.abs(Math.hypot(e.re, e.im) - 1) <= 1e-12));
    out.push({
      span,
      severity: 'information',
      code: 'marginally-stable',
      message: `${label} is marginally stable: ${boundary.filter((e) => e.im >= 0).map((e) => eigenvalueLabel(e)).join(', ') || 'an eigenvalue'} on the ${boundaryWord} with simple Jordan blocks; it neither decays nor grows.`,
    });
  }

  if (spec.defective) {
    const bad = spec.eigenvalues.filter((e) => e.geometric < e.algebraic && !(e.im < 0));
    out.push({
      span,
      severity: 'information',
      code: 'defective-matrix',
      message: `${label} is defective${spec.exact ? '' : ' (numerically)'}: ${bad
        .map((e) => `${eigenvalueLabel(e)}${multiplicityText(e)}`)
        .join('; ')}. It has no basis of eigenvectors, so modal (eigenvector) methods fail and ${continuous ? 't·e^{λt}' : 'k·λ^k'} terms appear.`,
    });
  }

  const cf = core.closedForm?.summary ?? null;
  if (spec.nearRepeated.length > 0 || (cf && !cf.check.passed)) {
    const pairs = spec.nearRepeated.map(({ a, b, separation }) => `${spec.eigenvalues[a].text} and ${spec.eigenvalues[b].text} (apart ${formatNumber(separation, 3)})`);
    const check = cf ? ` The closed form's check against the numeric ${continuous ? 'exponential' : 'powers'} has residual ${formatNumber(cf.check.residual, 3)} (cancellation factor ${formatNumber(cf.conditioning, 3)}).` : '';
    if (pairs.length > 0) {
      out.push({
        span,
        severity: 'warning',
        code: 'near-repeated-eigenvalues',
        message: `${label} has nearly repeated eigenvalues: ${pairs.join('; ')}. Closed forms built from them cancel catastrophically and are unreliable in floating point.${check}`,
      });
    } else if (cf) {
      out.push({
        span,
        severity: 'warning',
        code: 'closed-form-unverified',
        message: `The closed-form transition matrix of ${label} failed its numeric check.${check} Do not use its numbers.`,
      });
    }
  }

  // Exact coefficients can still be useless in floating point: when terms of size X cancel to
  // a sum of size 1, evaluating the printed formula loses log10(X) digits.
  if (cf && cf.check.passed && spec.nearRepeated.length === 0 && cf.conditioning > CANCELLATION_LIMIT) {
    out.push({
      span,
      severity: 'warning',
      code: 'closed-form-cancellation',
      message: `Evaluating the closed form of ${label} in floating point loses about ${Math.round(Math.log10(cf.conditioning))} of its 16 digits: its terms are up to ${formatNumber(cf.conditioning, 2)} times larger than their sum (cancellation factor). The coefficients are ${cf.exactCoefficients ? 'exact' : 'numeric'}; for numbers, use the numeric exponential.`,
    });
  }

  for (const m of core.modes) {
    const e = spec.eigenvalues[m.eigenvalueIndex];
    if (m.dampingRatio === null || e.im === 0 || m.s === null || m.behaviour === 'polynomial-growth') continue;
    if (m.dampingRatio >= 0 && m.dampingRatio < settings.lightDampingThreshold) {
      out.push({
        span,
        severity: 'information',
        code: 'light-damping',
        message: `The mode ${eigenvalueLabel(e)} is lightly damped: ζ = ${formatNumber(m.dampingRatio, p > 4 ? 4 : p)} is below ${settings.lightDampingThreshold} (setting eigenlens.lightDampingThreshold)${m.naturalFrequency !== null ? `, ω_n = ${formatNumber(m.naturalFrequency, 4)} rad/s` : ''}.`,
      });
    }
  }
  return out;
}
