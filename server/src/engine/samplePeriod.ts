/**
 * Sample-period advice: rules of thumb that relate a sampling period T to the continuous
 * spectrum of a model.
 *
 * Method: each rule is a plain inequality on T and one quantity of the spectrum; every
 * finding carries the measured value, the threshold it was compared against and the source
 * of the rule, so a caller can show the arithmetic rather than a bare verdict. These are
 * ranges of good practice, not laws; the only hard limit is the sampling theorem.
 *
 * Rules and their sources:
 *  - time constant: T ≤ τ_min / 10, τ = 1/|Re λ| (common practice);
 *  - aliasing: a mode with |Im λ|·T ≥ π is aliased (common practice; it is the sampling
 *    theorem applied to one oscillatory mode);
 *  - samples per oscillation period 2π/|Im λ|: 10–20 (common practice);
 *  - samples per rise time: 4–10 (Åström & Wittenmark, Computer-Controlled Systems,
 *    3rd ed., sampling-period selection, from memory), rise time approximated by
 *    t_r ≈ 1.8/ω_n of the slowest mode (common practice);
 *  - sampling frequency ≥ 20 × bandwidth for a smooth response, ≥ 2 × as the sampling
 *    theorem's floor (Franklin, Powell & Workman, Digital Control of Dynamic Systems,
 *    3rd ed., sample-rate selection, from memory); bandwidth approximated by the fastest
 *    mode's natural frequency ω_n = |λ|;
 *  - pathological periods at which zero-order hold loses controllability/observability
 *    (Kalman, Ho & Narendra 1963, from memory; see controllability.ts).
 *
 * Invariant: the function never throws for finite input; non-finite or non-positive
 * periods produce one error finding and no recommendation.
 */
import { pathologicalAt, type ComplexValue } from './controllability';

export type PeriodRule =
  | 'time-constant'
  | 'aliasing'
  | 'samples-per-oscillation'
  | 'samples-per-rise-time'
  | 'bandwidth-ratio'
  | 'sampling-theorem'
  | 'pathological-period'
  | 'invalid-period';

export type PeriodSeverity = 'info' | 'warning' | 'error';

export interface PeriodFinding {
  rule: PeriodRule;
  /** Where the rule comes from, as it should be shown to the user. */
  source: string;
  severity: PeriodSeverity;
  message: string;
  /** The measured quantity the rule compares (units given in the message). */
  value: number;
  /** The threshold it was compared against. */
  threshold: number;
  /** The eigenvalue the finding is about, when it is about one. */
  eigenvalue?: ComplexValue;
}

export interface PeriodAdviceOptions {
  /** T ≤ τ_min / timeConstantDivisor. */
  timeConstantDivisor: number;
  /** Fewest samples per oscillation period before a warning. */
  minSamplesPerOscillation: number;
  /** Samples per oscillation period considered comfortable (upper end of the range). */
  goodSamplesPerOscillation: number;
  /** Range of samples per rise time. */
  minSamplesPerRiseTime: number;
  maxSamplesPerRiseTime: number;
  /** Sampling frequency / bandwidth ratio for a smooth response. */
  bandwidthRatio: number;
  /** Rise time ≈ riseTimeFactor / ω_n (1.8 for a second-order response with ζ ≈ 0.5, common practice). */
  riseTimeFactor: number;
}

export const DEFAULT_PERIOD_ADVICE: PeriodAdviceOptions = {
  timeConstantDivisor: 10,
  minSamplesPerOscillation: 10,
  goodSamplesPerOscillation: 20,
  minSamplesPerRiseTime: 4,
  maxSamplesPerRiseTime: 10,
  bandwidthRatio: 20,
  riseTimeFactor: 1.8,
};

export interface PeriodAdvice {
  findings: PeriodFinding[];
  /** A period range that satisfies every upper-bound rule and the rise-time rule, or null. */
  recommended: { min: number; max: number } | null;
  /** Explanations of how the range was formed (e.g. rules that could not all be met). */
  notes: string[];
}

const SOURCE_COMMON = 'common practice';
const SOURCE_AW = 'Åström & Wittenmark, Computer-Controlled Systems, 3rd ed. (from memory)';
const SOURCE_FPW = 'Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed. (from memory)';
const SOURCE_KHN = 'Kalman, Ho & Narendra, controllability of linear dynamical systems, 1963 (from memory)';

function fmt(x: number): string {
  return Number.isFinite(x) ? Number(x.toPrecision(4)).toString() : String(x);
}

function describe(l: ComplexValue): string {
  if (l.im === 0) return fmt(l.re);
  return `${fmt(l.re)} ± j${fmt(Math.abs(l.im))}`;
}

