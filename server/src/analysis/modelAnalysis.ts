/**
 * Model-level results: controllability and observability of (A, B, C) and of the sampled
 * model, the transfer function, sample-period advice, float32 / fixed-point rounding of
 * the discrete state matrix, and the findings they give, placed on the matrix concerned
 * (B for an uncontrollable mode, C for an unobservable one, A for period and rounding).
 */
import { Rational } from '../engine/rational';
import { controllability, observability, type ReachabilityResult } from '../engine/controllability';
import { transferFunction } from '../engine/transferFunction';
import { samplePeriodAdvice, type PeriodFinding } from '../engine/samplePeriod';
import { quantizeMatrix, type QuantizationSuccess } from '../engine/quantize';
import { processNoise } from '../engine/vanLoan';
import { continuousFromZoh } from '../engine/matrixLog';
import type { ExtractedFile, MatrixLiteral } from '../syntax/types';
import type { ModelGroup } from '../model/types';
import type { Finding, MatrixReport, ModelReport } from './report';
import type { AnalysisSettings } from './settings';
import { formatNumber } from './numberText';

type AnyMatrix = Rational[][] | number[][];

function matrixOf(lit: MatrixLiteral | undefined, exact: boolean): AnyMatrix | null {
  if (!lit || lit.nRows === 0 || lit.rows.some((r) => r.some((e) => e.value === null))) return null;
  if (exact) return lit.rows.map((r) => r.map((e) => (e.value as { kind: 'exact'; value: Rational }).value));
  return lit.rows.map((r) => r.map((e) => (e.value!.kind === 'exact' ? e.value!.value.toNumber() : (e.value!.value as number))));
}

const PERIOD_CODE: Record<PeriodFinding['rule'], string> = {
  'time-constant': 'period-too-long',
  aliasing: 'aliasing',
  'sampling-theorem': 'aliasing',
  'samples-per-oscillation': 'few-samples-per-period',
  'samples-per-rise-time': 'few-samples-per-rise-time',
  'bandwidth-ratio': 'slow-sampling',
  'pathological-period': 'pathological-period',
  'invalid-period': 'bad-period',
};

const SEVERITY: Record<PeriodFinding['severity'], Finding['severity']> = { info: 'information', warning: 'warning', error: 'error' };

function modeList(r: ReachabilityResult): string {
  return r.uncontrollableEigenvalues.map((e) => `λ = ${e.text}${e.multiplicity > 1 ? ` (×${e.multiplicity})` : ''}`).join(', ');
}

/** A mode that does not decay (Re ≥ 0, or |z| ≥ 1) cannot be left uncontrollable or unobservable safely. */
function notDecaying(e: { re: number; im: number }, domain: 'continuous' | 'discrete'): boolean {
  return domain === 'continuous' ? e.re >= -1e-12 : Math.hypot(e.re, e.im) >= 1 - 1e-12;
}

