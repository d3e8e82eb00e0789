/**
 * Characteristic polynomial det(xI − A) by the Samuelson–Berkowitz algorithm.
 *
 * Source: S. J. Berkowitz, "On computing the determinant in small parallel time using a
 * small number of processors", Information Processing Letters 18(3), 1984. With A_r the
 * leading r×r block, A_r = [[A_{r−1}, c], [R, a_rr]], the coefficient vector (descending,
 * leading 1) satisfies p_r = T_r · p_{r−1}, where T_r is the (r+1)×r lower-triangular
 * Toeplitz matrix with first column [1, −a_rr, −R·c, −R·A_{r−1}·c, …, −R·A_{r−1}^{r−2}·c].
 *
 * Division-free, so it runs on integers: a rational A is written once as B/L with B an
 * integer matrix (L = lcm of all denominators), and det(xI − A) = L^{−n}·det(Lx·I − B),
 * i.e. coefficient i of p_A is coefficient i of p_B times L^{i−n}. Cost O(n⁴) BigInt
 * operations, ample for the exact path's cap of n = 12.
 */
import { Rational } from './rational';
import { toIntegerMatrix } from './matrixQ';
import type { PolyQ } from './polynomial';

/** Berkowitz on an integer matrix: ascending coefficients of det(xI − B), monic. */
export function characteristicPolynomialInt(b: bigint[][]): bigint[] {
  const n = b.length;
  let desc: bigint[] = [1n]; // p_0, descending coefficients
  for (let r = 1; r <= n; r++) {
    const k = r - 1; // size of the leading block A_{r−1}
    const arr = b[k][k];
    // Toeplitz first column: t[0] = 1, t[1] = −a_rr, t[j+2] = −R·A_{r−1}^j·c.
    const t = new Array<bigint>(r + 1).fill(0n);
    t[0] = 1n;
    t[1] = -arr;
    let v = new Array<bigint>(k);
    for (let i = 0; i < k; i++) v[i] = b[i][k]; // c
    for (let j = 0; j + 2 <= r; j++) {
      let dot = 0n;
      for (let i = 0; i < k; i++) dot += b[k][i] * v[i];
      t[j + 2] = -dot;
      if (j + 3 <= r) {
        const w = new Array<bigint>(k).fill(0n);
        for (let i = 0; i < k; i++) {
          let s = 0n;
          const row = b[i];
          for (let l = 0; l < k; l++) s += row[l] * v[l];
          w[i] = s;
        }
        v = w;
      }
    }
    // p_r = T_r · p_{r−1}: (r+1) × r lower-triangular Toeplitz times a length-r vector.
    const next = new Array<bigint>(r + 1).fill(0n);
    for (let i = 0; i <= r; i++) {
      let s = 0n;
      for (let j = 0; j < r && j <= i; j++) s += t[i - j] * desc[j];
      next[i] = s;
    }
    desc = next;
  }
  return desc.reverse();
}

/** Monic det(xI − A), ascending coefficients. Throws RangeError on a non-square matrix. */
export function characteristicPolynomial(a: Rational[][]): PolyQ {
  const n = a.length;
  for (const row of a) if (row.length !== n) throw new RangeError(`characteristic polynomial needs a square matrix, got ${n}×${row.length}`);
  const { ints, den } = toIntegerMatrix(a);
  const asc = characteristicPolynomialInt(ints);
  if (den === 1n) return asc.map((c) => Rational.fromInt(c));
  // coefficient i carries L^{i−n}.
  return asc.map((c, i) => Rational.of(c, den ** BigInt(n - i)));
}
