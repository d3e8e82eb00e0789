/**
 * Discretization of a continuous state-space model ẋ = Ax + Bu, y = Cx + Du at period T.
 *
 * Methods:
 *  - zero-order hold: Ad = e^{AT}, Bd = ∫₀ᵀ e^{As} ds·B, read off the block exponential
 *    expm([[A, B], [0, 0]]·T) (Van Loan, "Computing integrals involving the matrix
 *    exponential", IEEE Trans. Automatic Control AC-23(3), 1978; Franklin, Powell & Workman,
 *    Digital Control of Dynamic Systems, 3rd ed., ch. 4, from memory). Cd = C, Dd = D.
 *    Exact when A is nilpotent and the input is rational: the series then ends at A^{n−1}.
 *  - first-order (triangle) hold: the input is interpolated linearly between samples;
 *    Φ = e^{AT}, Γ1 = ∫₀ᵀ e^{Aσ}dσ·B, Γ2 = (1/T)∫₀ᵀ e^{A(T−τ)}τ dτ·B are blocks of
 *    expm([[A, B, 0], [0, 0, I/T], [0, 0, 0]]·T); with the state ξ = x − Γ2·u the model is
 *    Ad = Φ, Bd = Γ1 + (Φ − I)Γ2, Cd = C, Dd = D + C·Γ2 (Franklin, Powell & Workman, 3rd ed.,
 *    ch. 6, triangle-hold equivalent, from memory).
 *  - the generalized bilinear family (G. Zhang, X. Chen & T. Chen, "Digital redesign via the
 *    generalized bilinear transformation", Int. J. Control 82(4), 2009, from memory), with
 *    Ad = (I − αAT)⁻¹(I + (1−α)AT), Bd = (I − αAT)⁻¹BT, Cd = C(I − αAT)⁻¹, Dd = D + αC·Bd:
 *    α = 0 forward Euler, α = ½ Tustin, α = 1 backward Euler. This is the convention of
 *    SciPy's generalized bilinear transform. Other texts scale Bd and Cd by √T; the
 *    transfer function is the same. Tustin may be pre-warped at ω: T is replaced by
 *    T' = 2·tan(ωT/2)/ω, so that the frequency ω maps exactly.
 *    All three are exact over Q when A, B, C, D and T are rational.
 *
 * Invariants: inputs are never mutated; a result is either ok with matrices of the right
 * shapes (Bd/Dd null when B is absent, Cd/Dd null when C is absent) or an error with a
 * message; nothing here throws on bad input.
 */
import { EigenvalueDecomposition, Matrix, SingularValueDecomposition, solve as solveFloat } from 'ml-matrix';
import { Rational } from './rational';
import { identityQ, inverseQ, isZeroQ, mulQ, scaleQ, addQ, subQ, zerosQ, type MatrixQ } from './matrixQ';
import { expm } from './expm';

export type DiscretizationMethod = 'zoh' | 'tustin' | 'euler' | 'backward-euler' | 'foh';

/** A matrix of exact rationals or of doubles (never mixed within one matrix). */
export type AnyMatrix = Rational[][] | number[][];

export interface ContinuousModelInput {
  A: AnyMatrix;
  B?: AnyMatrix | null;
  C?: AnyMatrix | null;
  D?: AnyMatrix | null;
}

export interface DiscretizeOptions {
  /** Tustin only: pre-warp so that this angular frequency (rad/s) maps exactly. */
  prewarp?: number;
}

export interface DiscretizeSuccess {
  ok: true;
  method: DiscretizationMethod;
  period: number;
  Ad: number[][];
  Bd: number[][] | null;
  Cd: number[][] | null;
  Dd: number[][] | null;
  /** Exact text entries when every step stayed in Q; null otherwise. */
  exact: { Ad: string[][]; Bd: string[][] | null; Cd: string[][] | null; Dd: string[][] | null } | null;
  /** Limitations of the method for this model, in plain sentences. */
  caveats: string[];
  /** The formulas used, stated for the reader (conventions differ between texts). */
  convention: string;
}