export function analyseModel(
  file: ExtractedFile,
  model: ModelGroup,
  reports: Map<number, MatrixReport>,
  settings: AnalysisSettings,
): ModelReport {
  const out: ModelReport = {
    id: model.id,
    state: model.state,
    input: model.input,
    output: model.output,
    feedthrough: model.feedthrough,
    domain: model.domain,
    period: model.period,
    controllability: null,
    observability: null,
    sampledControllability: null,
    sampledObservability: null,
    transferFunction: null,
    periodAdvice: null,
    continuousEquivalent: null,
    quantization: [],
    notes: [],
  };
  const stateReport = reports.get(model.state);
  const stateLit = file.matrices[model.state];
  if (!stateReport || !stateReport.spectrum || !stateLit) return out;
  const n = stateReport.rows;
  const lits = {
    B: model.input !== null ? file.matrices[model.input] : undefined,
    C: model.output !== null ? file.matrices[model.output] : undefined,
    D: model.feedthrough !== null ? file.matrices[model.feedthrough] : undefined,
    G: model.noiseInput !== null ? file.matrices[model.noiseInput] : undefined,
    Q: model.noiseCovariance !== null ? file.matrices[model.noiseCovariance] : undefined,
  };
  const fits = (lit: MatrixLiteral | undefined, rows: number | null, cols: number | null) =>
    lit !== undefined && (rows === null || lit.nRows === rows) && (cols === null || lit.nCols === cols);
  const useExact =
    stateReport.spectrum.exact && stateLit.exact && [lits.B, lits.C, lits.D].every((l) => l === undefined || l.exact) && n <= settings.exactMaxN;
  const A = matrixOf(stateLit, useExact);
  const B = fits(lits.B, n, null) ? matrixOf(lits.B, useExact) : null;
  const C = fits(lits.C, null, n) ? matrixOf(lits.C, useExact) : null;
  const D = B && C && fits(lits.D, C.length, B[0].length) ? matrixOf(lits.D, useExact) : null;
  if (!A) return out;
  const huge = (M: AnyMatrix | null) => M !== null && (M as (Rational | number)[][]).some((r) => r.some((x) => Math.abs(x instanceof Rational ? x.toNumber() : x) > 1e150));
  if ([B, C, D].some(huge)) {
    out.notes.push('An entry of B, C or D exceeds 1e150 in magnitude; the model analysis was skipped (rescale the units).');
    return out;
  }
  const domain = stateReport.domain;
  const label = stateReport.name ?? 'the state matrix';

  const addFinding = (index: number | null, f: Finding) => {
    const rep = index === null ? stateReport : reports.get(index) ?? stateReport;
    rep.findings.push(f);
  };

  try {
    if (B) {
      const r = controllability(A, B);
      if (r.ok) {
        out.controllability = r;
        if (!r.controllable) {
          const bad = r.uncontrollableEigenvalues.some((e) => notDecaying(e, domain));
          addFinding(model.input, {
            span: lits.B!.span,
            severity: bad ? 'warning' : 'information',
            code: 'uncontrollable-mode',
            message: `(${label}, ${lits.B!.name ?? 'B'}) is not controllable: rank ${r.rank} of ${r.n}${r.exact ? ' (exact)' : ' (numerical)'}. The input cannot move ${modeList(r)}${bad ? '; that mode does not decay, so no feedback through this input can stabilize it' : ''}.`,
          });
        }
      } else out.notes.push(`Controllability: ${r.error}`);
    }
    if (C) {
      const r = observability(A, C);
      if (r.ok) {
        out.observability = r;
        if (!r.controllable) {
          const bad = r.uncontrollableEigenvalues.some((e) => notDecaying(e, domain));
          addFinding(model.output, {
            span: lits.C!.span,
            severity: bad ? 'warning' : 'information',
            code: 'unobservable-mode',
            message: `(${label}, ${lits.C!.name ?? 'C'}) is not observable: rank ${r.rank} of ${r.n}${r.exact ? ' (exact)' : ' (numerical)'}. The outputs do not see ${modeList(r)}${bad ? '; that mode does not decay, so no estimator from these outputs can track it' : ''}.`,
          });
        }
      } else out.notes.push(`Observability: ${r.error}`);
    }
    if (B && C && n <= settings.closedFormMaxN) {
      const tf = transferFunction({ A, B, C, D }, domain === 'continuous' ? 's' : 'z');
      if (tf.ok) out.transferFunction = tf;
      else out.notes.push(`Transfer function: ${tf.error}`);
    }
  } catch (err) {
    out.notes.push(`Model analysis stopped: ${(err as Error).message}`);
  }

  const spectrum = stateReport.spectrum;
  const eigs = spectrum.eigenvalues.map((e) => ({ re: e.re, im: e.im }));
  if (domain === 'continuous' && model.period !== null) {
    const advice = samplePeriodAdvice(eigs, model.period, {
      timeConstantDivisor: settings.periodTimeConstantDivisor,
      minSamplesPerOscillation: settings.periodMinSamplesPerOscillation,
    });
    out.periodAdvice = advice;
    // Information-level advice (e.g. "more samples than needed") stays in the hover and the
    // report; only rules that were broken become diagnostics.
    for (const f of advice.findings) {
      if (f.severity === 'info') continue;
      addFinding(model.state, {
        span: stateLit.span,
        severity: SEVERITY[f.severity],
        code: PERIOD_CODE[f.rule] ?? f.rule,
        message: `${f.message} (${f.source})`,
      });
    }
  }

  // A discrete model with a known period: which continuous model is it the zero-order hold of?
  if (domain === 'discrete' && model.period !== null && n <= settings.closedFormMaxN) {
    const toF = (M: AnyMatrix) => (M as (Rational | number)[][]).map((r) => r.map((x) => (x instanceof Rational ? x.toNumber() : x)));
    try {
      out.continuousEquivalent = continuousFromZoh(toF(A), B ? toF(B) : null, model.period);
    } catch (err) {
      out.notes.push(`Continuous equivalent: ${(err as Error).message}`);
    }
  }

  // The discrete state matrix that firmware will hold: A itself for a discrete model, Ad otherwise.
  const disc = stateReport.discrete;
  const Ad: number[][] | null = domain === 'discrete' ? (A as (Rational | number)[][]).map((r) => r.map((x) => (x instanceof Rational ? x.toNumber() : x))) : disc?.Ad ?? null;
  if (Ad) {
    const formats = [{ kind: 'float32' as const }, ...(settings.fixedPoint ? [{ kind: 'fixed' as const, ...settings.fixedPoint }] : [])];
    for (const format of formats) {
      const q = quantizeMatrix(Ad, format, { relativeThreshold: settings.quantizationThreshold });
      if (!q.ok) {
        out.notes.push(`Rounding check: ${q.error}`);
        continue;
      }
      out.quantization.push(q);
      if (q.sensitive) {
        addFinding(model.state, quantizationFinding(q, stateLit, domain === 'discrete' ? label : `its discrete matrix Ad`, settings));
      }
    }
  }

  if (disc && disc.Bd) {
    const rc = controllability(disc.Ad, disc.Bd);
    if (rc.ok) out.sampledControllability = rc;
    if (disc.Cd) {
      const ro = observability(disc.Ad, disc.Cd);
      if (ro.ok) out.sampledObservability = ro;
    }
    if (out.controllability?.controllable && rc.ok && !rc.controllable) {
      addFinding(model.input, {
        span: lits.B!.span,
        severity: 'warning',
        code: 'uncontrollable-mode',
        message: `Sampling at T = ${formatNumber(disc.period, 6)} s loses controllability: the continuous model is controllable, the sampled one has rank ${rc.rank} of ${rc.n} (${modeList(rc)}).`,
      });
    }
  }

  // Discrete process noise when a noise intensity is given (G defaults to the identity).
  if (disc && lits.Q && fits(lits.Q, null, null)) {
    const Qc = matrixOf(lits.Q, false) as number[][] | null;
    const G = lits.G ? (matrixOf(lits.G, false) as number[][] | null) : null;
    const Af = (A as (Rational | number)[][]).map((r) => r.map((x) => (x instanceof Rational ? x.toNumber() : x)));
    if (Qc) {
      const pn = processNoise(Af, Qc, disc.period, G);
      if (pn.ok) disc.Qd = pn.Qd;
      else out.notes.push(`Process noise: ${pn.error}`);
    }
  }
  return out;
}

