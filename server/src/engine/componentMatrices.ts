/**
 * Component matrices Z_{λ,k} = (A − λI)^k·P_λ of a square matrix, exactly over Q(√d) or
 * numerically over complex doubles.
 *
 * Method: every f analytic on the spectrum satisfies
 *   f(A) = Σ_λ Σ_{k<m_λ} f^{(k)}(λ)/k! · Z_{λ,k},
 * where m_λ is the exponent of (x − λ) in a polynomial that annihilates A and P_λ is the
 * spectral projector onto the generalized eigenspace of λ (Horn & Johnson, Topics in
 * Matrix Analysis, §6.1, from memory; Higham, Functions of Matrices, 2008, §1.2, from
 * memory). P_λ = e_λ(A) for the Hermite idempotent e_λ ≡ 1 mod (x − λ)^m,
 * e_λ ≡ 0 mod ψ/(x − λ)^m.
 *
 * Exact path: with ψ the minimal polynomial (rational coefficients) and g = ψ/(x − λ)^m,
 * extended Euclid over F = Q(√d) gives u·(x − λ)^m + v·g = 1, so e_λ = v·g mod ψ and
 * Z_{λ,k} = [(x − λ)^k·e_λ mod ψ](A). Each such polynomial has degree < deg ψ, so it is
 * evaluated from the rational powers A^0 … A^{deg ψ − 1}, computed once for all roots; with
 * coefficients a_i + b_i√d the result is X + √d·Y with rational X, Y.
 *
 * Numeric path: the same idempotent in product (Sylvester–Hermite) form,
 *   P_λ = v(A)·Π_{μ≠λ} ((A − μI)/(λ − μ))^{m_μ},
 * with v the first m terms of the Taylor series of 1/Π_{μ≠λ}(1 + y/(λ − μ))^{m_μ} at y = 0,
 * in powers of N = A − λI. The scaling by (λ − μ) keeps every factor of size ~1, and no
 * zero test on doubles is needed.
 *
 * Invariants: inputs are never mutated. Exact results satisfy Σ_λ Z_{λ,0} = I exactly
 * (checked by the tests, not here).
 */
import { Rational, lcm } from './rational';
import { mulInt, toIntegerMatrix } from './matrixQ';
import { QuadField, type QuadElement } from './quadField';
import {
  complexField,
  linearPower,
  polyDivmod,
  polyExtendedGcd,
  polyMod,
  polyMul,
  quadAsField,
  seriesInverse,
  type Complex,
  type Poly,
} from './fieldPoly';

/** A root λ of ψ in its field, with the exponent m of (x − λ) in ψ. */
export interface ExactRootSpec {
  field: QuadField;
  lambda: QuadElement;
  m: number;
}

/** Z_{λ,k} = X[k] + √d·Y[k], k = 0 … m − 1 (Y is all zero over Q). */
export interface ExactComponents {
  X: Rational[][][];
  Y: Rational[][][];
}

/** A^i = ints[i] / den^i for i = 0 … count − 1, integer BigInt matrices. */
export interface IntegerPowers {
  ints: bigint[][][];
  den: bigint;
}

export function integerPowers(A: Rational[][], count: number): IntegerPowers {
  const n = A.length;
  const { ints, den } = toIntegerMatrix(A);
  const identity = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1n : 0n)));
  const out: bigint[][][] = [identity];
  for (let i = 1; i < count; i++) out.push(mulInt(out[i - 1], ints));
  return { ints: out, den };
}

/** Σ c_i A^i for rational c_i, using one common denominator and BigInt dot products. */
export function evaluateRationalPolyAt(coeffs: Rational[], powers: IntegerPowers, n: number): Rational[][] {
  if (coeffs.length > powers.ints.length) throw new RangeError('polynomial degree exceeds the precomputed powers');
  // c_i/den^i = w_i/E with E the lcm of all c_i.den·den^i.
  let E = 1n;
  const scaledDen: bigint[] = [];
  let denPow = 1n;
  for (let i = 0; i < coeffs.length; i++) {
    const dI = coeffs[i].den * denPow;
    scaledDen.push(dI);
    if (!coeffs[i].isZero()) E = lcm(E, dI);
    denPow *= powers.den;
  }
  const weights = coeffs.map((c, i) => (c.isZero() ? 0n : c.num * (E / scaledDen[i])));
  const out: Rational[][] = [];
  for (let r = 0; r < n; r++) {
    const row: Rational[] = [];
    for (let c = 0; c < n; c++) {
      let acc = 0n;
      for (let i = 0; i < weights.length; i++) if (weights[i] !== 0n) acc += weights[i] * powers.ints[i][r][c];
      row.push(Rational.of(acc, E));
    }
    out.push(row);
  }
  return out;
}

/**
 * The polynomials h_k = (x − λ)^k·e_λ mod ψ, k = 0 … m − 1, over F = Q(√d), so that
 * Z_{λ,k} = h_k(A). `minimalPoly` is ψ with rational coefficients (ascending). Throws when
 * (x − λ)^m does not divide ψ or is not coprime to the cofactor (an inconsistent spectrum),
 * never returns a wrong polynomial.
 */
