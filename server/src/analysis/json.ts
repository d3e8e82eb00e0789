/**
 * The versioned JSON report of DESIGN.md §6 (version 1). Fields beyond the schema
 * (modes, the closed-form check, diagnostic positions) are additions a reader may ignore.
 */
import type { DocumentReport, MatrixReport, ModelReport } from './report';
import { lineColumnAt } from './position';

export const JSON_REPORT_VERSION = 1;

export interface JsonFileInput {
  path: string;
  text: string;
  report: DocumentReport;
}

function finite(x: number | null | undefined): number | null {
  return x === null || x === undefined || !Number.isFinite(x) ? null : x;
}

function reach(r: ModelReport['controllability']) {
  return r ? { rank: r.rank, n: r.n, full: r.controllable, exact: r.exact, missing: r.uncontrollableEigenvalues.map((e) => ({ text: e.text, re: e.re, im: e.im, multiplicity: e.multiplicity })) } : null;
}

function modelJson(model: ModelReport | undefined) {
  if (!model) return null;
  const ce = model.continuousEquivalent;
  return {
    id: model.id,
    controllability: reach(model.controllability),
    observability: reach(model.observability),
    sampledControllability: reach(model.sampledControllability),
    sampledObservability: reach(model.sampledObservability),
    transferFunction: model.transferFunction
      ? {
          variable: model.transferFunction.variable,
          exact: model.transferFunction.exact,
          entries: model.transferFunction.entries.map((row) =>
            row.map((e) => ({ text: e.text, numerator: e.numerator, denominator: e.denominator, poles: e.poles, zeros: e.zeros })),
          ),
        }
      : null,
    periodAdvice: model.periodAdvice ? { recommended: model.periodAdvice.recommended, findings: model.periodAdvice.findings.map((f) => ({ rule: f.rule, severity: f.severity, message: f.message, source: f.source })) } : null,
    continuousEquivalent: ce ? (ce.ok ? { A: ce.A, B: ce.B, residual: ce.residual } : { error: ce.reason }) : null,
    quantization: model.quantization.map((q) => ({ format: q.format, maxMovement: q.maxMovement, maxEquivalentShift: q.maxEquivalentShift, crossedUnitCircle: q.crossedUnitCircle, sensitive: q.sensitive })),
  };
}

function matrixJson(m: MatrixReport, text: string, models: ModelReport[]) {
  const spec = m.spectrum;
  return {
    name: m.name,
    line: m.line,
    column: m.column,
    rows: m.rows,
    cols: m.cols,
    role: m.role,
    modelId: m.modelId,
    domain: m.domain,
    period: m.period,
    exact: m.exact,
    eigenvalues: spec
      ? spec.eigenvalues.map((e) => ({ re: e.re, im: e.im, text: e.text, algebraic: e.algebraic, geometric: e.geometric, blocks: e.blocks }))
      : [],
    multiplicities: spec ? (spec.exact ? 'exact' : 'numerical') : null,
    defective: spec ? spec.defective : null,
    stability: m.stability,
    modes: m.modes.map((mode) => ({
      eigenvalue: spec?.eigenvalues[mode.eigenvalueIndex]?.text ?? null,
      behaviour: mode.behaviour,
      timeConstant: finite(mode.timeConstant),
      naturalFrequency: finite(mode.naturalFrequency),
      dampingRatio: finite(mode.dampingRatio),
      period: finite(mode.period),
      settlingTime2pct: finite(mode.settlingTime2pct),
      doublingTime: finite(mode.doublingTime),
    })),
    transition: m.transition
      ? {
          variable: m.transition.variable,
          entries: m.transition.entries,
          exactCoefficients: m.transition.exactCoefficients,
          check: m.transition.check,
          conditioning: m.transition.conditioning,
        }
      : null,
    discrete: m.discrete,
    model: m.role === 'state' ? modelJson(models.find((x) => x.state === m.index)) : null,
    diagnostics: m.findings.map((f) => ({ code: f.code, severity: f.severity, message: f.message, ...lineColumnAt(text, f.span.start) })),
    skipped: m.skipped,
  };
}

export function jsonReport(files: JsonFileInput[]) {
  return {
    version: JSON_REPORT_VERSION,
    files: files.map(({ path, text, report }) => ({
      path,
      language: report.language,
      matrices: report.matrices.map((m) => matrixJson(m, text, report.models)),
      diagnostics: report.findings.map((f) => ({ code: f.code, severity: f.severity, message: f.message, ...lineColumnAt(text, f.span.start) })),
    })),
  };
}
