/**
 * Coefficient quantization of a discrete state matrix: round every entry to float32 or to
 * a fixed-point Qm.n format, recompute the eigenvalues and report how far each pole moved.
 *
 * Why it matters: the sensitivity of a root to a coefficient grows with the inverse of
 * its distance to the other roots, so clustered poles (typical of fast sampling, where
 * every pole crowds towards z = 1) move much more than the coefficient error, and most in
 * companion (direct) forms (J. F. Kaiser, "Digital filters", in System Analysis by Digital
 * Computer, 1966; A. V. Oppenheim & R. W. Schafer, Discrete-Time Signal Processing,
 * coefficient-quantization sections; both from memory). A pole that crosses the unit
 * circle turns a stable design into an unstable implementation.
 *
 * Formats:
 *  - float32: each entry rounded to the nearest IEEE single (Math.fround, ties to even);
 *  - Qm.n: two's complement with m integer bits (sign excluded) and n fractional bits,
 *    range [−2^m, 2^m − 2^−n], round to nearest (ties away from zero), saturating; every
 *    saturated entry is reported.
 *
 * Poles before and after are paired greedily by smallest distance (adequate because a
 * pairing is only needed to measure movement, and the greedy pairing never overstates
 * the smallest movement of any pole).
 *
 * Invariants: inputs are never mutated; bad input gives { ok: false, error }.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { boundaryTolerance, maxAbs } from './tolerance';

export type QuantizationFormat =
  | { kind: 'float32' }
  | { kind: 'fixed'; integerBits: number; fractionalBits: number };

export interface ComplexPoint {
  re: number;
  im: number;
}

export interface PoleMovement {
  before: ComplexPoint;
  after: ComplexPoint;
  /** |z_after − z_before|. */
  movement: number;
  /** movement / |z_before| (movement itself when z_before = 0). */
  relativeMovement: number;
  radiusBefore: number;
  radiusAfter: number;
  /** Was inside the unit circle, is now on or outside it. */
  crossedUnitCircle: boolean;
  /**
   * Relative change of the pole's continuous equivalent, |ln z' − ln z| / |ln z| — so of its
   * time constant and frequency. A pole at z = 0.99999 moving by 1e-8 changes its time constant
   * by 0.1 % although |Δz|/|z| is 1e-8: poles near z = 1 (fast sampling of slow plants) are the
   * sensitive ones. 0 for z = 1 or z = 0 (no relative measure; crossing decides there).
   */
  equivalentShift: number;
}

export interface SaturatedEntry {
  row: number;
  col: number;
  value: number;
  saturatedTo: number;
}

export interface QuantizationOptions {
  /** A relative shift of a pole's continuous equivalent (time constant, frequency) above this makes the matrix "sensitive". */
  relativeThreshold: number;
}

/**
 * Default 1e-3: a 0.1 % change of a time constant or frequency, about 17,000× the float32 unit
 * roundoff 2^−24 ≈ 6e-8 (our choice of threshold, exposed as a parameter).
 */
export const DEFAULT_QUANTIZATION_OPTIONS: QuantizationOptions = { relativeThreshold: 1e-3 };

function equivalentShift(b: ComplexPoint, a: ComplexPoint): number {
  const rb = Math.hypot(b.re, b.im);
  const ra = Math.hypot(a.re, a.im);
  if (!(rb > 0) || !(ra > 0)) return 0;
  const lb = { re: Math.log(rb), im: Math.atan2(b.im, b.re) };
  const la = { re: Math.log(ra), im: Math.atan2(a.im, a.re) };
  const size = Math.hypot(lb.re, lb.im);
  return size > 0 ? Math.hypot(la.re - lb.re, la.im - lb.im) / size : 0;
}

export interface QuantizationSuccess {
  ok: true;
  format: QuantizationFormat;
  quantized: number[][];
  /** Largest |entry_after − entry_before|. */
  maxEntryError: number;
  saturated: SaturatedEntry[];
  poles: PoleMovement[];
  maxMovement: number;
  maxRelativeMovement: number;
  /** Largest PoleMovement.equivalentShift. */
  maxEquivalentShift: number;
  crossedUnitCircle: boolean;
  /** maxEquivalentShift > threshold or some pole crossed the unit circle. */
  sensitive: boolean;
  threshold: number;
}

export type QuantizationResult = QuantizationSuccess | { ok: false; error: string };

