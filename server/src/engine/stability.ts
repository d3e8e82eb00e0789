/**
 * Stability verdict from the eigenvalues and their Jordan structure (Lyapunov stability of
 * x' = Ax or x[k+1] = Ax[k]; the standard modal criterion, e.g. C.-T. Chen, "Linear System
 * Theory and Design", 3rd ed., 1999, §5.2–5.3 — from memory):
 *   continuous: every Re λ < 0 ⇒ asymptotically stable; some Re λ > 0 ⇒ unstable;
 *               otherwise eigenvalues with Re λ = 0 decide: all their Jordan blocks of size 1
 *               ⇒ marginally stable, any block of size > 1 ⇒ unstable (t^k growth);
 *   discrete:   the same with |z| against 1.
 *
 * Deciding "on the boundary": for eigenvalues with an exact form p + r·√d (QuadraticNumber)
 * the comparison is exact in rational arithmetic — Re = p for complex pairs, |z|² = p² − r²d,
 * and the sign of a + r√d for real surds from a² against r²d. Numeric roots (irreducible
 * factors of degree ≥ 3, or the float path) are compared with a tolerance
 * (tolerance.boundaryTolerance) and the reasons say so.
 *
 * Invariant: `boundary` lists the indices (into the given list) of eigenvalues found on the
 * stability boundary; the verdict never depends on the order of the list.
 */
import { Rational } from './rational';
import type { Domain, Eigenvalue, QuadraticNumber, Stability } from './types';
import { boundaryTolerance } from './tolerance';

export interface StabilityOptions {
  /** A norm of the matrix, to scale the numeric boundary tolerance (default: the largest |λ|). */
  normA?: number;
  /** Overrides the numeric boundary tolerance entirely. */
  tolerance?: number;
}

export interface StabilityResult {
  verdict: Stability;
  reasons: string[];
  boundary: number[];
}

/** −1 inside the stable region, 0 on its boundary, +1 outside. */
export type BoundaryPosition = -1 | 0 | 1;

/** Exact sign of a + r·√d, d > 0 not a perfect square. */
function signOfSurd(a: Rational, r: Rational, d: Rational): -1 | 0 | 1 {
  const sa = a.sign();
  const sr = r.sign();
  if (sr === 0) return sa;
  if (sa === 0 || sa === sr) return sr;
  // Opposite signs: the larger magnitude wins, compared through squares.
  const cmp = a.mul(a).cmp(r.mul(r).mul(d));
  return cmp > 0 ? sa : sr;
}

function exactPosition(q: QuadraticNumber, domain: Domain): BoundaryPosition {
  const one = Rational.ONE;
  const isReal = q.r.isZero();
  const complex = !isReal && q.d.sign() < 0;
  if (domain === 'continuous') {
    if (isReal || complex) return q.p.sign();
    return signOfSurd(q.p, q.r, q.d);
  }
  if (isReal) return q.p.abs().cmp(one);
  if (complex) return q.p.mul(q.p).sub(q.r.mul(q.r).mul(q.d)).cmp(one);
  // Real surd z: |z| vs 1 from the signs of z − 1 and z + 1.
  const above = signOfSurd(q.p.sub(one), q.r, q.d); // sign(z − 1)
  const below = signOfSurd(q.p.add(one), q.r, q.d); // sign(z + 1)
  if (above > 0 || below < 0) return 1;
  return -1; // strictly between −1 and 1 (equality is impossible for an irrational z)
}

/** Where one eigenvalue lies relative to the stability boundary; `numeric` when a tolerance decided it. */
export function boundaryPosition(e: { re: number; im: number; exact: QuadraticNumber | null }, domain: Domain, tolerance: number): { position: BoundaryPosition; numeric: boolean } {
  if (e.exact) return { position: exactPosition(e.exact, domain), numeric: false };
  const distance = domain === 'continuous' ? e.re : Math.hypot(e.re, e.im) - 1;
  if (Math.abs(distance) <= tolerance) return { position: 0, numeric: true };
  return { position: distance < 0 ? -1 : 1, numeric: true };
}

export function defaultBoundaryTolerance(eigs: { re: number; im: number }[], opts: StabilityOptions = {}): number {
  if (opts.tolerance !== undefined) return opts.tolerance;
  const scale = opts.normA ?? eigs.reduce((m, e) => Math.max(m, Math.hypot(e.re, e.im)), 0);
  return boundaryTolerance(scale);
}

export function stabilityOf(eigs: Eigenvalue[], domain: Domain, opts: StabilityOptions = {}): StabilityResult {
  const tol = defaultBoundaryTolerance(eigs, opts);
  const axis = domain === 'continuous' ? 'the imaginary axis' : 'the unit circle';
  const outsideWord = domain === 'continuous' ? 'positive real part' : 'magnitude above 1';
  const reasons: string[] = [];
  const boundary: number[] = [];
  let outside = false;
  let boundaryGrowth = false;
  let numericNearBoundary = false;

  eigs.forEach((e, idx) => {
    const { position, numeric } = boundaryPosition(e, domain, tol);
    const mentioned = e.im >= 0; // a conjugate pair is described once
    if (numeric && Math.abs(domain === 'continuous' ? e.re : Math.hypot(e.re, e.im) - 1) <= 1e3 * tol) numericNearBoundary = true;
    if (position > 0) {
      outside = true;
      if (mentioned) reasons.push(`eigenvalue ${e.text} has ${outsideWord}: its mode grows without bound`);
    } else if (position === 0) {
      boundary.push(idx);
      const largest = Math.max(...e.blocks);
      if (largest > 1) {
        boundaryGrowth = true;
        if (mentioned) {
          reasons.push(`eigenvalue ${e.text} lies on ${axis} with a Jordan block of size ${largest}: its mode grows like ${domain === 'continuous' ? 't' : 'k'}^${largest - 1}`);
        }
      } else if (mentioned) {
        reasons.push(`eigenvalue ${e.text} lies on ${axis} with ${e.algebraic > 1 ? 'only 1×1 Jordan blocks' : 'multiplicity 1'}: its mode stays bounded but does not decay`);
      }
    }
  });

  let verdict: Stability;
  if (outside || boundaryGrowth) verdict = 'unstable';
  else if (boundary.length > 0) verdict = 'marginally-stable';
  else {
    verdict = 'asymptotically-stable';
    reasons.push(
      eigs.length === 0
        ? 'no states: nothing can grow'
        : domain === 'continuous'
          ? 'every eigenvalue has negative real part'
          : 'every eigenvalue lies strictly inside the unit circle',
    );
  }
  if (numericNearBoundary) {
    reasons.push(`decided in floating point near ${axis}: eigenvalues within ${tol.toExponential(1)} of it count as on it, so this verdict is numerical`);
  }
  return { verdict, reasons, boundary };
}
