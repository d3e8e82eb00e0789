/**
 * Jordan block sizes of the roots of one irreducible factor, decided exactly over Q.
 *
 * Method (the Weyr characteristic; e.g. R. A. Horn & C. R. Johnson, "Matrix Analysis",
 * 2nd ed., §3.1, from memory): for an irreducible q of degree d with exponent a in the
 * characteristic polynomial, ker q(A)^k is the direct sum over the d conjugate roots λ of
 * ker (A − λI)^k, and all conjugates share one block structure (Galois symmetry). So
 * ν_k = nullity(q(A)^k)/d is dim ker (A − λI)^k for each root λ, and
 *   #blocks of size ≥ k = ν_k − ν_{k−1},   geometric = ν_1,
 *   index (exponent of q in the minimal polynomial) = least k with ν_k = a.
 * Ranks are exact (Bareiss on integers, matrixQ.ts); no tolerance anywhere.
 *
 * Invariants: blocks are descending, sum(blocks) = algebraic, blocks.length = geometric,
 * blocks[0] = index.
 */
import { Rational, lcm } from './rational';
import { contentInt, mulInt, rankInt, toIntegerMatrix } from './matrixQ';
import type { PolyQ } from './polynomial';

export interface JordanStructure {
  /** Block sizes of each root of q, descending. */
  blocks: number[];
  geometric: number;
  /** Size of the largest block = exponent of q in the minimal polynomial. */
  index: number;
  /** ν_1 … ν_index: dim ker (A − λI)^k for one root λ. */
  kernelDimensions: number[];
  /**
   * False when some nullity was not a multiple of deg q — impossible for a truly
   * irreducible q, so it flags a factor the factorizer failed to split (see factor.ts).
   */
  consistent: boolean;
}

export function jordanStructure(a: Rational[][], q: PolyQ, algebraic: number): JordanStructure {
  const n = a.length;
  const d = q.length - 1;
  if (algebraic === 1) return { blocks: [1], geometric: 1, index: 1, kernelDimensions: [1], consistent: true };
  // A nonzero multiple of q(A) as an integer matrix: the kernel is unchanged.
  const base = reduce(scaledPolyAtMatrixInt(q, a));
  const target = algebraic * d;
  const kernelDimensions: number[] = [];
  let consistent = true;
  let power = base;
  for (let k = 1; k <= algebraic; k++) {
    if (k > 1) power = reduce(mulInt(power, base));
    const nullity = n - rankInt(power);
    if (nullity % d !== 0) consistent = false;
    kernelDimensions.push(Math.floor(nullity / d));
    if (nullity >= target) break;
  }
  return { ...blocksFromKernelDimensions(kernelDimensions), kernelDimensions, consistent };
}

/** Block sizes from ν_1 ≤ ν_2 ≤ … (ν_0 = 0): exactly-size-k count = (ν_k − ν_{k−1}) − (ν_{k+1} − ν_k). */
export function blocksFromKernelDimensions(nu: number[]): { blocks: number[]; geometric: number; index: number } {
  const atLeast = nu.map((v, i) => v - (i === 0 ? 0 : nu[i - 1]));
  const blocks: number[] = [];
  for (let k = atLeast.length; k >= 1; k--) {
    const exactly = atLeast[k - 1] - (k < atLeast.length ? atLeast[k] : 0);
    for (let c = 0; c < exactly; c++) blocks.push(k);
  }
  return { blocks, geometric: nu[0] ?? 0, index: blocks.length > 0 ? blocks[0] : 0 };
}

function reduce(m: bigint[][]): bigint[][] {
  const g = contentInt(m);
  if (g <= 1n) return m;
  return m.map((row) => row.map((x) => x / g));
}

/**
 * c·q(A) with c > 0 chosen so everything is an integer: with A = B/L (B integer),
 * D·L^d·q(A) = Σ e_i·B^i where e_i = D·q_i·L^{d−i} and D clears the remaining
 * denominators; evaluated by Horner's rule in BigInt matrices (no Rational gcds).
 */
function scaledPolyAtMatrixInt(q: PolyQ, a: Rational[][]): bigint[][] {
  const n = a.length;
  const d = q.length - 1;
  const { ints: B, den: L } = toIntegerMatrix(a);
  const scaled = q.map((c, i) => c.mul(Rational.of(L ** BigInt(d - i))));
  let D = 1n;
  for (const c of scaled) if (c.den !== 1n) D = lcm(D, c.den);
  const e = scaled.map((c) => c.num * (D / c.den));
  let h: bigint[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? e[d] : 0n)));
  for (let i = d - 1; i >= 0; i--) {
    h = mulInt(h, B);
    for (let k = 0; k < n; k++) h[k][k] += e[i];
  }
  return h;
}
