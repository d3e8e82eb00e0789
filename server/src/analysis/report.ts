/**
 * The analysis result for one document: one MatrixReport per matrix literal found, plus
 * model-level results. Plain data, produced by analysis/analyze.ts and consumed by ide/
 * (hover, lenses, diagnostics, actions) and cli/ (text, JSON, SARIF).
 */
import type { Mode, Spectrum, Stability, TransitionClosedForm, Domain } from '../engine/types';
import type { ReachabilityResult } from '../engine/controllability';
import type { TransferFunctionSuccess } from '../engine/transferFunction';
import type { PeriodAdvice } from '../engine/samplePeriod';
import type { QuantizationSuccess } from '../engine/quantize';
import type { ContinuousFromZohResult } from '../engine/matrixLog';
import type { MatrixRole, Problem, SourceLanguage, Span, EntryValue } from '../syntax/types';

/** A finding with a stable code of ours, at a document range. */
export interface Finding extends Problem {
  /** Optional machine-readable data for quick fixes (e.g. the pragma text to insert). */
  data?: Record<string, unknown>;
}

export interface DiscreteModel {
  method: 'zoh' | 'tustin' | 'euler' | 'backward-euler' | 'foh';
  period: number;
  Ad: number[][];
  Bd: number[][] | null;
  Cd?: number[][] | null;
  Dd?: number[][] | null;
  Qd?: number[][] | null;
  /** Exact text entries when the method kept exactness (Tustin/Euler of rational input). */
  exact?: { Ad: string[][]; Bd: string[][] | null; Cd?: string[][] | null; Dd?: string[][] | null } | null;
}

export interface MatrixReport {
  /** Index in ExtractedFile.matrices. */
  index: number;
  name: string | null;
  /** 1-based line and column of the literal's start, as the CLI prints them. */
  line: number;
  column: number;
  span: Span;
  nameSpan: Span | null;
  statementSpan: Span;
  rows: number;
  cols: number;
  role: MatrixRole;
  modelId: string | null;
  domain: Domain;
  period: number | null;
  exact: boolean;
  /** Span of each entry, row-major, for entry hovers (optional: filled when the analysis has it). */
  entrySpans?: Span[][];
  /** Entries as evaluated, row-major (null where an entry failed to evaluate). */
  values: (EntryValue | null)[][];
  /** State matrices only; null when the matrix is not square, failed to evaluate, or is over a cap. */
  spectrum: Spectrum | null;
  stability: Stability | null;
  modes: Mode[];
  /**
   * The closed form, built on first read (so only read it where it is shown: hovers, actions,
   * the CLI). Not an own enumerable property: copying a report does not build it.
   */
  readonly transition: TransitionClosedForm | null;
  /** A closed form can be built (a spectrum, within the size cap, no earlier failure); reading this builds nothing. */
  closedFormAvailable: boolean;
  discrete: DiscreteModel | null;
  findings: Finding[];
  /** What was not computed and why (caps, bad entries). */
  skipped: string[];
  /** Content hash used by the cache (entries, domain, period, settings that matter). */
  hash: string;
}

export interface ModelReport {
  id: string;
  state: number;
  input: number | null;
  output: number | null;
  feedthrough: number | null;
  domain: Domain;
  period: number | null;
  /** Kalman rank and uncontrollable modes of (A, B); null without B or when not computed. */
  controllability: ReachabilityResult | null;
  /** Rank and unobservable modes of (A, C); null without C. */
  observability: ReachabilityResult | null;
  /** The same for the sampled model (Ad, Bd) / (Ad, Cd) when a discretization exists. */
  sampledControllability: ReachabilityResult | null;
  sampledObservability: ReachabilityResult | null;
  /** C(sI − A)⁻¹B + D (or the z-domain one), entries[output][input]. */
  transferFunction: TransferFunctionSuccess | null;
  /** Sample-period advice for a continuous model with a known period. */
  periodAdvice: PeriodAdvice | null;
  /**
   * Discrete model with a period: the continuous (A, B) whose zero-order hold it is (a real
   * principal matrix logarithm), or why none exists (e.g. eigenvalues on the negative real axis).
   */
  continuousEquivalent: ContinuousFromZohResult | null;
  /** Float32 (and fixed-point, when set) rounding of the discrete state matrix. */
  quantization: QuantizationSuccess[];
  /** Why any of the above was not computed. */
  notes: string[];
}

export interface DocumentReport {
  language: SourceLanguage;
  matrices: MatrixReport[];
  models: ModelReport[];
  /** Findings not tied to one matrix (parse errors, unknown names, file caps). */
  findings: Finding[];
  /** The time budget ran out: some state matrices were not analysed in this pass (a later pass continues). */
  incomplete?: boolean;
  /** Only the matrix at the focus and the other matrices of its model are in it (AnalyzeOptions.focusOnly). */
  partial?: boolean;
}
