/**
 * Closed-form transition matrices Φ(t) = e^{At} and Φ(k) = A^k in real form, entry by entry.
 *
 * Method: the spectral (component-matrix) expansion
 *   f(A) = Σ_λ Σ_{i<m_λ} f^{(i)}(λ)/i! · Z_{λ,i},   Z_{λ,i} = (A − λI)^i·P_λ
 * (Horn & Johnson, Topics in Matrix Analysis, §6.1, from memory; Higham, Functions of
 * Matrices, 2008, §1.2, from memory); the Z are built in componentMatrices.ts.
 *
 * - Continuous, f(x) = e^{xt}: f^{(i)}(λ)/i! = t^i·e^{λt}/i!.
 * - Discrete, f(x) = x^k: f^{(i)}(λ)/i! = C(k, i)·λ^{k−i}. For λ ≠ 0 we write
 *   C(k, i) = Σ_j s(i, j)·k^j / i! with s the signed Stirling numbers of the first kind
 *   (Graham, Knuth & Patashnik, Concrete Mathematics, §6.1, from memory), giving terms
 *   k^j·λ^k·W_j with W_j = Σ_{i≥j} s(i, j)/i!·λ^{−i}·Z_{λ,i}. This is valid for every k ≥ 0
 *   because C(k, i) vanishes for k < i. For λ = 0, A^k·P_0 = Z_{0,k} for k < m and 0 after,
 *   so those are "at k = j" terms.
 * - Real form: a complex pair σ ± jω (ω > 0 taken) contributes
 *   2·Re(W·e^{λt}) = 2e^{σt}(Re W·cos ωt − Im W·sin ωt), and likewise with r^k, θk.
 *
 * Exact path (rational A, exact spectrum with factors): each root of a factor of degree ≤ 2
 * lives in Q(√d); the Z and W have entries a + b√d, so coefficients are exact (for complex
 * pairs Re W is rational and Im W = b·√|d|). Roots of degree ≥ 3 factors are handled by the
 * numeric path; their terms carry no `exact` text and exactCoefficients is false.
 * Numeric path (float A or float spectrum): the same expansion over complex doubles with m
 * the algebraic multiplicity ((x − λ)^alg annihilates the generalized eigenspace).
 *
 * Term order in each entry: slowest-decaying first — continuous by rate descending, then
 * power descending, then frequency ascending, cos before sin; discrete by radius
 * descending, then power descending, angle ascending, cos before sin, then the "at k = j"
 * terms by j. Distinct eigenvalues give distinct (rate, freq) / (radius, angle) keys, so
 * merging like terms only combines pieces of the same eigenvalue.
 *
 * The result always carries a check against an independent reference (see `checkClosedForm`)
 * so that a numerically meaningless closed form (nearly repeated eigenvalues) is reported
 * as not passed rather than shown as a silently wrong number. The reference is the double
 * exponential / repeated products; for rational input a sample that fails against it is
 * re-checked against a multiprecision reference, because the double reference can itself be
 * wrong on strongly non-normal matrices. Sample times are capped by ‖A‖_∞·t ≤ 100, so on
 * matrices with large entries and slow modes the check samples early times only (every
 * coefficient still enters Φ there).
 */
import { Rational } from './rational';
import { polyMul as polyMulQ, polyPow as polyPowQ } from './polynomial';
import { QuadField, quadText, quadToNumber, rationalSqrt, type QuadElement } from './quadField';
import {
  componentPolynomials,
  evaluateFieldPolyAt,
  integerPowers,
  numericComponentMatrices,
  type ComplexMatrix,
  type IntegerPowers,
  type NumericRootSpec,
} from './componentMatrices';
import { complexField, polyAdd, polyScale, quadAsField, type Complex, type Poly } from './fieldPoly';
import { expmTimes } from './expm';
import { EPS, SPECTRUM_BACKWARD_ERROR, frobeniusNorm } from './tolerance';
import { evaluateTerm } from './transitionEval';
import type { ContinuousTerm, DiscreteTerm, Domain, Spectrum, TransitionClosedForm, TransitionTerm } from './types';

export interface ClosedFormOptions {
  /** Largest n accepted (DESIGN.md §3 cap); default 12. */
  maxN?: number;
  /**
   * The check of an earlier build from the very same inputs: the build is deterministic, so a
   * rebuild (a closed form dropped from a bounded store and read again) takes the recorded
   * check and conditioning instead of evaluating the terms against a reference again.
   */
  knownCheck?: { check: TransitionClosedForm['check']; conditioning: number };
}

export const DEFAULT_CLOSED_FORM_MAX_N = 12;

/**
 * Acceptance of the check. Evaluating a sum of terms whose magnitudes add up to
 * conditioning·‖Φ‖ in doubles commits an error of a few ulps of each term (exp, cos, pow
 * and the rounding of each coefficient are each within ~1 ulp), so the expected residual is
 * ~c·EPS·conditioning with c of order the number of terms per entry; 32 covers that for
 * n ≤ 12. The floor 1e-11 absorbs the reference's own error (scaling and squaring, ~1e-14
 * relative) amplified by e^{σt} with σt ≤ 20 and a rate rounded to a double (relative
 * error ≤ 20·EPS·|λ|t in e^{λt}). The absolute cap 1e-6 says that even a "well explained"
 * residual above it makes the closed form useless as displayed numbers (CHECKS.md #9).
 */
