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
 *
 * Real or complex is decided exactly for rational coefficients: the number of distinct real
 * roots comes from a Sturm sequence (J. C. F. Sturm, 1835; e.g. S. Basu, R. Pollack &
 * M.-F. Roy, "Algorithms in Real Algebraic Geometry", §2.2, from memory), and the roots
 * with the smallest relative imaginary parts take that many real places. A nearly real
 * complex pair is therefore never reported as two real roots. Plain-number input falls
 * back to the tolerance REAL_ROOT_RELATIVE_IMAG.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { Rational, bitLength } from './rational';
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
  const exact = coeffs.length > 0 && coeffs.every((x) => x instanceof Rational);
  // Work in t = x/σ with σ = 2^s near the Fujiwara root bound max_k |c_{n−k}/c_n|^{1/k}:
  // the scaled monic coefficients are ≤ 1 in size, which balances the companion matrix
  // (unbalanced ones cost QR iterations and accuracy). For rational input the scaling is
  // done exactly before rounding to doubles, so coefficients beyond double range still work.
  const { monic, log2Sigma } = exact ? scaledMonicExact(coeffs as Rational[]) : scaledMonicFloat(coeffs as number[]);
  const deg = monic.length - 1;
  if (deg < 1) return [];
  if (!monic.every(Number.isFinite)) throw new RangeError('polynomial coefficients are not finite numbers');
  if (Math.abs(log2Sigma) > 1000) throw new RangeError('polynomial roots are beyond the range of double precision');
  const sigma = 2 ** log2Sigma;
  let raw: Complex[];
  if (deg === 1) raw = [{ re: -monic[0], im: 0 }];
  else {
    // Companion matrix with the monic coefficients in the last column.
    const comp = Matrix.zeros(deg, deg);
    for (let i = 1; i < deg; i++) comp.set(i, i - 1, 1);
    for (let i = 0; i < deg; i++) comp.set(i, deg - 1, -monic[i]);
    const evd = new EigenvalueDecomposition(comp, { assumeSymmetric: false });
    raw = evd.realEigenvalues.map((re, i) => ({ re, im: evd.imaginaryEigenvalues[i] }));
  }
  const deriv = monic.slice(1).map((x, i) => x * (i + 1));
  const scaledRoots = raw.map((z) => polish(monic, deriv, z));
  let polished = scaledRoots.map((z) => ({ re: z.re * sigma, im: z.im * sigma }));
  // The high-precision pass is needed only where double precision cannot vouch for a root:
  // first-order bound 4u·Σ|m_k||t|^k / |p'(t)| (Wilkinson, Rounding Errors in Algebraic
  // Processes, 1963, ch. 2, from memory) above ~1e-15 relative, i.e. clustered roots.
  // The bound assumes a coefficient-wise backward error; the companion QR's is norm-wise, so
  // Vieta's formulas (sum and product of the roots against the coefficients) are checked too.
  if (exact && deg >= 2 && (scaledRoots.some((t) => !(rootErrorBound(monic, deriv, t) <= 1e-15 * Math.hypot(t.re, t.im))) || !vietaConsistent(monic, scaledRoots))) {
    polished = refineSimultaneously(coeffs as Rational[], polished);
  }
  return symmetrize(polished, exact ? realRootCount(coeffs as Rational[]) : null);
}

/**
 * Weierstrass (Durand–Kerner) simultaneous iteration z_i ← z_i − p(z_i)/Π_{j≠i}(z_i − z_j) in
 * 256-bit fixed point against the exact coefficients (K. Weierstrass 1891; E. Durand 1960;
 * I. O. Kerner 1966, from memory). Double precision alone leaves roots of a tight cluster
 * accurate only to about u^{1/m} (a cluster of three at width 1e-5 gave 1e-6 errors), and
 * Newton from such starts can fall onto a neighbour; the simultaneous iteration keeps the
 * roots apart and converges quadratically for simple roots, which an irreducible factor has.
 * It stops when every correction is below 2^-200 relative, or after 60 sweeps (then the
 * double-precision starts are returned unchanged if anything went non-finite).
 */
