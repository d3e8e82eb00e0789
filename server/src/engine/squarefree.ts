/**
 * Square-free factorization over Q by Yun's algorithm.
 *
 * Source: D. Y. Y. Yun, "On square-free decomposition algorithms", Proc. ACM Symposium on
 * Symbolic and Algebraic Computation (SYMSAC '76), 1976. For monic f = Π a_i^i with the a_i
 * square-free and pairwise coprime: b_0 = f/g, c_0 = f'/g − b_0' with g = gcd(f, f');
 * then a_i = gcd(b, c), b ← b/a_i, c ← c/a_i − b'. In characteristic 0 this is exact.
 *
 * Output: the nontrivial a_i (degree ≥ 1) with their multiplicity i, each monic.
 */
import {
  PolyQ, polyDegree, polyDerivative, polyExactQuotient, polyGcd, polyMonic, polySub,
} from './polynomial';

export interface SquareFreePart {
  poly: PolyQ;
  multiplicity: number;
}

export function squareFreeFactorization(f: PolyQ): SquareFreePart[] {
  const monic = polyMonic(f);
  if (polyDegree(monic) < 1) return [];
  const df = polyDerivative(monic);
  const g = polyGcd(monic, df);
  let b = exactDiv(monic, g);
  let c = polySub(exactDiv(df, g), polyDerivative(b));
  const parts: SquareFreePart[] = [];
  let i = 1;
  while (polyDegree(b) >= 1) {
    const a = polyGcd(b, c);
    b = exactDiv(b, a);
    c = polySub(exactDiv(c, a), polyDerivative(b));
    if (polyDegree(a) >= 1) parts.push({ poly: polyMonic(a), multiplicity: i });
    i++;
  }
  return parts;
}

function exactDiv(a: PolyQ, b: PolyQ): PolyQ {
  const q = polyExactQuotient(a, b);
  if (q === null) throw new Error('internal: Yun step division was not exact');
  return q;
}
