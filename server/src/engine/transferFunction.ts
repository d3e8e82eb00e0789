/**
 * Transfer function G(s) = C(sI − A)⁻¹B + D of a state-space model, entry by entry
 * (the same formula gives H(z) of a discrete model, with z for s).
 *
 * Method: for input j and output i, with b = B_j (column) and c = C_i (row), the matrix
 * determinant lemma det(sI − A + b·c) = det(sI − A)·(1 + c(sI − A)⁻¹b) gives
 *   c·adj(sI − A)·b = det(sI − (A − b·c)) − det(sI − A)
 * (e.g. T. Kailath, Linear Systems, 1980, §2.4, from memory), so
 *   G_ij(s) = [charpoly(A − b·c) − charpoly(A) + D_ij·charpoly(A)] / charpoly(A).
 * Both characteristic polynomials come from the division-free Berkowitz algorithm over Q
 * (charpoly.ts), so the exact path never divides until the final gcd cancellation: the
 * common factor gcd(num, den) over Q is removed (polynomial.ts, Euclid) and the reduced
 * form is reported, with the cancelled degree (cancelled poles are uncontrollable or
 * unobservable modes of that channel).
 *
 * Float path: the same identity with characteristic polynomials built from numeric
 * eigenvalues (ml-matrix Hessenberg QR). No cancellation is attempted there, because
 * deciding that a pole equals a zero needs a tolerance the user has not chosen; the report
 * says so.
 *
 * Coefficient arrays are ascending (index = power), like the rest of the engine.
 * Invariants: inputs are never mutated; bad shapes give { ok: false, error }.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { Rational } from './rational';
import { characteristicPolynomial } from './charpoly';
import { polyAdd, polyExactQuotient, polyGcd, polyLeading, polyScale, polySub, polyToString, polyTrim, type PolyQ } from './polynomial';
import { polynomialRoots } from './polyRoots';
import { numericRootText } from './format';
import { rootsWithMultiplicity, type ModeEigenvalue } from './controllability';
import { isRationalMatrix, toFloatMatrix, type AnyMatrix } from './discretize';

export interface PolynomialCoefficients {
  /** Ascending coefficients as numbers. */
  coeffs: number[];
  /** Exact ascending coefficients (rational text) on the exact path, else null. */
  exact: string[] | null;
}

export interface TransferEntry {
  output: number;
  input: number;
  numerator: PolynomialCoefficients;
  /** Monic. */
  denominator: PolynomialCoefficients;
  /** "(s + 2)/(s^2 + 3s + 2)"; numbers rounded to 6 significant digits on the float path. */
  text: string;
  poles: ModeEigenvalue[];
  zeros: ModeEigenvalue[];
  /** Degree of the common factor removed from numerator and denominator (exact path only). */
  cancelledDegree: number;
}

export interface TransferFunctionSuccess {
  ok: true;
  variable: 's' | 'z';
  exact: boolean;
  /** entries[output][input]. */
  entries: TransferEntry[][];
  notes: string[];
}

export type TransferFunctionResult = TransferFunctionSuccess | { ok: false; error: string };

export interface StateSpaceInput {
  A: AnyMatrix;
  B: AnyMatrix;
  C: AnyMatrix;
  D?: AnyMatrix | null;
}

function validate(m: StateSpaceInput): string | null {
  const n = m.A.length;
  if (n === 0 || m.A.some((r) => r.length !== n)) return 'A must be a non-empty square matrix.';
  if (m.B.length !== n || m.B.length === 0 || m.B[0].length === 0 || m.B.some((r) => r.length !== m.B[0].length)) return `B must have ${n} rows of equal length.`;
  if (m.C.length === 0 || m.C.some((r) => r.length !== n)) return `C must have ${n} columns.`;
  if (m.D && (m.D.length !== m.C.length || m.D.some((r) => r.length !== m.B[0].length))) return `D must be ${m.C.length}×${m.B[0].length}.`;
  for (const x of [m.A, m.B, m.C, m.D ?? []] as (Rational | number)[][][]) {
    for (const row of x) for (const v of row) if (!(v instanceof Rational) && !Number.isFinite(v)) return `Non-finite entry ${v}.`;
  }
  return null;
}

export function transferFunction(model: StateSpaceInput, variable: 's' | 'z' = 's'): TransferFunctionResult {
  const bad = validate(model);
  if (bad) return { ok: false, error: bad };
  const exact = [model.A, model.B, model.C, model.D].every((m) => !m || isRationalMatrix(m));
  try {
    return exact ? transferExact(model as ExactInput, variable) : transferFloat(model, variable);
  } catch (e) {
    return { ok: false, error: `Transfer function failed: ${e instanceof Error ? e.message : String(e)}` };
  }
}

interface ExactInput {
  A: Rational[][];
  B: Rational[][];
  C: Rational[][];
  D?: Rational[][] | null;
}

/** A − b·c for column j of B and row i of C. */
function rankOneUpdate<T>(A: T[][], B: T[][], C: T[][], i: number, j: number, mul: (a: T, b: T) => T, sub: (a: T, b: T) => T): T[][] {
  return A.map((row, r) => row.map((a, k) => sub(a, mul(B[r][j], C[i][k]))));
}

