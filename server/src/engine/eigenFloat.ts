/**
 * Eigenvalues (and optionally eigenvectors) of a real float matrix.
 *
 * Method: Parlett–Reinsch balancing (./balance), then reduction to Hessenberg form by
 * orthogonal similarity and the shifted QR iteration in the EISPACK `orthes`/`hqr2` form
 * (J. H. Wilkinson & C. Reinsch, "Handbook for Automatic Computation, Vol. II: Linear
 * Algebra", 1971), as implemented by ml-matrix's EigenvalueDecomposition. ml-matrix was
 * measured accurate to ~3e-15 relative here; mathjs.eigs was not used because it failed
 * to converge on a sizeable share of random non-symmetric matrices.
 *
 * When no eigenvectors are asked (the common case: spectrum, stability, modes) the same
 * method runs here on flat arrays in its eigenvalue-only form — EISPACK `orthes` + `hqr`
 * (R. S. Martin, G. Peters & J. H. Wilkinson, "The QR algorithm for real Hessenberg
 * matrices", Numer. Math. 14, 1970): the QR sweeps touch only the active window and no
 * transformations are accumulated, which is several times faster for n = 200, and the
 * iteration count is capped at 30·n as in EISPACK, so a pathological input ends with a
 * clear error instead of an endless loop (ml-matrix's hqr2 has no cap).
 *
 * Invariants: the input is not mutated; eigenvalues come back as complex numbers with
 * conjugate pairs adjacent (upper half-plane member first) exactly as the QR iteration
 * produced them, so pairs are exact conjugates; eigenvector k (when asked) belongs to
 * eigenvalue k and refers to the original, unbalanced matrix.
 */
import { EigenvalueDecomposition } from 'ml-matrix';
import { balance } from './balance';
import { UNIT_ROUNDOFF } from './tolerance';
import { runToEnd } from './steps';

export interface Complex {
  re: number;
  im: number;
}

export interface FloatEigen {
  values: Complex[];
  /** vectors[k] is an eigenvector (length n, not normalized) for values[k]; only when asked. */
  vectors: Complex[][] | null;
}

export function assertFiniteSquare(A: number[][], what: string): number {
  if (!Array.isArray(A)) throw new Error(`${what}: expected a square matrix`);
  const n = A.length;
  for (let i = 0; i < n; i++) {
    if (!Array.isArray(A[i]) || A[i].length !== n) throw new Error(`${what}: expected a square matrix, row ${i + 1} has the wrong length`);
    for (let j = 0; j < n; j++) {
      if (typeof A[i][j] !== 'number' || !Number.isFinite(A[i][j])) throw new Error(`${what}: entry (${i + 1}, ${j + 1}) is not a finite number`);
    }
  }
  return n;
}

/**
 * Entries below u²·‖A‖_F are set to zero. That perturbation is far below the backward error
 * u·‖A‖ of the QR iteration itself, so no accuracy is lost, but it keeps subnormal noise
 * (e.g. 5e-324 from forming S·J·S⁻¹) from steering balancing into scale factors near the
 * overflow limit, where the QR iteration then underflows and stalls.
 */
function flushNegligible(A: number[][]): number[][] {
  let sumSq = 0;
  let big = 0;
  for (const row of A) for (const x of row) big = Math.max(big, Math.abs(x));
  if (big === 0) return A;
  for (const row of A) for (const x of row) sumSq += (x / big) ** 2;
  const floor = UNIT_ROUNDOFF * UNIT_ROUNDOFF * big * Math.sqrt(sumSq);
  return A.map((row) => row.map((x) => (Math.abs(x) < floor ? 0 : x)));
}

/**
 * The eigenvalues last computed in steps (eigenvalueSteps), with a copy of their matrix: a
 * later eigenFloat of the same entries takes them instead of computing them again.
 */
let stepped: { entries: Float64Array; n: number; values: Complex[] } | null = null;

function sameEntries(A: number[][], entries: Float64Array, n: number): boolean {
  if (A.length !== n) return false;
  for (let i = 0; i < n; i++) {
    const row = A[i];
    for (let j = 0; j < n; j++) if (!Object.is(row[j], entries[i * n + j])) return false;
  }
  return true;
}

