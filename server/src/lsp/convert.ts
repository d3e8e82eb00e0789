/**
 * The one converter between our plain data (UTF-16 offsets, our severities, Markdown text)
 * and LSP types. TextDocument does the offset ↔ Position work, so surrogate pairs and CRLF
 * line ends are handled the way every LSP client expects (UTF-16 code units).
 */
import {
  CodeAction,
  CodeActionKind,
  type CodeLens,
  Diagnostic,
  DiagnosticSeverity,
  type Hover,
  MarkupKind,
  type Range,
  TextEdit as LspTextEdit,
  type WorkspaceEdit,
} from 'vscode-languageserver/node';
import type { TextDocument } from 'vscode-languageserver-textdocument';
import type { Severity, Span } from '../syntax/types';
import type { PlainDiagnostic } from '../ide/diagnostics';
import type { PlainLens } from '../ide/lens';
import { ACTION_KINDS, type PlainCodeAction } from '../ide/actions';
import type { TextEdit } from '../ide/edits';
import type { HoverResult } from '../ide/hover';

export function toRange(doc: TextDocument, span: Span): Range {
  return { start: doc.positionAt(span.start), end: doc.positionAt(span.end) };
}

export function toSpan(doc: TextDocument, range: Range): Span {
  return { start: doc.offsetAt(range.start), end: doc.offsetAt(range.end) };
}

const SEVERITIES: Record<Severity, DiagnosticSeverity> = {
  error: DiagnosticSeverity.Error,
  warning: DiagnosticSeverity.Warning,
  information: DiagnosticSeverity.Information,
  hint: DiagnosticSeverity.Hint,
};

export function toDiagnostic(doc: TextDocument, d: PlainDiagnostic): Diagnostic {
  const diagnostic = Diagnostic.create(toRange(doc, d.span), d.message, SEVERITIES[d.severity], d.code, d.source);
  if (d.data !== undefined || d.matrixIndex !== null) diagnostic.data = { ...(d.data ?? {}), matrixIndex: d.matrixIndex };
  return diagnostic;
}

export function toHover(doc: TextDocument, h: HoverResult): Hover {
  return { contents: { kind: MarkupKind.Markdown, value: h.markdown }, range: toRange(doc, h.span) };
}

/**
 * What an unresolved lens carries for codeLens/resolve: [document key, version, matrix index].
 * The key is a small number the server maps to the document's URI (LensDocumentKeys): a
 * 10,000-matrix file sends 10,000 of these, and the URI in each was half the answer's size.
 */
export type LensData = [number, number, number];

export function lensData(x: unknown): { key: number; version: number; matrixIndex: number } | null {
  if (!Array.isArray(x) || x.length !== 3 || !x.every((v) => Number.isInteger(v))) return null;
  return { key: x[0] as number, version: x[1] as number, matrixIndex: x[2] as number };
}

export function toLens(doc: TextDocument, lens: PlainLens, docKey = 0): CodeLens {
  const args = lens.needsUri ? [doc.uri, ...lens.args] : lens.args;
  if (lens.unresolved) {
    const data: LensData = [docKey, doc.version, lens.args[0] as number];
    return { range: toRange(doc, lens.span), data };
  }
  return { range: toRange(doc, lens.span), command: { title: lens.title, command: lens.command, arguments: args } };
}

export function toTextEdits(doc: TextDocument, edits: TextEdit[]): LspTextEdit[] {
  return edits.map((e) => LspTextEdit.replace(toRange(doc, e.span), e.newText));
}

export function toWorkspaceEdit(doc: TextDocument, edits: TextEdit[]): WorkspaceEdit {
  return {
    documentChanges: [{ textDocument: { uri: doc.uri, version: doc.version }, edits: toTextEdits(doc, edits) }],
  };
}

/**
 * `deferred`: the client resolves edits (codeAction/resolve), so an action with costly edits
 * goes out without them and with `data` for the resolve request to find it again.
 */
export function toCodeAction(doc: TextDocument, action: PlainCodeAction, contextDiagnostics: Diagnostic[], deferred?: unknown): CodeAction {
  const kind = action.kind === 'quickfix' ? CodeActionKind.QuickFix : ACTION_KINDS[action.kind];
  const result: CodeAction = action.resolveEdits && deferred !== undefined ? { title: action.title, kind, data: deferred } : CodeAction.create(action.title, toWorkspaceEdit(doc, action.resolveEdits ? action.resolveEdits() : action.edits), kind);
  if (action.fixes.length) result.diagnostics = contextDiagnostics.filter((d) => typeof d.code === 'string' && action.fixes.includes(d.code));
  if (action.isPreferred) result.isPreferred = true;
  return result;
}