/** Round to Qm.n with saturation; returns the value and whether it saturated. */
export function toFixedPoint(x: number, integerBits: number, fractionalBits: number): { value: number; saturated: boolean } {
  const scale = 2 ** fractionalBits;
  const max = 2 ** integerBits - 1 / scale;
  const min = -(2 ** integerBits);
  // Round half away from zero.
  const r = (Math.sign(x) * Math.round(Math.abs(x) * scale)) / scale;
  if (r > max) return { value: max, saturated: true };
  if (r < min) return { value: min, saturated: true };
  return { value: r === 0 ? 0 : r, saturated: false };
}

function eigenvalues(M: number[][]): ComplexPoint[] {
  const evd = new EigenvalueDecomposition(new Matrix(M), { assumeSymmetric: false });
  return evd.realEigenvalues.map((re, i) => ({ re, im: evd.imaginaryEigenvalues[i] }));
}

export function quantizeMatrix(Ad: number[][], format: QuantizationFormat, options: Partial<QuantizationOptions> = {}): QuantizationResult {
  const o = { ...DEFAULT_QUANTIZATION_OPTIONS, ...options };
  const n = Ad.length;
  if (n === 0 || Ad.some((r) => r.length !== n)) return { ok: false, error: 'The matrix must be non-empty and square.' };
  if (Ad.some((r) => r.some((x) => !Number.isFinite(x)))) return { ok: false, error: 'The matrix has a non-finite entry.' };
  if (format.kind === 'fixed') {
    const { integerBits: m, fractionalBits: f } = format;
    if (!Number.isInteger(m) || !Number.isInteger(f) || m < 0 || f < 0 || m + f > 52) {
      return { ok: false, error: `Q${m}.${f} is not a supported fixed-point format (integer bit counts m, n ≥ 0 with m + n ≤ 52).` };
    }
  }
  const saturated: SaturatedEntry[] = [];
  const quantized = Ad.map((row, i) =>
    row.map((x, j) => {
      if (format.kind === 'float32') return Math.fround(x);
      const q = toFixedPoint(x, format.integerBits, format.fractionalBits);
      if (q.saturated) saturated.push({ row: i, col: j, value: x, saturatedTo: q.value });
      return q.value;
    }),
  );
  if (quantized.some((r) => r.some((x) => !Number.isFinite(x)))) return { ok: false, error: 'An entry overflows float32.' };
  let maxEntryError = 0;
  Ad.forEach((row, i) => row.forEach((x, j) => (maxEntryError = Math.max(maxEntryError, Math.abs(quantized[i][j] - x)))));

  const before = eigenvalues(Ad);
  const after = eigenvalues(quantized);
  const tol = boundaryTolerance(maxAbs(Ad));
  const poles = pairPoles(before, after).map(([b, a]) => {
    const movement = Math.hypot(a.re - b.re, a.im - b.im);
    const rb = Math.hypot(b.re, b.im);
    const ra = Math.hypot(a.re, a.im);
    return {
      before: b,
      after: a,
      movement,
      relativeMovement: rb > 0 ? movement / rb : movement,
      radiusBefore: rb,
      radiusAfter: ra,
      crossedUnitCircle: rb < 1 - tol && ra >= 1 - tol,
      equivalentShift: equivalentShift(b, a),
    };
  });
  const maxMovement = Math.max(0, ...poles.map((p) => p.movement));
  const maxRelativeMovement = Math.max(0, ...poles.map((p) => p.relativeMovement));
  const crossedUnitCircle = poles.some((p) => p.crossedUnitCircle);
  const maxEquivalentShift = Math.max(0, ...poles.map((p) => p.equivalentShift));
  return {
    ok: true,
    format,
    quantized,
    maxEntryError,
    saturated,
    poles,
    maxMovement,
    maxRelativeMovement,
    crossedUnitCircle,
    maxEquivalentShift,
    sensitive: crossedUnitCircle || maxEquivalentShift > o.relativeThreshold,
    threshold: o.relativeThreshold,
  };
}

/** Greedy nearest pairing of two equally long point lists. */
function pairPoles(before: ComplexPoint[], after: ComplexPoint[]): [ComplexPoint, ComplexPoint][] {
  const candidates: { i: number; j: number; d: number }[] = [];
  before.forEach((b, i) => after.forEach((a, j) => candidates.push({ i, j, d: Math.hypot(a.re - b.re, a.im - b.im) })));
  candidates.sort((x, y) => x.d - y.d);
  const usedB = new Set<number>();
  const usedA = new Set<number>();
  const pairs: [ComplexPoint, ComplexPoint][] = [];
  for (const c of candidates) {
    if (usedB.has(c.i) || usedA.has(c.j)) continue;
    usedB.add(c.i);
    usedA.add(c.j);
    pairs.push([before[c.i], after[c.j]]);
  }
  return pairs;
}
