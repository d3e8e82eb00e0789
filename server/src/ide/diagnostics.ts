/**
 * Findings from the analysis (document-wide and per matrix) as plain diagnostics: our stable
 * code, severity, message and exact range, all with source "eigenlens". Duplicates (the same
 * code, range and message reported twice along the analysis) are dropped.
 */
import type { DocumentReport, Finding } from '../analysis/report';
import type { Severity, Span } from '../syntax/types';
import { DIAGNOSTIC_SOURCE } from '../shared/protocol';

export interface PlainDiagnostic {
  span: Span;
  severity: Severity;
  code: string;
  message: string;
  source: string;
  /** MatrixReport.index of the matrix the finding belongs to, when it belongs to one. */
  matrixIndex: number | null;
  data?: Record<string, unknown>;
}

export function diagnosticsOf(report: DocumentReport): PlainDiagnostic[] {
  const out: PlainDiagnostic[] = [];
  const seen = new Set<string>();
  const push = (finding: Finding, matrixIndex: number | null) => {
    const key = `${finding.code}|${finding.span.start}|${finding.span.end}|${finding.message}`;
    if (seen.has(key)) return;
    seen.add(key);
    out.push({
      span: finding.span,
      severity: finding.severity,
      code: finding.code,
      message: finding.message,
      source: DIAGNOSTIC_SOURCE,
      matrixIndex,
      ...(finding.data ? { data: finding.data } : {}),
    });
  };
  for (const finding of report.findings) push(finding, matrixIndexAt(report, finding.span));
  for (const matrix of report.matrices) for (const finding of matrix.findings) push(finding, matrix.index);
  return out.sort((a, b) => a.span.start - b.span.start || a.span.end - b.span.end || a.code.localeCompare(b.code));
}

function matrixIndexAt(report: DocumentReport, span: Span): number | null {
  const m = report.matrices.find((mat) => span.start >= mat.statementSpan.start && span.end <= mat.statementSpan.end);
  return m ? m.index : null;
}