function quantizationFinding(q: QuantizationSuccess, lit: MatrixLiteral, what: string, settings: AnalysisSettings): Finding {
  const fmtName = q.format.kind === 'float32' ? 'float32' : `Q${q.format.integerBits}.${q.format.fractionalBits} fixed point`;
  const worst = q.poles.reduce((x, y) => (y.equivalentShift > x.equivalentShift ? y : x), q.poles[0]);
  const crossed = q.crossedUnitCircle ? ' A pole crossed onto or outside the unit circle: the rounded filter is not stable.' : '';
  return {
    span: lit.span,
    severity: 'warning',
    code: 'float32-sensitive',
    message: `Rounding ${what} to ${fmtName} moves a pole by ${formatNumber(worst.movement, 3)}, which changes its time constant or frequency by ${formatNumber(100 * worst.equivalentShift, 3)} % (above ${formatNumber(100 * settings.quantizationThreshold, 3)} %, setting eigenlens.quantizationThreshold): z = ${formatNumber(worst.before.re, 12)}${worst.before.im ? ` ${worst.before.im < 0 ? '−' : '+'} ${formatNumber(Math.abs(worst.before.im), 12)}j` : ''} becomes ${formatNumber(worst.after.re, 12)}${worst.after.im ? ` ${worst.after.im < 0 ? '−' : '+'} ${formatNumber(Math.abs(worst.after.im), 12)}j` : ''}.${crossed}${q.saturated.length ? ` ${q.saturated.length} entr${q.saturated.length === 1 ? 'y saturates' : 'ies saturate'}.` : ''}`,
  };
}
