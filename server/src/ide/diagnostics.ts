/**
 * Findings from the analysis (document-wide and per matrix) as plain diagnostics: our stable
 * code, severity, message and exact range, all with source "eigenlens". Duplicates (the same
 * code, range and message reported twice along the analysis) are dropped.
 */
import type { DocumentReport, Finding } from '../analysis/report';
import type { Severity, Span } from '../syntax/types';
import { DIAGNOSTIC_SOURCE } from '../shared/protocol';
import { groupedInteger } from '../analysis/numberText';

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

const SEVERITY_RANK: Record<Severity, number> = { error: 0, warning: 1, information: 2, hint: 3 };

/**
 * At most `max` diagnostics (setting eigenlens.maxDiagnostics): a file of 10,000 matrices has
 * thousands of findings, and publishing them all costs the editor and the server more than
 * they are worth (a 7,500-diagnostic list was about 2.5 MB of JSON, sent after every pass).
 * Kept first: the notes about the document as a whole (no matrix: time budget, file limits);
 * then by severity, errors first; within a severity, in document order. One more
 * information diagnostic at the top of the file says how many were left out; hovers and the
 * full analysis still show every matrix's findings. The result is in document order.
 */
export function capDiagnostics(list: PlainDiagnostic[], max: number): PlainDiagnostic[] {
  if (list.length <= max) return list;
  const keep = Math.max(0, max - 1);
  const order = list.map((d, i) => ({ d, i })).sort((a, b) => Number(a.d.matrixIndex !== null) - Number(b.d.matrixIndex !== null) || SEVERITY_RANK[a.d.severity] - SEVERITY_RANK[b.d.severity] || a.i - b.i);
  const kept = order.slice(0, keep).sort((a, b) => a.i - b.i).map((x) => x.d);
  const left = list.length - keep;
  const note: PlainDiagnostic = {
    span: { start: 0, end: 0 },
    severity: 'information',
    code: 'diagnostics-limit',
    message: `eigenlens shows ${groupedInteger(keep)} of ${groupedInteger(list.length)} findings in this file (setting eigenlens.maxDiagnostics): notes on the whole file first, then errors, warnings and notes in file order. ${groupedInteger(left)} are left out; a matrix's hover and its full analysis show all of its findings.`,
    source: DIAGNOSTIC_SOURCE,
    matrixIndex: null,
  };
  return [note, ...kept];
}