const FIX_BITS = 256n;

interface FixComplex {
  re: bigint;
  im: bigint;
}

function toFix(x: number): bigint {
  const r = Rational.fromNumber(x);
  return (r.num << FIX_BITS) / r.den;
}

function fixToNumber(x: bigint): number {
  return Rational.of(x, 1n << FIX_BITS).toNumber();
}

function fixMul(a: FixComplex, b: FixComplex): FixComplex {
  return { re: (a.re * b.re - a.im * b.im) >> FIX_BITS, im: (a.re * b.im + a.im * b.re) >> FIX_BITS };
}

function fixDiv(a: FixComplex, b: FixComplex): FixComplex | null {
  const den = b.re * b.re + b.im * b.im;
  if (den === 0n) return null;
  return { re: ((a.re * b.re + a.im * b.im) << FIX_BITS) / den, im: ((a.im * b.re - a.re * b.im) << FIX_BITS) / den };
}

function refineSimultaneously(coeffs: Rational[], start: Complex[]): Complex[] {
  const c = coeffs.slice();
  while (c.length > 0 && c[c.length - 1].isZero()) c.pop();
  const deg = c.length - 1;
  if (deg !== start.length || !start.every((z) => Number.isFinite(z.re) && Number.isFinite(z.im))) return start;
  const lc = c[deg];
  const monic = c.map((x) => {
    const m = x.div(lc);
    return (m.num << FIX_BITS) / m.den;
  });
  const evalAt = (z: FixComplex): FixComplex => {
    let acc: FixComplex = { re: 1n << FIX_BITS, im: 0n };
    for (let i = deg - 1; i >= 0; i--) {
      acc = fixMul(acc, z);
      acc.re += monic[i];
    }
    return acc;
  };
  let z: FixComplex[] = start.map((w) => ({ re: toFix(w.re), im: toFix(w.im) }));
  const abs = (w: FixComplex): bigint => (w.re < 0n ? -w.re : w.re) + (w.im < 0n ? -w.im : w.im);
  for (let sweep = 0; sweep < 60; sweep++) {
    let converged = true;
    const next: FixComplex[] = [];
    for (let i = 0; i < deg; i++) {
      let den: FixComplex = { re: 1n << FIX_BITS, im: 0n };
      for (let j = 0; j < deg; j++) if (j !== i) den = fixMul(den, { re: z[i].re - z[j].re, im: z[i].im - z[j].im });
      const step = fixDiv(evalAt(z[i]), den);
      if (!step) return start;
      next.push({ re: z[i].re - step.re, im: z[i].im - step.im });
      // |step| ≤ 2^-200·max(1, |z_i|): converged to far beyond double precision.
      const scale = abs(z[i]) > 1n << FIX_BITS ? abs(z[i]) : 1n << FIX_BITS;
      if (abs(step) << 200n > scale) converged = false;
    }
    z = next;
    if (converged) break;
  }
  const out = z.map((w) => ({ re: fixToNumber(w.re), im: fixToNumber(w.im) }));
  return out.every((w) => Number.isFinite(w.re) && Number.isFinite(w.im)) ? out : start;
}

function scaledMonicFloat(coeffs: number[]): { monic: number[]; log2Sigma: number } {
  const c = coeffs.slice();
  while (c.length > 0 && c[c.length - 1] === 0) c.pop();
  const deg = c.length - 1;
  if (deg < 1) return { monic: [], log2Sigma: 0 };
  const monic = c.map((x) => x / c[deg]);
  let bound = 0;
  for (let k = 1; k <= deg; k++) bound = Math.max(bound, Math.abs(monic[deg - k]) ** (1 / k));
  const log2Sigma = bound > 0 && Number.isFinite(bound) ? Math.round(Math.log2(bound)) : 0;
  return { monic: monic.map((x, i) => x / 2 ** (log2Sigma * (deg - i))), log2Sigma };
}

