/**
 * Discrete process-noise covariance Qd = ∫₀ᵀ e^{As} G Qc Gᵀ e^{Aᵀs} ds for ẋ = Ax + Gw,
 * E[w(t)w(τ)ᵀ] = Qc δ(t − τ), sampled at period T.
 *
 * Method: C. F. Van Loan, "Computing integrals involving the matrix exponential", IEEE
 * Trans. Automatic Control AC-23(3), 1978: with W = G·Qc·Gᵀ,
 *   M = [[−A, W], [0, Aᵀ]]·T,  E = expm(M),  Ad = E₂₂ᵀ,  Qd = Ad·E₁₂.
 * Exact path: when A is nilpotent and every input is rational, e^{As} = Σ_{k<n} A^k s^k/k!
 * and the integral is the finite sum Σ_{k,l} A^k W (A^l)ᵀ T^{k+l+1} / (k!·l!·(k+l+1)).
 *
 * Invariants: Qd is returned exactly symmetric (the float result is replaced by
 * (Qd + Qdᵀ)/2, which removes rounding asymmetry only); inputs are never mutated; bad
 * input gives { ok: false, error }.
 */
import { Rational } from './rational';
import { addQ, identityQ, isZeroQ, mulQ, scaleQ, transposeQ, zerosQ, type MatrixQ } from './matrixQ';
import { expm } from './expm';
import { isRationalMatrix, periodAsRational, toFloatMatrix, type AnyMatrix } from './discretize';

export interface ProcessNoiseSuccess {
  ok: true;
  period: number;
  Ad: number[][];
  Qd: number[][];
  /** Exact text of Qd (and Ad) when every step stayed in Q. */
  exact: { Ad: string[][]; Qd: string[][] } | null;
}

export interface ProcessNoiseFailure {
  ok: false;
  error: string;
}

export type ProcessNoiseResult = ProcessNoiseSuccess | ProcessNoiseFailure;

function shapeOf(m: AnyMatrix): [number, number] {
  return [m.length, m.length ? m[0].length : 0];
}

function finite(m: AnyMatrix): boolean {
  return (m as (Rational | number)[][]).every((r) => r.every((x) => x instanceof Rational || Number.isFinite(x)));
}

/** Qd from Qc at period T; G defaults to the identity (noise enters every state). */
export function processNoise(A: AnyMatrix, Qc: AnyMatrix, T: number | Rational, G?: AnyMatrix | null): ProcessNoiseResult {
  const Tnum = T instanceof Rational ? T.toNumber() : T;
  if (!(Number.isFinite(Tnum) && Tnum > 0)) return { ok: false, error: `The sample period must be a positive finite number (got ${String(T)}).` };
  const [n, nc] = shapeOf(A);
  if (n === 0 || nc !== n || A.some((r) => r.length !== n)) return { ok: false, error: 'A must be a non-empty square matrix.' };
  const noiseDim = G ? shapeOf(G)[1] : n;
  if (G && (G.length !== n || G.some((r) => r.length !== noiseDim) || noiseDim === 0)) return { ok: false, error: `G must have ${n} rows and equal-length rows.` };
  if (Qc.length !== noiseDim || Qc.some((r) => r.length !== noiseDim)) {
    return { ok: false, error: `Qc must be ${noiseDim}×${noiseDim} (one row and column per noise input).` };
  }
  if (![A, Qc, ...(G ? [G] : [])].every(finite)) return { ok: false, error: 'A, G and Qc must have finite entries.' };
  const Qcf = toFloatMatrix(Qc);
  for (let i = 0; i < noiseDim; i++) {
    for (let j = 0; j < i; j++) {
      if (Math.abs(Qcf[i][j] - Qcf[j][i]) > 1e-12 * Math.max(1, Math.abs(Qcf[i][j]))) return { ok: false, error: 'Qc must be symmetric.' };
    }
    if (Qcf[i][i] < 0) return { ok: false, error: 'Qc must be positive semidefinite (a diagonal entry is negative).' };
  }

  const Tq = periodAsRational(T);
  if (Tq && isRationalMatrix(A) && isRationalMatrix(Qc) && (!G || isRationalMatrix(G))) {
    const exact = nilpotentProcessNoise(A, Qc, G ? (G as MatrixQ) : identityQ(n), Tq);
    if (exact) {
      return {
        ok: true,
        period: Tnum,
        Ad: exact.Ad.map((r) => r.map((x) => x.toNumber())),
        Qd: exact.Qd.map((r) => r.map((x) => x.toNumber())),
        exact: { Ad: exact.Ad.map((r) => r.map(String)), Qd: exact.Qd.map((r) => r.map(String)) },
      };
    }
  }

  const Af = toFloatMatrix(A);
  const Gf = G ? toFloatMatrix(G) : Af.map((r, i) => r.map((_, j) => (i === j ? 1 : 0)));
  // W = G·Qc·Gᵀ
  const GQ = Gf.map((row) => Qcf[0].map((_, j) => row.reduce((s, g, k) => s + g * Qcf[k][j], 0)));
  const W = GQ.map((row) => Gf.map((grow) => row.reduce((s, x, k) => s + x * grow[k], 0)));
  const size = 2 * n;
  const M = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      M[i][j] = -Af[i][j] * Tnum;
      M[i][n + j] = W[i][j] * Tnum;
      M[n + i][n + j] = Af[j][i] * Tnum;
    }
  }
  let E: number[][];
  try {
    E = expm(M);
  } catch (e) {
    return { ok: false, error: `The matrix exponential failed: ${e instanceof Error ? e.message : String(e)}` };
  }
  const Ad = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => E[n + j][n + i]));
  const E12 = E.slice(0, n).map((r) => r.slice(n));
  const Qd = Ad.map((row) => E12[0].map((_, j) => row.reduce((s, a, k) => s + a * E12[k][j], 0)));
  const sym = Qd.map((row, i) => row.map((x, j) => (x + Qd[j][i]) / 2));
  if (!sym.every((r) => r.every(Number.isFinite))) return { ok: false, error: 'Qd overflowed: A·T is too large for a double-precision result.' };
  return { ok: true, period: Tnum, Ad, Qd: sym, exact: null };
}

function factorial(k: number): bigint {
  let f = 1n;
  for (let i = 2n; i <= BigInt(k); i++) f *= i;
  return f;
}

function nilpotentProcessNoise(A: MatrixQ, Qc: MatrixQ, G: MatrixQ, T: Rational): { Ad: MatrixQ; Qd: MatrixQ } | null {
  const n = A.length;
  const powers: MatrixQ[] = [identityQ(n)];
  for (;;) {
    const next = mulQ(powers[powers.length - 1], A);
    if (isZeroQ(next)) break;
    if (powers.length >= n) return null; // A^n ≠ 0: not nilpotent
    powers.push(next);
  }
  const W = mulQ(G, mulQ(Qc, transposeQ(G)));
  let Ad = zerosQ(n, n);
  let Qd = zerosQ(n, n);
  powers.forEach((Pk, k) => {
    Ad = addQ(Ad, scaleQ(Pk, T.pow(k).div(Rational.of(factorial(k)))));
    const PkW = mulQ(Pk, W);
    powers.forEach((Pl, l) => {
      const c = T.pow(k + l + 1).div(Rational.of(factorial(k) * factorial(l) * BigInt(k + l + 1)));
      Qd = addQ(Qd, scaleQ(mulQ(PkW, transposeQ(Pl)), c));
    });
  });
  return { Ad, Qd };
}