export interface DiscretizeFailure {
  ok: false;
  method: DiscretizationMethod;
  period: number;
  error: string;
}

export type DiscretizeResult = DiscretizeSuccess | DiscretizeFailure;

export function isRationalMatrix(m: AnyMatrix): m is Rational[][] {
  return m.length > 0 && m[0].length > 0 && m[0][0] instanceof Rational;
}

export function toFloatMatrix(m: AnyMatrix): number[][] {
  return (m as (Rational | number)[][]).map((row) => row.map((x) => (x instanceof Rational ? x.toNumber() : x)));
}

/** A period given as a double is read as the decimal the user wrote: 0.1 is 1/10. */
export function periodAsRational(T: number | Rational): Rational | null {
  if (T instanceof Rational) return T;
  if (!Number.isFinite(T)) return null;
  return Rational.parse(String(T));
}

function toText(m: MatrixQ): string[][] {
  return m.map((row) => row.map((x) => x.toString()));
}

function toNum(m: MatrixQ): number[][] {
  return m.map((row) => row.map((x) => x.toNumber()));
}

/** Checks shapes and finiteness; returns a message or null. */
export function validateModel(model: ContinuousModelInput): string | null {
  const { A, B, C, D } = model;
  const n = A.length;
  if (n === 0) return 'A is empty.';
  if (A.some((row) => row.length !== n)) return `A must be square (got ${n} rows, row lengths ${A.map((r) => r.length).join(', ')}).`;
  const check = (name: string, m: AnyMatrix | null | undefined, rows: number | null, cols: number | null): string | null => {
    if (m === null || m === undefined) return null;
    if (m.length === 0) return `${name} is empty.`;
    const c = m[0].length;
    if (m.some((row) => row.length !== c)) return `${name} has rows of different lengths.`;
    if (rows !== null && m.length !== rows) return `${name} must have ${rows} rows (it has ${m.length}).`;
    if (cols !== null && c !== cols) return `${name} must have ${cols} columns (it has ${c}).`;
    for (const row of m as (Rational | number)[][]) {
      for (const x of row) if (!(x instanceof Rational) && !Number.isFinite(x)) return `${name} has a non-finite entry (${x}).`;
    }
    return null;
  };
  const m = B ? B[0]?.length ?? 0 : null;
  const p = C ? C.length : null;
  return (
    check('A', A, n, n) ??
    check('B', B, n, null) ??
    check('C', C, null, n) ??
    check('D', D, p, m) ??
    (D && (!B || !C) ? 'D needs both B and C.' : null)
  );
}

const CONVENTIONS: Record<DiscretizationMethod, string> = {
  zoh: 'Zero-order hold: Ad = e^{AT}, Bd = ∫₀ᵀ e^{As} ds·B, Cd = C, Dd = D.',
  foh:
    'First-order (triangle) hold: Ad = e^{AT}, Bd = Γ1 + (Ad − I)Γ2, Cd = C, Dd = D + C·Γ2, ' +
    'with Γ1 = ∫₀ᵀ e^{As} ds·B, Γ2 = (1/T)∫₀ᵀ e^{A(T−s)} s ds·B; the discrete state is x − Γ2·u.',
  tustin: 'Tustin (bilinear): Ad = (I − AT/2)⁻¹(I + AT/2), Bd = (I − AT/2)⁻¹BT, Cd = C(I − AT/2)⁻¹, Dd = D + C·Bd/2.',
  euler: 'Forward Euler: Ad = I + AT, Bd = BT, Cd = C, Dd = D.',
  'backward-euler': 'Backward Euler: Ad = (I − AT)⁻¹, Bd = (I − AT)⁻¹BT, Cd = C(I − AT)⁻¹, Dd = D + C·Bd.',
};