export const CHECK_RESIDUAL_FLOOR = 1e-11;
export const CHECK_ULPS_PER_CONDITION = 32;
export const CHECK_RESIDUAL_CAP = 1e-6;

/**
 * Numeric coefficients at or below NUMERIC_DROP_ULPS·EPS·(largest coefficient of the same
 * eigenvalue) are rounding noise of the O(n)-term sums that form them (n ≤ 12, growth a few
 * ulps per product), so they are dropped; doing so changes Φ by less than that noise.
 */
const NUMERIC_DROP_ULPS = 64;

/** Sample-time caps: growth e^{σt} ≤ e^20 keeps every value far from overflow; ‖A‖_∞·t ≤ 100
 *  keeps t^k terms bounded and the reference exponential in the range where scaling and
 *  squaring is accurate (a slow mode still shows at such t, its coefficient enters Φ at t ≈ 0). */
const MAX_GROWTH_EXPONENT = 20;
const MAX_NORM_TIMES = 100;
/** Largest step used by the discrete check (repeated products, O(n³) each). */
const MAX_DISCRETE_STEP = 200;

export function transitionClosedForm(
  A: Rational[][] | number[][],
  spectrum: Spectrum,
  domain: Domain,
  opts: ClosedFormOptions = {},
): TransitionClosedForm {
  const maxN = opts.maxN ?? DEFAULT_CLOSED_FORM_MAX_N;
  const n = validateSquare(A);
  if (n > maxN) throw new RangeError(`closed form skipped: the matrix is ${n}×${n}, above the cap of ${maxN}×${maxN}`);
  if (spectrum.n !== n) throw new RangeError(`closed form: the spectrum is for n = ${spectrum.n}, the matrix has n = ${n}`);
  const variable = domain === 'continuous' ? 't' : 'k';
  if (n === 0) {
    return { variable, entries: [], exactCoefficients: true, check: { samples: [], residual: 0, passed: true }, conditioning: 1 };
  }
  const rational = isRationalMatrix(A);
  const Afloat: number[][] = rational ? (A as Rational[][]).map((row) => row.map((x) => x.toNumber())) : (A as number[][]);
  const builder = new TermBuilder(n, domain);
  let exactCoefficients: boolean;
  if (rational && spectrum.exact && spectrum.factors) {
    exactCoefficients = buildExact(A as Rational[][], Afloat, spectrum, builder);
  } else {
    buildNumeric(Afloat, numericRootsFromEigenvalues(spectrum, Afloat), builder);
    exactCoefficients = false;
  }
  const entries = builder.finish();
  if (opts.knownCheck) return { variable, entries, exactCoefficients, check: opts.knownCheck.check, conditioning: opts.knownCheck.conditioning };
  const { samples, residual, conditioning, reference } = checkClosedForm(Afloat, entries, domain, spectrum, rational ? (A as Rational[][]) : null);
  return {
    variable,
    entries,
    exactCoefficients,
    check: { samples, residual, passed: residual <= acceptanceBound(conditioning), reference },
    conditioning,
  };
}

/* ------------------------------------------------------------------ validation */

function validateSquare(A: unknown[][]): number {
  if (!Array.isArray(A)) throw new RangeError('closed form: the matrix must be an array of rows');
  const n = A.length;
  for (const row of A) {
    if (!Array.isArray(row) || row.length !== n) throw new RangeError(`closed form: the matrix must be square (${n} rows, a row has ${Array.isArray(row) ? row.length : 0} entries)`);
    for (const x of row) {
      if (typeof x === 'number' ? !Number.isFinite(x) : !(x instanceof Rational)) {
        throw new RangeError('closed form: every entry must be a finite number or an exact rational');
      }
    }
  }
  return n;
}

function isRationalMatrix(A: Rational[][] | number[][]): A is Rational[][] {
  return A.length > 0 && A[0].length > 0 && A[0][0] instanceof Rational && A.every((row) => (row as unknown[]).every((x) => x instanceof Rational));
}

/* ------------------------------------------------------------------ exact path */

interface ExactRoot {
  field: QuadField;
  lambda: QuadElement;
  m: number;
  /** Complex root (d < 0): only the upper member is listed. */
  complex: boolean;
  /** Real surd: the Galois conjugate is also a root with conjugate components. */
  hasConjugate: boolean;
}

/** Roots of one factor of degree ≤ 2 in Q(√d), from its coefficients (monic, ascending). */
function exactRootsOfFactor(coeffs: Rational[], m: number): ExactRoot[] {
  const lead = coeffs[coeffs.length - 1];
  const c = coeffs.map((x) => x.div(lead));
  if (c.length === 2) return [{ field: QuadField.RATIONALS, lambda: QuadField.RATIONALS.fromRational(c[0].neg()), m, complex: false, hasConjugate: false }];
  // x² + b x + c0: λ = −b/2 ± √(b²/4 − c0).
  const half = c[1].div(Rational.fromInt(2)).neg();
  const disc = half.mul(half).sub(c[0]);
  if (disc.isZero()) return [{ field: QuadField.RATIONALS, lambda: QuadField.RATIONALS.fromRational(half), m: 2 * m, complex: false, hasConjugate: false }];
  const { field, r } = QuadField.normalize(Rational.ONE, disc);
  if (field.isRational) {
    // A reducible quadratic (not expected from a factorization over Q): two rational roots.
    return [half.add(r), half.sub(r)].map((x) => ({ field, lambda: field.fromRational(x), m, complex: false, hasConjugate: false }));
  }
  return [{ field, lambda: field.elem(half, r), m, complex: field.d < 0n, hasConjugate: field.d > 0n }];
}

