/**
 * Matrix exponential by scaling and squaring with diagonal Padé approximants.
 *
 * Method: N. J. Higham, "The scaling and squaring method for the matrix exponential
 * revisited", SIAM J. Matrix Anal. Appl. 26(4), 2005 (Padé degrees m = 3, 5, 7, 9, 13 and
 * the θ_m table), with the changes of A. H. Al-Mohy & N. J. Higham, "A new scaling and
 * squaring algorithm for the matrix exponential", SIAM J. Matrix Anal. Appl. 31(3), 2009,
 * Algorithm 6.1:
 *   - the degree and the scaling s are chosen from d_k = ‖A^k‖₁^{1/k} instead of ‖A‖₁, which
 *     can be far larger for non-normal matrices (that is what "overscaling" is);
 *   - s is increased only as far as the backward-error bound ℓ(A, m) asks;
 *   - for triangular input the diagonal and first superdiagonal are recomputed from exact
 *     formulas after every squaring (their Code Fragment 2.1), which removes the
 *     cancellation that otherwise ruins entries like b·sinh(1) in [[1, b], [0, −1]].
 * Where the paper uses a 1-norm estimator we compute the norms exactly: ‖A^k‖₁ from the
 * powers we form anyway, and ‖|A|^{2m+1}‖₁ as the largest entry of 1ᵀ|A|^{2m+1}, which is
 * 2m+1 vector–matrix products (O(n²) each), so exact and cheap for every n we accept.
 *
 * Written here rather than taken from mathjs because mathjs.expm measured 1e-15…6.5e-11
 * relative error against 50-digit references (stiff and large off-diagonal cases), while
 * this algorithm reaches float64 accuracy on the same cases.
 *
 * Invariants: inputs are never mutated; every function returns fresh arrays; the result
 * is finite or an Error is thrown (non-square, non-finite input, or overflow), never a
 * silent Infinity/NaN.
 */

/** Row-major n×n matrix stored flat: entry (i, j) at i*n + j. */
type Flat = Float64Array;

/** Unit roundoff of IEEE double (round to nearest): u = 2^-53. */
const UNIT_ROUNDOFF = 2 ** -53;

/**
 * θ_m: the largest ‖2^{-s}A‖ for which the degree-m Padé approximant has backward error
 * ≤ u. Degrees 3..9 from Higham 2005, Table 2.3; θ_13 = 4.25 is the value Al-Mohy & Higham
 * 2009 use with Algorithm 6.1 (the 2005 value 5.37 assumed ‖A‖ rather than d_k bounds).
 */
const THETA: Record<number, number> = {
  3: 1.495585217958292e-2,
  5: 2.539398330063230e-1,
  7: 9.504178996162932e-1,
  9: 2.097847961257068e0,
  13: 4.25,
};

function factorial(k: number): bigint {
  let f = 1n;
  for (let i = 2n; i <= BigInt(k); i++) f *= i;
  return f;
}

/**
 * Coefficients of the numerator p_m(x) = Σ b_j x^j of the [m/m] Padé approximant to e^x,
 * scaled so b_m = 1: b_j = (2m−j)! / (j!(m−j)!) (Higham 2005, eq. 2.2 times (2m)!/m!).
 * Computed exactly in BigInt, then rounded once to double. The denominator is p_m(−x).
 */
function padeCoefficients(m: number): number[] {
  const coeffs: number[] = [];
  for (let j = 0; j <= m; j++) {
    coeffs.push(Number(factorial(2 * m - j) / (factorial(j) * factorial(m - j))));
  }
  return coeffs;
}

const PADE: Record<number, number[]> = {
  3: padeCoefficients(3),
  5: padeCoefficients(5),
  7: padeCoefficients(7),
  9: padeCoefficients(9),
  13: padeCoefficients(13),
};

/**
 * |c_{2m+1}|, the leading coefficient of the error series e^x − r_m(x):
 * (m!)² / ((2m)!(2m+1)!) (Al-Mohy & Higham 2009, eq. 5.1).
 */
function leadingErrorCoefficient(m: number): number {
  const mf = Number(factorial(m));
  return (mf * mf) / (Number(factorial(2 * m)) * Number(factorial(2 * m + 1)));
}

