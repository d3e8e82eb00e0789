/**
 * Exact matrices over Q: arithmetic, rank, reduced row echelon form, inverse, null space,
 * polynomial evaluation at a matrix.
 *
 * Rank uses fraction-free Gaussian elimination (E. H. Bareiss, "Sylvester's identity and
 * multistep integer-preserving Gaussian elimination", Math. Comp. 22(103), 1968): each row
 * is first scaled by the lcm of its denominators (rank is unchanged by nonzero row scaling),
 * then every elimination step divides exactly by the previous pivot, so entries stay
 * integers bounded by minors of the input. No tolerance is ever used: a rank is exact.
 *
 * Matrices are Rational[][] row-major and are never mutated by the exported functions;
 * internal helpers that work in place say so.
 */
import { Rational, gcd, lcm } from './rational';

export type MatrixQ = Rational[][];

export function zerosQ(nRows: number, nCols: number): MatrixQ {
  return Array.from({ length: nRows }, () => new Array<Rational>(nCols).fill(Rational.ZERO));
}

export function identityQ(n: number): MatrixQ {
  const m = zerosQ(n, n);
  for (let i = 0; i < n; i++) m[i][i] = Rational.ONE;
  return m;
}

export function fromIntsQ(rows: (number | bigint)[][]): MatrixQ {
  return rows.map((row) => row.map((x) => Rational.fromInt(x)));
}

function shapeOf(m: MatrixQ): [number, number] {
  return [m.length, m.length === 0 ? 0 : m[0].length];
}

function assertSameShape(a: MatrixQ, b: MatrixQ, op: string): void {
  const [ra, ca] = shapeOf(a);
  const [rb, cb] = shapeOf(b);
  if (ra !== rb || ca !== cb) throw new RangeError(`${op}: shapes ${ra}×${ca} and ${rb}×${cb} differ`);
}

export function addQ(a: MatrixQ, b: MatrixQ): MatrixQ {
  assertSameShape(a, b, 'addQ');
  return a.map((row, i) => row.map((x, j) => x.add(b[i][j])));
}

export function subQ(a: MatrixQ, b: MatrixQ): MatrixQ {
  assertSameShape(a, b, 'subQ');
  return a.map((row, i) => row.map((x, j) => x.sub(b[i][j])));
}

export function scaleQ(a: MatrixQ, s: Rational): MatrixQ {
  return a.map((row) => row.map((x) => x.mul(s)));
}

export function transposeQ(a: MatrixQ): MatrixQ {
  const [r, c] = shapeOf(a);
  return Array.from({ length: c }, (_, j) => Array.from({ length: r }, (_, i) => a[i][j]));
}

export function equalsQ(a: MatrixQ, b: MatrixQ): boolean {
  const [ra, ca] = shapeOf(a);
  const [rb, cb] = shapeOf(b);
  if (ra !== rb || ca !== cb) return false;
  for (let i = 0; i < ra; i++) for (let j = 0; j < ca; j++) if (!a[i][j].eq(b[i][j])) return false;
  return true;
}

export function isZeroQ(a: MatrixQ): boolean {
  return a.every((row) => row.every((x) => x.isZero()));
}

function allIntegers(a: MatrixQ): boolean {
  return a.every((row) => row.every((x) => x.den === 1n));
}

/** Product of integer matrices in BigInt (no gcd work). */
export function mulInt(a: bigint[][], b: bigint[][]): bigint[][] {
  const n = a.length;
  const inner = b.length;
  const m = inner === 0 ? 0 : b[0].length;
  const out: bigint[][] = [];
  for (let i = 0; i < n; i++) {
    const ai = a[i];
    const row = new Array<bigint>(m).fill(0n);
    for (let k = 0; k < inner; k++) {
      const aik = ai[k];
      if (aik === 0n) continue;
      const bk = b[k];
      for (let j = 0; j < m; j++) if (bk[j] !== 0n) row[j] += aik * bk[j];
    }
    out.push(row);
  }
  return out;
}

export function mulQ(a: MatrixQ, b: MatrixQ): MatrixQ {
  const [ra, ca] = shapeOf(a);
  const [rb, cb] = shapeOf(b);
  if (ca !== rb) throw new RangeError(`mulQ: ${ra}×${ca} times ${rb}×${cb}`);
  if (allIntegers(a) && allIntegers(b)) {
    // Integer fast path: accumulate in BigInt, build Rationals once.
    const p = mulInt(
      a.map((row) => row.map((x) => x.num)),
      b.map((row) => row.map((x) => x.num)),
    );
    return p.map((row) => row.map((x) => Rational.fromInt(x)));
  }
  // Common-denominator path: A = A'/da, B = B'/db with integer A', B'.
  const { ints: ai, den: da } = toIntegerMatrix(a);
  const { ints: bi, den: db } = toIntegerMatrix(b);
  const p = mulInt(ai, bi);
  const d = da * db;
  return p.map((row) => row.map((x) => Rational.of(x, d)));
}

/** A = ints / den with one common positive denominator (the lcm of all entry denominators). */
export function toIntegerMatrix(a: MatrixQ): { ints: bigint[][]; den: bigint } {
  let den = 1n;
  for (const row of a) for (const x of row) if (x.den !== 1n) den = lcm(den, x.den);
  if (den === 1n) return { ints: a.map((row) => row.map((x) => x.num)), den };
  return { ints: a.map((row) => row.map((x) => x.num * (den / x.den))), den };
}