/** Builds all terms; returns whether every coefficient is exact. */
function buildExact(A: Rational[][], Afloat: number[][], spectrum: Spectrum, builder: TermBuilder): boolean {
  const n = A.length;
  const factors = spectrum.factors!;
  let psi: Rational[] = [Rational.ONE];
  const exactRoots: ExactRoot[] = [];
  const numericFactorRoots: NumericRootSpec[] = [];
  let degreeSum = 0;
  for (const f of factors) {
    if (f.index < 1 || f.index > f.algebraic) throw new RangeError(`closed form: factor of degree ${f.degree} has an invalid index ${f.index}`);
    psi = polyMulQ(psi, polyPowQ(f.coeffs, f.index));
    degreeSum += f.degree * f.algebraic;
    if (f.degree <= 2) exactRoots.push(...exactRootsOfFactor(f.coeffs, f.index));
    else for (const root of f.roots) numericFactorRoots.push({ lambda: { re: root.re, im: root.im }, m: f.index });
  }
  if (degreeSum !== n) throw new RangeError(`closed form: the factors have total degree ${degreeSum}, the matrix has n = ${n}`);
  const powers = integerPowers(A, psi.length - 1);
  for (const root of exactRoots) {
    const W = exactExpansionMatrices(psi, root, builder.domain, powers, n);
    builder.addExactRoot(root, W);
    if (root.hasConjugate) {
      // The Galois conjugation √d → −√d fixes A and ψ, so it maps the expansion of λ to that of λ̄.
      const conjRoot = { ...root, lambda: root.field.conj(root.lambda) };
      builder.addExactRoot(conjRoot, W.map((Wj) => Wj.map((row) => row.map((x) => root.field.conj(x)))));
    }
  }
  if (numericFactorRoots.length === 0) return true;
  // Degree ≥ 3 factors: numeric component matrices, using every root of ψ in the product form.
  const allRoots: NumericRootSpec[] = [];
  for (const root of exactRoots) {
    for (const member of root.complex || root.hasConjugate ? [root.lambda, root.field.conj(root.lambda)] : [root.lambda]) {
      allRoots.push({ lambda: exactToComplex(root.field, member), m: root.m });
    }
  }
  const firstNumeric = allRoots.length;
  allRoots.push(...conjugateClosed(numericFactorRoots));
  buildNumeric(Afloat, allRoots, builder, firstNumeric);
  return false;
}

/**
 * Expansion matrices of one exact root: the weighted sums W_j = Σ_i w[j][i]·Z_{λ,i} are
 * formed on the polynomials h_i (degree < deg ψ) before evaluating at A, which costs
 * O(m·deg ψ) field operations instead of O(m·n²), and only one evaluation per W_j.
 */
function exactExpansionMatrices(psi: Rational[], root: ExactRoot, domain: Domain, powers: IntegerPowers, n: number): QuadElement[][][] {
  const F = root.field;
  const hs = componentPolynomials(psi, root);
  const m = hs.length;
  let polys: Poly<QuadElement>[];
  if (domain === 'discrete' && F.isZero(root.lambda)) {
    polys = hs;
  } else {
    const FF = quadAsField(F);
    const w = expansionWeights<QuadElement>(domain, m, {
      fromRational: (q) => F.fromRational(q),
      mul: (x, y) => F.mul(x, y),
      zero: F.zero,
      invPow: (i) => F.pow(root.lambda, -i),
    });
    polys = w.map((wj) => wj.reduce<Poly<QuadElement>>((acc, wji, i) => (F.isZero(wji) ? acc : polyAdd(FF, acc, polyScale(FF, hs[i], wji))), []));
  }
  return polys.map((p) => {
    const { X, Y } = evaluateFieldPolyAt(F, p, powers, n);
    return X.map((row, r) => row.map((x, c) => F.elem(x, Y[r][c])));
  });
}

function exactToComplex(field: QuadField, x: QuadElement): Complex {
  return field.d < 0n ? field.toComplex(x) : { re: quadToNumber(x.a, x.b, field.d), im: 0 };
}

/* ------------------------------------------------------------------ numeric path */

/**
 * Distinct eigenvalues with algebraic multiplicities, closed under conjugation. An
 * eigenvalue with |λ| ≤ SPECTRUM_BACKWARD_ERROR·‖A‖_F is taken as exactly 0: it is zero to
 * within the backward error of the spectrum (the mean of a split Jordan block is accurate
 * to that level), and a tiny non-zero λ would make the discrete expansion divide by λ^i.
 */