/** One representative per conjugate pair (the upper half-plane member), zeros removed. */
function distinctModes(spectrum: ComplexValue[]): ComplexValue[] {
  const out: ComplexValue[] = [];
  for (const l of spectrum) {
    if (l.im < 0) continue;
    if (!out.some((o) => o.re === l.re && o.im === l.im)) out.push({ re: l.re, im: l.im });
  }
  // A spectrum given with only lower-half members still counts.
  for (const l of spectrum) {
    if (l.im < 0 && !out.some((o) => o.re === l.re && o.im === -l.im)) out.push({ re: l.re, im: -l.im });
  }
  return out;
}

/**
 * Upper bounds on T from the spectrum alone (no T needed): the largest period each rule allows.
 * Returns Infinity for a rule that does not constrain (e.g. no oscillatory modes).
 */
export function periodUpperBounds(
  spectrum: ComplexValue[],
  options: Partial<PeriodAdviceOptions> = {},
): { timeConstant: number; oscillation: number; bandwidth: number; aliasing: number } {
  const o = { ...DEFAULT_PERIOD_ADVICE, ...options };
  const modes = distinctModes(spectrum);
  let tauMin = Infinity;
  let wdMax = 0;
  let wnMax = 0;
  for (const l of modes) {
    if (l.re !== 0) tauMin = Math.min(tauMin, 1 / Math.abs(l.re));
    wdMax = Math.max(wdMax, Math.abs(l.im));
    wnMax = Math.max(wnMax, Math.hypot(l.re, l.im));
  }
  return {
    timeConstant: tauMin / o.timeConstantDivisor,
    oscillation: wdMax > 0 ? (2 * Math.PI) / (wdMax * o.minSamplesPerOscillation) : Infinity,
    bandwidth: wnMax > 0 ? (2 * Math.PI) / (wnMax * o.bandwidthRatio) : Infinity,
    aliasing: wdMax > 0 ? Math.PI / wdMax : Infinity,
  };
}

/**
 * Advice for period T (or only a recommendation when T is null) given the continuous
 * eigenvalues of the model (conjugates may be listed or not).
 */
