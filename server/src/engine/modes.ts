/**
 * Modal quantities of each eigenvalue: time constant, natural frequency, damping ratio,
 * period, 2 % settling time, doubling time.
 *
 * Conventions (trade-standard definitions; e.g. G. F. Franklin, J. D. Powell & A.
 * Emami-Naeini, "Feedback Control of Dynamic Systems", ch. 3 — from memory):
 *   continuous pole s = σ + jω:  ω_n = |s|, ζ = −σ/|s| (a real pole gives ζ = +1 when stable
 *   and −1 when unstable; s = 0 gives null), τ = 1/|σ| (null when σ = 0), damped period
 *   2π/|ω|; 2 % settling time −ln(0.02)/|σ| ≈ 3.912/|σ| for decaying modes — the time for the
 *   envelope e^{σt} to reach 2 % (the familiar 4/(ζω_n) is the rounded rule of thumb, common
 *   practice); doubling time ln 2/σ for growing modes.
 *   discrete pole z with period T: s = ln(z)/T on the principal branch (|arg z| ≤ π), then as
 *   above; z = 0 is a deadbeat mode (gone after as many steps as its largest Jordan block); a
 *   negative real z maps to Im s = π/T, a sign flip every sample, which the notes say.
 *   Without a period: per-step radius |z|, angle arg z (rad/sample) and the samples to 2 %,
 *   ln(0.02)/ln|z|.
 * One mode per real eigenvalue and per conjugate pair (the member with Im > 0).
 * A mode on the stability boundary with a Jordan block larger than 1 is 'polynomial-growth'.
 */
import type { Domain, Mode, Spectrum } from './types';
import { boundaryPosition, defaultBoundaryTolerance, type BoundaryPosition } from './stability';

export interface ModesOptions {
  /** Numeric boundary tolerance; default as in stabilityOf. */
  tolerance?: number;
  normA?: number;
}

const LN_50 = -Math.log(0.02);

function continuousQuantities(sre: number, sim: number, position: BoundaryPosition): Omit<Mode, 'eigenvalueIndex' | 's' | 'behaviour'> {
  const magnitude = Math.hypot(sre, sim);
  const omega = Math.abs(sim);
  const onAxis = position === 0;
  return {
    timeConstant: onAxis || sre === 0 ? null : 1 / Math.abs(sre),
    naturalFrequency: magnitude,
    dampingRatio: magnitude === 0 || (onAxis && omega === 0) ? null : onAxis ? 0 : -sre / magnitude,
    period: omega === 0 ? null : (2 * Math.PI) / omega,
    settlingTime2pct: position < 0 && sre < 0 ? LN_50 / Math.abs(sre) : null,
    doublingTime: position > 0 && sre > 0 ? Math.LN2 / sre : null,
  };
}

function behaviourOf(position: BoundaryPosition, oscillating: boolean, largestBlock: number): Mode['behaviour'] {
  if (position === 0) return largestBlock > 1 ? 'polynomial-growth' : oscillating ? 'oscillates' : 'constant';
  if (position < 0) return oscillating ? 'decaying-oscillation' : 'decays';
  return oscillating ? 'growing-oscillation' : 'grows';
}

export function modesOf(spec: Spectrum, domain: Domain, period: number | null, opts: ModesOptions = {}): Mode[] {
  if (domain === 'discrete' && period !== null && !(Number.isFinite(period) && period > 0)) {
    throw new Error('modesOf: the sample period must be a positive finite number');
  }
  const tol = defaultBoundaryTolerance(spec.eigenvalues, opts);
  const modes: Mode[] = [];
  spec.eigenvalues.forEach((e, idx) => {
    if (e.im < 0) return; // described by its conjugate
    const { position } = boundaryPosition(e, domain, tol);
    const largestBlock = Math.max(...e.blocks);
    const oscillating = e.im !== 0;

    if (domain === 'continuous') {
      modes.push({
        eigenvalueIndex: idx,
        s: { re: e.re, im: e.im },
        behaviour: behaviourOf(position, oscillating, largestBlock),
        ...continuousQuantities(e.re, e.im, position),
      });
      return;
    }

    const radius = Math.hypot(e.re, e.im);
    const angle = Math.atan2(e.im, e.re);
    const isZero = e.exact ? e.exact.p.isZero() && e.exact.r.isZero() : radius <= tol;
    if (isZero) {
      modes.push({
        eigenvalueIndex: idx,
        s: null,
        behaviour: 'deadbeat',
        timeConstant: null,
        naturalFrequency: null,
        dampingRatio: null,
        period: null,
        settlingTime2pct: period === null ? null : largestBlock * period,
        doublingTime: null,
        perStep: { radius: 0, angle: 0, samplesTo2pct: largestBlock },
        notes: [`reaches exactly zero after ${largestBlock} sample${largestBlock > 1 ? 's' : ''}`],
      });
      return;
    }
    const notes: string[] = [];
    const negativeReal = !oscillating && e.re < 0;
    if (negativeReal) notes.push('negative real pole: the mode changes sign every sample (an oscillation at half the sample rate)');
    const samplesTo2pct = position < 0 ? Math.log(0.02) / Math.log(radius) : null;
    const perStep = { radius, angle, samplesTo2pct };
    const mode: Mode = {
      eigenvalueIndex: idx,
      s: null,
      behaviour: behaviourOf(position, oscillating || negativeReal, largestBlock),
      timeConstant: null,
      naturalFrequency: null,
      dampingRatio: null,
      period: null,
      settlingTime2pct: null,
      doublingTime: null,
      perStep,
    };
    if (period !== null) {
      // Principal branch: Im s = arg(z)/T ∈ (−π/T, π/T], which is π/T for a negative real z.
      const sre = position === 0 ? 0 : Math.log(radius) / period;
      const sim = angle / period;
      mode.s = { re: sre, im: sim };
      Object.assign(mode, continuousQuantities(sre, sim, position));
    }
    if (notes.length > 0) mode.notes = notes;
    modes.push(mode);
  });
  return modes;
}