function numericRootsFromEigenvalues(spectrum: Spectrum, A: number[][]): NumericRootSpec[] {
  const zeroBelow = SPECTRUM_BACKWARD_ERROR * frobeniusNorm(A);
  const snapped = spectrum.eigenvalues.map((e) => ({
    lambda: Math.hypot(e.re, e.im) <= zeroBelow ? { re: 0, im: 0 } : { re: e.re, im: e.im },
    m: e.algebraic,
  }));
  const roots = conjugateClosed(snapped);
  const total = roots.reduce((acc, r) => acc + r.m, 0);
  if (total !== spectrum.n) throw new RangeError(`closed form: the eigenvalue multiplicities add up to ${total}, the matrix has n = ${spectrum.n}`);
  for (const r of roots) {
    if (!Number.isFinite(r.lambda.re) || !Number.isFinite(r.lambda.im)) throw new RangeError('closed form: an eigenvalue is not finite');
  }
  return roots;
}

/**
 * Keeps real roots and upper members, then appends the exact conjugate of each upper
 * member, so the product form sees a conjugate-symmetric set even when a numeric spectrum's
 * lower members differ from the conjugates in the last bit.
 */
function conjugateClosed(roots: NumericRootSpec[]): NumericRootSpec[] {
  const upperOrReal = roots.filter((r) => r.lambda.im >= 0);
  const lowers = upperOrReal.filter((r) => r.lambda.im > 0).map((r) => ({ lambda: { re: r.lambda.re, im: -r.lambda.im }, m: r.m }));
  return [...upperOrReal, ...lowers];
}

/** Adds the terms of every real or upper root at index ≥ first. */
function buildNumeric(Afloat: number[][], roots: NumericRootSpec[], builder: TermBuilder, first = 0): void {
  for (let idx = first; idx < roots.length; idx++) {
    if (roots[idx].lambda.im < 0) continue;
    const Z = numericComponentMatrices(Afloat, roots, idx);
    builder.addNumericRoot(roots[idx], Z);
  }
}

/* ------------------------------------------------------------------ terms */

/** Signed Stirling numbers of the first kind s(i, j), 0 ≤ j ≤ i < count. */
function stirlingFirstKind(count: number): bigint[][] {
  const s: bigint[][] = [[1n]];
  for (let i = 1; i < count; i++) {
    const row: bigint[] = new Array(i + 1).fill(0n);
    for (let j = 1; j <= i; j++) row[j] = (s[i - 1][j - 1] ?? 0n) - BigInt(i - 1) * (s[i - 1][j] ?? 0n);
    s.push(row);
  }
  return s;
}

function factorialBig(k: number): bigint {
  let f = 1n;
  for (let i = 2; i <= k; i++) f *= BigInt(i);
  return f;
}

/**
 * Weights w[j][i] with W_j = Σ_i w[j][i]·Z_i: continuous δ_ij/j!; discrete s(i,j)/i!·λ^{−i}
 * (λ ≠ 0). Generic over the scalar arithmetic so the exact and numeric paths share it.
 */
function expansionWeights<T>(
  domain: Domain,
  m: number,
  ops: { fromRational: (q: Rational) => T; mul: (x: T, y: T) => T; zero: T; invPow: (i: number) => T },
): T[][] {
  const w: T[][] = [];
  if (domain === 'continuous') {
    for (let j = 0; j < m; j++) w.push(Array.from({ length: m }, (_, i) => (i === j ? ops.fromRational(Rational.of(1n, factorialBig(j))) : ops.zero)));
    return w;
  }
  const s = stirlingFirstKind(m);
  for (let j = 0; j < m; j++) {
    const row: T[] = [];
    for (let i = 0; i < m; i++) {
      row.push(i < j || s[i][j] === 0n ? ops.zero : ops.mul(ops.fromRational(Rational.of(s[i][j], factorialBig(i))), ops.invPow(i)));
    }
    w.push(row);
  }
  return w;
}

type Shape =
  | { kind: 'continuous'; power: number; rate: number; freq: number; wave: 'cos' | 'sin'; rateExact?: string; freqExact?: string }
  | { kind: 'discrete'; power: number; radius: number; angle: number; wave: 'cos' | 'sin'; radiusExact?: string }
  | { kind: 'at'; at: number };

class TermBuilder {
  private readonly cells: TransitionTerm[][][];

  constructor(
    private readonly n: number,
    readonly domain: Domain,
  ) {
    this.cells = Array.from({ length: n }, () => Array.from({ length: n }, () => [] as TransitionTerm[]));
  }

  private push(r: number, c: number, coef: number, exact: string | undefined, shape: Shape): void {
    let term: TransitionTerm;
    if (shape.kind === 'continuous') {
      const t: ContinuousTerm = { coef, power: shape.power, rate: shape.rate, freq: shape.freq, wave: shape.wave };
      if (exact !== undefined) t.exact = exact;
      if (shape.rateExact !== undefined) t.rateExact = shape.rateExact;
      if (shape.freqExact !== undefined) t.freqExact = shape.freqExact;
      term = t;
    } else if (shape.kind === 'discrete') {
      const t: DiscreteTerm = { coef, power: shape.power, radius: shape.radius, angle: shape.angle, wave: shape.wave };
      if (exact !== undefined) t.exact = exact;
      if (shape.radiusExact !== undefined) t.radiusExact = shape.radiusExact;
      term = t;
    } else {
      const t: DiscreteTerm = { coef, at: shape.at };
      if (exact !== undefined) t.exact = exact;
      term = t;
    }
    this.cells[r][c].push(term);
  }