/**
 * eigenFloat's eigenvalues in steps: the generator yields every few Hessenberg columns and QR
 * sweeps (about a millisecond of work for n = 200), so a caller with other work to do can stop
 * in between; the eigenvalues it returns are also what the next eigenFloat of the same entries
 * returns (without computing them again). For large matrices in a pass that must not hold the
 * thread for long (analyze.ts).
 */
export function* eigenvalueSteps(A: number[][]): Generator<void, Complex[], void> {
  const n = assertFiniteSquare(A, 'eigenvalues');
  if (n === 0) return [];
  const { balanced } = balance(flushNegligible(A));
  const values = yield* hessenbergQrSteps(balanced);
  const entries = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) entries[i * n + j] = A[i][j];
  stepped = { entries, n, values };
  return values.map((v) => ({ ...v }));
}

export function eigenFloat(A: number[][], opts: { vectors?: boolean } = {}): FloatEigen {
  const n = assertFiniteSquare(A, 'eigenvalues');
  if (n === 0) return { values: [], vectors: opts.vectors ? [] : null };
  if (!opts.vectors && stepped && sameEntries(A, stepped.entries, stepped.n)) return { values: stepped.values.map((v) => ({ ...v })), vectors: null };
  const { balanced, scaling } = balance(flushNegligible(A));
  if (!opts.vectors) return { values: hessenbergQrEigenvalues(balanced), vectors: null };
  const evd = new EigenvalueDecomposition(balanced);
  const re = evd.realEigenvalues;
  const im = evd.imaginaryEigenvalues;
  const values: Complex[] = re.map((r, k) => ({ re: r, im: im[k] }));
  if (!opts.vectors) return { values, vectors: null };

  // hqr2 stores a complex pair's vector as two real columns: Re in column k, Im in k+1.
  const V = evd.eigenvectorMatrix;
  const vectors: Complex[][] = [];
  for (let k = 0; k < n; k++) {
    const v: Complex[] = [];
    for (let i = 0; i < n; i++) {
      const d = scaling[i];
      if (im[k] === 0) v.push({ re: d * V.get(i, k), im: 0 });
      else if (im[k] > 0) v.push({ re: d * V.get(i, k), im: d * V.get(i, k + 1) });
      else v.push({ re: d * V.get(i, k - 1), im: -d * V.get(i, k) });
    }
    vectors.push(v);
  }
  return { values, vectors };
}

/**
 * Householder reduction to upper Hessenberg form in place (EISPACK orthes, transformations
 * not kept), steps `from`..`to` of 1..n−2 (`ort` is scratch of length n). After step m,
 * column m−1 is zero below the subdiagonal; similarity is kept.
 */
function reduceColumns(H: Float64Array, n: number, ort: Float64Array, from: number, to: number): void {
  for (let m = from; m <= to; m++) {
    let scale = 0;
    for (let i = m; i < n; i++) scale += Math.abs(H[i * n + m - 1]);
    if (scale === 0) continue;
    let h = 0;
    for (let i = n - 1; i >= m; i--) {
      ort[i] = H[i * n + m - 1] / scale;
      h += ort[i] * ort[i];
    }
    let g = Math.sqrt(h);
    if (ort[m] > 0) g = -g;
    h -= ort[m] * g;
    ort[m] -= g;
    // H ← (I − u uᵀ/h)·H
    for (let j = m; j < n; j++) {
      let f = 0;
      for (let i = n - 1; i >= m; i--) f += ort[i] * H[i * n + j];
      f /= h;
      for (let i = m; i < n; i++) H[i * n + j] -= f * ort[i];
    }
    // H ← H·(I − u uᵀ/h)
    for (let i = 0; i < n; i++) {
      let f = 0;
      const row = i * n;
      for (let j = n - 1; j >= m; j--) f += ort[j] * H[row + j];
      f /= h;
      for (let j = m; j < n; j++) H[row + j] -= f * ort[j];
    }
    H[m * n + m - 1] = scale * g;
    for (let i = m + 1; i < n; i++) H[i * n + m - 1] = 0;
  }
}