// ---------- small dense kernels on flat arrays ----------

function toFlat(A: number[][], n: number): Flat {
  const F = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const row = A[i];
    for (let j = 0; j < n; j++) F[i * n + j] = row[j];
  }
  return F;
}

function fromFlat(F: Flat, n: number): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < n; i++) out.push(Array.from(F.subarray(i * n, i * n + n)));
  return out;
}

/**
 * C = A·B as dot products of rows of A with rows of Bᵀ, four partial sums per entry:
 * contiguous reads and independent accumulators measured ~1.6× faster than i-k-j here.
 */
function mul(A: Flat, B: Flat, n: number): Flat {
  const C = new Float64Array(n * n);
  const BT = transpose(B, n);
  for (let i = 0; i < n; i++) {
    const ai = i * n;
    for (let j = 0; j < n; j++) {
      const bj = j * n;
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      let k = 0;
      for (; k + 3 < n; k += 4) {
        s0 += A[ai + k] * BT[bj + k];
        s1 += A[ai + k + 1] * BT[bj + k + 1];
        s2 += A[ai + k + 2] * BT[bj + k + 2];
        s3 += A[ai + k + 3] * BT[bj + k + 3];
      }
      for (; k < n; k++) s0 += A[ai + k] * BT[bj + k];
      C[ai + j] = s0 + s1 + (s2 + s3);
    }
  }
  return C;
}

/** Σ coef_i · M_i (+ c0·I when c0 is given). */
function combine(terms: [number, Flat][], n: number, identityCoef = 0): Flat {
  const out = new Float64Array(n * n);
  for (const [c, M] of terms) {
    if (c === 0) continue;
    for (let i = 0; i < n * n; i++) out[i] += c * M[i];
  }
  if (identityCoef !== 0) for (let i = 0; i < n; i++) out[i * n + i] += identityCoef;
  return out;
}

function scale(A: Flat, c: number): Flat {
  const out = new Float64Array(A.length);
  for (let i = 0; i < A.length; i++) out[i] = c * A[i];
  return out;
}

/** Induced 1-norm: largest absolute column sum. */
function norm1(A: Flat, n: number): number {
  let best = 0;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.abs(A[i * n + j]);
    if (s > best) best = s;
  }
  return best;
}

function allFinite(A: Flat): boolean {
  for (let i = 0; i < A.length; i++) if (!Number.isFinite(A[i])) return false;
  return true;
}

/**
 * Solves Q·X = P for X by LU with partial pivoting (Q, P n×n). Q = q_m(A) is well
 * conditioned for ‖A‖ ≤ θ_m (Higham 2005, §2), so no refinement is needed.
 */