  /** Shapes for power j of a root with the given continuous/discrete parameters. */
  private shapeFor(j: number, wave: 'cos' | 'sin', p: RootParams): Shape {
    if (this.domain === 'continuous') {
      return { kind: 'continuous', power: j, rate: p.rate, freq: p.freq, wave, rateExact: p.rateExact, freqExact: p.freqExact };
    }
    return { kind: 'discrete', power: j, radius: p.radius, angle: p.angle, wave, radiusExact: p.radiusExact };
  }

  /**
   * Terms of one exact root from its expansion matrices: W[j] is the coefficient matrix of
   * t^j·e^{λt} (continuous), of k^j·λ^k (discrete, λ ≠ 0), or Z_{0,j} = A^j·P_0 (discrete,
   * λ = 0), as computed by `exactExpansionMatrices`.
   */
  addExactRoot(root: ExactRoot, W: QuadElement[][][]): void {
    const F = root.field;
    const params = exactRootParams(root);
    const zeroStep = this.domain === 'discrete' && F.isZero(root.lambda);
    const absD = -F.d;
    const sqrtAbsD = root.complex ? Math.sqrt(Number(absD)) : 0;
    const two = Rational.fromInt(2);
    W.forEach((Wj, j) =>
      this.eachEntry((r, c) => {
        const x = Wj[r][c];
        if (F.isZero(x)) return;
        if (zeroStep) {
          this.push(r, c, F.toNumber(x), F.toText(x), { kind: 'at', at: j });
        } else if (!root.complex) {
          this.push(r, c, F.toNumber(x), F.toText(x), this.shapeFor(j, 'cos', params));
        } else {
          // 2·Re(W·e^{jωt}) = 2a·cos − 2b√|d|·sin for W = a + b·j√|d|.
          if (!x.a.isZero()) this.push(r, c, x.a.mul(two).toNumber(), x.a.mul(two).toString(), this.shapeFor(j, 'cos', params));
          if (!x.b.isZero()) {
            const sinCoef = x.b.mul(two).neg();
            this.push(r, c, sinCoef.toNumber() * sqrtAbsD, quadText(Rational.ZERO, sinCoef, absD), this.shapeFor(j, 'sin', params));
          }
        }
      }),
    );
  }

  addNumericRoot(root: NumericRootSpec, Z: ComplexMatrix[]): void {
    const C = complexField;
    const m = Z.length;
    const lambda = root.lambda;
    const params = numericRootParams(lambda);
    const complex = lambda.im > 0;
    if (this.domain === 'discrete' && lambda.re === 0 && lambda.im === 0) {
      for (let j = 0; j < m; j++) this.addNumericMatrix(Z[j].map((row) => row.map((x) => x.re)), { kind: 'at', at: j });
      return;
    }
    const w = expansionWeights<Complex>(this.domain, m, {
      fromRational: (q) => ({ re: q.toNumber(), im: 0 }),
      mul: C.mul,
      zero: C.zero,
      invPow: (i) => complexPow(C.inv(lambda), i),
    });
    for (let j = 0; j < m; j++) {
      const W = Z[0].map((row, r) =>
        row.map((_, c) => {
          let x = C.zero;
          for (let i = 0; i < m; i++) x = C.add(x, C.mul(w[j][i], Z[i][r][c]));
          return x;
        }),
      );
      if (!complex) {
        this.addNumericMatrix(W.map((row) => row.map((x) => x.re)), this.shapeFor(j, 'cos', params));
      } else {
        // Both parts are dropped against the same scale so a tiny sin part of a large cos part is noise.
        const scale = Math.max(...W.flat().map((x) => Math.hypot(x.re, x.im)));
        this.addNumericMatrix(W.map((row) => row.map((x) => 2 * x.re)), this.shapeFor(j, 'cos', params), 2 * scale);
        this.addNumericMatrix(W.map((row) => row.map((x) => -2 * x.im)), this.shapeFor(j, 'sin', params), 2 * scale);
      }
    }
  }

  private addNumericMatrix(M: number[][], shape: Shape, scale?: number): void {
    const ref = scale ?? Math.max(...M.flat().map(Math.abs));
    const noise = NUMERIC_DROP_ULPS * EPS * ref;
    this.eachEntry((r, c) => {
      const x = M[r][c];
      if (Math.abs(x) > noise) this.push(r, c, x, undefined, shape);
    });
  }

  private eachEntry(fn: (r: number, c: number) => void): void {
    for (let r = 0; r < this.n; r++) for (let c = 0; c < this.n; c++) fn(r, c);
  }

  finish(): TransitionTerm[][][] {
    return this.cells.map((row) => row.map((terms) => mergeLikeTerms(terms).sort(compareTerms)));
  }
}

interface RootParams {
  rate: number;
  freq: number;
  rateExact?: string;
  freqExact?: string;
  radius: number;
  angle: number;
  radiusExact?: string;
}