/** Discretize a continuous model at period T by the given method. Never throws on bad input. */
export function discretize(
  model: ContinuousModelInput,
  T: number | Rational,
  method: DiscretizationMethod,
  opts: DiscretizeOptions = {},
): DiscretizeResult {
  const Tnum = T instanceof Rational ? T.toNumber() : T;
  const fail = (error: string): DiscretizeFailure => ({ ok: false, method, period: Tnum, error });
  if (!(Number.isFinite(Tnum) && Tnum > 0)) return fail(`The sample period must be a positive finite number (got ${String(T)}).`);
  const bad = validateModel(model);
  if (bad) return fail(bad);
  if (opts.prewarp !== undefined && method !== 'tustin') return fail('Pre-warping applies to the Tustin method only.');
  try {
    switch (method) {
      case 'euler':
        return bilinearFamily(model, T, 0, method, opts);
      case 'tustin':
        return bilinearFamily(model, T, 0.5, method, opts);
      case 'backward-euler':
        return bilinearFamily(model, T, 1, method, opts);
      case 'zoh':
        return holdEquivalent(model, T, 'zoh');
      case 'foh':
        return holdEquivalent(model, T, 'foh');
      default:
        return fail(`Unknown discretization method ${String(method)}.`);
    }
  } catch (e) {
    return fail(`Discretization failed: ${e instanceof Error ? e.message : String(e)}`);
  }
}

function allRational(model: ContinuousModelInput): boolean {
  return [model.A, model.B, model.C, model.D].every((m) => m === null || m === undefined || isRationalMatrix(m));
}

function floatEigenvalues(A: number[][]): { re: number; im: number }[] {
  const evd = new EigenvalueDecomposition(new Matrix(A), { assumeSymmetric: false });
  return evd.realEigenvalues.map((re, i) => ({ re, im: evd.imaginaryEigenvalues[i] }));
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString();
}

function eigText(l: { re: number; im: number }): string {
  return l.im === 0 ? fmt(l.re) : `${fmt(l.re)} ${l.im < 0 ? '−' : '+'} j${fmt(Math.abs(l.im))}`;
}

/** Where the method moves stable/unstable continuous poles to the wrong side of the unit circle. */
function bilinearCaveats(A: number[][], T: number, alpha: number, method: DiscretizationMethod, prewarp?: number): string[] {
  const caveats: string[] = [];
  let eigs: { re: number; im: number }[];
  try {
    eigs = floatEigenvalues(A);
  } catch {
    return caveats;
  }
  for (const l of eigs) {
    if (l.im < 0) continue;
    // z = (1 + (1−α)λT) / (1 − αλT)
    const nr = 1 + (1 - alpha) * l.re * T;
    const ni = (1 - alpha) * l.im * T;
    const dr = 1 - alpha * l.re * T;
    const di = -alpha * l.im * T;
    const z = Math.hypot(nr, ni) / Math.hypot(dr, di);
    if (method === 'euler' && l.re < 0 && z >= 1) {
      caveats.push(
        `Forward Euler maps the stable pole ${eigText(l)} to |z| = ${fmt(z)} (on or outside the unit circle): ` +
          `the discrete model is not stable at this period; a shorter period or another method keeps it stable.`,
      );
    }
    if (method === 'backward-euler' && l.re > 0 && z < 1) {
      caveats.push(
        `Backward Euler maps the unstable pole ${eigText(l)} to |z| = ${fmt(z)} (inside the unit circle): ` +
          `the discrete model looks stable although the continuous one is not.`,
      );
    }
    if (method === 'tustin' && l.im > 0 && prewarp === undefined) {
      // Tustin maps jω to the unit circle at angle 2·atan(ωT/2): the apparent frequency shrinks.
      const w = Math.hypot(l.re, l.im);
      const apparent = (2 / T) * Math.atan((w * T) / 2);
      const distortion = 1 - apparent / w;
      if (distortion > 0.01) {
        caveats.push(
          `Tustin compresses frequencies: the mode ${eigText(l)} (ω_n = ${fmt(w)} rad/s) appears at about ` +
            `${fmt(apparent)} rad/s (${fmt(100 * distortion)} % low); pre-warping at that frequency removes the error there.`,
        );
      }
    }
  }
  return caveats;
}