export function samplePeriodAdvice(
  spectrum: ComplexValue[],
  T: number | null,
  options: Partial<PeriodAdviceOptions> = {},
): PeriodAdvice {
  const o = { ...DEFAULT_PERIOD_ADVICE, ...options };
  const findings: PeriodFinding[] = [];
  const notes: string[] = [];
  if (T !== null && !(Number.isFinite(T) && T > 0)) {
    findings.push({
      rule: 'invalid-period',
      source: SOURCE_COMMON,
      severity: 'error',
      message: `The sample period must be a positive finite number (got ${String(T)}).`,
      value: Number.isFinite(T) ? T : NaN,
      threshold: 0,
    });
    return { findings, recommended: null, notes };
  }
  if (spectrum.some((l) => !Number.isFinite(l.re) || !Number.isFinite(l.im))) {
    notes.push('Some eigenvalues are not finite; no advice computed.');
    return { findings, recommended: null, notes };
  }
  const modes = distinctModes(spectrum);
  const bounds = periodUpperBounds(modes, o);

  if (T !== null) {
    // Time constants: the fastest real part sets the bound.
    for (const l of modes) {
      if (l.re === 0) continue;
      const tau = 1 / Math.abs(l.re);
      const limit = tau / o.timeConstantDivisor;
      if (T > limit) {
        findings.push({
          rule: 'time-constant',
          source: SOURCE_COMMON,
          severity: 'warning',
          message: `Mode ${describe(l)} has time constant ${fmt(tau)} s; the period ${fmt(T)} s is more than 1/${o.timeConstantDivisor} of it (limit ${fmt(limit)} s).`,
          value: T / tau,
          threshold: 1 / o.timeConstantDivisor,
          eigenvalue: l,
        });
      }
    }
    for (const l of modes) {
      const wd = Math.abs(l.im);
      if (wd === 0) continue;
      const phasePerSample = wd * T;
      if (phasePerSample >= Math.PI) {
        findings.push({
          rule: 'aliasing',
          source: SOURCE_COMMON,
          severity: 'error',
          message: `Mode ${describe(l)} turns ${fmt(phasePerSample)} rad per sample (≥ π): it is aliased to a slower oscillation at this period.`,
          value: phasePerSample,
          threshold: Math.PI,
          eigenvalue: l,
        });
        continue;
      }
      const samples = (2 * Math.PI) / phasePerSample;
      if (samples < o.minSamplesPerOscillation) {
        findings.push({
          rule: 'samples-per-oscillation',
          source: SOURCE_COMMON,
          severity: 'warning',
          message: `Mode ${describe(l)} gets ${fmt(samples)} samples per oscillation period; ${o.minSamplesPerOscillation}–${o.goodSamplesPerOscillation} is usual.`,
          value: samples,
          threshold: o.minSamplesPerOscillation,
          eigenvalue: l,
        });
      }
    }
    // Rise time from the slowest non-zero mode (it dominates the step response).
    const slowest = slowestMode(modes);
    if (slowest) {
      const wn = Math.hypot(slowest.re, slowest.im);
      const riseTime = o.riseTimeFactor / wn;
      const samples = riseTime / T;
      if (samples < o.minSamplesPerRiseTime || samples > o.maxSamplesPerRiseTime) {
        const few = samples < o.minSamplesPerRiseTime;
        findings.push({
          rule: 'samples-per-rise-time',
          source: SOURCE_AW,
          severity: few ? 'warning' : 'info',
          message: `About ${fmt(samples)} samples per rise time (t_r ≈ ${o.riseTimeFactor}/ω_n = ${fmt(riseTime)} s for mode ${describe(slowest)}); ${o.minSamplesPerRiseTime}–${o.maxSamplesPerRiseTime} is the usual range${few ? '' : ' (more samples cost computation but do no harm)'}.`,
          value: samples,
          threshold: few ? o.minSamplesPerRiseTime : o.maxSamplesPerRiseTime,
          eigenvalue: slowest,
        });
      }
    }
    // Bandwidth ≈ fastest ω_n.
    const fastest = fastestMode(modes);
    if (fastest) {
      const wn = Math.hypot(fastest.re, fastest.im);
      const ratio = (2 * Math.PI) / T / wn;
      if (ratio < 2) {
        findings.push({
          rule: 'sampling-theorem',
          source: SOURCE_FPW,
          severity: 'error',
          message: `Sampling frequency is ${fmt(ratio)}× the fastest natural frequency ${fmt(wn)} rad/s, below the sampling theorem's 2×.`,
          value: ratio,
          threshold: 2,
          eigenvalue: fastest,
        });
      } else if (ratio < o.bandwidthRatio) {
        findings.push({
          rule: 'bandwidth-ratio',
          source: SOURCE_FPW,
          severity: 'warning',
          message: `Sampling frequency is ${fmt(ratio)}× the fastest natural frequency ${fmt(wn)} rad/s (used as the bandwidth); about ${o.bandwidthRatio}× gives a smooth response.`,
          value: ratio,
          threshold: o.bandwidthRatio,
          eigenvalue: fastest,
        });
      }
    }
    for (const p of pathologicalAt(spectrum, T)) {
      {
        findings.push({
          rule: 'pathological-period',
          source: SOURCE_KHN,
          severity: 'warning',
          message: `At this period the modes ${describe(p.a)} and ${describe(p.b)} sample to the same discrete eigenvalue: zero-order hold can lose controllability and observability.`,
          value: T,
          threshold: p.period,
        });
      }
    }
  }

  // Recommended range: below every upper bound (rise time included), and no shorter than
  // needed for the rise-time window of the slowest mode.
  const slowest = slowestMode(modes);
  let upper = Math.min(bounds.timeConstant, bounds.oscillation, bounds.bandwidth, bounds.aliasing);
  let lower = upper * (o.minSamplesPerRiseTime / o.maxSamplesPerRiseTime);
  if (slowest) {
    const riseTime = o.riseTimeFactor / Math.hypot(slowest.re, slowest.im);
    upper = Math.min(upper, riseTime / o.minSamplesPerRiseTime);
    const riseLower = riseTime / o.maxSamplesPerRiseTime;
    if (riseLower <= upper) lower = riseLower;
    else {
      lower = upper * (o.minSamplesPerRiseTime / o.maxSamplesPerRiseTime);
      notes.push('Fast modes need a shorter period than the rise time of the slowest mode asks for; the fast modes set the range.');
    }
  }
  let recommended: { min: number; max: number } | null = null;
  if (Number.isFinite(upper) && upper > 0) recommended = { min: lower, max: upper };
  else notes.push('Every eigenvalue is zero: the spectrum sets no time scale for the period.');
  return { findings, recommended, notes };
}

function slowestMode(modes: ComplexValue[]): ComplexValue | null {
  let best: ComplexValue | null = null;
  for (const l of modes) {
    const w = Math.hypot(l.re, l.im);
    if (w === 0) continue;
    if (!best || w < Math.hypot(best.re, best.im)) best = l;
  }
  return best;
}

function fastestMode(modes: ComplexValue[]): ComplexValue | null {
  let best: ComplexValue | null = null;
  for (const l of modes) {
    const w = Math.hypot(l.re, l.im);
    if (w === 0) continue;
    if (!best || w > Math.hypot(best.re, best.im)) best = l;
  }
  return best;
}