function exactRootParams(root: ExactRoot): RootParams {
  const F = root.field;
  const { a, b } = root.lambda;
  if (root.complex) {
    const absD = -F.d;
    const freq = b.toNumber() * Math.sqrt(Number(absD));
    const radiusSquared = a.mul(a).add(b.mul(b).mul(Rational.fromInt(absD)));
    return {
      rate: a.toNumber(),
      freq,
      rateExact: a.toString(),
      freqExact: quadText(Rational.ZERO, b, absD),
      radius: Math.hypot(a.toNumber(), freq),
      angle: Math.atan2(freq, a.toNumber()),
      radiusExact: sqrtText(radiusSquared),
    };
  }
  const value = F.toNumber(root.lambda);
  const magnitude = value < 0 ? F.neg(root.lambda) : root.lambda;
  return {
    rate: value,
    freq: 0,
    rateExact: F.toText(root.lambda),
    radius: Math.abs(value),
    angle: value < 0 ? Math.PI : 0,
    radiusExact: F.toText(magnitude),
  };
}

/** Exact text of √q for a rational q ≥ 0: rational when q is a square, else "s√c/v". */
function sqrtText(q: Rational): string {
  const root = rationalSqrt(q);
  if (root) return root.toString();
  const { field, r } = QuadField.normalize(Rational.ONE, q);
  return quadText(Rational.ZERO, r, field.d);
}

function numericRootParams(lambda: Complex): RootParams {
  return {
    rate: lambda.re,
    freq: lambda.im > 0 ? lambda.im : 0,
    radius: Math.hypot(lambda.re, lambda.im),
    angle: lambda.im > 0 ? Math.atan2(lambda.im, lambda.re) : lambda.re < 0 ? Math.PI : 0,
  };
}

function complexPow(x: Complex, k: number): Complex {
  let out = complexField.one;
  for (let i = 0; i < k; i++) out = complexField.mul(out, x);
  return out;
}

/* ------------------------------------------------------------------ ordering, merging */

function termKey(t: TransitionTerm): string {
  if ('rate' in t) return `c|${t.power}|${t.rate}|${t.freq}|${t.wave}`;
  if ('at' in t) return `a|${t.at}`;
  return `d|${t.power}|${t.radius}|${t.angle}|${t.wave}`;
}

/** Sums terms with identical shape; an exact text survives only when one piece is present. */
function mergeLikeTerms(terms: TransitionTerm[]): TransitionTerm[] {
  const byKey = new Map<string, TransitionTerm>();
  for (const t of terms) {
    const key = termKey(t);
    const prev = byKey.get(key);
    if (!prev) {
      byKey.set(key, { ...t });
      continue;
    }
    prev.coef += t.coef;
    delete prev.exact;
  }
  return [...byKey.values()].filter((t) => t.coef !== 0 || t.exact !== undefined);
}

function compareTerms(x: TransitionTerm, y: TransitionTerm): number {
  if ('rate' in x && 'rate' in y) {
    return y.rate - x.rate || y.power - x.power || x.freq - y.freq || waveRank(x.wave) - waveRank(y.wave);
  }
  const xAt = 'at' in x;
  const yAt = 'at' in y;
  if (xAt && yAt) return (x as { at: number }).at - (y as { at: number }).at;
  if (xAt) return 1;
  if (yAt) return -1;
  const a = x as Extract<DiscreteTerm, { radius: number }>;
  const b = y as Extract<DiscreteTerm, { radius: number }>;
  return b.radius - a.radius || b.power - a.power || a.angle - b.angle || waveRank(a.wave) - waveRank(b.wave);
}

function waveRank(w: 'cos' | 'sin'): number {
  return w === 'cos' ? 0 : 1;
}

/* ------------------------------------------------------------------ check */

/**
 * Sample times from the spectrum. Continuous: with τ_fast = 1/max|λ| and τ_slow = 1/min|λ|
 * over non-zero eigenvalues (1 when all are zero), t ∈ {0, τ_fast/2, τ_fast,
 * √(τ_fast·τ_slow), τ_slow, 2τ_slow}, each capped so that max Re(λ)·t ≤ 20 and
 * ‖A‖_∞·t ≤ 100 (a nilpotent 3×3 block at ‖A‖t = 1000 already cost the double reference
 * six digits). Eigenvalues with |λ| ≤ SPECTRUM_BACKWARD_ERROR·‖A‖_∞ count as zero here. Discrete: k ∈ {0, 1, 2, 3, 5, 8, 13, 21}, the largest Jordan index and
 * one more, and the step where the slowest non-unit radius has decayed or grown by e
 * (≤ 200), each capped so that max r^k ≤ e^20.
 */
