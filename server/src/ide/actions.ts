/**
 * Code actions at a range, as plain data: quick fixes tied to our diagnostics (read the
 * matrix in the other time domain by adding or rewriting the pragma), and rewrites that
 * write code (insert the closed-form Φ as a function; for every state matrix at once as a
 * source action).
 */
import type { DocumentReport, MatrixReport } from '../analysis/report';
import type { SourceLanguage, Span } from '../syntax/types';
import type { TextEdit } from './edits';
import { domainEdit } from './pragmaEdit';
import { phiFunctionName, phiInsertEdit, supportsPhiCode } from './phiCode';

export type ActionKind = 'quickfix' | 'refactor.rewrite' | 'source';

/** LSP kind strings of our actions (source actions get a sub-kind of ours). */
export const ACTION_KINDS: Record<ActionKind, string> = {
  quickfix: 'quickfix',
  'refactor.rewrite': 'refactor.rewrite',
  source: 'source.eigenlens.insertAllTransitions',
};

export interface PlainCodeAction {
  title: string;
  kind: ActionKind;
  edits: TextEdit[];
  /** Codes of the diagnostics (at the request range) this action fixes. */
  fixes: string[];
  isPreferred?: boolean;
}

export interface ActionRequest {
  span: Span;
  /** Codes of our diagnostics the client sent in the request context. */
  diagnosticCodes: string[];
  /** Only these kinds (prefix match, as LSP `only`); empty = all. */
  only: string[];
}

const overlaps = (a: Span, b: Span) => a.start <= b.end && b.start <= a.end;

const DOMAIN_FIX_CODES = new Set(['unstable-mode', 'marginally-stable']);

function wanted(kind: ActionKind, only: string[]): boolean {
  if (only.length === 0) return true;
  const full = ACTION_KINDS[kind];
  return only.some((o) => full === o || full.startsWith(`${o}.`));
}

function label(matrix: MatrixReport): string {
  return matrix.name ?? `the matrix at line ${matrix.line}`;
}

export function codeActionsAt(report: DocumentReport, text: string, language: SourceLanguage, request: ActionRequest): PlainCodeAction[] {
  const out: PlainCodeAction[] = [];
  const states = report.matrices.filter((m) => m.role === 'state');
  for (const matrix of states) {
    if (!overlaps(request.span, matrix.statementSpan)) continue;
    const other = matrix.domain === 'continuous' ? 'discrete' : 'continuous';
    const edit = domainEdit(text, language, matrix, other);
    const fixes = request.diagnosticCodes.filter((c) => DOMAIN_FIX_CODES.has(c));
    if (edit) {
      const title = `Read ${label(matrix)} as ${other}-time (${language === 'lti' ? 'system header' : 'eigenlens pragma'})`;
      if (fixes.length > 0 && wanted('quickfix', request.only)) out.push({ title, kind: 'quickfix', edits: [edit], fixes });
      else if (wanted('refactor.rewrite', request.only)) out.push({ title, kind: 'refactor.rewrite', edits: [edit], fixes: [] });
    }
    if (supportsPhiCode(language) && matrix.transition && wanted('refactor.rewrite', request.only)) {
      const insert = phiInsertEdit(matrix, language, text);
      if (insert) {
        const what = matrix.transition.variable === 't' ? 'Φ(t)' : 'A^k';
        const replacing = insert.span.end > insert.span.start;
        out.push({
          title: `${replacing ? 'Regenerate' : 'Insert'} ${what} of ${label(matrix)} as function ${phiFunctionName(matrix)}`,
          kind: 'refactor.rewrite',
          edits: [insert],
          fixes: [],
        });
      }
    }
  }
  if (supportsPhiCode(language) && wanted('source', request.only)) {
    const edits = states.filter((m) => m.transition).map((m) => phiInsertEdit(m, language, text)).filter((e): e is TextEdit => e !== null);
    if (edits.length > 0) {
      out.push({ title: `Insert the transition function of every state matrix (${edits.length})`, kind: 'source', edits, fixes: [] });
    }
  }
  return out;
}
