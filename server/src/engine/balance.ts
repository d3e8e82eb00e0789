/**
 * Balancing a matrix before computing eigenvalues: B = D⁻¹·A·D with D diagonal.
 *
 * Method: B. N. Parlett & C. Reinsch, "Balancing a matrix for calculation of eigenvalues
 * and eigenvectors", Numer. Math. 13, 1969 (the EISPACK routine `balanc`, scaling part
 * only; permutations are not needed by our callers). Row and column i are scaled until
 * their off-diagonal 1-norms are within a factor of the radix of each other; the loop stops
 * when no scaling reduces r + c by at least 5 %.
 *
 * Invariants: every scale factor is a power of two, so D⁻¹AD is computed without any
 * rounding and has exactly the eigenvalues of A; the input is not mutated; the loop
 * terminates because each accepted step lowers Σ (r_i + c_i) by ≥ 5 %, with a hard cap on
 * sweeps and a range for D as guards against pathological inputs.
 */

export interface Balanced {
  /** D⁻¹·A·D. */
  balanced: number[][];
  /** Diagonal of D (powers of two). Eigenvectors of A are D·(eigenvectors of B). */
  scaling: number[];
}

const RADIX = 2;
const MAX_SWEEPS = 100;

export function balance(A: number[][]): Balanced {
  const n = A.length;
  const B = A.map((row) => row.slice());
  const scaling = new Array<number>(n).fill(1);
  for (let sweep = 0; sweep < MAX_SWEEPS; sweep++) {
    let converged = true;
    for (let i = 0; i < n; i++) {
      let c = 0;
      let r = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        c += Math.abs(B[j][i]);
        r += Math.abs(B[i][j]);
      }
      if (c === 0 || r === 0) continue;
      const sum = c + r;
      let f = 1;
      let g = r / RADIX;
      while (c < g) {
        f *= RADIX;
        c *= RADIX * RADIX;
      }
      g = r * RADIX;
      while (c >= g) {
        f /= RADIX;
        c /= RADIX * RADIX;
      }
      // c now holds c_old·f², so (c + r)/f = c_old·f + r/f: the new column plus row norm.
      // Keep D within [2^-512, 2^512] (LAPACK dgebal guards the same way against overflow).
      const next = scaling[i] * f;
      if ((c + r) / f < 0.95 * sum && next >= 2 ** -512 && next <= 2 ** 512) {
        converged = false;
        scaling[i] *= f;
        for (let j = 0; j < n; j++) B[i][j] /= f;
        for (let j = 0; j < n; j++) B[j][i] *= f;
      }
    }
    if (converged) break;
  }
  return { balanced: B, scaling };
}