export function checkSamples(spectrum: Spectrum, domain: Domain, normInf: number): number[] {
  const eigs = spectrum.eigenvalues;
  const out = new Set<number>();
  if (domain === 'continuous') {
    const speeds = eigs.map((e) => Math.hypot(e.re, e.im)).filter((s) => s > SPECTRUM_BACKWARD_ERROR * normInf);
    const fast = speeds.length ? 1 / Math.max(...speeds) : 1;
    const slow = speeds.length ? 1 / Math.min(...speeds) : 1;
    const maxRe = Math.max(0, ...eigs.map((e) => e.re));
    let cap = Infinity;
    if (maxRe > 0) cap = Math.min(cap, MAX_GROWTH_EXPONENT / maxRe);
    if (normInf > 0) cap = Math.min(cap, MAX_NORM_TIMES / normInf);
    for (const t of [0, fast / 2, fast, Math.sqrt(fast * slow), slow, 2 * slow]) out.add(Math.min(t, cap));
  } else {
    const radii = eigs.map((e) => Math.hypot(e.re, e.im));
    const maxRadius = Math.max(0, ...radii);
    const cap = maxRadius > 1 ? Math.max(1, Math.floor(MAX_GROWTH_EXPONENT / Math.log(maxRadius))) : MAX_DISCRETE_STEP;
    const maxIndex = Math.max(1, ...eigs.map((e) => e.blocks[0] ?? e.algebraic));
    const candidates = [0, 1, 2, 3, 5, 8, 13, 21, maxIndex, maxIndex + 1];
    const logs = radii.filter((r) => r > 0 && r !== 1).map((r) => Math.abs(Math.log(r)));
    if (logs.length) candidates.push(Math.min(MAX_DISCRETE_STEP, Math.round(1 / Math.min(...logs))));
    for (const k of candidates) out.add(Math.min(k, cap, MAX_DISCRETE_STEP));
  }
  return [...out].sort((a, b) => a - b);
}

function discretePowers(A: number[][], steps: number[]): Map<number, number[][]> {
  const n = A.length;
  const out = new Map<number, number[][]>();
  let P: number[][] = A.map((_, i) => A.map((__, j) => (i === j ? 1 : 0)));
  const last = Math.max(0, ...steps);
  for (let k = 0; k <= last; k++) {
    if (steps.includes(k)) out.set(k, P);
    if (k < last) {
      const next: number[][] = [];
      for (let i = 0; i < n; i++) {
        const row = new Array<number>(n).fill(0);
        for (let l = 0; l < n; l++) {
          const pil = P[i][l];
          if (pil === 0) continue;
          for (let j = 0; j < n; j++) row[j] += pil * A[l][j];
        }
        next.push(row);
      }
      P = next;
    }
  }
  return out;
}

/** Largest absolute entry of a numeric matrix. */
function maxAbsEntry(M: number[][]): number {
  let m = 0;
  for (const row of M) for (const x of row) m = Math.max(m, Math.abs(x));
  return m;
}

/** Norm-relative difference and cancellation measure of the closed form at one sample. */
function compareAtSample(entries: TransitionTerm[][][], ref: number[][], at: number): { residual: number; conditioning: number } {
  const refNorm = maxAbsEntry(ref);
  let diff = 0;
  let cancellation = 0;
  entries.forEach((row, r) =>
    row.forEach((terms, c) => {
      let sum = 0;
      let absSum = 0;
      for (const term of terms) {
        const v = evaluateTerm(term, at);
        sum += v;
        absSum += Math.abs(v);
      }
      const d = Math.abs(sum - ref[r][c]);
      diff = Number.isFinite(sum) && !Number.isNaN(d) ? Math.max(diff, d) : Infinity;
      cancellation = Math.max(cancellation, absSum);
    }),
  );
  const conditioning = cancellation / Math.max(refNorm, Number.MIN_VALUE);
  return { residual: diff / Math.max(1, refNorm), conditioning: Number.isNaN(conditioning) ? Infinity : conditioning };
}

export function acceptanceBound(conditioning: number): number {
  return Math.min(CHECK_RESIDUAL_CAP, Math.max(CHECK_RESIDUAL_FLOOR, CHECK_ULPS_PER_CONDITION * EPS * conditioning));
}

/**
 * Residual max_samples ‖Φ_closed − Φ_ref‖_max / max(1, ‖Φ_ref‖_max) against e^{At} by
 * scaling and squaring (expm.ts) or A^k by repeated products, and the cancellation measure
 * max_samples max_entries Σ|term values| / max(‖Φ_ref‖_max, tiny). A NaN/∞ residual
 * (coefficients beyond the double range) is reported as ∞, so the check fails.
 *
 * The double reference is itself inexact: for strongly non-normal matrices scaling and
 * squaring (and repeated products) can be off by far more than the closed form (seen: 9e-9
 * on a 4×4 integer matrix with entries ~10³, where the exact closed form agreed with a
 * 40-digit reference to 1e-16). So when A is rational and a sample fails against the double
 * reference, that sample is re-checked against a multiprecision reference (fixed-point
 * e^{At} or exact A^k below) and that verdict stands. Near-defective input such as
 * CHECKS.md #9 still fails: there the double evaluation of the closed form is what is wrong.
 */