/** Exact rank of an integer matrix by fraction-free (Bareiss) elimination. */
export function rankInt(input: bigint[][]): number {
  const nRows = input.length;
  if (nRows === 0) return 0;
  const nCols = input[0].length;
  const m = input.map((row) => row.slice()); // working copy, mutated in place below
  let rank = 0;
  let prevPivot = 1n;
  for (let col = 0; col < nCols && rank < nRows; col++) {
    let pivotRow = -1;
    for (let i = rank; i < nRows; i++) {
      if (m[i][col] !== 0n) {
        pivotRow = i;
        break;
      }
    }
    if (pivotRow < 0) continue;
    if (pivotRow !== rank) [m[pivotRow], m[rank]] = [m[rank], m[pivotRow]];
    const pivot = m[rank][col];
    const prow = m[rank];
    for (let i = rank + 1; i < nRows; i++) {
      const row = m[i];
      const f = row[col];
      for (let j = col + 1; j < nCols; j++) {
        // Sylvester's identity makes this division exact.
        row[j] = (pivot * row[j] - f * prow[j]) / prevPivot;
      }
      row[col] = 0n;
    }
    prevPivot = pivot;
    rank++;
  }
  return rank;
}

/** Exact rank over Q. */
export function rankQ(a: MatrixQ): number {
  // Scale each row by the lcm of its denominators: integer rows, same row space.
  const ints = a.map((row) => {
    let den = 1n;
    for (const x of row) if (x.den !== 1n) den = lcm(den, x.den);
    return row.map((x) => (den === 1n ? x.num : x.num * (den / x.den)));
  });
  return rankInt(ints);
}

/** Dimension of the (right) null space: columns − rank. */
export function nullityQ(a: MatrixQ): number {
  const [, c] = shapeOf(a);
  return c - rankQ(a);
}

/** Reduced row echelon form over Q with the pivot columns. */
export function rrefQ(a: MatrixQ): { rref: MatrixQ; pivots: number[] } {
  const [nRows, nCols] = shapeOf(a);
  const m = a.map((row) => row.slice()); // working copy, mutated in place below
  const pivots: number[] = [];
  let r = 0;
  for (let col = 0; col < nCols && r < nRows; col++) {
    let p = -1;
    for (let i = r; i < nRows; i++) if (!m[i][col].isZero()) { p = i; break; }
    if (p < 0) continue;
    if (p !== r) [m[p], m[r]] = [m[r], m[p]];
    const inv = m[r][col].inv();
    m[r] = m[r].map((x) => x.mul(inv));
    for (let i = 0; i < nRows; i++) {
      if (i === r || m[i][col].isZero()) continue;
      const f = m[i][col];
      m[i] = m[i].map((x, j) => x.sub(f.mul(m[r][j])));
    }
    pivots.push(col);
    r++;
  }
  return { rref: m, pivots };
}

/** Inverse over Q, or null when the matrix is singular. Throws on a non-square matrix. */
export function inverseQ(a: MatrixQ): MatrixQ | null {
  const [n, c] = shapeOf(a);
  if (n !== c) throw new RangeError(`inverseQ: matrix is ${n}×${c}, not square`);
  const aug = a.map((row, i) => [...row, ...identityQ(n)[i]]);
  const { rref, pivots } = rrefQ(aug);
  if (pivots.length < n || pivots[n - 1] !== n - 1) return null;
  return rref.map((row) => row.slice(n));
}

/** Basis of the right null space {x : A x = 0}, each vector as a Rational[] of length cols. */
export function nullspaceQ(a: MatrixQ): Rational[][] {
  const [, nCols] = shapeOf(a);
  const { rref, pivots } = rrefQ(a);
  const pivotSet = new Set(pivots);
  const basis: Rational[][] = [];
  for (let free = 0; free < nCols; free++) {
    if (pivotSet.has(free)) continue;
    const v = new Array<Rational>(nCols).fill(Rational.ZERO);
    v[free] = Rational.ONE;
    pivots.forEach((pc, row) => {
      v[pc] = rref[row][free].neg();
    });
    basis.push(v);
  }
  return basis;
}

/** A^k for k ≥ 0 by binary powering. */
export function powerQ(a: MatrixQ, k: number): MatrixQ {
  const [n, c] = shapeOf(a);
  if (n !== c) throw new RangeError(`powerQ: matrix is ${n}×${c}, not square`);
  if (!Number.isInteger(k) || k < 0) throw new RangeError('powerQ: exponent must be an integer ≥ 0');
  let result = identityQ(n);
  let base = a;
  let e = k;
  while (e > 0) {
    if (e & 1) result = mulQ(result, base);
    e >>= 1;
    if (e > 0) base = mulQ(base, base);
  }
  return result;
}

/**
 * p(A) for p given by ascending rational coefficients, by Horner's rule on matrices.
 * Works on one common-denominator integer form of A so the inner products stay in BigInt.
 */
export function polyAtMatrixQ(coeffs: Rational[], a: MatrixQ): MatrixQ {
  const [n, c] = shapeOf(a);
  if (n !== c) throw new RangeError(`polyAtMatrixQ: matrix is ${n}×${c}, not square`);
  let result = zerosQ(n, n);
  for (let i = coeffs.length - 1; i >= 0; i--) {
    result = mulQ(result, a);
    if (!coeffs[i].isZero()) {
      for (let d = 0; d < n; d++) result[d][d] = result[d][d].add(coeffs[i]);
    }
  }
  return result;
}

export function toFloatQ(a: MatrixQ): number[][] {
  return a.map((row) => row.map((x) => x.toNumber()));
}

/** Greatest common divisor of all entries of an integer matrix (0 for the zero matrix). */
export function contentInt(a: bigint[][]): bigint {
  let g = 0n;
  for (const row of a) for (const x of row) if (x !== 0n) { g = gcd(g, x); if (g === 1n) return 1n; }
  return g;
}