function scaledMonicExact(coeffs: Rational[]): { monic: number[]; log2Sigma: number } {
  const c = coeffs.slice();
  while (c.length > 0 && c[c.length - 1].isZero()) c.pop();
  const deg = c.length - 1;
  if (deg < 1) return { monic: [], log2Sigma: 0 };
  const lc = c[deg];
  const m = c.map((x) => x.div(lc));
  // log2 |m_i| from bit lengths (within 1), enough to pick a power-of-two scale.
  let best = -Infinity;
  for (let k = 1; k <= deg; k++) {
    const x = m[deg - k];
    if (x.isZero()) continue;
    const log2 = bitLength(x.num < 0n ? -x.num : x.num) - bitLength(x.den);
    best = Math.max(best, log2 / k);
  }
  const s = Number.isFinite(best) ? Math.round(best) : 0;
  const monic = m.map((x, i) => {
    const e = s * (deg - i); // divide by 2^e exactly
    const scaled = e >= 0 ? Rational.of(x.num, x.den << BigInt(e)) : Rational.of(x.num << BigInt(-e), x.den);
    return scaled.toNumber();
  });
  return { monic, log2Sigma: s };
}

/** Number of distinct real roots of a nonzero rational polynomial, by a Sturm sequence. */
export function realRootCount(p: Rational[]): number {
  const f = primitive(p);
  if (f.length < 2) return 0;
  const seq: bigint[][] = [f, primitive(f.slice(1).map((c, i) => Rational.fromInt(c * BigInt(i + 1))))];
  while (seq[seq.length - 1].length > 1) {
    const r = signedRemainder(seq[seq.length - 2], seq[seq.length - 1]);
    if (r.length === 0) break; // not square-free: the last term is the gcd; counts stay distinct roots
    seq.push(r);
  }
  const changes = (signs: number[]): number => {
    let count = 0;
    let last = 0;
    for (const sg of signs) {
      if (sg === 0) continue;
      if (last !== 0 && sg !== last) count++;
      last = sg;
    }
    return count;
  };
  const lead = (q: bigint[]): number => (q[q.length - 1] > 0n ? 1 : -1);
  const atPlus = seq.map(lead);
  const atMinus = seq.map((q) => lead(q) * ((q.length - 1) % 2 === 0 ? 1 : -1));
  return changes(atMinus) - changes(atPlus);
}

/** Integer multiple of p by a positive factor, content removed (signs preserved). */
function primitive(p: Rational[]): bigint[] {
  let n = p.length;
  while (n > 0 && p[n - 1].isZero()) n--;
  let den = 1n;
  for (let i = 0; i < n; i++) if (p[i].den !== 1n) den = (den / gcdBig(den, p[i].den)) * p[i].den;
  return contentFree(p.slice(0, n).map((c) => c.num * (den / c.den)));
}

function contentFree(a: bigint[]): bigint[] {
  let g = 0n;
  for (const c of a) if (c !== 0n) g = gcdBig(g, c);
  return g > 1n ? a.map((c) => c / g) : a;
}

function gcdBig(a: bigint, b: bigint): bigint {
  if (a < 0n) a = -a;
  if (b < 0n) b = -b;
  while (b !== 0n) [a, b] = [b, a % b];
  return a;
}

/** −(positive multiple of a mod b), trimmed and content-free: the next Sturm term. */
function signedRemainder(a: bigint[], b: bigint[]): bigint[] {
  const r = a.slice(); // working copy, reduced in place
  const db = b.length - 1;
  const lc = b[db];
  const absLc = lc < 0n ? -lc : lc;
  const sgn = lc < 0n ? -1n : 1n;
  for (let k = r.length - 1; k >= db; k--) {
    const f = r[k];
    // r ← |lc|·r − sign(lc)·f·x^{k−db}·b: multiplies by a positive number, cancels r[k].
    for (let i = 0; i <= k; i++) r[i] *= absLc;
    if (f !== 0n) for (let j = 0; j <= db; j++) r[k - db + j] -= sgn * f * b[j];
  }
  let n = db;
  while (n > 0 && r[n - 1] === 0n) n--;
  return contentFree(r.slice(0, n).map((c) => -c));
}