function solve(Q: Flat, P: Flat, n: number): Flat {
  const LU = Float64Array.from(Q);
  const X = Float64Array.from(P);
  for (let k = 0; k < n; k++) {
    let piv = k;
    let best = Math.abs(LU[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(LU[i * n + k]);
      if (v > best) {
        best = v;
        piv = i;
      }
    }
    if (best === 0) throw new Error('expm: Padé denominator is singular (input too large or not finite)');
    if (piv !== k) {
      for (let j = 0; j < n; j++) {
        let t = LU[k * n + j];
        LU[k * n + j] = LU[piv * n + j];
        LU[piv * n + j] = t;
        t = X[k * n + j];
        X[k * n + j] = X[piv * n + j];
        X[piv * n + j] = t;
      }
    }
    const pivot = LU[k * n + k];
    for (let i = k + 1; i < n; i++) {
      const f = LU[i * n + k] / pivot;
      if (f === 0) continue;
      LU[i * n + k] = f;
      for (let j = k + 1; j < n; j++) LU[i * n + j] -= f * LU[k * n + j];
      for (let j = 0; j < n; j++) X[i * n + j] -= f * X[k * n + j];
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    const pivot = LU[k * n + k];
    for (let j = 0; j < n; j++) X[k * n + j] /= pivot;
    for (let i = 0; i < k; i++) {
      const f = LU[i * n + k];
      if (f === 0) continue;
      for (let j = 0; j < n; j++) X[i * n + j] -= f * X[k * n + j];
    }
  }
  return X;
}

// ---------- the algorithm ----------

/**
 * ℓ(A, m) = max(⌈log2(α/u) / (2m)⌉, 0), α = |c_{2m+1}|·‖|A|^{2m+1}‖₁ / ‖A‖₁
 * (Al-Mohy & Higham 2009, Algorithm 6.1): how many extra halvings keep the relative
 * backward error of r_m below u. `scaleFactor` is the 2^{-s} applied to A.
 * Evaluated in logarithms on |A|/‖A‖₁ so large inputs cannot overflow here.
 */
function extraScalings(A: Flat, n: number, m: number, scaleFactor: number): number {
  const normA = norm1(A, n);
  if (normA === 0) return 0;
  const p = 2 * m + 1;
  // v ← vᵀ·(|A|/‖A‖₁), starting from the all-ones row: max(v) is then ‖(|A|/‖A‖₁)^p‖₁.
  let v = new Float64Array(n).fill(1);
  for (let step = 0; step < p; step++) {
    const next = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const vi = v[i];
      if (vi === 0) continue;
      for (let j = 0; j < n; j++) next[j] += vi * (Math.abs(A[i * n + j]) / normA);
    }
    v = next;
  }
  let normPower = 0;
  for (let j = 0; j < n; j++) if (v[j] > normPower) normPower = v[j];
  if (normPower === 0) return 0;
  const log2Alpha =
    Math.log2(leadingErrorCoefficient(m)) + (p - 1) * Math.log2(normA * scaleFactor) + Math.log2(normPower);
  const ell = Math.ceil((log2Alpha - Math.log2(UNIT_ROUNDOFF)) / (2 * m));
  return Number.isFinite(ell) ? Math.max(ell, 0) : 0;
}

/** r_m(A) for m ∈ {3,5,7,9} from the precomputed even powers (Higham 2005, eq. 2.9 form). */
function padeLowDegree(A: Flat, evenPowers: Flat[], n: number, m: number): Flat {
  const b = PADE[m];
  // U = A·Σ b_{2k+1} A^{2k}, V = Σ b_{2k} A^{2k}; evenPowers[k-1] = A^{2k}.
  const uTerms: [number, Flat][] = [];
  const vTerms: [number, Flat][] = [];
  for (let k = 1; 2 * k <= m; k++) {
    uTerms.push([b[2 * k + 1], evenPowers[k - 1]]);
    vTerms.push([b[2 * k], evenPowers[k - 1]]);
  }
  const U = mul(A, combine(uTerms, n, b[1]), n);
  const V = combine(vTerms, n, b[0]);
  return solve(combine([[1, V], [-1, U]], n), combine([[1, V], [1, U]], n), n);
}

/** r_13(A) with Higham 2005's evaluation scheme (eq. 2.10): 6 products and one solve. */
function pade13(A: Flat, A2: Flat, A4: Flat, A6: Flat, n: number): Flat {
  const b = PADE[13];
  const uInner = mul(A6, combine([[b[13], A6], [b[11], A4], [b[9], A2]], n), n);
  const U = mul(A, combine([[1, uInner], [b[7], A6], [b[5], A4], [b[3], A2]], n, b[1]), n);
  const vInner = mul(A6, combine([[b[12], A6], [b[10], A4], [b[8], A2]], n), n);
  const V = combine([[1, vInner], [b[6], A6], [b[4], A4], [b[2], A2]], n, b[0]);
  return solve(combine([[1, V], [-1, U]], n), combine([[1, V], [1, U]], n), n);
}

function isUpperTriangular(A: Flat, n: number): boolean {
  for (let i = 1; i < n; i++) for (let j = 0; j < i; j++) if (A[i * n + j] !== 0) return false;
  return true;
}

function isLowerTriangular(A: Flat, n: number): boolean {
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (A[i * n + j] !== 0) return false;
  return true;
}

function transpose(A: Flat, n: number): Flat {
  const T = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) T[j * n + i] = A[i * n + j];
  return T;
}

