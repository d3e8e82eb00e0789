/**
 * Settings that change what the analysis computes. One plain object per document (the
 * language server caches it per resource); the CLI builds one from its flags.
 */
export interface AnalysisSettings {
  /** Domain of a state matrix when neither a pragma, a name suffix nor a .lti system says. */
  defaultDomain: 'continuous' | 'discrete';
  /** Sample period used when the file gives none (seconds), or null. */
  defaultPeriod: number | null;
  /** Discretization shown for continuous models with a known period. */
  discretizeMethod: 'zoh' | 'tustin' | 'euler' | 'backward-euler' | 'foh' | null;
  /** Largest n analysed exactly over Q; larger exact matrices fall back to floats. */
  exactMaxN: number;
  /** Largest n for which a closed-form transition matrix is built. */
  closedFormMaxN: number;
  /** Largest n for which any spectrum is computed. */
  numericMaxN: number;
  /** Digits (numerator + denominator) above which an exact entry is analysed as a float. */
  exactMaxDigits: number;
  /** Damping ratio below which an oscillatory mode is reported as lightly damped. */
  lightDampingThreshold: number;
  /** Relative separation below which distinct eigenvalues count as nearly repeated. */
  nearRepeatThreshold: number;
  /** Extra regular expressions (source text) of variable names that count as state matrices. */
  stateMatrixNames: string[];
  /** Significant digits for numbers printed in hovers and reports. */
  precision: number;
  /** Fixed-point format checked besides float32 (Qm.n: m integer bits, n fractional bits), or null. */
  fixedPoint: { integerBits: number; fractionalBits: number } | null;
  /**
   * Relative change of a pole's continuous equivalent ln(z) under rounding above which
   * `float32-sensitive` is reported (1e-3 = a 0.1 % change in a time constant; our choice).
   */
  quantizationThreshold: number;
  /** Sample-period rules: T ≤ τ_min / this (common practice). */
  periodTimeConstantDivisor: number;
  /** Sample-period rules: fewest samples per oscillation period (common practice). */
  periodMinSamplesPerOscillation: number;
  /** Wall-clock budget for one matrix's analysis, milliseconds. */
  timeBudgetMs: number;
  /** Files larger than this (characters) get one information finding and no analysis. */
  maxFileChars: number;
}

export const DEFAULT_SETTINGS: AnalysisSettings = {
  defaultDomain: 'continuous',
  defaultPeriod: null,
  discretizeMethod: 'zoh',
  exactMaxN: 12,
  closedFormMaxN: 12,
  numericMaxN: 200,
  exactMaxDigits: 64,
  lightDampingThreshold: 0.1,
  nearRepeatThreshold: 1e-6,
  stateMatrixNames: [],
  precision: 6,
  fixedPoint: null,
  quantizationThreshold: 1e-3,
  periodTimeConstantDivisor: 10,
  periodMinSamplesPerOscillation: 10,
  timeBudgetMs: 2000,
  maxFileChars: 4_000_000,
};
