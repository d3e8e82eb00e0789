/**
 * Plain data exchanged between the engine's parts and handed to the analysis layer.
 * No classes with behaviour here except `Rational` (imported), so reports serialize simply.
 */
import type { Rational } from './rational';

/** A real matrix, row-major: entries are exact rationals or doubles, never mixed. */
export type RationalMatrix = Rational[][];
export type FloatMatrix = number[][];

export type Domain = 'continuous' | 'discrete';

/**
 * An algebraic number of degree ≤ 2 over Q, written p + r·√d with p, r rational and d a
 * rational that is not a perfect square (d < 0 means a complex number p ± j·r·√|d|).
 * r = 0 means λ = p is rational (then d is 1 by convention).
 */
export interface QuadraticNumber {
  p: Rational;
  r: Rational;
  d: Rational;
}

/** A root of one irreducible factor of the characteristic polynomial. */
export interface Root {
  re: number;
  im: number;
  /** Exact form when the factor has degree ≤ 2; null for numeric roots of degree ≥ 3 factors. */
  exact: QuadraticNumber | null;
  /** Human text: "-1", "(1+√5)/2", "-1+j√3", "≈ 0.3247+j0.8931". */
  text: string;
}

/** One irreducible (over Q) factor q of the characteristic polynomial, exact path only. */
export interface IrreducibleFactor {
  /** Monic coefficients, ascending powers: q(x) = Σ coeffs[i]·x^i, coeffs[deg] = 1. */
  coeffs: Rational[];
  degree: number;
  /** Exponent of q in the characteristic polynomial. */
  algebraic: number;
  /** Exponent of q in the minimal polynomial = size of the largest Jordan block. */
  index: number;
  /** Jordan block sizes of each root of q (the same for every conjugate), descending. */
  blocks: number[];
  /** Number of blocks = dim ker q(A) / degree. */
  geometric: number;
  /** The deg(q) roots, conjugate pairs adjacent, upper half-plane first. */
  roots: Root[];
}

/** One eigenvalue as reported: a root with its multiplicities. */
export interface Eigenvalue extends Root {
  algebraic: number;
  geometric: number;
  /** Jordan block sizes, descending; sum = algebraic, length = geometric. */
  blocks: number[];
}

export interface Spectrum {
  n: number;
  /** True when multiplicities and blocks were decided exactly over Q. */
  exact: boolean;
  /** Characteristic polynomial, ascending coefficients (exact text on the exact path). */
  charPoly: { coeffs: number[]; exactCoeffs: string[] | null };
  /** Minimal polynomial, ascending coefficients (exact path only). */
  minimalPoly: { coeffs: number[]; exactCoeffs: string[] } | null;
  /** Exact path only: factorization of the characteristic polynomial over Q. */
  factors: IrreducibleFactor[] | null;
  /** Every distinct eigenvalue, sorted by descending real part, then descending imaginary part. */
  eigenvalues: Eigenvalue[];
  /** Some eigenvalue has geometric < algebraic multiplicity. */
  defective: boolean;
  /** Float path: the tolerance used to cluster eigenvalues into multiple ones. */
  clusterTolerance: number | null;
  /** Pairs of distinct eigenvalues closer than the near-repeat threshold (relative). */
  nearRepeated: { a: number; b: number; separation: number }[];
  /** Anything the computation wants to say (caps hit, numeric fallbacks). */
  notes: string[];
}

export type Stability = 'asymptotically-stable' | 'marginally-stable' | 'unstable';

/** c·t^power·e^{rate·t}·cos|sin(freq·t). */
export interface ContinuousTerm {
  coef: number;
  exact?: string;
  power: number;
  rate: number;
  freq: number;
  wave: 'cos' | 'sin';
  /** Exact text of rate and freq where the spectrum is exact, e.g. "-1/2", "√3/2". */
  rateExact?: string;
  freqExact?: string;
}

/** c·k^power·radius^k·cos|sin(angle·k), or c at k = at only. */
export type DiscreteTerm =
  | { coef: number; exact?: string; power: number; radius: number; angle: number; wave: 'cos' | 'sin'; radiusExact?: string }
  | { coef: number; exact?: string; at: number };

export type TransitionTerm = ContinuousTerm | DiscreteTerm;

export interface TransitionClosedForm {
  variable: 't' | 'k';
  /** entries[row][col] is a sum of terms (empty array = identically zero). */
  entries: TransitionTerm[][][];
  /** Coefficients are exact (strings in `exact`) because the spectrum is exact. */
  exactCoefficients: boolean;
  /** Check against an independent numeric e^{At} or repeated products. */
  check: {
    samples: number[];
    /** max over samples of ‖closed − reference‖_max / max(1, ‖reference‖_max). */
    residual: number;
    /** residual below the acceptance bound for this conditioning. */
    passed: boolean;
    /**
     * Which reference decided: 'double' (float e^{At} / repeated products) or, for rational
     * matrices where the double reference disagreed, 'multiprecision' (≥ 200-bit fixed point
     * e^{At}, exact A^k), because the double reference itself can be off on non-normal input.
     */
    reference?: 'double' | 'multiprecision';
  };
  /** Condition estimate of the spectral decomposition (large = nearly repeated). */
  conditioning: number;
}

export interface Mode {
  /** Index into Spectrum.eigenvalues; a conjugate pair is one mode (upper half-plane member). */
  eigenvalueIndex: number;
  /** Continuous-equivalent pole s (discrete: ln(z)/T when a period is known, else null). */
  s: { re: number; im: number } | null;
  behaviour: 'decays' | 'grows' | 'constant' | 'oscillates' | 'decaying-oscillation' | 'growing-oscillation' | 'polynomial-growth' | 'deadbeat';
  timeConstant: number | null;
  naturalFrequency: number | null;
  /** Convention: ζ = −Re(s)/|s|; a real pole gives +1 (stable) or −1 (unstable); s = 0 gives null. */
  dampingRatio: number | null;
  period: number | null;
  settlingTime2pct: number | null;
  doublingTime: number | null;
  /** Discrete without a period: per-step quantities (radius, angle in rad/sample, samples to 2 %). */
  perStep?: { radius: number; angle: number; samplesTo2pct: number | null };
  /** Remarks on this mode (e.g. a negative real discrete pole alternates sign every sample). */
  notes?: string[];
}
