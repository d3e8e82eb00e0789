/**
 * From a zero-order-hold model back to the continuous one: A = log(Ad)/T and
 * B = (∫₀ᵀ e^{As} ds)⁻¹·Bd, by a real principal matrix logarithm.
 *
 * Method: inverse scaling and squaring (N. J. Higham, Functions of Matrices: Theory and
 * Computation, SIAM 2008, ch. 11, from memory):
 *  1. repeated principal square roots X ← X^{1/2} by the product form of the
 *     Denman–Beavers iteration (E. D. Denman & A. N. Beavers, "The matrix sign function and
 *     computations in systems", Appl. Math. Comput. 2, 1976, from memory) until
 *     ‖X − I‖₁ ≤ 1/4; after s roots, log Ad = 2^s·log X;
 *  2. log X by the series log X = 2·Σ_k W^{2k+1}/(2k+1), W = (X − I)(X + I)⁻¹ (the
 *     inverse hyperbolic tangent series), which converges like ‖W‖² ≲ 1/50 per term here.
 * The principal logarithm of a real matrix is real exactly when no eigenvalue lies on the
 * closed negative real axis (Higham 2008, Thm 1.31, from memory); such input gets a reason,
 * not a number. The result is checked by re-exponentiating: e^{A·T} vs Ad.
 * Bc: Γ = ∫₀ᵀ e^{As} ds is the upper-right block of expm([[A, I], [0, 0]]·T); it is
 * invertible for a principal logarithm (its eigenvalues (e^{λT} − 1)/λ vanish only at
 * λT = 2πjm, m ≠ 0, outside the principal strip |Im λT| < π).
 *
 * Equivalent continuous poles: s = ln(z)/T on the principal branch for every eigenvalue z.
 *
 * Invariants: inputs are never mutated; every outcome is a result object, never a throw.
 */
import { EigenvalueDecomposition, Matrix, inverse, solve } from 'ml-matrix';
import { expm } from './expm';
import { boundaryTolerance, maxAbs, relativeError } from './tolerance';

export interface EquivalentPole {
  z: { re: number; im: number };
  /** ln(z)/T on the principal branch; null for z = 0 (no finite equivalent). */
  s: { re: number; im: number } | null;
}

export interface ContinuousFromZohSuccess {
  ok: true;
  period: number;
  A: number[][];
  B: number[][] | null;
  poles: EquivalentPole[];
  /** ‖e^{A·T} − Ad‖_F / ‖Ad‖_F of the result. */
  residual: number;
  squareRoots: number;
}

export interface ContinuousFromZohFailure {
  ok: false;
  period: number;
  reason: string;
  poles: EquivalentPole[];
}

export type ContinuousFromZohResult = ContinuousFromZohSuccess | ContinuousFromZohFailure;

const MAX_SQUARE_ROOTS = 64;
const MAX_DB_ITERATIONS = 100;

function identity(n: number): Matrix {
  return Matrix.eye(n, n);
}

function norm1(m: Matrix): number {
  let best = 0;
  for (let j = 0; j < m.columns; j++) {
    let s = 0;
    for (let i = 0; i < m.rows; i++) s += Math.abs(m.get(i, j));
    best = Math.max(best, s);
  }
  return best;
}

/** Principal square root by the product form of Denman–Beavers: M_k → I, X_k → √A. */
function sqrtm(A: Matrix): Matrix | null {
  const n = A.rows;
  let M = A.clone();
  let X = A.clone();
  let previous = Infinity;
  for (let k = 0; k < MAX_DB_ITERATIONS; k++) {
    const Minv = inverse(M);
    const half = 0.5;
    // X ← X(I + M⁻¹)/2, M ← (I + (M + M⁻¹)/2)/2
    const Xn = X.mmul(identity(n).add(Minv)).mul(half);
    const Mn = identity(n).add(M.clone().add(Minv).mul(half)).mul(half);
    const change = norm1(Mn.clone().sub(identity(n)));
    X = Xn;
    M = Mn;
    // Converged when M is I to rounding (2^-50 relative, a few ulps; common practice).
    if (change <= 2 ** -50 * n) return X;
    if (!Number.isFinite(change)) return null;
    // Stagnation at the rounding level of an ill-conditioned input: the iterate is as good as it gets.
    if (change < 1e-10 && change >= previous) return X;
    previous = change;
  }
  return null;
}

