/**
 * The one place where the engine decides that two floating-point quantities are "the same".
 * Every numeric comparison in engine/ goes through a function or constant from this file,
 * so each tolerance is stated and justified once.
 *
 * Background (common practice, see N. J. Higham, "Accuracy and Stability of Numerical
 * Algorithms", 2nd ed., 2002, ch. 1–3): a backward-stable computation returns the exact
 * answer for data perturbed by a few units of u·‖data‖; the forward error is that times a
 * condition number. Tolerances below are therefore relative to a norm of the data.
 */

/** Machine epsilon of IEEE double: spacing of doubles at 1, 2^-52. */
export const EPS = 2 ** -52;

/** Unit roundoff of IEEE double with round-to-nearest, 2^-53. */
export const UNIT_ROUNDOFF = 2 ** -53;

/**
 * Default relative tolerance for scalar comparisons: 64·EPS ≈ 1.4e-14. Allows a backward
 * stable O(n) computation with modest growth; tighter than any printed reference we use.
 */
export const DEFAULT_REL = 64 * EPS;

/** Default absolute floor, so values that should be 0 compare equal to tiny round-off. */
export const DEFAULT_ABS = 64 * EPS;

/**
 * Backward-error level assumed for a computed spectrum: ‖E‖ ≤ SPECTRUM_BACKWARD_ERROR·‖A‖.
 * Hessenberg QR has backward error p(n)·u·‖A‖ with a modest p(n); a Jordan basis with
 * condition κ amplifies it to κ·p(n)·u. 1e-11 ≈ 9e4·u leaves room for n·κ up to ~1e4.
 * Under such a perturbation a Jordan block of size m splits into m eigenvalues on a circle
 * of radius ≈ ‖A‖·(backward error)^{1/m} (Lidskii; see Moro, Burke & Overton, SIAM J.
 * Matrix Anal. Appl. 18(4), 1997 — from memory), which is why clustering uses
 * `clusterRadius(m)` rather than one fixed distance.
 */
export const SPECTRUM_BACKWARD_ERROR = 1e-11;

/**
 * Numerical rank cut-off for A − λI, relative to ‖A‖: singular values ≤ RANK_REL·‖A‖ count
 * as zero. 1e-8 ≈ √u: an eigenvalue accurate to u·κ·‖A‖ gives a singular value at that
 * level for a semisimple eigenvalue and at (u·κ)^m level for a defective one, so √u sits
 * between round-off and the O(‖A‖) singular values of the non-null part (common practice).
 */
export const RANK_REL = 1e-8;

/**
 * Distinct eigenvalues closer than this (relative to max(1, |λ|)) are reported as nearly
 * repeated: modal closed forms lose about log10(1/separation) digits (common practice).
 */
export const NEAR_REPEAT_REL = 1e-6;

/**
 * Distance from the stability boundary (Re s = 0 or |z| = 1) below which a float
 * eigenvalue counts as on it: 1e-9·max(1, ‖A‖). A semisimple eigenvalue is computed to
 * ~u·κ·‖A‖, so this allows κ up to ~1e6 while still calling 1e-8-damped modes stable only
 * when they truly are; the reasons always say the verdict is numerical near the boundary.
 */
export const BOUNDARY_REL = 1e-9;

/** |a − b| ≤ max(abs, rel·max(|a|, |b|)). NaN is never close to anything. */
export function closeTo(a: number, b: number, rel = DEFAULT_REL, abs = DEFAULT_ABS): boolean {
  if (a === b) return true;
  const diff = Math.abs(a - b);
  return diff <= Math.max(abs, rel * Math.max(Math.abs(a), Math.abs(b)));
}

/** Frobenius norm of a rectangular matrix. */
export function frobeniusNorm(A: number[][]): number {
  let scale = 0;
  let sum = 1;
  // Scaled accumulation (LAPACK dnrm2 style) so huge entries cannot overflow the squares.
  for (const row of A) {
    for (const x of row) {
      const ax = Math.abs(x);
      if (ax === 0) continue;
      if (ax > scale) {
        sum = 1 + sum * (scale / ax) ** 2;
        scale = ax;
      } else {
        sum += (ax / scale) ** 2;
      }
    }
  }
  return scale === 0 ? 0 : scale * Math.sqrt(sum);
}

/** Largest absolute entry. */
export function maxAbs(A: number[][]): number {
  let m = 0;
  for (const row of A) for (const x of row) m = Math.max(m, Math.abs(x));
  return m;
}

/**
 * Norm-relative error ‖A − B‖_F / ‖B‖_F of A against the reference B (same shape).
 * When B = 0 the absolute error ‖A‖_F is returned. Shape mismatch throws.
 * Entry-wise relative error is deliberately not used: entries far below ‖B‖ (cancellation,
 * e.g. CHECKS #2 entry (2,2)) cannot be computed to full relative accuracy by any
 * backward-stable method.
 */
export function relativeError(A: number[][], B: number[][]): number {
  if (A.length !== B.length || A.some((row, i) => row.length !== B[i].length)) {
    throw new Error('relativeError: matrices have different shapes');
  }
  const diff = A.map((row, i) => row.map((x, j) => x - B[i][j]));
  const ref = frobeniusNorm(B);
  const err = frobeniusNorm(diff);
  return ref === 0 ? err : err / ref;
}

/** Matrices agree to a norm-relative tolerance. */
export function matricesClose(A: number[][], B: number[][], rel = DEFAULT_REL): boolean {
  return relativeError(A, B) <= rel;
}

/** Tolerance for a cluster of m eigenvalues to count as one m-fold eigenvalue. */
export function clusterRadius(m: number, normA: number): number {
  return normA * SPECTRUM_BACKWARD_ERROR ** (1 / m);
}

/** Distance below which a float eigenvalue is treated as on the stability boundary. */
export function boundaryTolerance(normA: number): number {
  return BOUNDARY_REL * Math.max(1, normA);
}

/** Two distinct eigenvalues are nearly repeated: |a − b| < NEAR_REPEAT_REL·max(1, |a|, |b|). */
export function nearlyRepeated(a: { re: number; im: number }, b: { re: number; im: number }): boolean {
  const sep = Math.hypot(a.re - b.re, a.im - b.im);
  return sep < NEAR_REPEAT_REL * Math.max(1, Math.hypot(a.re, a.im), Math.hypot(b.re, b.im));
}