function bilinearFamily(
  model: ContinuousModelInput,
  T: number | Rational,
  alpha: 0 | 0.5 | 1,
  method: DiscretizationMethod,
  opts: DiscretizeOptions,
): DiscretizeResult {
  const Tnum = T instanceof Rational ? T.toNumber() : T;
  let effectiveT = Tnum;
  let prewarped = false;
  if (opts.prewarp !== undefined) {
    const w = opts.prewarp;
    if (!(Number.isFinite(w) && w > 0)) return { ok: false, method, period: Tnum, error: `The pre-warp frequency must be positive (got ${w}).` };
    if (w * Tnum >= Math.PI) {
      return { ok: false, method, period: Tnum, error: `Cannot pre-warp at ${w} rad/s: ωT = ${fmt(w * Tnum)} ≥ π (at or above the Nyquist frequency).` };
    }
    effectiveT = (2 * Math.tan((w * Tnum) / 2)) / w;
    prewarped = true;
  }
  const Af = toFloatMatrix(model.A);
  const caveats = bilinearCaveats(Af, effectiveT, alpha, method, opts.prewarp);
  let convention = CONVENTIONS[method];
  if (prewarped) convention += ` Pre-warped at ω = ${opts.prewarp} rad/s: T is replaced by T' = 2·tan(ωT/2)/ω = ${effectiveT}.`;
  const Tq = prewarped ? null : periodAsRational(T);
  if (Tq && allRational(model)) {
    const r = bilinearExact(model as ExactModel, Tq, alpha);
    if (!r) return { ok: false, method, period: Tnum, error: singularMessage(alpha) };
    return {
      ok: true,
      method,
      period: Tnum,
      Ad: toNum(r.Ad),
      Bd: r.Bd && toNum(r.Bd),
      Cd: r.Cd && toNum(r.Cd),
      Dd: r.Dd && toNum(r.Dd),
      exact: { Ad: toText(r.Ad), Bd: r.Bd && toText(r.Bd), Cd: r.Cd && toText(r.Cd), Dd: r.Dd && toText(r.Dd) },
      caveats,
      convention,
    };
  }
  const r = bilinearFloat(model, effectiveT, alpha);
  if (!r) return { ok: false, method, period: Tnum, error: singularMessage(alpha) };
  return { ok: true, method, period: Tnum, ...r, exact: null, caveats, convention };
}

function singularMessage(alpha: number): string {
  const what = alpha === 0.5 ? 'I − AT/2' : 'I − AT';
  const where = alpha === 0.5 ? '2/T' : '1/T';
  return `${what} is singular: A has the eigenvalue ${where}, so this method has no discrete model at this period; change the period or the method.`;
}

interface ExactModel {
  A: MatrixQ;
  B?: MatrixQ | null;
  C?: MatrixQ | null;
  D?: MatrixQ | null;
}

function bilinearExact(
  model: ExactModel,
  T: Rational,
  alpha: 0 | 0.5 | 1,
): { Ad: MatrixQ; Bd: MatrixQ | null; Cd: MatrixQ | null; Dd: MatrixQ | null } | null {
  const n = model.A.length;
  const I = identityQ(n);
  const a = alpha === 0 ? Rational.ZERO : alpha === 1 ? Rational.ONE : Rational.of(1, 2);
  const AT = scaleQ(model.A, T);
  const left = subQ(I, scaleQ(AT, a));
  const leftInv = inverseQ(left);
  if (!leftInv) return null;
  const Ad = mulQ(leftInv, addQ(I, scaleQ(AT, Rational.ONE.sub(a))));
  const B = model.B ?? null;
  const C = model.C ?? null;
  const Bd = B ? mulQ(leftInv, scaleQ(B, T)) : null;
  const Cd = C ? mulQ(C, leftInv) : null;
  let Dd: MatrixQ | null = null;
  if (B && C) {
    const D = model.D ?? zerosQ(C.length, B[0].length);
    Dd = addQ(D, scaleQ(mulQ(C, Bd!), a));
  }
  return { Ad, Bd, Cd, Dd };
}

function matmul(a: number[][], b: number[][]): number[][] {
  return new Matrix(a).mmul(new Matrix(b)).to2DArray();
}