/** log X for ‖X − I‖ ≤ 1/4 by the atanh series. */
function logNearIdentity(X: Matrix): Matrix {
  const n = X.rows;
  const W = solve(X.clone().add(identity(n)).transpose(), X.clone().sub(identity(n)).transpose()).transpose();
  const W2 = W.mmul(W);
  let term = W.clone();
  let sum = W.clone();
  for (let k = 1; k < 200; k++) {
    term = term.mmul(W2);
    const contribution = term.clone().mul(1 / (2 * k + 1));
    sum.add(contribution);
    if (norm1(contribution) <= 2 ** -55 * Math.max(norm1(sum), Number.MIN_VALUE)) break;
  }
  return sum.mul(2);
}

/** The equivalent continuous poles ln(z)/T, principal branch. */
export function equivalentContinuousPoles(Ad: number[][], T: number): EquivalentPole[] {
  const evd = new EigenvalueDecomposition(new Matrix(Ad), { assumeSymmetric: false });
  return evd.realEigenvalues.map((re, i) => {
    const im = evd.imaginaryEigenvalues[i];
    const r = Math.hypot(re, im);
    return { z: { re, im }, s: r === 0 ? null : { re: Math.log(r) / T, im: Math.atan2(im, re) / T } };
  });
}

/** Continuous (A, B) whose zero-order hold at period T is (Ad, Bd). */
export function continuousFromZoh(Ad: number[][], Bd: number[][] | null, T: number): ContinuousFromZohResult {
  const n = Ad.length;
  const fail = (reason: string, poles: EquivalentPole[] = []): ContinuousFromZohFailure => ({ ok: false, period: T, reason, poles });
  if (!(Number.isFinite(T) && T > 0)) return fail(`The sample period must be a positive finite number (got ${T}).`);
  if (n === 0 || Ad.some((r) => r.length !== n)) return fail('Ad must be a non-empty square matrix.');
  if (Bd && (Bd.length !== n || Bd.some((r) => r.length !== Bd[0].length) || Bd[0].length === 0)) return fail(`Bd must have ${n} rows of equal length.`);
  if (Ad.some((r) => r.some((x) => !Number.isFinite(x))) || (Bd && Bd.some((r) => r.some((x) => !Number.isFinite(x))))) {
    return fail('Ad and Bd must have finite entries.');
  }
  const poles = equivalentContinuousPoles(Ad, T);
  const tol = boundaryTolerance(maxAbs(Ad));
  for (const p of poles) {
    const r = Math.hypot(p.z.re, p.z.im);
    if (r <= tol) return fail('Ad has the eigenvalue 0 (it is singular): no continuous model has this zero-order hold, since e^{AT} is always invertible.', poles);
    if (Math.abs(p.z.im) <= tol && p.z.re < 0) {
      return fail(
        `Ad has the eigenvalue ${Number(p.z.re.toPrecision(6))} on the negative real axis: it has no real principal logarithm ` +
          '(the continuous mode would oscillate at exactly half the sampling frequency, which zero-order hold cannot tell from its alias).',
        poles,
      );
    }
  }
  let X = new Matrix(Ad);
  let squareRoots = 0;
  while (norm1(X.clone().sub(identity(n))) > 0.25) {
    if (squareRoots >= MAX_SQUARE_ROOTS) return fail('The square-root iteration did not reach the identity (the matrix is too ill-conditioned).', poles);
    let root: Matrix | null;
    try {
      root = sqrtm(X);
    } catch {
      root = null;
    }
    if (!root) return fail('The matrix square root did not converge (Ad is too close to singular).', poles);
    X = root;
    squareRoots++;
  }
  const L = logNearIdentity(X).mul(2 ** squareRoots / T);
  const A = L.to2DArray();
  let residual: number;
  try {
    residual = relativeError(expm(A.map((r) => r.map((x) => x * T))), Ad);
  } catch (e) {
    return fail(`Re-exponentiation failed: ${e instanceof Error ? e.message : String(e)}`, poles);
  }
  let B: number[][] | null = null;
  if (Bd) {
    // Γ = upper-right block of expm([[A, I], [0, 0]]·T).
    const M = Array.from({ length: 2 * n }, (_, i) => Array.from({ length: 2 * n }, (_, j) => (i < n ? (j < n ? A[i][j] * T : i === j - n ? T : 0) : 0)));
    const E = expm(M);
    const Gamma = new Matrix(E.slice(0, n).map((r) => r.slice(n)));
    B = solve(Gamma, new Matrix(Bd)).to2DArray();
  }
  return { ok: true, period: T, A, B, poles, residual, squareRoots };
}
