/**
 * Every command the client contributes, by id. The ids the server also knows (lens and
 * hover links) come from the shared protocol file; the rest are the client's own.
 */
import { Commands } from '../../server/src/shared/protocol';

export const ClientCommands = {
  /** Full analysis in a read-only `eigenlens-report:` document. Args: [uri?, matrixIndex?]. */
  showFullAnalysis: Commands.showFullAnalysis,
  /** Copy Φ(t) or A^k as text. Args: [text?]; without text, the matrix at the cursor. */
  copyTransitionMatrix: Commands.copyTransitionMatrix,
  /** Flip the domain of the matrix at the cursor (runs the server's serverSwitchDomain command). */
  switchDomain: Commands.switchDomain,
  /** Ask for a sample period, then for the discrete model of the matrix at the cursor. */
  discretizeAtPeriod: 'eigenlens.discretizeAtPeriod',
  /** The discrete model of the matrix at the cursor as C array initializers, to the clipboard. */
  copyAsCArrays: 'eigenlens.copyAsCArrays',
  /** Stop and start the language server; also resets the crash-restart budget. */
  restartServer: 'eigenlens.restartServer',
} as const;

/** URI scheme of the read-only report documents. */
export const REPORT_SCHEME = 'eigenlens-report';

export const DOCUMENT_LANGUAGES = ['python', 'typescript', 'javascript', 'typescriptreact', 'lti'] as const;
