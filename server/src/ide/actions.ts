/**
 * Code actions at a range, as plain data: quick fixes tied to our diagnostics (read the
 * matrix in the other time domain by adding or rewriting the pragma), and rewrites that
 * write code (insert the closed-form Φ as a function; for every state matrix at once as a
 * source action; insert the discrete-time model of a continuous state matrix whose period
 * is known, by ZOH, Tustin, forward and backward Euler; the same as C initializers inside a
 * comment block, for editors without our clipboard command).
 */
import type { DocumentReport, MatrixReport } from '../analysis/report';
import type { SourceLanguage, Span } from '../syntax/types';
import type { TextEdit } from './edits';
import { domainEdit } from './pragmaEdit';
import { phiBlockExists, phiFunctionName, phiInsertEdit, supportsPhiCode } from './phiCode';
import { cCommentInsertEdit, discreteInsertEdit, METHOD_LABEL } from './discreteCode';
import type { DiscretizationMethod } from '../engine/discretize';

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
  /** The edits; empty when `resolveEdits` builds them (the LSP layer defers those to codeAction/resolve). */
  edits: TextEdit[];
  /** Builds the edits on demand: set on actions that need closed forms, which are costly to build for a menu. */
  resolveEdits?: () => TextEdit[];
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
  /** Significant digits for generated code (17 = shortest round-trip). */
  codePrecision?: number;
}

/** The "every state matrix" source action is offered up to this many matrices. */
export const MAX_INSERT_ALL = 200;

/** The methods offered as insert actions, in menu order (first-order hold only through eigenlens/discretize). */
export const INSERT_METHODS: readonly DiscretizationMethod[] = ['zoh', 'tustin', 'euler', 'backward-euler'];

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
    if (supportsPhiCode(language) && matrix.closedFormAvailable && wanted('refactor.rewrite', request.only)) {
      const what = matrix.domain === 'continuous' ? 'Φ(t)' : 'A^k';
      out.push({
        title: `${phiBlockExists(matrix, language, text) ? 'Regenerate' : 'Insert'} ${what} of ${label(matrix)} as function ${phiFunctionName(matrix)}`,
        kind: 'refactor.rewrite',
        edits: [],
        resolveEdits: () => {
          const insert = phiInsertEdit(matrix, language, text);
          return insert ? [insert] : [];
        },
        fixes: [],
      });
    }
    if (matrix.domain === 'continuous' && matrix.period !== null && wanted('refactor.rewrite', request.only)) {
      out.push(...discreteActions(report, matrix, text, language, matrix.period, request.codePrecision ?? 17));
    }
  }
  if (supportsPhiCode(language) && wanted('source', request.only)) {
    const withClosedForm = states.filter((m) => m.closedFormAvailable);
    // One function per matrix is code for people to read: beyond a few hundred it is neither
    // readable nor quick to build (each needs its closed form), so it is not offered.
    if (withClosedForm.length > 0 && withClosedForm.length <= MAX_INSERT_ALL) {
      out.push({
        title: `Insert the transition function of every state matrix (${withClosedForm.length})`,
        kind: 'source',
        edits: [],
        resolveEdits: () => withClosedForm.map((m) => phiInsertEdit(m, language, text)).filter((e): e is TextEdit => e !== null),
        fixes: [],
      });
    }
  }
  return out;
}

function periodWords(T: number): string {
  return `T = ${String(T)} s`;
}

/** Insert/update the discrete model by each method, then the C initializers as a comment. */
function discreteActions(report: DocumentReport, matrix: MatrixReport, text: string, language: SourceLanguage, period: number, precision: number): PlainCodeAction[] {
  const out: PlainCodeAction[] = [];
  for (const method of INSERT_METHODS) {
    const insert = discreteInsertEdit(report, matrix, language, text, { period, method, precision });
    if (!('edit' in insert)) continue;
    out.push({
      title: `${insert.replacing ? 'Update' : 'Insert'} discrete model of ${label(matrix)} (${METHOD_LABEL[method]}, ${periodWords(period)})`,
      kind: 'refactor.rewrite',
      edits: [insert.edit],
      fixes: [],
    });
  }
  const method: DiscretizationMethod = matrix.discrete?.method ?? 'zoh';
  const c = cCommentInsertEdit(report, matrix, language, text, { period, method, precision });
  if ('edit' in c) {
    out.push({
      title: `${c.replacing ? 'Update' : 'Insert'} C initializers of the discrete model of ${label(matrix)} as a comment (${METHOD_LABEL[method]}, ${periodWords(period)})`,
      kind: 'refactor.rewrite',
      edits: [c.edit],
      fixes: [],
    });
  }
  return out;
}
