/**
 * Code lenses above each state matrix: the verdict with the dominant mode (click: the full
 * analysis), "Copy Φ(t)" (the closed form as text) and the domain switch. Plain data; the
 * lsp layer turns each into an LSP CodeLens with the command ids of shared/protocol.ts.
 */
import type { DocumentReport } from '../analysis/report';
import type { Span } from '../syntax/types';
import { Commands } from '../shared/protocol';
import { asciiMinus, transitionText, transitionTitle } from './format';
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
    if (matrix.transition) {
      const name = matrix.name ?? 'A';
      const text = `${transitionTitle(name, matrix.transition.variable)}\n${transitionText(matrix.transition, precision)}\n`;
      out.push({
        span,
        title: matrix.transition.variable === 't' ? 'copy Φ(t)' : 'copy A^k',
        command: Commands.copyTransitionMatrix,
        args: [asciiMinus(text)],
        needsUri: false,
      });
    }
    const other = matrix.domain === 'continuous' ? 'discrete' : 'continuous';
    out.push({ span, title: `read as ${other}-time`, command: Commands.serverSwitchDomain, args: [matrix.index, other], needsUri: true });
  }
  return out;
}
