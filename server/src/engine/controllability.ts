/**
 * Controllability and observability, mode by mode.
 *
 * Exact path (rational A, B): the Kalman rank test rank[B, AB, …, A^{n−1}B] over Q
 * (R. E. Kalman, Y. C. Ho & K. S. Narendra, "Controllability of linear dynamical systems",
 * Contrib. Differential Equations 1, 1963, from memory) gives the controllable subspace K.
 * A rational basis of K is extended by unit vectors to a basis S of Qⁿ; in that basis
 * S⁻¹AS = [[A11, A12], [0, A22]] (Kalman decomposition) and the uncontrollable eigenvalues,
 * with algebraic multiplicities, are the roots of charpoly(A22) = charpoly(A)/charpoly(A|K).
 * Everything is decided over Q: no tolerance.
 *
 * Float path: the orthogonal staircase reduction (P. Van Dooren, "The generalized
 * eigenstructure problem in linear system theory", IEEE Trans. Automatic Control AC-26(1),
 * 1981, from memory): repeated SVDs of the current input block split off the controllable
 * part; the remaining block's eigenvalues are the uncontrollable ones. Ranks use the
 * tolerance n·ε·max(‖A‖₂, ‖B‖₂) (common practice for a numerical rank). This avoids the
 * badly scaled powers A^k B of the Kalman matrix.
 *
 * Observability by duality: (A, C) is observable iff (Aᵀ, Cᵀ) is controllable, with the
 * same unobservable eigenvalues.
 *
 * Sampling can destroy controllability: under zero-order hold, two modes λi ≠ λj with
 * Re λi = Re λj and Im(λi − λj)·T = 2πm (m ≠ 0) map to one discrete eigenvalue
 * (Kalman, Ho & Narendra 1963, from memory). `pathologicalPeriods` lists such T.
 *
 * Invariants: inputs are never mutated; bad shapes give { ok: false, error }, never a throw.
 */
import { EigenvalueDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
import { Rational } from './rational';
import { inverseQ, mulQ, rankQ, rrefQ, type MatrixQ } from './matrixQ';
import { characteristicPolynomial } from './charpoly';
import type { PolyQ } from './polynomial';
import { factorOverQ } from './factor';
import { polynomialRoots } from './polyRoots';
import { numericRootText, quadraticFromSurd, quadraticNumberToString, quadraticNumberValue } from './format';
import { BOUNDARY_REL, EPS, clusterRadius } from './tolerance';
import { isRationalMatrix, toFloatMatrix, type AnyMatrix } from './discretize';

export interface ComplexValue {
  re: number;
  im: number;
}

export interface ModeEigenvalue {
  text: string;
  re: number;
  im: number;
  multiplicity: number;
}

export interface ReachabilityResult {
  ok: true;
  /** Rank of the Kalman matrix (dimension of the controllable / observable subspace). */
  rank: number;
  n: number;
  /** True for controllable (or observable, for the dual question). */
  controllable: boolean;
  /** Eigenvalues of the uncontrollable (unobservable) part, with algebraic multiplicity. */
  uncontrollableEigenvalues: ModeEigenvalue[];
  exact: boolean;
  /** Float path: the rank tolerance used. */
  tolerance: number | null;
  /** Exact path: characteristic polynomial of the uncontrollable block, ascending. */
  uncontrollablePolynomial: string[] | null;
}

export interface ReachabilityFailure {
  ok: false;
  error: string;
}

export type ControllabilityResult = ReachabilityResult | ReachabilityFailure;

function shapeError(A: AnyMatrix, B: AnyMatrix, bName: string): string | null {
  const n = A.length;
  if (n === 0) return 'A is empty.';
  if (A.some((r) => r.length !== n)) return 'A must be square.';
  if (B.length !== n) return `${bName} must have ${n} rows (it has ${B.length}).`;
  if (B.length === 0 || B[0].length === 0) return `${bName} is empty.`;
  if (B.some((r) => r.length !== B[0].length)) return `${bName} has rows of different lengths.`;
  for (const m of [A, B] as (Rational | number)[][][]) {
    for (const row of m) for (const x of row) if (!(x instanceof Rational) && !Number.isFinite(x)) return `Non-finite entry ${x}.`;
  }
  return null;
}

/** Is (A, B) controllable, and which eigenvalues are not? */
export function controllability(A: AnyMatrix, B: AnyMatrix): ControllabilityResult {
  const bad = shapeError(A, B, 'B');
  if (bad) return { ok: false, error: bad };
  if (isRationalMatrix(A) && isRationalMatrix(B)) return controllabilityExact(A, B);
  return controllabilityFloat(toFloatMatrix(A), toFloatMatrix(B));
}

/** Is (A, C) observable? By duality with (Aᵀ, Cᵀ). */
export function observability(A: AnyMatrix, C: AnyMatrix): ControllabilityResult {
  const n = A.length;
  if (C.length === 0 || C.some((r) => r.length !== n)) return { ok: false, error: `C must have ${n} columns.` };
  const At = transposeAny(A);
  const Ct = transposeAny(C);
  const bad = shapeError(At, Ct, 'Cᵀ');
  if (bad) return { ok: false, error: bad };
  if (isRationalMatrix(At) && isRationalMatrix(Ct)) return controllabilityExact(At, Ct);
  return controllabilityFloat(toFloatMatrix(At), toFloatMatrix(Ct));
}

function transposeAny(m: AnyMatrix): AnyMatrix {
  return (m as (Rational | number)[][])[0].map((_, j) => (m as (Rational | number)[][]).map((r) => r[j])) as AnyMatrix;
}

// ---------------------------------------------------------------- exact path

/** Columns [B, AB, …, A^{n−1}B] as a list of column vectors. */
function kalmanColumns(A: MatrixQ, B: MatrixQ): Rational[][] {
  const n = A.length;
  const cols: Rational[][] = [];
  let block = B;
  for (let k = 0; k < n; k++) {
    for (let j = 0; j < block[0].length; j++) cols.push(block.map((r) => r[j]));
    if (k < n - 1) block = mulQ(A, block);
  }
  return cols;
}

/** A rational basis of the span of the given column vectors (the pivot rows of the rref of their transpose). */
function spanBasis(cols: Rational[][]): Rational[][] {
  if (cols.length === 0) return [];
  const { rref, pivots } = rrefQ(cols.map((c) => c.slice()));
  return rref.slice(0, pivots.length).map((r) => r.slice());
}

function controllabilityExact(A: MatrixQ, B: MatrixQ): ReachabilityResult {
  const n = A.length;
  const basis = spanBasis(kalmanColumns(A, B));
  const rank = basis.length;
  if (rank === n) {
    return { ok: true, rank, n, controllable: true, uncontrollableEigenvalues: [], exact: true, tolerance: null, uncontrollablePolynomial: ['1'] };
  }
  // Extend by unit vectors e_i that keep the set independent.
  const vectors = basis.slice();
  for (let i = 0; i < n && vectors.length < n; i++) {
    const e = Array.from({ length: n }, (_, j) => (j === i ? Rational.ONE : Rational.ZERO));
    if (rankQ([...vectors, e]) > vectors.length) vectors.push(e);
  }
  // S has the vectors as columns; S⁻¹AS is block upper triangular because K is A-invariant.
  const S: MatrixQ = Array.from({ length: n }, (_, i) => vectors.map((v) => v[i]));
  const Sinv = inverseQ(S)!;
  const Ahat = mulQ(Sinv, mulQ(A, S));
  const A22 = Ahat.slice(rank).map((r) => r.slice(rank));
  const p = characteristicPolynomial(A22);
  return {
    ok: true,
    rank,
    n,
    controllable: false,
    uncontrollableEigenvalues: rootsWithMultiplicity(p),
    exact: true,
    tolerance: null,
    uncontrollablePolynomial: p.map((c) => c.toString()),
  };
}

/**
 * Roots of a rational polynomial with multiplicities and text, in the project's notation:
 * irreducible factors over Q (factor.ts); degree 1 and 2 factors give exact roots
 * (quadratic formula), higher degrees numeric ones ("≈ …").
 */
export function rootsWithMultiplicity(p: PolyQ): ModeEigenvalue[] {
  const out: ModeEigenvalue[] = [];
  for (const { factor, multiplicity } of factorOverQ(p)) {
    const deg = factor.length - 1;
    if (deg === 1) {
      const r = factor[0].neg();
      out.push({ text: quadraticNumberToString(quadraticFromSurd(r, Rational.ZERO, Rational.ONE)), re: r.toNumber(), im: 0, multiplicity });
    } else if (deg === 2) {
      // x² + c1x + c0: −c1/2 ± √Δ with Δ = c1²/4 − c0.
      const centre = factor[1].div(Rational.fromInt(2)).neg();
      const disc = centre.mul(centre).sub(factor[0]);
      for (const sign of [Rational.ONE, Rational.MINUS_ONE]) {
        const qn = quadraticFromSurd(centre, sign, disc);
        const v = quadraticNumberValue(qn);
        out.push({ text: quadraticNumberToString(qn), re: v.re, im: v.im, multiplicity });
      }
    } else {
      for (const z of polynomialRoots(factor)) out.push({ text: numericRootText(z.re, z.im), re: z.re, im: z.im, multiplicity });
    }
  }
  return out.sort((a, b) => b.re - a.re || b.im - a.im);
}

// ---------------------------------------------------------------- float path


function norm2(m: number[][]): number {
  if (m.length === 0 || m[0].length === 0) return 0;
  return new SingularValueDecomposition(new Matrix(m), { autoTranspose: true }).norm2;
}

/** Eigenvalues of the uncontrollable block within clusterRadius(2, ‖block‖) count as one multiple eigenvalue. */
function clusterEigenvalues(eigs: ComplexValue[], normBlock: number): ModeEigenvalue[] {
  const out: ModeEigenvalue[] = [];
  const radius = clusterRadius(2, Math.max(normBlock, Number.MIN_VALUE));
  for (const l of eigs) {
    const hit = out.find((o) => Math.hypot(o.re - l.re, o.im - l.im) <= radius);
    if (hit) {
      hit.re = (hit.re * hit.multiplicity + l.re) / (hit.multiplicity + 1);
      hit.im = (hit.im * hit.multiplicity + l.im) / (hit.multiplicity + 1);
      hit.multiplicity++;
    } else out.push({ text: '', re: l.re, im: l.im, multiplicity: 1 });
  }
  for (const o of out) o.text = numericRootText(o.re, o.im);
  return out.sort((a, b) => b.re - a.re || b.im - a.im);
}

function controllabilityFloat(A: number[][], B: number[][]): ReachabilityResult {
  const n = A.length;
  const tolerance = n * EPS * Math.max(norm2(A), norm2(B), Number.MIN_VALUE);
  // Staircase: keep an orthogonal basis Q with Qᵀ A Q, Qᵀ B in staircase form.
  let Acur = new Matrix(A);
  let Bcur = new Matrix(B);
  let rank = 0;
  while (rank < n) {
    const size = Acur.rows;
    if (Bcur.columns === 0) break;
    const svd = new SingularValueDecomposition(Bcur, { autoTranspose: true, computeLeftSingularVectors: true, computeRightSingularVectors: false });
    const sv = svd.diagonal;
    const r = sv.filter((s) => s > tolerance).length;
    if (r === 0) break;
    rank += r;
    if (r === size) {
      Acur = new Matrix(0, 0);
      break;
    }
    // Complete U to an orthogonal basis of R^size (autoTranspose may return fewer columns).
    const U = completeOrthonormal(svd.leftSingularVectors, size);
    const At = U.transpose().mmul(Acur).mmul(U);
    // Next input block: rows r.., columns ..r; next state block: rows/cols r..
    Bcur = At.subMatrix(r, size - 1, 0, r - 1);
    Acur = At.subMatrix(r, size - 1, r, size - 1);
  }
  let unc: ModeEigenvalue[] = [];
  if (rank < n && Acur.rows > 0) {
    const evd = new EigenvalueDecomposition(Acur, { assumeSymmetric: false });
    unc = clusterEigenvalues(evd.realEigenvalues.map((re, i) => ({ re, im: evd.imaginaryEigenvalues[i] })), norm2(Acur.to2DArray()));
  }
  return { ok: true, rank, n, controllable: rank === n, uncontrollableEigenvalues: unc, exact: false, tolerance, uncontrollablePolynomial: null };
}

/** Columns of U (orthonormal, size × k, k ≤ size) completed to a size × size orthogonal matrix. */
function completeOrthonormal(U: Matrix, size: number): Matrix {
  const cols: number[][] = [];
  for (let j = 0; j < Math.min(U.columns, size); j++) cols.push(U.getColumn(j));
  for (let i = 0; i < size && cols.length < size; i++) {
    // Gram–Schmidt twice on e_i (re-orthogonalization keeps the basis orthogonal to ε).
    let v: number[] = Array.from({ length: size }, (_, j) => (j === i ? 1 : 0));
    for (let pass = 0; pass < 2; pass++) {
      for (const c of cols) {
        const d = c.reduce((s, x, j) => s + x * v[j], 0);
        v = v.map((x, j) => x - d * c[j]);
      }
    }
    const nv = Math.hypot(...v);
    if (nv > 0.5) cols.push(v.map((x) => x / nv));
  }
  return new Matrix(Array.from({ length: size }, (_, i) => cols.map((c) => c[i])));
}

// ---------------------------------------------------------------- sampling

export interface PathologicalPeriod {
  a: ComplexValue;
  b: ComplexValue;
  /** m in Im(a − b)·T = 2πm. */
  m: number;
  period: number;
}

/**
 * Two real parts are equal when they agree to BOUNDARY_REL relative to the eigenvalues'
 * size: the same allowance tolerance.ts makes for an eigenvalue to sit on the stability
 * boundary, for the same reason (float eigenvalues carry ~u·κ·‖A‖ error).
 */
const EQUAL_REAL_RELATIVE = BOUNDARY_REL;

/** The full spectrum with conjugates added where only one member of a pair was given. */
function withConjugates(eigs: ComplexValue[]): ComplexValue[] {
  const out: ComplexValue[] = [];
  const has = (re: number, im: number) => out.some((o) => o.re === re && o.im === im);
  for (const l of eigs) {
    if (!has(l.re, l.im)) out.push({ re: l.re, im: l.im });
    if (l.im !== 0 && !has(l.re, -l.im)) out.push({ re: l.re, im: -l.im });
  }
  return out;
}

function samePairs(eigs: ComplexValue[]): { a: ComplexValue; b: ComplexValue; gap: number }[] {
  const full = withConjugates(eigs);
  const pairs: { a: ComplexValue; b: ComplexValue; gap: number }[] = [];
  const seen = new Set<string>();
  for (let i = 0; i < full.length; i++) {
    for (let j = i + 1; j < full.length; j++) {
      const a = full[i];
      const b = full[j];
      const scale = Math.max(Math.abs(a.re), Math.abs(b.re), Math.hypot(a.re, a.im), Math.hypot(b.re, b.im), Number.MIN_VALUE);
      if (Math.abs(a.re - b.re) > EQUAL_REAL_RELATIVE * scale) continue;
      const gap = Math.abs(a.im - b.im);
      if (gap === 0) continue;
      // A pair and its mirror image (conjugates of both) give the same condition.
      const key = `${a.re}|${gap}|${Math.abs(a.im + b.im)}`;
      if (seen.has(key)) continue;
      seen.add(key);
      const [hi, lo] = a.im + b.im >= 0 ? [a, b] : [{ re: b.re, im: -b.im }, { re: a.re, im: -a.im }];
      pairs.push({ a: hi.im >= lo.im ? hi : lo, b: hi.im >= lo.im ? lo : hi, gap });
    }
  }
  return pairs;
}

/**
 * Sampling periods T ≤ maxPeriod at which ZOH maps two distinct continuous eigenvalues to
 * the same discrete one (and can lose controllability/observability), sorted ascending.
 */
export function pathologicalPeriods(eigs: ComplexValue[], opts: { maxPeriod: number; maxCount?: number }): PathologicalPeriod[] {
  const maxCount = opts.maxCount ?? 50;
  const out: PathologicalPeriod[] = [];
  if (!(opts.maxPeriod > 0) || !Number.isFinite(opts.maxPeriod)) return out;
  for (const { a, b, gap } of samePairs(eigs)) {
    for (let m = 1; ; m++) {
      const period = (2 * Math.PI * m) / gap;
      if (period > opts.maxPeriod || out.length >= maxCount * 4) break;
      out.push({ a, b, m, period });
    }
  }
  return out.sort((x, y) => x.period - y.period).slice(0, maxCount);
}

/**
 * Is T pathological for these eigenvalues? Returns the offending pairs (empty when not).
 * T matches when gap·T/(2π) is within EQUAL_REAL_RELATIVE (relative) of a positive integer.
 */
export function pathologicalAt(eigs: ComplexValue[], T: number): PathologicalPeriod[] {
  const out: PathologicalPeriod[] = [];
  if (!(T > 0) || !Number.isFinite(T)) return out;
  for (const { a, b, gap } of samePairs(eigs)) {
    const turns = (gap * T) / (2 * Math.PI);
    const m = Math.round(turns);
    if (m >= 1 && Math.abs(turns - m) <= EQUAL_REAL_RELATIVE * Math.max(1, turns)) out.push({ a, b, m, period: (2 * Math.PI * m) / gap });
  }
  return out;
}
