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
}

export function lensesOf(report: DocumentReport, precision: number): PlainLens[] {
  const out: PlainLens[] = [];
  for (const matrix of report.matrices) {
    if (matrix.role !== 'state') continue;
    const span = matrix.nameSpan ?? matrix.span;
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
