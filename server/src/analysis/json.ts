/**
 * The versioned JSON report of DESIGN.md §6 (version 1). Fields beyond the schema
 * (modes, the closed-form check, diagnostic positions) are additions a reader may ignore.
 */
import type { DocumentReport, MatrixReport } from './report';
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

function matrixJson(m: MatrixReport, text: string) {
  const spec = m.spectrum;
  return {
    name: m.name,
    line: m.line,
    column: m.column,
    rows: m.rows,
    cols: m.cols,
    role: m.role,
    model: m.modelId,
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
      matrices: report.matrices.map((m) => matrixJson(m, text)),
      diagnostics: report.findings.map((f) => ({ code: f.code, severity: f.severity, message: f.message, ...lineColumnAt(text, f.span.start) })),
    })),
  };
}