function bilinearFloat(
  model: ContinuousModelInput,
  T: number,
  alpha: number,
): { Ad: number[][]; Bd: number[][] | null; Cd: number[][] | null; Dd: number[][] | null } | null {
  const A = toFloatMatrix(model.A);
  const left = A.map((row, i) => row.map((x, j) => (i === j ? 1 : 0) - alpha * T * x));
  const right = A.map((row, i) => row.map((x, j) => (i === j ? 1 : 0) + (1 - alpha) * T * x));
  if (!isWellConditioned(left)) return null;
  const solveLeft = (rhs: number[][]): number[][] => solveFloat(new Matrix(left), new Matrix(rhs)).to2DArray();
  const Ad = alpha === 0 ? right : solveLeft(right);
  const B = model.B ? toFloatMatrix(model.B) : null;
  const C = model.C ? toFloatMatrix(model.C) : null;
  const Bd = B ? (alpha === 0 ? B.map((r) => r.map((x) => x * T)) : solveLeft(B.map((r) => r.map((x) => x * T)))) : null;
  // C·left⁻¹ = (left⁻ᵀ·Cᵀ)ᵀ
  const Cd = C
    ? alpha === 0
      ? C.map((r) => r.slice())
      : new Matrix(solveFloat(new Matrix(left).transpose(), new Matrix(C).transpose())).transpose().to2DArray()
    : null;
  let Dd: number[][] | null = null;
  if (B && C) {
    const D = model.D ? toFloatMatrix(model.D) : C.map(() => B[0].map(() => 0));
    const CB = matmul(C, Bd!);
    Dd = D.map((r, i) => r.map((x, j) => x + alpha * CB[i][j]));
  }
  return { Ad, Bd, Cd, Dd };
}

/**
 * Singular-value ratio of the matrix to invert. Below 1e-14 (about 50 ulps of 1 in float64)
 * the solve would return noise, so it is reported as singular (common practice for a
 * numerical rank decision).
 */
function isWellConditioned(m: number[][]): boolean {
  const s = new Matrix(m);
  const svd = new SingularValueDecomposition(s, { autoTranspose: true });
  const sv: number[] = svd.diagonal;
  const max = Math.max(...sv);
  const min = Math.min(...sv);
  return max > 0 && min / max > 1e-14;
}

/** Exact e^{AT} series for nilpotent A: the terms A^k T^k / k! for k < n. */
function nilpotentPowers(A: MatrixQ): MatrixQ[] | null {
  const n = A.length;
  const powers: MatrixQ[] = [identityQ(n)];
  for (let k = 1; k <= n; k++) {
    const next = mulQ(powers[k - 1], A);
    if (isZeroQ(next)) return powers;
    powers.push(next);
  }
  return null;
}

function factorial(k: number): Rational {
  let f = 1n;
  for (let i = 2n; i <= BigInt(k); i++) f *= i;
  return Rational.of(f);
}