export function componentPolynomials(minimalPoly: Rational[], root: ExactRootSpec): Poly<QuadElement>[] {
  const { field, lambda, m } = root;
  const F = quadAsField(field);
  const psi: Poly<QuadElement> = minimalPoly.map((c) => field.fromRational(c));
  const local = linearPower(F, lambda, m);
  const { quotient: g, remainder } = polyDivmod(F, psi, local);
  if (remainder.length > 0) throw new RangeError(`(x − ${field.toText(lambda)})^${m} does not divide the minimal polynomial`);
  const { gcd, t: v } = polyExtendedGcd(F, local, g);
  if (gcd.length !== 1) throw new RangeError(`root ${field.toText(lambda)} is repeated beyond its stated exponent ${m}`);
  let h = polyMod(F, polyMul(F, v, g), psi);
  const linear = linearPower(F, lambda, 1);
  const out: Poly<QuadElement>[] = [];
  for (let k = 0; k < m; k++) {
    out.push(h);
    if (k + 1 < m) h = polyMod(F, polyMul(F, h, linear), psi);
  }
  return out;
}

/** p(A) = X + √d·Y for p with coefficients in Q(√d), from precomputed powers of A. */
export function evaluateFieldPolyAt(field: QuadField, p: Poly<QuadElement>, powers: IntegerPowers, n: number): { X: Rational[][]; Y: Rational[][] } {
  const X = evaluateRationalPolyAt(p.map((c) => c.a), powers, n);
  const Y = field.isRational || p.every((c) => c.b.isZero()) ? zeroMatrix(n) : evaluateRationalPolyAt(p.map((c) => c.b), powers, n);
  return { X, Y };
}

/**
 * Exact Z_{λ,k} for one root; `powers` must hold at least deg ψ powers of A.
 */
export function exactComponentMatrices(minimalPoly: Rational[], root: ExactRootSpec, powers: IntegerPowers, n: number): ExactComponents {
  const X: Rational[][][] = [];
  const Y: Rational[][][] = [];
  for (const h of componentPolynomials(minimalPoly, root)) {
    const z = evaluateFieldPolyAt(root.field, h, powers, n);
    X.push(z.X);
    Y.push(z.Y);
  }
  return { X, Y };
}

function zeroMatrix(n: number): Rational[][] {
  return Array.from({ length: n }, () => new Array<Rational>(n).fill(Rational.ZERO));
}

/* ---------------- numeric path ---------------- */

export type ComplexMatrix = Complex[][];

export interface NumericRootSpec {
  lambda: Complex;
  m: number;
}

function cIdentity(n: number): ComplexMatrix {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => ({ re: i === j ? 1 : 0, im: 0 })));
}

export function complexMatMul(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  const n = a.length;
  const out: ComplexMatrix = [];
  for (let i = 0; i < n; i++) {
    const row: Complex[] = [];
    for (let j = 0; j < n; j++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const x = a[i][k];
        const y = b[k][j];
        re += x.re * y.re - x.im * y.im;
        im += x.re * y.im + x.im * y.re;
      }
      row.push({ re, im });
    }
    out.push(row);
  }
  return out;
}

/** (A − μI)·s for real A and complex μ, s. */
function shiftedScaled(A: number[][], mu: Complex, s: Complex): ComplexMatrix {
  return A.map((row, i) =>
    row.map((x, j) => {
      const re = x - (i === j ? mu.re : 0);
      const im = i === j ? -mu.im : 0;
      return { re: re * s.re - im * s.im, im: re * s.im + im * s.re };
    }),
  );
}

/**
 * Numeric Z_{λ,k}, k = 0 … m − 1, for the root `roots[which]`, using every root of `roots`
 * (distinct values with exponents m_μ whose total is at least the degree needed to
 * annihilate A, e.g. algebraic multiplicities).
 */
export function numericComponentMatrices(A: number[][], roots: NumericRootSpec[], which: number): ComplexMatrix[] {
  const n = A.length;
  const C = complexField;
  const { lambda, m } = roots[which];
  let product = cIdentity(n);
  // Series of Π (1 + y/(λ − μ))^{m_μ}, truncated to m terms.
  let series: Poly<Complex> = [C.one];
  for (let idx = 0; idx < roots.length; idx++) {
    if (idx === which) continue;
    const mu = roots[idx].lambda;
    const diffInv = C.inv(C.sub(lambda, mu));
    const factor = shiftedScaled(A, mu, diffInv);
    const linear: Poly<Complex> = [C.one, diffInv];
    for (let e = 0; e < roots[idx].m; e++) {
      product = complexMatMul(product, factor);
      series = polyMul(C, series, linear).slice(0, m);
    }
  }
  const v = seriesInverse(C, series, m);
  const N = shiftedScaled(A, lambda, C.one);
  // v(N) by Horner: v_0 I + N(v_1 I + N(v_2 I + …)).
  let vAtN: ComplexMatrix = scalarMatrix(n, v[m - 1] ?? C.zero);
  for (let i = m - 2; i >= 0; i--) vAtN = addScalar(complexMatMul(N, vAtN), v[i] ?? C.zero);
  const Z: ComplexMatrix[] = [complexMatMul(vAtN, product)];
  for (let k = 1; k < m; k++) Z.push(complexMatMul(N, Z[k - 1]));
  return Z;
}

function scalarMatrix(n: number, s: Complex): ComplexMatrix {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? { ...s } : { re: 0, im: 0 })));
}

function addScalar(M: ComplexMatrix, s: Complex): ComplexMatrix {
  return M.map((row, i) => row.map((x, j) => (i === j ? { re: x.re + s.re, im: x.im + s.im } : x)));
}
