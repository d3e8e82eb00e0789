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
 * Invariants: the input is not mutated; eigenvalues come back as complex numbers with
 * conjugate pairs adjacent (upper half-plane member first) exactly as the QR iteration
 * produced them, so pairs are exact conjugates; eigenvector k (when asked) belongs to
 * eigenvalue k and refers to the original, unbalanced matrix.
 */
import { EigenvalueDecomposition } from 'ml-matrix';
import { balance } from './balance';

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

export function eigenFloat(A: number[][], opts: { vectors?: boolean } = {}): FloatEigen {
  const n = assertFiniteSquare(A, 'eigenvalues');
  if (n === 0) return { values: [], vectors: opts.vectors ? [] : null };
  const { balanced, scaling } = balance(A);
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
