/**
 * Controllability/observability (controllability.ts) and sample-period advice (samplePeriod.ts).
 * Sources beside each check.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { fromIntsQ, inverseQ, mulQ } from '../../server/src/engine/matrixQ';
import {
  controllability, observability, pathologicalAt, pathologicalPeriods, type ReachabilityResult, type ControllabilityResult,
} from '../../server/src/engine/controllability';
import { samplePeriodAdvice, periodUpperBounds } from '../../server/src/engine/samplePeriod';
import { discretize } from '../../server/src/engine/discretize';
import { closeTo } from '../../server/src/engine/tolerance';

function ok(r: ControllabilityResult): ReachabilityResult {
  if (!r.ok) throw new Error(r.error);
  return r;
}

describe('Kalman rank test, exact (CHECKS #20)', () => {
  const A = fromIntsQ([[0, 1], [0, 0]]);
  it('double integrator: B = [0;1] controllable, B = [1;0] not; C = [1 0] observable, C = [0 1] not (Kalman, Ho & Narendra 1963, from memory)', () => {
    expect(ok(controllability(A, fromIntsQ([[0], [1]])))).toMatchObject({ rank: 2, controllable: true, exact: true, uncontrollableEigenvalues: [] });
    const c = ok(controllability(A, fromIntsQ([[1], [0]])));
    expect(c.rank).toBe(1);
    expect(c.controllable).toBe(false);
    expect(c.uncontrollableEigenvalues).toEqual([{ text: '0', re: 0, im: 0, multiplicity: 1 }]);
    expect(ok(observability(A, fromIntsQ([[1, 0]])))).toMatchObject({ rank: 2, controllable: true });
    const o = ok(observability(A, fromIntsQ([[0, 1]])));
    expect(o.rank).toBe(1);
    expect(o.uncontrollableEigenvalues.map((e) => e.text)).toEqual(['0']);
  });
  it('the same verdicts on float input by the staircase reduction', () => {
    expect(ok(controllability([[0, 1], [0, 0]], [[0], [1]])).controllable).toBe(true);
    const c = ok(controllability([[0, 1], [0, 0]], [[1], [0]]));
    expect(c).toMatchObject({ rank: 1, controllable: false, exact: false });
    expect(Math.abs(c.uncontrollableEigenvalues[0].re)).toBeLessThan(1e-12);
  });
  it('PBH per mode: diag(−1, −2, −2) with B = [1;1;0] leaves one copy of −2 uncontrollable (PBH test: rank[λI − A, B] < n; Hautus 1969, from memory)', () => {
    const A = fromIntsQ([[-1, 0, 0], [0, -2, 0], [0, 0, -2]]);
    const c = ok(controllability(A, fromIntsQ([[1], [1], [0]])));
    expect(c.rank).toBe(2);
    expect(c.uncontrollableEigenvalues).toEqual([{ text: '-2', re: -2, im: 0, multiplicity: 1 }]);
    // Two equal eigenvalues with one input can never both be controllable (a single input
    // controls at most one Jordan block per eigenvalue; standard result, from memory).
    const c2 = ok(controllability(A, fromIntsQ([[1], [1], [1]])));
    expect(c2.rank).toBe(2);
    expect(c2.uncontrollableEigenvalues.map((e) => e.text)).toEqual(['-2']);
  });
  it('uncontrollable complex pair and surds come out exact', () => {
    // Block diag: controllable lag −1, uncontrollable oscillator s² + 2s + 5 (−1 ± 2j) and surd pair s² − 2 (±√2).
    const A = fromIntsQ([
      [-1, 0, 0, 0, 0],
      [0, 0, 1, 0, 0],
      [0, -5, -2, 0, 0],
      [0, 0, 0, 0, 1],
      [0, 0, 0, 2, 0],
    ]);
    const c = ok(controllability(A, fromIntsQ([[1], [0], [0], [0], [0]])));
    expect(c.rank).toBe(1);
    const texts = c.uncontrollableEigenvalues.map((e) => e.text).sort();
    expect(texts).toEqual(['-1+j2', '-1-j2', '-√2', '√2'].sort());
    const fl = ok(controllability(A.map((r) => r.map((x) => x.toNumber())), [[1], [0], [0], [0], [0]]));
    expect(fl.rank).toBe(1);
    expect(fl.uncontrollableEigenvalues.length).toBe(4);
  });
  it('property: rank and uncontrollable eigenvalues are invariant under similarity with a unimodular integer S (x = Sz gives (S⁻¹AS, S⁻¹B); standard result)', () => {
    const small = fc.integer({ min: -3, max: 3 });
    fc.assert(
      fc.property(
        fc.array(small, { minLength: 9, maxLength: 9 }),
        fc.array(small, { minLength: 3, maxLength: 3 }),
        fc.array(small, { minLength: 3, maxLength: 3 }),
        fc.boolean(),
        (xs, b, l, makeUncontrollable) => {
          let A = [xs.slice(0, 3), xs.slice(3, 6), xs.slice(6, 9)];
          let B = b.map((x) => [x]);
          if (makeUncontrollable) {
            // Decoupled third state with no input: guaranteed uncontrollable.
            A = [[A[0][0], A[0][1], A[0][2]], [A[1][0], A[1][1], A[1][2]], [0, 0, A[2][2]]];
            B = [[b[0]], [b[1]], [0]];
          }
          // Unit upper/lower triangular product: det S = 1.
          const U = fromIntsQ([[1, l[0], l[1]], [0, 1, l[2]], [0, 0, 1]]);
          const L = fromIntsQ([[1, 0, 0], [l[2], 1, 0], [l[0], l[1], 1]]);
          const S = mulQ(U, L);
          const Sinv = inverseQ(S)!;
          const Aq = fromIntsQ(A);
          const Bq = fromIntsQ(B);
          const r1 = ok(controllability(Aq, Bq));
          const r2 = ok(controllability(mulQ(Sinv, mulQ(Aq, S)), mulQ(Sinv, Bq)));
          expect(r2.rank).toBe(r1.rank);
          expect(r2.uncontrollableEigenvalues.map((e) => [e.text, e.multiplicity])).toEqual(r1.uncontrollableEigenvalues.map((e) => [e.text, e.multiplicity]));
          if (makeUncontrollable) expect(r1.controllable).toBe(false);
          // The float path agrees on the rank for these small integer cases.
          const f = ok(controllability(A, B));
          expect(f.rank).toBe(r1.rank);
        },
      ),
      { seed: 2020, numRuns: 150 },
    );
  });
  it('bad shapes are errors', () => {
    expect(controllability([[1, 2]], [[1]]).ok).toBe(false);
    expect(controllability([[1]], [[1], [2]]).ok).toBe(false);
    expect(observability([[1, 0], [0, 1]], [[1]]).ok).toBe(false);
  });
});

describe('pathological sampling periods', () => {
  // Harmonic oscillator ±jω: ZOH at T = πm/ω makes both eigenvalues e^{±jωT} = ±1 equal
  // (Kalman, Ho & Narendra 1963, from memory; e.g. Åström & Wittenmark, Computer-Controlled Systems, ch. 2, from memory).
  it('oscillator ω = 2: periods π/2, π, 3π/2 …', () => {
    const p = pathologicalPeriods([{ re: 0, im: 2 }, { re: 0, im: -2 }], { maxPeriod: 5 });
    expect(p.map((x) => x.m)).toEqual([1, 2, 3]);
    p.forEach((x, i) => expect(closeTo(x.period, ((i + 1) * Math.PI) / 2)).toBe(true));
    expect(pathologicalAt([{ re: -1, im: 2 }], Math.PI / 2).length).toBe(1);
    expect(pathologicalAt([{ re: -1, im: 2 }], 1).length).toBe(0);
    // Different real parts never collide.
    expect(pathologicalPeriods([{ re: -1, im: 0 }, { re: -2, im: 0 }], { maxPeriod: 100 })).toEqual([]);
  });
  it('ZOH at a pathological period really loses controllability (exact rank drop of the discrete pair)', () => {
    const A = [[0, 2], [-2, 0]];
    const B = [[0], [1]];
    const good = discretize({ A, B }, 1, 'zoh');
    const bad = discretize({ A, B }, Math.PI / 2, 'zoh');
    if (!good.ok || !bad.ok) throw new Error('discretize failed');
    expect(ok(controllability(good.Ad, good.Bd!)).rank).toBe(2);
    // At T = π/2, Ad = −I and Bd ∝ [1; 0]: rank 1.
    expect(ok(controllability(bad.Ad, bad.Bd!)).rank).toBe(1);
  });
});

describe('sample-period advice (CHECKS #23–#25: test the arithmetic, not a verdict)', () => {
  it('#25 T ≤ τ_min/10 (common practice): λ = −10 gives τ = 0.1, so T = 0.02 warns and T = 0.005 does not', () => {
    const warn = samplePeriodAdvice([{ re: -10, im: 0 }], 0.02).findings.filter((f) => f.rule === 'time-constant');
    expect(warn.length).toBe(1);
    expect(closeTo(warn[0].value, 0.2)).toBe(true);
    expect(warn[0].threshold).toBe(0.1);
    expect(warn[0].source).toBe('common practice');
    expect(samplePeriodAdvice([{ re: -10, im: 0 }], 0.005).findings.filter((f) => f.rule === 'time-constant')).toEqual([]);
  });
  it('#25 aliasing |Im λ|·T ≥ π (common practice): ω = 10 at T = 0.4 turns 4 rad per sample', () => {
    const a = samplePeriodAdvice([{ re: -1, im: 10 }, { re: -1, im: -10 }], 0.4).findings.filter((f) => f.rule === 'aliasing');
    expect(a.length).toBe(1);
    expect(closeTo(a[0].value, 4)).toBe(true);
    expect(a[0].threshold).toBe(Math.PI);
    expect(a[0].severity).toBe('error');
  });
  it('#25 samples per oscillation period 2π/(ωT): ω = 10, T = 0.1 gives 2π ≈ 6.28 < 10 (common practice)', () => {
    const s = samplePeriodAdvice([{ re: -1, im: 10 }], 0.1).findings.find((f) => f.rule === 'samples-per-oscillation')!;
    expect(closeTo(s.value, 2 * Math.PI)).toBe(true);
    expect(s.threshold).toBe(10);
  });
  it('#23 samples per rise time 4–10 (Åström & Wittenmark, 3rd ed., from memory), t_r ≈ 1.8/ω_n: ω_n = 2 gives t_r = 0.9', () => {
    const f = samplePeriodAdvice([{ re: -1, im: Math.sqrt(3) }], 0.5).findings.find((x) => x.rule === 'samples-per-rise-time')!;
    expect(closeTo(f.value, 1.8)).toBe(true);
    expect(f.severity).toBe('warning');
    expect(f.source).toMatch(/Åström & Wittenmark/);
  });
  it('#24 sampling frequency vs 20× bandwidth, floor 2× (Franklin, Powell & Workman, 3rd ed., from memory)', () => {
    // ω_n = 2 rad/s, T = 0.5 ⇒ ω_s = 4π ≈ 12.57 rad/s = 6.28× ω_n.
    const f = samplePeriodAdvice([{ re: -1, im: Math.sqrt(3) }], 0.5).findings.find((x) => x.rule === 'bandwidth-ratio')!;
    expect(closeTo(f.value, 2 * Math.PI)).toBe(true);
    expect(f.threshold).toBe(20);
    const floor = samplePeriodAdvice([{ re: -2, im: 0 }], 2).findings.find((x) => x.rule === 'sampling-theorem')!;
    expect(closeTo(floor.value, Math.PI / 2)).toBe(true);
  });
  it('thresholds are parameters', () => {
    const f = samplePeriodAdvice([{ re: -10, im: 0 }], 0.02, { timeConstantDivisor: 4 }).findings.filter((x) => x.rule === 'time-constant');
    expect(f).toEqual([]);
  });
  it('recommended range respects every upper bound', () => {
    const spec = [{ re: -1, im: 10 }, { re: -0.5, im: 0 }];
    const adv = samplePeriodAdvice(spec, null);
    const b = periodUpperBounds(spec);
    expect(closeTo(b.oscillation, (2 * Math.PI) / 100)).toBe(true);
    expect(closeTo(b.bandwidth, (2 * Math.PI) / (Math.hypot(1, 10) * 20))).toBe(true);
    expect(adv.recommended!.max).toBeLessThanOrEqual(Math.min(b.timeConstant, b.oscillation, b.bandwidth, b.aliasing));
    expect(adv.recommended!.min).toBeGreaterThan(0);
    expect(adv.recommended!.min).toBeLessThanOrEqual(adv.recommended!.max);
    // A period inside the range draws no warnings of the upper-bound rules.
    const mid = (adv.recommended!.min + adv.recommended!.max) / 2;
    const rules = samplePeriodAdvice(spec, mid).findings.filter((f) => f.severity !== 'info').map((f) => f.rule);
    expect(rules.filter((r) => r !== 'samples-per-rise-time')).toEqual([]);
  });
  it('pathological period is flagged: oscillator ω = 2 at T = π/2', () => {
    const f = samplePeriodAdvice([{ re: 0, im: 2 }], Math.PI / 2).findings.filter((x) => x.rule === 'pathological-period');
    expect(f.length).toBe(1);
  });
  it('bad period → one error finding; zero spectrum → no range', () => {
    expect(samplePeriodAdvice([{ re: -1, im: 0 }], -1).findings[0].rule).toBe('invalid-period');
    expect(samplePeriodAdvice([{ re: -1, im: 0 }], Number.NaN).recommended).toBeNull();
    expect(samplePeriodAdvice([{ re: 0, im: 0 }], null).recommended).toBeNull();
  });
});