function holdEquivalent(model: ContinuousModelInput, T: number | Rational, method: 'zoh' | 'foh'): DiscretizeResult {
  const Tnum = T instanceof Rational ? T.toNumber() : T;
  const convention = CONVENTIONS[method];
  const Tq = periodAsRational(T);
  const B = model.B ?? null;
  const C = model.C ?? null;
  if (Tq && allRational(model)) {
    const powers = nilpotentPowers(model.A as MatrixQ);
    if (powers) {
      // A^n = 0: e^{AT} = Σ A^k T^k/k!, Γ1 = Σ A^k T^{k+1}/(k+1)!·B, Γ2 = Σ A^k T^{k+1}/(k+2)!·B.
      const n = model.A.length;
      let Phi = zerosQ(n, n);
      let G1 = zerosQ(n, n);
      let G2 = zerosQ(n, n);
      powers.forEach((P, k) => {
        Phi = addQ(Phi, scaleQ(P, Tq.pow(k).div(factorial(k))));
        G1 = addQ(G1, scaleQ(P, Tq.pow(k + 1).div(factorial(k + 1))));
        G2 = addQ(G2, scaleQ(P, Tq.pow(k + 1).div(factorial(k + 2))));
      });
      const Bq = B as MatrixQ | null;
      const Cq = C as MatrixQ | null;
      let Bd: MatrixQ | null = null;
      let Cd: MatrixQ | null = Cq ? Cq.map((r) => r.slice()) : null;
      let Dd: MatrixQ | null = null;
      if (Bq) {
        const Gamma1 = mulQ(G1, Bq);
        if (method === 'zoh') Bd = Gamma1;
        else Bd = addQ(Gamma1, mulQ(subQ(Phi, identityQ(n)), mulQ(G2, Bq)));
        if (Cq) {
          const D = (model.D as MatrixQ | null | undefined) ?? zerosQ(Cq.length, Bq[0].length);
          Dd = method === 'zoh' ? D.map((r) => r.slice()) : addQ(D, mulQ(Cq, mulQ(G2, Bq)));
        }
      }
      return {
        ok: true,
        method,
        period: Tnum,
        Ad: toNum(Phi),
        Bd: Bd && toNum(Bd),
        Cd: Cd && toNum(Cd),
        Dd: Dd && toNum(Dd),
        exact: { Ad: toText(Phi), Bd: Bd && toText(Bd), Cd: Cd && toText(Cd), Dd: Dd && toText(Dd) },
        caveats: [],
        convention,
      };
    }
  }
  const A = toFloatMatrix(model.A);
  const n = A.length;
  const Bf = B ? toFloatMatrix(B) : null;
  const Cf = C ? toFloatMatrix(C) : null;
  const m = Bf ? Bf[0].length : 0;
  let Ad: number[][];
  let Bd: number[][] | null = null;
  let Dd: number[][] | null = null;
  if (method === 'zoh') {
    // expm([[A, B], [0, 0]]·T) = [[e^{AT}, Γ1], [0, I]]
    const size = n + m;
    const M = Array.from({ length: size }, (_, i) =>
      Array.from({ length: size }, (_, j) => (i < n ? (j < n ? A[i][j] * Tnum : Bf![i][j - n] * Tnum) : 0)),
    );
    const E = expm(M);
    Ad = E.slice(0, n).map((r) => r.slice(0, n));
    if (Bf) Bd = E.slice(0, n).map((r) => r.slice(n, n + m));
    if (Bf && Cf) Dd = model.D ? toFloatMatrix(model.D) : Cf.map(() => new Array(m).fill(0));
  } else {
    // expm([[A, B, 0], [0, 0, I/T], [0, 0, 0]]·T) = [[Φ, Γ1, Γ2], [0, I, I], [0, 0, I]]
    const size = n + 2 * m;
    const M = Array.from({ length: size }, () => new Array<number>(size).fill(0));
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) M[i][j] = A[i][j] * Tnum;
      for (let j = 0; j < m; j++) M[i][n + j] = Bf![i][j] * Tnum;
    }
    for (let j = 0; j < m; j++) M[n + j][n + m + j] = 1;
    const E = expm(M);
    Ad = E.slice(0, n).map((r) => r.slice(0, n));
    if (Bf) {
      const G1 = E.slice(0, n).map((r) => r.slice(n, n + m));
      const G2 = E.slice(0, n).map((r) => r.slice(n + m, n + 2 * m));
      const PhiMinusI = Ad.map((r, i) => r.map((x, j) => x - (i === j ? 1 : 0)));
      const corr = matmul(PhiMinusI, G2);
      Bd = G1.map((r, i) => r.map((x, j) => x + corr[i][j]));
      if (Cf) {
        const D = model.D ? toFloatMatrix(model.D) : Cf.map(() => new Array(m).fill(0));
        const CG2 = matmul(Cf, G2);
        Dd = D.map((r, i) => r.map((x, j) => x + CG2[i][j]));
      }
    }
  }
  if (!Ad.every((r) => r.every(Number.isFinite)) || (Bd && !Bd.every((r) => r.every(Number.isFinite)))) {
    return { ok: false, method, period: Tnum, error: 'The matrix exponential overflowed: A·T is too large for a double-precision result.' };
  }
  return { ok: true, method, period: Tnum, Ad, Bd, Cd: Cf ? Cf.map((r) => r.slice()) : null, Dd, exact: null, caveats: [], convention };
}