export function checkClosedForm(
  Afloat: number[][],
  entries: TransitionTerm[][][],
  domain: Domain,
  spectrum: Spectrum,
  Aexact: Rational[][] | null = null,
): { samples: number[]; residual: number; conditioning: number; reference: 'double' | 'multiprecision' } {
  const normInf = Math.max(0, ...Afloat.map((row) => row.reduce((acc, x) => acc + Math.abs(x), 0)));
  const samples = checkSamples(spectrum, domain, normInf);
  const powers = domain === 'discrete' ? discretePowers(Afloat, samples) : null;
  const perSample = samples.map((s) => {
    try {
      // e^{A·0} = I exactly; no need to run the exponential for it.
      const ref = powers ? powers.get(s)! : s === 0 ? Afloat.map((_, i) => Afloat.map((__, j) => (i === j ? 1 : 0))) : expmTimes(Afloat, s);
      return compareAtSample(entries, ref, s);
    } catch {
      return { residual: Infinity, conditioning: Infinity };
    }
  });
  let conditioning = Math.max(1, ...perSample.map((p) => p.conditioning));
  let reference: 'double' | 'multiprecision' = 'double';
  if (Aexact && perSample.some((p) => !(p.residual <= acceptanceBound(conditioning)))) {
    reference = 'multiprecision';
    // Re-check failing samples one by one; the first that still fails settles the verdict,
    // so pathological input costs one multiprecision reference, not one per sample.
    for (let i = 0; i < samples.length; i++) {
      if (perSample[i].residual <= acceptanceBound(conditioning)) continue;
      const s = samples[i];
      const ref = domain === 'discrete' ? exactPower(Aexact, s) : multiprecisionExpm(Aexact, s);
      perSample[i] = compareAtSample(entries, ref, s);
      if (!(perSample[i].residual <= acceptanceBound(Math.max(conditioning, perSample[i].conditioning)))) break;
    }
    conditioning = Math.max(1, ...perSample.map((p) => p.conditioning));
  }
  let residual = Math.max(0, ...perSample.map((p) => p.residual));
  if (Number.isNaN(residual)) residual = Infinity;
  return { samples, residual, conditioning, reference };
}

/* ------------------------------------------------------------------ multiprecision references */

/** Fractional bits of the fixed-point exponential: 2^-224 ≈ 4e-68 leaves ~50 decimal digits
 *  of headroom over doubles for error growth in the squaring phase. */
const FIXED_POINT_BITS = 224n;

/**
 * e^{A·t} for rational A and a double t by Taylor series and repeated squaring in BigInt
 * fixed point (Moler & Van Loan, "Nineteen Dubious Ways…", SIAM Review 20(4), 1978,
 * methods 1 and 3, from memory): B = A·t/2^s with ‖B‖_∞ ≤ 2^-8, T = Σ_{j≤K} B^j/j! by Horner
 * with K chosen so ‖B‖^K/K! < 2^-(P+16), then T ← T² s times. Each product truncates to
 * P = 224 fractional bits; an independent method from expm.ts (no Padé, no doubles).
 */
export function multiprecisionExpm(A: Rational[][], t: number): number[][] {
  const n = A.length;
  const P = FIXED_POINT_BITS;
  const one = 1n << P;
  const tq = Rational.fromNumber(t);
  const B = A.map((row) => row.map((x) => x.mul(tq)));
  const norm = Math.max(0, ...B.map((row) => row.reduce((acc, x) => acc + Math.abs(x.toNumber()), 0)));
  const squarings = norm > 0 ? Math.max(0, Math.ceil(Math.log2(norm)) + 8) : 0;
  const X = B.map((row) => row.map((x) => (x.num << P) / (x.den << BigInt(squarings))));
  let degree = 1;
  let logFactorial = 0;
  while (8 * degree + logFactorial < Number(P) + 16) {
    degree++;
    logFactorial += Math.log2(degree);
  }
  const identity = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? one : 0n)));
  const fixedMul = (a: bigint[][], b: bigint[][]): bigint[][] => mulIntShift(a, b, P);
  let T = identity;
  for (let j = degree; j >= 1; j--) {
    const XT = fixedMul(X, T);
    const J = BigInt(j);
    T = XT.map((row, r) => row.map((x, c) => identity[r][c] + x / J));
  }
  for (let i = 0; i < squarings; i++) T = fixedMul(T, T);
  return T.map((row) => row.map((x) => Rational.of(x, one).toNumber()));
}

function mulIntShift(a: bigint[][], b: bigint[][], shift: bigint): bigint[][] {
  const n = a.length;
  const out: bigint[][] = [];
  for (let i = 0; i < n; i++) {
    const row = new Array<bigint>(n).fill(0n);
    for (let k = 0; k < n; k++) {
      const aik = a[i][k];
      if (aik === 0n) continue;
      for (let j = 0; j < n; j++) row[j] += aik * b[k][j];
    }
    out.push(row.map((x) => x >> shift));
  }
  return out;
}

/** A^k exactly (binary powering of the integer numerator matrix), rounded to doubles. */
export function exactPower(A: Rational[][], k: number): number[][] {
  const n = A.length;
  const { ints, den } = integerPowers(A, 2);
  let result = integerPowers(A, 1).ints[0];
  let base = ints[1];
  let e = k;
  while (e > 0) {
    if (e & 1) result = mulIntShift(result, base, 0n);
    e >>= 1;
    if (e > 0) base = mulIntShift(base, base, 0n);
  }
  const denK = den ** BigInt(k);
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => Rational.of(result[i][j], denK).toNumber()));
}
