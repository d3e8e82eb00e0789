import { describe, expect, it } from 'vitest';
import { Q } from '../../server/src/engine/rational';
import type { Eigenvalue, QuadraticNumber } from '../../server/src/engine/types';
import { stabilityOf } from '../../server/src/engine/stability';
import { floatSpectrum } from '../../server/src/engine/spectrumFloat';
import { modesOf } from '../../server/src/engine/modes';
import { expmTimes } from '../../server/src/engine/expm';
import { closeTo } from '../../server/src/engine/tolerance';

/** Hand-built exact eigenvalue p + r√d with the given Jordan blocks. */
function exactEig(p: [number, number], r: [number, number], d: number, blocks: number[], text: string): Eigenvalue {
  const q: QuadraticNumber = { p: Q(p[0], p[1]), r: Q(r[0], r[1]), d: Q(d) };
  const root = r[0] === 0 ? 0 : (r[0] / r[1]) * Math.sqrt(Math.abs(d));
  const re = d < 0 ? p[0] / p[1] : p[0] / p[1] + root;
  const im = d < 0 ? root : 0;
  return { re, im, exact: q, text, algebraic: blocks.reduce((s, b) => s + b, 0), geometric: blocks.length, blocks };
}

// Source for every verdict here: the modal stability criterion (C.-T. Chen, "Linear System
// Theory and Design", 3rd ed., 1999, §5.2–5.3, from memory): eigenvalues on the boundary
// with a Jordan block larger than 1 give polynomial growth.
describe('stability traps, exact eigenvalues', () => {
  it('[[0,1],[-1,0]] (±j, simple) is marginally stable', () => {
    const eigs = [exactEig([0, 1], [1, 1], -1, [1], 'j'), exactEig([0, 1], [-1, 1], -1, [1], '-j')];
    const r = stabilityOf(eigs, 'continuous');
    expect(r.verdict).toBe('marginally-stable');
    expect(r.boundary).toEqual([0, 1]);
    expect(r.reasons.join(' ')).not.toMatch(/floating point/);
  });

  it('[[J, I],[0, J]], J = [[0,1],[-1,0]]: ±j with blocks [2] is unstable', () => {
    const eigs = [exactEig([0, 1], [1, 1], -1, [2], 'j'), exactEig([0, 1], [-1, 1], -1, [2], '-j')];
    const r = stabilityOf(eigs, 'continuous');
    expect(r.verdict).toBe('unstable');
    expect(r.reasons.join(' ')).toMatch(/Jordan block of size 2/);
  });

  it('discrete rotation [[0,-1],[1,0]] (z = ±j, |z|² = 1 exactly) is marginally stable', () => {
    const eigs = [exactEig([0, 1], [1, 1], -1, [1], 'j'), exactEig([0, 1], [-1, 1], -1, [1], '-j')];
    expect(stabilityOf(eigs, 'discrete').verdict).toBe('marginally-stable');
  });

  it('discrete Jordan block on z = 1 ([[1,1],[0,1]]) is unstable; I₂ discrete is marginally stable', () => {
    expect(stabilityOf([exactEig([1, 1], [0, 1], 1, [2], '1')], 'discrete').verdict).toBe('unstable');
    expect(stabilityOf([exactEig([1, 1], [0, 1], 1, [1, 1], '1')], 'discrete').verdict).toBe('marginally-stable');
  });

  it('real surds decided exactly: (1±√5)/2 (Knuth, TAOCP vol. 1, §1.2.8, from memory)', () => {
    const golden = exactEig([1, 2], [1, 2], 5, [1], '(1+√5)/2');
    const conjugate = exactEig([1, 2], [-1, 2], 5, [1], '(1-√5)/2');
    expect(stabilityOf([golden, conjugate], 'continuous').verdict).toBe('unstable');
    expect(stabilityOf([conjugate], 'continuous').verdict).toBe('asymptotically-stable');
    // |(1−√5)/2| ≈ 0.618 < 1, (1+√5)/2 ≈ 1.618 > 1, −(1+√5)/2 outside, (√5−1)/2 inside.
    expect(stabilityOf([conjugate], 'discrete').verdict).toBe('asymptotically-stable');
    expect(stabilityOf([golden], 'discrete').verdict).toBe('unstable');
    expect(stabilityOf([exactEig([-1, 2], [-1, 2], 5, [1], '-(1+√5)/2')], 'discrete').verdict).toBe('unstable');
  });

  it('a complex pair whose |z|² is 1 only approximately is decided exactly (0.6 ± 0.8j vs 0.6 ± 0.80001j)', () => {
    // 0.6² + 0.8² = 1 exactly (3-4-5 triangle); r√|d| = 0.8 with d = −1.
    const onCircle = exactEig([3, 5], [4, 5], -1, [1], '0.6+j0.8');
    expect(stabilityOf([onCircle], 'discrete').verdict).toBe('marginally-stable');
    const outside = exactEig([3, 5], [80001, 100000], -1, [1], '0.6+j0.80001');
    expect(stabilityOf([outside], 'discrete').verdict).toBe('unstable');
  });
});

