/**
 * Numeric roots of a real polynomial: eigenvalues of the companion matrix, then Newton
 * polishing against the exact coefficients.
 *
 * Companion-matrix eigenvalues are the roots (A. Edelman & H. Murakami, "Polynomial roots
 * from companion matrix eigenvalues", Math. Comp. 64(210), 1995); ml-matrix's
 * EigenvalueDecomposition (EISPACK-style Hessenberg QR) computes them to about machine
 * precision times the conditioning. Newton steps z ← z − p(z)/p'(z) in complex double are
 * then accepted only while they decrease |p(z)|, so polishing can never make a root worse.
 * Intended for square-free input (simple roots); at a multiple root Newton converges only
 * linearly and the accuracy is ~√ε — callers pass square-free factors.
 *
 * Output order: real roots descending, then complex pairs with the upper half-plane member
 * first; an exact conjugate symmetry is enforced (a real polynomial has conjugate roots).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type { Rational } from './rational';
import { polyEvalComplex, type Complex } from './polynomial';

/**
 * Imaginary parts below this fraction of the modulus are treated as rounding noise of a
 * real root. Justification: Hessenberg QR gives backward-stable eigenvalues, so for a
 * simple, reasonably conditioned root the error is ~1e-15·|λ|; 1e-10 leaves five orders of
 * magnitude for conditioning while no genuine complex root of a degree ≤ 12 integer
 * polynomial of moderate height has |Im|/|λ| that small.
 */
const REAL_ROOT_RELATIVE_IMAG = 1e-10;
const NEWTON_STEPS = 6;

export function polynomialRoots(coeffs: (Rational | number)[]): Complex[] {
  const c = coeffs.map((x) => (typeof x === 'number' ? x : x.toNumber()));
  while (c.length > 0 && c[c.length - 1] === 0) c.pop();
  const deg = c.length - 1;
  if (deg < 1) return [];
  const lc = c[deg];
  const monic = c.map((x) => x / lc);
  let raw: Complex[];
  if (deg === 1) raw = [{ re: -monic[0], im: 0 }];
  else {
    // Substitute x = σ·t with σ a power of two near the Fujiwara root bound
    // max_k |c_{n−k}|^{1/k}: the scaled coefficients are ≤ 1 in size, which balances the
    // companion matrix (unbalanced ones cost QR iterations and accuracy); powers of two
    // keep the scaling exact.
    let bound = 0;
    for (let k = 1; k <= deg; k++) bound = Math.max(bound, Math.abs(monic[deg - k]) ** (1 / k));
    const sigma = bound > 0 && Number.isFinite(bound) ? 2 ** Math.round(Math.log2(bound)) : 1;
    const scaled = monic.map((x, i) => x / sigma ** (deg - i));
    // Companion matrix with the monic coefficients in the last column.
    const comp = Matrix.zeros(deg, deg);
    for (let i = 1; i < deg; i++) comp.set(i, i - 1, 1);
    for (let i = 0; i < deg; i++) comp.set(i, deg - 1, -scaled[i]);
    const evd = new EigenvalueDecomposition(comp, { assumeSymmetric: false });
    raw = evd.realEigenvalues.map((re, i) => ({ re: re * sigma, im: evd.imaginaryEigenvalues[i] * sigma }));
  }
  const deriv = monic.slice(1).map((x, i) => x * (i + 1));
  const polished = raw.map((z) => polish(monic, deriv, z));
  return symmetrize(polished);
}

function abs2(z: Complex): number {
  return z.re * z.re + z.im * z.im;
}

function polish(p: number[], dp: number[], z0: Complex): Complex {
  let z = z0;
  let fz = polyEvalComplex(p, z);
  for (let step = 0; step < NEWTON_STEPS; step++) {
    if (fz.re === 0 && fz.im === 0) break;
    const d = polyEvalComplex(dp, z);
    const dd = abs2(d);
    if (dd === 0) break;
    // (fz / d)
    const qr = (fz.re * d.re + fz.im * d.im) / dd;
    const qi = (fz.im * d.re - fz.re * d.im) / dd;
    const cand = { re: z.re - qr, im: z.im - qi };
    const fc = polyEvalComplex(p, cand);
    if (!(abs2(fc) < abs2(fz))) break;
    z = cand;
    fz = fc;
  }
  return z;
}

function symmetrize(roots: Complex[]): Complex[] {
  const reals: number[] = [];
  const upper: Complex[] = [];
  const lower: Complex[] = [];
  for (const z of roots) {
    const mod = Math.hypot(z.re, z.im);
    if (Math.abs(z.im) <= REAL_ROOT_RELATIVE_IMAG * mod) reals.push(z.re);
    else if (z.im > 0) upper.push(z);
    else lower.push(z);
  }
  // Pair each upper root with its nearest lower conjugate and average the pair.
  const pairs: Complex[] = [];
  const unused = lower.slice();
  for (const u of upper) {
    let best = -1;
    let bestDist = Infinity;
    unused.forEach((l, i) => {
      const dist = Math.hypot(u.re - l.re, u.im + l.im);
      if (dist < bestDist) { bestDist = dist; best = i; }
    });
    if (best >= 0) {
      const l = unused.splice(best, 1)[0];
      pairs.push({ re: (u.re + l.re) / 2, im: (u.im - l.im) / 2 });
    } else pairs.push(u);
  }
  for (const l of unused) pairs.push({ re: l.re, im: -l.im }); // unmatched (should not happen)
  reals.sort((a, b) => b - a);
  pairs.sort((a, b) => b.re - a.re || b.im - a.im);
  const out: Complex[] = reals.map((re) => ({ re, im: 0 }));
  for (const p of pairs) out.push(p, { re: p.re, im: -p.im });
  return out;
}