/** Parenthesize sums, and fractions that would otherwise read as a chain of divisions. */
function wrapped(text: string): string {
  return /[+\-/ ]/.test(text.replace(/^-/, '')) ? `(${text})` : text;
}

function ratioText(num: string, den: string): string {
  if (den === '1') return num;
  return `${wrapped(num)}/${wrapped(den)}`;
}

function transferExact(model: ExactInput, variable: 's' | 'z'): TransferFunctionSuccess {
  const { A, B, C } = model;
  const pA = characteristicPolynomial(A);
  const entries: TransferEntry[][] = [];
  for (let i = 0; i < C.length; i++) {
    const row: TransferEntry[] = [];
    for (let j = 0; j < B[0].length; j++) {
      const pUpdated = characteristicPolynomial(rankOneUpdate(A, B, C, i, j, (a, b) => a.mul(b), (a, b) => a.sub(b)));
      const d = model.D ? model.D[i][j] : Rational.ZERO;
      let num = polyAdd(polySub(pUpdated, pA), polyScale(pA, d));
      let den = pA;
      let cancelledDegree = 0;
      if (polyTrim(num).length === 0) {
        num = [];
        cancelledDegree = den.length - 1;
        den = [Rational.ONE];
      } else {
        const g = polyGcd(num, den);
        if (g.length > 1) {
          num = polyExactQuotient(num, g)!;
          den = polyExactQuotient(den, g)!;
          cancelledDegree = g.length - 1;
        }
        const lc = polyLeading(den);
        if (!lc.isOne()) {
          num = polyScale(num, lc.inv());
          den = polyScale(den, lc.inv());
        }
      }
      const zeros = num.length > 1 ? rootsWithMultiplicity(num) : [];
      const poles = den.length > 1 ? rootsWithMultiplicity(den) : [];
      row.push({
        output: i,
        input: j,
        numerator: { coeffs: num.map((c) => c.toNumber()), exact: num.map((c) => c.toString()) },
        denominator: { coeffs: den.map((c) => c.toNumber()), exact: den.map((c) => c.toString()) },
        text: ratioText(polyToString(num, variable), polyToString(den, variable)),
        poles,
        zeros,
        cancelledDegree,
      });
    }
    entries.push(row);
  }
  return { ok: true, variable, exact: true, entries, notes: [] };
}

/** Monic real polynomial with the eigenvalues of M as roots (ascending). */
function floatCharpoly(M: number[][]): number[] {
  const evd = new EigenvalueDecomposition(new Matrix(M), { assumeSymmetric: false });
  let re = [1];
  let im = [0];
  evd.realEigenvalues.forEach((lr, k) => {
    const li = evd.imaginaryEigenvalues[k];
    // multiply by (x − λ): ascending coefficients
    const nr = new Array(re.length + 1).fill(0);
    const ni = new Array(re.length + 1).fill(0);
    for (let t = 0; t < re.length; t++) {
      nr[t + 1] += re[t];
      ni[t + 1] += im[t];
      nr[t] -= lr * re[t] - li * im[t];
      ni[t] -= lr * im[t] + li * re[t];
    }
    re = nr;
    im = ni;
  });
  return re; // conjugate pairs make the imaginary parts rounding noise
}

function numText(coeffs: number[], variable: string): string {
  const rounded = coeffs.map((c) => Rational.parse(Number(c.toPrecision(6)).toString()) ?? Rational.ZERO);
  return polyToString(rounded as PolyQ, variable);
}

function transferFloat(model: StateSpaceInput, variable: 's' | 'z'): TransferFunctionSuccess {
  const A = toFloatMatrix(model.A);
  const B = toFloatMatrix(model.B);
  const C = toFloatMatrix(model.C);
  const D = model.D ? toFloatMatrix(model.D) : null;
  const pA = floatCharpoly(A);
  const entries: TransferEntry[][] = [];
  for (let i = 0; i < C.length; i++) {
    const row: TransferEntry[] = [];
    for (let j = 0; j < B[0].length; j++) {
      const pU = floatCharpoly(rankOneUpdate(A, B, C, i, j, (a, b) => a * b, (a, b) => a - b));
      const d = D ? D[i][j] : 0;
      const num = pA.map((a, k) => pU[k] - a + d * a);
      // Coefficients that are rounding noise of a cancelled leading term are dropped.
      const scale = Math.max(...num.map(Math.abs), ...pA.map(Math.abs));
      while (num.length > 0 && Math.abs(num[num.length - 1]) <= 64 * 2 ** -52 * scale) num.pop();
      const zeros = polynomialRoots(num).map((z) => ({ text: numericRootText(z.re, z.im), re: z.re, im: z.im, multiplicity: 1 }));
      const poles = polynomialRoots(pA).map((z) => ({ text: numericRootText(z.re, z.im), re: z.re, im: z.im, multiplicity: 1 }));
      row.push({
        output: i,
        input: j,
        numerator: { coeffs: num, exact: null },
        denominator: { coeffs: pA, exact: null },
        text: ratioText(num.length ? numText(num, variable) : '0', numText(pA, variable)),
        poles,
        zeros,
        cancelledDegree: 0,
      });
    }
    entries.push(row);
  }
  return { ok: true, variable, exact: false, entries, notes: ['Entries are floating point: common pole–zero factors were not cancelled.'] };
}