describe('stability from the float spectrum', () => {
  it('[[0,1],[-1,0]] marginal, with a note that the decision is numerical', () => {
    const s = floatSpectrum([[0, 1], [-1, 0]]);
    const r = stabilityOf(s.eigenvalues, 'continuous', { normA: 1 });
    expect(r.verdict).toBe('marginally-stable');
    expect(r.reasons.join(' ')).toMatch(/floating point/);
  });

  it('4×4 [[J, I],[0, J]] unstable (Jordan block of 2 on ±j found numerically)', () => {
    const s = floatSpectrum([[0, 1, 1, 0], [-1, 0, 0, 1], [0, 0, 0, 1], [0, 0, -1, 0]]);
    expect(stabilityOf(s.eigenvalues, 'continuous').verdict).toBe('unstable');
  });

  it('discrete rotation by 0.3 rad marginal; [[1,1],[0,1]] unstable; I₂ marginal; ZOH of a stable plant stable', () => {
    const c = Math.cos(0.3);
    const sn = Math.sin(0.3);
    expect(stabilityOf(floatSpectrum([[c, -sn], [sn, c]]).eigenvalues, 'discrete').verdict).toBe('marginally-stable');
    expect(stabilityOf(floatSpectrum([[1, 1], [0, 1]]).eigenvalues, 'discrete').verdict).toBe('unstable');
    expect(stabilityOf(floatSpectrum([[1, 0], [0, 1]]).eigenvalues, 'discrete').verdict).toBe('marginally-stable');
    expect(stabilityOf(floatSpectrum(expmTimes([[0, 1], [-4, -2]], 0.1)).eigenvalues, 'discrete').verdict).toBe('asymptotically-stable');
  });

  it('slightly damped (Re = −1e-6) is asymptotically stable, slightly growing is unstable', () => {
    expect(stabilityOf(floatSpectrum([[-1e-6, 1], [-1, -1e-6]]).eigenvalues, 'continuous').verdict).toBe('asymptotically-stable');
    expect(stabilityOf(floatSpectrum([[1e-6, 1], [-1, 1e-6]]).eigenvalues, 'continuous').verdict).toBe('unstable');
  });

  it('no states is vacuously asymptotically stable', () => {
    expect(stabilityOf([], 'continuous').verdict).toBe('asymptotically-stable');
  });
});

describe('modes', () => {
  it('#21 s = −1 ± j√3: ω_n = 2, ζ = 0.5 (CHECKS #21, standard result); 2 % settling −ln(0.02)/σ (common practice)', () => {
    const s = floatSpectrum([[0, 1], [-4, -2]]);
    const modes = modesOf(s, 'continuous', null);
    expect(modes).toHaveLength(1);
    const m = modes[0];
    expect(m.behaviour).toBe('decaying-oscillation');
    expect(closeTo(m.naturalFrequency!, 2, 1e-14)).toBe(true);
    expect(closeTo(m.dampingRatio!, 0.5, 1e-14)).toBe(true);
    expect(closeTo(m.timeConstant!, 1, 1e-14)).toBe(true);
    expect(closeTo(m.period!, (2 * Math.PI) / Math.sqrt(3), 1e-14)).toBe(true);
    expect(closeTo(m.settlingTime2pct!, 3.912023005428146, 1e-14)).toBe(true);
    expect(m.doublingTime).toBeNull();
  });

  it('#22 ZOH at T = 0.1: z = 0.89129875425536483 ± 0.15594000045150901j gives back ω_n = 2, ζ = 0.5 (Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., ch. 4, from memory)', () => {
    const s = floatSpectrum(expmTimes([[0, 1], [-4, -2]], 0.1));
    const upper = s.eigenvalues.find((e) => e.im > 0)!;
    expect(closeTo(upper.re, 0.89129875425536483, 1e-14)).toBe(true);
    expect(closeTo(upper.im, 0.15594000045150901, 1e-13)).toBe(true);
    const [m] = modesOf(s, 'discrete', 0.1);
    expect(closeTo(m.naturalFrequency!, 2, 1e-12)).toBe(true);
    expect(closeTo(m.dampingRatio!, 0.5, 1e-12)).toBe(true);
    expect(closeTo(m.perStep!.radius, 0.90483741803595957, 1e-14)).toBe(true);
  });

  it('real poles: ζ = +1 stable, −1 unstable, doubling time ln2/σ (convention stated in modes.ts)', () => {
    const modes = modesOf(floatSpectrum([[2, 0], [0, -3]]), 'continuous', null);
    const growing = modes.find((m) => m.s!.re > 0)!;
    const decaying = modes.find((m) => m.s!.re < 0)!;
    expect(growing.dampingRatio).toBe(-1);
    expect(growing.behaviour).toBe('grows');
    expect(closeTo(growing.doublingTime!, Math.LN2 / 2)).toBe(true);
    expect(decaying.dampingRatio).toBe(1);
    expect(closeTo(decaying.timeConstant!, 1 / 3)).toBe(true);
  });

  it('double integrator: polynomial growth, no damping ratio', () => {
    const [m] = modesOf(floatSpectrum([[0, 1], [0, 0]]), 'continuous', null);
    expect(m.behaviour).toBe('polynomial-growth');
    expect(m.dampingRatio).toBeNull();
    expect(m.timeConstant).toBeNull();
  });

  it('discrete: deadbeat z = 0 with a block of 2; negative real z alternates (Im s = π/T); per-step numbers without a period', () => {
    const [dead] = modesOf(floatSpectrum([[0, 1], [0, 0]]), 'discrete', 0.5);
    expect(dead.behaviour).toBe('deadbeat');
    expect(dead.perStep!.samplesTo2pct).toBe(2);
    const [alt] = modesOf(floatSpectrum([[-0.5]]), 'discrete', 0.1);
    expect(closeTo(alt.s!.im, Math.PI / 0.1)).toBe(true);
    expect(closeTo(alt.s!.re, Math.log(0.5) / 0.1)).toBe(true);
    expect(alt.notes!.join(' ')).toMatch(/sign/);
    const [noPeriod] = modesOf(floatSpectrum([[0.5]]), 'discrete', null);
    expect(noPeriod.s).toBeNull();
    expect(closeTo(noPeriod.perStep!.samplesTo2pct!, Math.log(0.02) / Math.log(0.5))).toBe(true);
    expect(() => modesOf(floatSpectrum([[0.5]]), 'discrete', -1)).toThrow(/period/);
  });
});