function abs2(z: Complex): number {
  return z.re * z.re + z.im * z.im;
}

/** Σt = −m_{d−1} and Πt = (−1)^d·m_0 to about 1e-14 relative (Vieta; m monic, scaled). */
function vietaConsistent(m: number[], roots: Complex[]): boolean {
  const d = m.length - 1;
  let sumRe = 0;
  let absSum = 0;
  let prod: Complex = { re: 1, im: 0 };
  for (const t of roots) {
    sumRe += t.re;
    absSum += Math.hypot(t.re, t.im);
    prod = { re: prod.re * t.re - prod.im * t.im, im: prod.re * t.im + prod.im * t.re };
  }
  const sumOk = Math.abs(sumRe + m[d - 1]) <= 1e-14 * Math.max(absSum, Math.abs(m[d - 1]), Number.MIN_VALUE);
  const target = (d % 2 === 0 ? 1 : -1) * m[0];
  const prodOk = Math.abs(prod.re - target) <= 1e-13 * Math.abs(target) && Math.abs(prod.im) <= 1e-13 * Math.abs(target);
  return sumOk && prodOk;
}

function rootErrorBound(p: number[], dp: number[], t: Complex): number {
  const r = Math.hypot(t.re, t.im);
  let absSum = 0;
  for (let k = 0; k < p.length; k++) absSum += Math.abs(p[k]) * r ** k;
  const d = polyEvalComplex(dp, t);
  const dn = Math.hypot(d.re, d.im);
  return dn > 0 ? (4 * 2 ** -53 * absSum) / dn : Number.POSITIVE_INFINITY;
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

function symmetrize(roots: Complex[], realCount: number | null): Complex[] {
  const reals: number[] = [];
  const upper: Complex[] = [];
  const lower: Complex[] = [];
  const relImag = (z: Complex): number => Math.abs(z.im) / Math.max(Math.hypot(z.re, z.im), Number.MIN_VALUE);
  // With an exact count, the realCount roots of smallest relative imaginary part are real.
  const order = roots.map((z, i) => i).sort((i, j) => relImag(roots[i]) - relImag(roots[j]));
  const isReal = new Array<boolean>(roots.length).fill(false);
  order.forEach((idx, rank) => {
    isReal[idx] = realCount !== null ? rank < realCount : relImag(roots[idx]) <= REAL_ROOT_RELATIVE_IMAG;
  });
  roots.forEach((z, i) => {
    if (isReal[i]) reals.push(z.re);
    else if (z.im > 0) upper.push(z);
    else lower.push(z);
  });
  // The exact count may call a root complex whose computed imaginary part is exactly 0
  // (a pair so close to real that rounding split it along the real axis): such roots land
  // in `lower`; move half of them to `upper` so they pair up.
  while (lower.length > upper.length && lower.some((z) => z.im === 0)) {
    const k = lower.findIndex((z) => z.im === 0);
    upper.push(lower.splice(k, 1)[0]);
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
      // A pair split along the real axis by rounding: its half-width is the best estimate
      // of the (tiny) imaginary part, and keeps the pair visibly complex.
      const im = (u.im - l.im) / 2 || Math.abs(u.re - l.re) / 2 || Number.MIN_VALUE;
      pairs.push({ re: (u.re + l.re) / 2, im });
    } else pairs.push(u);
  }
  for (const l of unused) pairs.push({ re: l.re, im: -l.im }); // unmatched (should not happen)
  reals.sort((a, b) => b - a);
  pairs.sort((a, b) => b.re - a.re || b.im - a.im);
  const out: Complex[] = reals.map((re) => ({ re, im: 0 }));
  for (const p of pairs) out.push(p, { re: p.re, im: -p.im });
  return out;
}