/** Eigenvalues of a real matrix by Hessenberg reduction and Francis double-shift QR (hqr). */
export function hessenbergQrEigenvalues(A: number[][]): Complex[] {
  return runToEnd(hessenbergQrSteps(A, Number.POSITIVE_INFINITY));
}

/** hessenbergQrEigenvalues in steps: yields every `per` Hessenberg columns and every `per` QR sweeps. */
function* hessenbergQrSteps(A: number[][], per = 8): Generator<void, Complex[], void> {
  // The arithmetic runs in plain functions between the yields: a generator's own loops ran
  // 70 % slower (n = 200, Node 20), as its locals live in the generator object.
  const nn = A.length;
  const H = new Float64Array(nn * nn);
  for (let i = 0; i < nn; i++) for (let j = 0; j < nn; j++) H[i * nn + j] = A[i][j];
  const ort = new Float64Array(nn);
  for (let m = 1; m <= nn - 2; m += per) {
    reduceColumns(H, nn, ort, m, Math.min(m + per - 1, nn - 2));
    if (m + per <= nn - 2) yield;
  }
  let norm = 0;
  for (let i = 0; i < nn; i++) for (let j = Math.max(i - 1, 0); j < nn; j++) norm += Math.abs(H[i * nn + j]);
  const st: QrState = { H, nn, d: new Float64Array(nn), e: new Float64Array(nn), norm, n: nn - 1, exshift: 0, iter: 0, totalIterations: 0, p: 0, q: 0, r: 0, s: 0, z: 0, w: 0, x: 0, y: 0 };
  while (!qrSweeps(st, per)) yield;
  const values: Complex[] = [];
  for (let i = 0; i < nn; i++) values.push({ re: st.d[i], im: st.e[i] });
  return values;
}

/** Where the QR iteration of hqr stands between calls of qrSweeps. */
interface QrState {
  H: Float64Array;
  nn: number;
  d: Float64Array;
  e: Float64Array;
  norm: number;
  n: number;
  exshift: number;
  iter: number;
  totalIterations: number;
  p: number;
  q: number;
  r: number;
  s: number;
  z: number;
  w: number;
  x: number;
  y: number;
}

