/**
 * Code lenses above each state matrix: the verdict with the dominant mode (click: the full
 * analysis), "copy Φ(t)" (the closed form as text, fetched on click) and the domain switch. Plain data; the
 * lsp layer turns each into an LSP CodeLens with the command ids of shared/protocol.ts.
 */
import type { DocumentReport } from '../analysis/report';
import type { Span } from '../syntax/types';
import { Commands } from '../shared/protocol';
import { lensTitle } from './summary';

export interface PlainLens {
  span: Span;
  title: string;
  command: string;
  /** Arguments after the document URI (the lsp layer prepends the URI where the command takes one). */
  args: unknown[];
  needsUri: boolean;
  /** The title is left for codeLens/resolve (see COMPACT_LENSES_ABOVE); `verdictLens` fills it. */
  unresolved?: boolean;
}

/** The verdict lens of one state matrix, as a resolve request completes it. */
export function verdictLens(report: DocumentReport, matrixIndex: number, precision: number): PlainLens | null {
  const matrix = report.matrices.find((m) => m.index === matrixIndex && m.role === 'state');
  if (!matrix) return null;
  return { span: matrix.nameSpan ?? matrix.span, title: lensTitle(matrix, precision), command: Commands.showFullAnalysis, args: [matrix.index], needsUri: true };
}

/**
 * Above this many state matrices a document gets the verdict lens only (no copy or domain
 * lens: those stay in the command palette and the code actions), and the lens titles are
 * filled in when the editor shows them (codeLens/resolve): 30,000 lenses of a 10,000-matrix
 * file would take longer to build and send than an editor waits.
 */
export const COMPACT_LENSES_ABOVE = 200;

/** A verdict lens whose title codeLens/resolve fills in. */
export function unresolvedLens(index: number, span: Span): PlainLens {
  return { span, title: '', command: Commands.showFullAnalysis, args: [index], needsUri: true, unresolved: true };
}

export function lensesOf(report: DocumentReport, precision: number): PlainLens[] {
  const out: PlainLens[] = [];
  const states = report.matrices.filter((m) => m.role === 'state');
  const compact = states.length > COMPACT_LENSES_ABOVE;
  for (const matrix of states) {
    const span = matrix.nameSpan ?? matrix.span;
    if (compact) {
      out.push(unresolvedLens(matrix.index, span));
      continue;
    }
    out.push({ span, title: lensTitle(matrix, precision), command: Commands.showFullAnalysis, args: [matrix.index], needsUri: true });
    // The text is fetched when the lens is clicked (eigenlens/transitionText): building every
    // closed form of a file to fill lens arguments would cost more than the whole analysis.
    if (matrix.closedFormAvailable) {
      out.push({ span, title: matrix.domain === 'continuous' ? 'copy Φ(t)' : 'copy A^k', command: Commands.copyTransitionMatrix, args: [matrix.index], needsUri: true });
    }
    const other = matrix.domain === 'continuous' ? 'discrete' : 'continuous';
    out.push({ span, title: `read as ${other}-time`, command: Commands.serverSwitchDomain, args: [matrix.index, other], needsUri: true });
  }
  return out;
}