/**
 * (1,2) entry of exp([[λ1, t],[0, λ2]]) without cancellation:
 * t·e^{(λ1+λ2)/2}·sinh((λ2−λ1)/2)/((λ2−λ1)/2) (Higham, "Functions of Matrices", 2008,
 * eq. 10.42; used by Al-Mohy & Higham 2009, Code Fragment 2.1).
 */
function expSuperdiagonal(l1: number, l2: number, t: number): number {
  const half = (l2 - l1) / 2;
  const sinhc = half === 0 ? 1 : Math.sinh(half) / half;
  const mean = (l1 + l2) / 2;
  // Split e^{mean} so a large mean times a small sinhc does not overflow early.
  return t * Math.exp(mean / 2) * sinhc * Math.exp(mean / 2);
}

/** Overwrites the diagonal and superdiagonal of X with those of exp(c·T), T upper triangular. */
function fixTriangular(X: Flat, T: Flat, n: number, c: number): void {
  for (let i = 0; i < n; i++) X[i * n + i] = Math.exp(c * T[i * n + i]);
  for (let i = 0; i + 1 < n; i++) {
    X[i * n + i + 1] = expSuperdiagonal(c * T[i * n + i], c * T[(i + 1) * n + i + 1], c * T[i * n + i + 1]);
  }
}

function validateSquare(A: number[][], what: string): number {
  if (!Array.isArray(A)) throw new Error(`${what}: expected a square matrix`);
  const n = A.length;
  for (let i = 0; i < n; i++) {
    const row = A[i];
    if (!Array.isArray(row) || row.length !== n) {
      throw new Error(`${what}: expected a square matrix, row ${i + 1} has ${Array.isArray(row) ? row.length : 0} entries for ${n} rows`);
    }
    for (let j = 0; j < n; j++) {
      if (typeof row[j] !== 'number' || !Number.isFinite(row[j])) {
        throw new Error(`${what}: entry (${i + 1}, ${j + 1}) is not a finite number`);
      }
    }
  }
  return n;
}

function expmFlat(A: Flat, n: number): Flat {
  if (n === 0) return new Float64Array(0);
  // Lower triangular: e^{A} = (e^{Aᵀ})ᵀ, so the triangular refinements apply too.
  if (!isUpperTriangular(A, n) && isLowerTriangular(A, n)) return transpose(expmFlat(transpose(A, n), n), n);
  const triangular = isUpperTriangular(A, n);

  const A2 = mul(A, A, n);
  const A4 = mul(A2, A2, n);
  const A6 = mul(A2, A4, n);
  const d4 = norm1(A4, n) ** (1 / 4);
  const d6 = norm1(A6, n) ** (1 / 6);
  const eta1 = Math.max(d4, d6);

  let result: Flat | null = null;
  if (Number.isFinite(eta1) && eta1 <= THETA[3] && extraScalings(A, n, 3, 1) === 0) {
    result = padeLowDegree(A, [A2], n, 3);
  } else if (Number.isFinite(eta1) && eta1 <= THETA[5] && extraScalings(A, n, 5, 1) === 0) {
    result = padeLowDegree(A, [A2, A4], n, 5);
  }
  let squarings = 0;
  if (result === null) {
    const A8 = mul(A4, A4, n);
    const d8 = norm1(A8, n) ** (1 / 8);
    const eta3 = Math.max(d6, d8);
    if (Number.isFinite(eta3) && eta3 <= THETA[7] && extraScalings(A, n, 7, 1) === 0) {
      result = padeLowDegree(A, [A2, A4, A6], n, 7);
    } else if (Number.isFinite(eta3) && eta3 <= THETA[9] && extraScalings(A, n, 9, 1) === 0) {
      result = padeLowDegree(A, [A2, A4, A6, A8], n, 9);
    } else {
      const d10 = norm1(mul(A4, A6, n), n) ** (1 / 10);
      const eta4 = Math.max(d8, d10);
      // d_k ≤ ‖A‖₁ always, so ‖A‖₁ is a safe stand-in when a power overflowed.
      let eta5 = Math.min(eta3, eta4);
      if (!Number.isFinite(eta5)) eta5 = norm1(A, n);
      // A norm beyond the double range would ask for infinitely many squarings.
      if (!Number.isFinite(eta5)) throw new RangeError('expm: the matrix norm overflows double precision');
      squarings = Math.max(Math.ceil(Math.log2(eta5 / THETA[13])), 0);
      squarings += extraScalings(A, n, 13, 2 ** -squarings);
      const c = 2 ** -squarings;
      const As = scale(A, c);
      // Powers of two scale exactly, so rescaling the powers equals recomputing them,
      // unless they overflowed or would underflow badly; then recompute from As.
      let S2 = scale(A2, c * c);
      let S4 = scale(A4, c ** 4);
      let S6 = scale(A6, c ** 6);
      if (!allFinite(A6) || c ** 6 === 0) {
        S2 = mul(As, As, n);
        S4 = mul(S2, S2, n);
        S6 = mul(S2, S4, n);
      }
      result = pade13(As, S2, S4, S6, n);
    }
  }

  if (triangular) fixTriangular(result, A, n, 2 ** -squarings);
  for (let k = squarings - 1; k >= 0; k--) {
    result = mul(result, result, n);
    if (triangular) fixTriangular(result, A, n, 2 ** -k);
  }
  if (!allFinite(result)) throw new RangeError('expm: the matrix exponential overflows double precision');
  return result;
}