/** Runs the QR iteration for at most `maxSweeps` double-shift sweeps; true once every eigenvalue is found. */
function qrSweeps(st: QrState, maxSweeps: number): boolean {
  const { H, nn, d, e, norm } = st;
  const at = (i: number, j: number) => H[i * nn + j];
  const eps = Number.EPSILON;
  const maxIterations = 30 * Math.max(nn, 1);
  let { n, exshift, iter, totalIterations, p, q, r, s, z, w, x, y } = st;
  let sweeps = 0;
  while (n >= 0) {
    if (sweeps >= maxSweeps) break;
    // Look for a negligible subdiagonal entry.
    let l = n;
    while (l > 0) {
      s = Math.abs(at(l - 1, l - 1)) + Math.abs(at(l, l));
      if (s === 0) s = norm;
      // "≤", not "<": for an all-zero block (s = norm = 0) an exactly zero subdiagonal must deflate.
      if (Math.abs(at(l, l - 1)) <= eps * s) break;
      l--;
    }
    if (l === n) {
      // One root found.
      d[n] = at(n, n) + exshift;
      e[n] = 0;
      n--;
      iter = 0;
    } else if (l === n - 1) {
      // Two roots found: the trailing 2×2 block.
      w = at(n, n - 1) * at(n - 1, n);
      p = (at(n - 1, n - 1) - at(n, n)) / 2;
      q = p * p + w;
      z = Math.sqrt(Math.abs(q));
      x = at(n, n) + exshift;
      if (q >= 0) {
        z = p >= 0 ? p + z : p - z;
        d[n - 1] = x + z;
        d[n] = z !== 0 ? x - w / z : x + z;
        e[n - 1] = 0;
        e[n] = 0;
      } else {
        d[n - 1] = x + p;
        d[n] = x + p;
        e[n - 1] = z;
        e[n] = -z;
      }
      n -= 2;
      iter = 0;
    } else {
      if (totalIterations >= maxIterations) {
        throw new Error('eigenvalues: the QR iteration did not converge (input too ill-behaved for double precision)');
      }
      x = at(n, n);
      y = at(n - 1, n - 1);
      w = at(n, n - 1) * at(n - 1, n);
      // Exceptional shifts after 10 and 30 stalled iterations (EISPACK hqr).
      if (iter === 10) {
        exshift += x;
        for (let i = 0; i <= n; i++) H[i * nn + i] -= x;
        s = Math.abs(at(n, n - 1)) + Math.abs(at(n - 1, n - 2));
        x = y = 0.75 * s;
        w = -0.4375 * s * s;
      }
      if (iter === 30) {
        s = (y - x) / 2;
        s = s * s + w;
        if (s > 0) {
          s = Math.sqrt(s);
          if (y < x) s = -s;
          s = x - w / ((y - x) / 2 + s);
          for (let i = 0; i <= n; i++) H[i * nn + i] -= s;
          exshift += s;
          x = y = w = 0.964;
        }
      }
      iter++;
      totalIterations++;
      sweeps++;
      // Look for two consecutive small subdiagonal entries.
      let m = n - 2;
      while (m >= l) {
        z = at(m, m);
        r = x - z;
        s = y - z;
        p = (r * s - w) / at(m + 1, m) + at(m, m + 1);
        q = at(m + 1, m + 1) - z - r - s;
        r = at(m + 2, m + 1);
        s = Math.abs(p) + Math.abs(q) + Math.abs(r);
        p /= s;
        q /= s;
        r /= s;
        if (m === l) break;
        if (Math.abs(at(m, m - 1)) * (Math.abs(q) + Math.abs(r)) < eps * (Math.abs(p) * (Math.abs(at(m - 1, m - 1)) + Math.abs(z) + Math.abs(at(m + 1, m + 1))))) break;
        m--;
      }
      for (let i = m + 2; i <= n; i++) {
        H[i * nn + i - 2] = 0;
        if (i > m + 2) H[i * nn + i - 3] = 0;
      }
      // Double QR step on rows l..n and columns m..n (active window only: no vectors kept).
      for (let k = m; k <= n - 1; k++) {
        const notlast = k !== n - 1;
        if (k !== m) {
          p = at(k, k - 1);
          q = at(k + 1, k - 1);
          r = notlast ? at(k + 2, k - 1) : 0;
          x = Math.abs(p) + Math.abs(q) + Math.abs(r);
          if (x !== 0) {
            p /= x;
            q /= x;
            r /= x;
          }
        }
        if (x === 0) break;
        s = Math.sqrt(p * p + q * q + r * r);
        if (p < 0) s = -s;
        if (s !== 0) {
          if (k !== m) H[k * nn + k - 1] = -s * x;
          else if (l !== m) H[k * nn + k - 1] = -at(k, k - 1);
          p += s;
          x = p / s;
          y = q / s;
          z = r / s;
          q /= p;
          r /= p;
          for (let j = k; j <= n; j++) {
            p = at(k, j) + q * at(k + 1, j);
            if (notlast) {
              p += r * at(k + 2, j);
              H[(k + 2) * nn + j] -= p * z;
            }
            H[k * nn + j] -= p * x;
            H[(k + 1) * nn + j] -= p * y;
          }
          const last = Math.min(n, k + 3);
          for (let i = l; i <= last; i++) {
            p = x * at(i, k) + y * at(i, k + 1);
            if (notlast) {
              p += z * at(i, k + 2);
              H[i * nn + k + 2] -= p * r;
            }
            H[i * nn + k] -= p;
            H[i * nn + k + 1] -= p * q;
          }
        }
      }
    }
  }
  Object.assign(st, { n, exshift, iter, totalIterations, p, q, r, s, z, w, x, y });
  return n < 0;
}
