/**
 * What the source extractors find in a document: matrix literals with the exact range of
 * every entry, constants, pragmas and problems. Plain data; no LSP or engine types.
 * Offsets are UTF-16 code-unit offsets into the document text (as LSP and tree-sitter use).
 */
import type { Rational } from '../engine/rational';

export type SourceLanguage = 'python' | 'typescript' | 'javascript' | 'lti';

export interface Span {
  start: number;
  end: number;
}

export type Severity = 'error' | 'warning' | 'information' | 'hint';

/** A problem found while reading the source; `code` is one of our stable codes (e.g. `unknown-name`). */
export interface Problem {
  span: Span;
  severity: Severity;
  code: string;
  message: string;
}

/** An entry's value: exact rational when all arithmetic was rational, else a double. */
export type EntryValue = { kind: 'exact'; value: Rational } | { kind: 'float'; value: number };

export interface MatrixEntry {
  span: Span;
  text: string;
  /** null when the entry could not be evaluated (a Problem then points at `span`). */
  value: EntryValue | null;
}

export type MatrixRole =
  | 'state' // A, F (state matrix / transition)
  | 'input' // B
  | 'output' // C, H
  | 'feedthrough' // D
  | 'noise-input' // G
  | 'noise-covariance' // Q, Qc (process noise intensity/covariance)
  | 'unknown';

/** Settings carried by a pragma comment such as `# eigenlens: discrete period=0.01`. */
export interface Pragma {
  span: Span;
  domain?: 'continuous' | 'discrete';
  period?: EntryValue;
  role?: MatrixRole;
  /** Explicit model name to group matrices by. */
  model?: string;
  /** Skip this matrix entirely. */
  ignore?: boolean;
}

export interface MatrixLiteral {
  /** Variable or block name (`A`, `A_cl`, `B`), null for an anonymous literal. */
  name: string | null;
  nameSpan: Span | null;
  /** The literal itself, from its first bracket (or `np.array(`) to its last. */
  span: Span;
  /** The whole statement (assignment) containing it; code actions insert after it. */
  statementSpan: Span;
  rows: MatrixEntry[][];
  /** Span of each row's bracket (or line, in .lti files). */
  rowSpans: Span[];
  nRows: number;
  nCols: number;
  /** Every entry has an exact value. */
  exact: boolean;
  /** Role from the name or pragma. */
  role: MatrixRole;
  /** Grouping key derived from the name suffix (A_cl → "cl") or the .lti system name. */
  groupKey: string;
  pragma: Pragma | null;
  /** Full left-hand side when it is more than the name (`self.A`, `sys.A` for an object property). */
  qualifiedName?: string;
}

/** A constant resolved from an earlier assignment (`m = 1.5`, `const k = 40;`, `param g = 9.81`). */
export interface Constant {
  name: string;
  span: Span;
  value: EntryValue;
}

export interface ExtractedFile {
  language: SourceLanguage;
  matrices: MatrixLiteral[];
  constants: Constant[];
  /** File-wide pragma (first pragma not attached to a matrix), if any. */
  filePragma: Pragma | null;
  problems: Problem[];
  /** .lti files: per-system metadata (state/input/output names, declared domain and period). */
  systems: LtiSystemInfo[];
}

export interface LtiSystemInfo {
  name: string;
  nameSpan: Span;
  span: Span;
  domain: 'continuous' | 'discrete' | null;
  period: EntryValue | null;
  states: string[];
  inputs: string[];
  outputs: string[];
}