/**
 * e^{A} for a real square matrix. Throws an Error with a readable message for a
 * non-square or non-finite input and a RangeError when the result overflows.
 *
 * @example expm([[0, 1], [0, 0]]) // [[1, 1], [0, 1]]
 */
export function expm(A: number[][]): number[][] {
  const n = validateSquare(A, 'expm');
  return fromFlat(expmFlat(toFlat(A, n), n), n);
}

/** e^{A·t}: the continuous transition matrix Φ(t) at one time. */
export function expmTimes(A: number[][], t: number): number[][] {
  const n = validateSquare(A, 'expmTimes');
  if (!Number.isFinite(t)) throw new Error('expmTimes: the time must be a finite number');
  return fromFlat(expmFlat(scale(toFlat(A, n), t), n), n);
}

/**
 * Zero-order hold through one exponential (Van Loan 1978 block form):
 * exp([[A, B], [0, 0]]·T) = [[Ad, Bd], [0, I]] with Ad = e^{AT}, Bd = ∫₀ᵀ e^{As} ds·B.
 * A is n×n, B is n×m (m may be 0), T is the sample period.
 */
export function expmBlock(A: number[][], B: number[][], T: number): { Ad: number[][]; Bd: number[][] } {
  const n = validateSquare(A, 'expmBlock');
  if (!Array.isArray(B) || B.length !== n) {
    throw new Error(`expmBlock: B must have ${n} rows like A, it has ${Array.isArray(B) ? B.length : 0}`);
  }
  const m = n === 0 ? 0 : Array.isArray(B[0]) ? B[0].length : 0;
  for (let i = 0; i < n; i++) {
    if (!Array.isArray(B[i]) || B[i].length !== m) throw new Error(`expmBlock: row ${i + 1} of B does not have ${m} entries`);
    for (let j = 0; j < m; j++) {
      if (typeof B[i][j] !== 'number' || !Number.isFinite(B[i][j])) {
        throw new Error(`expmBlock: entry (${i + 1}, ${j + 1}) of B is not a finite number`);
      }
    }
  }
  if (!Number.isFinite(T)) throw new Error('expmBlock: the sample period must be a finite number');
  const size = n + m;
  const M = new Float64Array(size * size);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) M[i * size + j] = A[i][j] * T;
    for (let j = 0; j < m; j++) M[i * size + n + j] = B[i][j] * T;
  }
  const E = expmFlat(M, size);
  const Ad: number[][] = [];
  const Bd: number[][] = [];
  for (let i = 0; i < n; i++) {
    Ad.push(Array.from(E.subarray(i * size, i * size + n)));
    Bd.push(Array.from(E.subarray(i * size + n, i * size + size)));
  }
  return { Ad, Bd };
}
