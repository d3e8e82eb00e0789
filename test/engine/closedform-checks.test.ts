/**
 * Closed-form transition matrices against published closed forms (CHECKS.md #1–#12), through
 * the real pipeline exactSpectrum → transitionClosedForm, plus the numeric path and bad
 * input. Expected values are computed in each test from the source's formula with Math.exp,
 * Math.cos etc., never from our own code.
 *
 * Tolerance: relativeError (tolerance.ts, Frobenius-norm-relative) ≤ DEFAULT_REL ≈ 1.4e-14,
 * the "exact, compare to ~1e-14 relative" rule of CHECKS.md; the printed values of the
 * sources have 17 significant digits except where noted.
 */
import { describe, expect, it } from 'vitest';
import { Rational, Q } from '../../server/src/engine/rational';
import { exactSpectrum } from '../../server/src/engine/spectrumExact';
import { exactPower, multiprecisionExpm, transitionClosedForm } from '../../server/src/engine/closedForm';
import { evaluateTransition } from '../../server/src/engine/transitionEval';
import { DEFAULT_REL, relativeError } from '../../server/src/engine/tolerance';
import type { Spectrum, TransitionClosedForm, TransitionTerm } from '../../server/src/engine/types';

const ints = (rows: number[][]): Rational[][] => rows.map((r) => r.map((x) => Rational.fromInt(x)));

function closed(A: Rational[][], domain: 'continuous' | 'discrete' = 'continuous'): TransitionClosedForm {
  return transitionClosedForm(A, exactSpectrum(A), domain);
}

/** A term as "exact|power|rate|freq|wave" (continuous) or "exact|power|radius|wave" / "exact@j". */
function describeTerm(t: TransitionTerm): string {
  if ('rate' in t) return `${t.exact}|${t.power}|${t.rateExact}|${t.freqExact ?? '0'}|${t.wave}`;
  if ('at' in t) return `${t.exact}@${t.at}`;
  return `${t.exact}|${t.power}|${t.radiusExact}|${t.angle === 0 ? '+' : t.angle === Math.PI ? '-' : t.angle.toFixed(6)}|${t.wave}`;
}

function entryTerms(cf: TransitionClosedForm, r: number, c: number): string[] {
  return cf.entries[r][c].map(describeTerm).sort();
}

/** c·t^p·e^{rate·t} as a description (continuous, real rate). */
const e = (coef: string, power: number, rate: string, freq = '0', wave: 'cos' | 'sin' = 'cos'): string =>
  `${coef}|${power}|${rate}|${freq}|${wave}`;

function expectEntries(cf: TransitionClosedForm, expected: string[][][]): void {
  expected.forEach((row, r) => row.forEach((terms, c) => expect(entryTerms(cf, r, c), `entry (${r + 1},${c + 1})`).toEqual([...terms].sort())));
}

describe('CHECKS.md closed forms of e^{At} (exact path)', () => {
  it('#1 two real modes −1, −17 (Moler & Van Loan, "Nineteen Dubious Ways…", SIAM Review 20(4), 1978, Taylor-series section, from memory; SciPy test_burkardt_4)', () => {
    const cf = closed(ints([[-49, 24], [-64, 31]]));
    expect(cf.exactCoefficients).toBe(true);
    expectEntries(cf, [
      [[e('-2', 0, '-1'), e('3', 0, '-17')], [e('3/2', 0, '-1'), e('-3/2', 0, '-17')]],
      [[e('-4', 0, '-1'), e('4', 0, '-17')], [e('3', 0, '-1'), e('-2', 0, '-17')]],
    ]);
    const at1 = [[-0.73575875814475308, 0.5518190996580977], [-1.4715175990882605, 1.1036382407155726]];
    expect(relativeError(evaluateTransition(cf, 1), at1)).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
  });

  it('#2 companion form with modes −1, −39 (SciPy expm tests, test_burkardt_3, attributed to Laub)', () => {
    const cf = closed(ints([[0, 1], [-39, -40]]));
    expectEntries(cf, [
      [[e('39/38', 0, '-1'), e('-1/38', 0, '-39')], [e('1/38', 0, '-1'), e('-1/38', 0, '-39')]],
      [[e('-39/38', 0, '-1'), e('39/38', 0, '-39')], [e('-1/38', 0, '-1'), e('39/38', 0, '-39')]],
    ]);
    const at1 = [[0.37756047909700659, 0.0096810379255642713], [-0.37756047909700658, -0.0096810379255642598]];
    // Entry (2,2) loses digits to cancellation in float64; the norm-relative error does not.
    expect(relativeError(evaluateTransition(cf, 1), at1)).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
  });

  it('#3 rotation with decay e^{σt}[[cos ωt, sin ωt], [−sin ωt, cos ωt]] (standard identity)', () => {
    const cf = closed(ints([[-1, 2], [-2, -1]]));
    expectEntries(cf, [
      [[e('1', 0, '-1', '2', 'cos')], [e('1', 0, '-1', '2', 'sin')]],
      [[e('-1', 0, '-1', '2', 'sin')], [e('1', 0, '-1', '2', 'cos')]],
    ]);
    const at = [[0.32770991402245983, 0.51037795154457281], [-0.51037795154457281, 0.32770991402245983]];
    expect(relativeError(evaluateTransition(cf, 0.5), at)).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#3 with an irrational frequency: [[0, 1], [−4, −2]] has s = −1 ± j√3 (CHECKS.md #21 pole, standard identity)', () => {
    // e^{At} = e^{−t}[[cos √3t + sin √3t/√3, sin √3t/√3], [−4 sin √3t/√3, cos √3t − sin √3t/√3]].
    const cf = closed(ints([[0, 1], [-4, -2]]));
    expectEntries(cf, [
      [[e('1', 0, '-1', '√3', 'cos'), e('√3/3', 0, '-1', '√3', 'sin')], [e('√3/3', 0, '-1', '√3', 'sin')]],
      [[e('-4√3/3', 0, '-1', '√3', 'sin')], [e('1', 0, '-1', '√3', 'cos'), e('-√3/3', 0, '-1', '√3', 'sin')]],
    ]);
    const t = 0.7;
    const w = Math.sqrt(3);
    const k = Math.exp(-t);
    const ref = [
      [k * (Math.cos(w * t) + Math.sin(w * t) / w), (k * Math.sin(w * t)) / w],
      [(-4 * k * Math.sin(w * t)) / w, k * (Math.cos(w * t) - Math.sin(w * t) / w)],
    ];
    expect(relativeError(evaluateTransition(cf, t), ref)).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#4 defective 3×3 with a 4t·e^{16t} term (SciPy expm tests, test_burkardt_8)', () => {
    const cf = closed(ints([[21, 17, 6], [-5, -1, -6], [4, 4, 16]]));
    expectEntries(cf, [
      [[e('5/4', 0, '16'), e('2', 1, '16'), e('-1/4', 0, '4')], [e('5/4', 0, '16'), e('2', 1, '16'), e('-5/4', 0, '4')], [e('1/2', 0, '16'), e('-1/2', 0, '4')]],
      [[e('1/4', 0, '4'), e('-1/4', 0, '16'), e('-2', 1, '16')], [e('5/4', 0, '4'), e('-1/4', 0, '16'), e('-2', 1, '16')], [e('1/2', 0, '4'), e('-1/2', 0, '16')]],
      [[e('4', 1, '16')], [e('4', 1, '16')], [e('1', 0, '16')]],
    ]);
    for (const t of [0.25, 1]) {
      const a = Math.exp(4 * t);
      const b = Math.exp(16 * t);
      const ref = [
        [((5 + 8 * t) * b - a) / 4, ((5 + 8 * t) * b - 5 * a) / 4, (b - a) / 2],
        [(a - (1 + 8 * t) * b) / 4, (5 * a - (1 + 8 * t) * b) / 4, (a - b) / 2],
        [4 * t * b, 4 * t * b, b],
      ];
      expect(relativeError(evaluateTransition(cf, t), ref)).toBeLessThanOrEqual(DEFAULT_REL);
    }
    expect(cf.check.passed).toBe(true);
  });

  it('#5 defective non-derogatory 3×3 (Ward, SIAM J. Numer. Anal. 14(4), 1977, example 1, from memory; SciPy test_burkardt_10)', () => {
    const cf = closed(ints([[4, 2, 0], [1, 4, 1], [1, 1, 4]]));
    expectEntries(cf, [
      [[e('1/3', 0, '6'), e('2/3', 0, '3')], [e('4/9', 0, '6'), e('2/3', 1, '3'), e('-4/9', 0, '3')], [e('2/9', 0, '6'), e('-2/3', 1, '3'), e('-2/9', 0, '3')]],
      [[e('1/3', 0, '6'), e('-1/3', 0, '3')], [e('4/9', 0, '6'), e('5/9', 0, '3'), e('-1/3', 1, '3')], [e('2/9', 0, '6'), e('1/3', 1, '3'), e('-2/9', 0, '3')]],
      [[e('1/3', 0, '6'), e('-1/3', 0, '3')], [e('4/9', 0, '6'), e('-1/3', 1, '3'), e('-4/9', 0, '3')], [e('2/9', 0, '6'), e('1/3', 1, '3'), e('7/9', 0, '3')]],
    ]);
    const row1 = evaluateTransition(cf, 1)[0];
    expect(relativeError([row1], [[147.86662244637015, 183.76513864636843, 71.797032399996545]])).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#6 critically damped pair e^{−ωt}[[1+ωt, t], [−ω²t, 1−ωt]], ω = 2 (standard result)', () => {
    const cf = closed(ints([[0, 1], [-4, -4]]));
    expectEntries(cf, [
      [[e('1', 0, '-2'), e('2', 1, '-2')], [e('1', 1, '-2')]],
      [[e('-4', 1, '-2')], [e('1', 0, '-2'), e('-2', 1, '-2')]],
    ]);
    const at = [[0.73575888234288464, 0.18393972058572116], [-0.73575888234288464, 0]];
    expect(relativeError(evaluateTransition(cf, 0.5), at)).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#7 nilpotent 4×4: polynomial entries 6t, 18t², 36t³ (Moler & Van Loan 1978, from memory; SciPy test_burkardt_5)', () => {
    const A = ints([[0, 6, 0, 0], [0, 0, 6, 0], [0, 0, 0, 6], [0, 0, 0, 0]]);
    const cf = closed(A);
    expect(entryTerms(cf, 0, 0)).toEqual([e('1', 0, '0')]);
    expect(entryTerms(cf, 0, 1)).toEqual([e('6', 1, '0')]);
    expect(entryTerms(cf, 0, 2)).toEqual([e('18', 2, '0')]);
    expect(entryTerms(cf, 0, 3)).toEqual([e('36', 3, '0')]);
    expect(entryTerms(cf, 3, 0)).toEqual([]);
    const t = 1.5;
    const ref = [[1, 6 * t, 18 * t ** 2, 36 * t ** 3], [0, 1, 6 * t, 18 * t ** 2], [0, 0, 1, 6 * t], [0, 0, 0, 1]];
    expect(relativeError(evaluateTransition(cf, t), ref)).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#8 repeated but not defective: e^{It} = e^t·I with no t·e^t term (a closed-form trap)', () => {
    const cf = closed(ints([[1, 0], [0, 1]]));
    expect(entryTerms(cf, 0, 0)).toEqual([e('1', 0, '1')]);
    expect(entryTerms(cf, 0, 1)).toEqual([]);
    expect(entryTerms(cf, 1, 1)).toEqual([e('1', 0, '1')]);
  });

  it('#9 near-defective [[1+ε, 1], [0, 1−ε]], ε = 2⁻⁵², is detected, never shown as a passed check (Moler & Van Loan 1978, from memory; SciPy test_burkardt_7)', () => {
    const eps = Q(1n, 2n ** 52n);
    const A = [[Q(1).add(eps), Q(1)], [Q(0), Q(1).sub(eps)]];
    const cf = closed(A);
    // The exact coefficients are ±1/(2ε) = ±2^51: correct, but useless in doubles.
    expect(entryTerms(cf, 0, 1)).toEqual(
      [`${2n ** 51n}|0|${Q(1).add(eps)}|0|cos`, `-${2n ** 51n}|0|${Q(1).sub(eps)}|0|cos`].sort(),
    );
    expect(cf.check.passed).toBe(false);
    expect(cf.conditioning).toBeGreaterThan(2 ** 50);
    expect(cf.check.residual).toBeGreaterThan(1e-6);
  });

  it('#10 overscaling case [[1, b], [0, −1]], b = 1e8: entry (1,2) = b·sinh 1 (Al-Mohy & Higham, SIAM J. Matrix Anal. Appl. 31(3), 2009, §1, from memory)', () => {
    const cf = closed(ints([[1, 1e8], [0, -1]]));
    expect(entryTerms(cf, 0, 1)).toEqual([e('50000000', 0, '1'), e('-50000000', 0, '-1')].sort());
    const at1 = [[Math.E, 117520119.36438015], [0, 1 / Math.E]];
    expect(relativeError(evaluateTransition(cf, 1), at1)).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
  });
});

describe('CHECKS.md closed forms of A^k (exact path)', () => {
  /** c·k^p·r^k with the radius text and sign of the real eigenvalue. */
  const d = (coef: string, power: number, radius: string, sign: '+' | '-' = '+'): string => `${coef}|${power}|${radius}|${sign}|cos`;

  it('#11 [[λ, 1], [0, λ]]^k = [[λ^k, kλ^{k−1}], [0, λ^k]], λ = 1/2 (standard identity)', () => {
    const cf = closed([[Q(1, 2), Q(1)], [Q(0), Q(1, 2)]], 'discrete');
    expect(cf.variable).toBe('k');
    expect(entryTerms(cf, 0, 0)).toEqual([d('1', 0, '1/2')]);
    // kλ^{k−1} = 2k·λ^k.
    expect(entryTerms(cf, 0, 1)).toEqual([d('2', 1, '1/2')]);
    expect(entryTerms(cf, 1, 0)).toEqual([]);
    expect(relativeError(evaluateTransition(cf, 5), [[0.03125, 0.3125], [0, 0.03125]])).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#11 3×3 Jordan block, λ = 9/10, k = 10: corner C(k,2)λ^{k−2} = (50/81)(k² − k)λ^k (standard identity)', () => {
    const l = Q(9, 10);
    const cf = closed([[l, Q(1), Q(0)], [Q(0), l, Q(1)], [Q(0), Q(0), l]], 'discrete');
    expect(entryTerms(cf, 0, 1)).toEqual([d('10/9', 1, '9/10')]);
    expect(entryTerms(cf, 0, 2)).toEqual([d('50/81', 2, '9/10'), d('-50/81', 1, '9/10')].sort());
    const P = evaluateTransition(cf, 10);
    expect(relativeError([[P[0][0], P[0][1], P[0][2]]], [[0.3486784401, 3.87420489, 19.37102445]])).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('#12 [[1, 1], [1, 0]]^k = [[F_{k+1}, F_k], [F_k, F_{k−1}]] with Binet coefficients (Knuth, TAOCP vol. 1, §1.2.8, from memory)', () => {
    const cf = closed(ints([[1, 1], [1, 0]]), 'discrete');
    // F_k = (φ^k − ψ^k)/√5, φ = (1+√5)/2, ψ = (1−√5)/2 < 0 (radius −1/2 + √5/2, angle π).
    expect(entryTerms(cf, 0, 1)).toEqual([d('√5/5', 0, '1/2 + √5/2'), d('-√5/5', 0, '-1/2 + √5/2', '-')].sort());
    // F_{k+1} = (φ/√5)φ^k − (ψ/√5)ψ^k = (1/2 + √5/10)φ^k + (1/2 − √5/10)ψ^k.
    expect(entryTerms(cf, 0, 0)).toEqual([d('1/2 + √5/10', 0, '1/2 + √5/2'), d('1/2 - √5/10', 0, '-1/2 + √5/2', '-')].sort());
    const P = evaluateTransition(cf, 10);
    expect(relativeError(P, [[89, 55], [55, 34]])).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
  });

  it('nilpotent powers appear only at k = j: N^2 and N^3 of the #7 matrix have 36 and 216 (standard identity)', () => {
    const cf = closed(ints([[0, 6, 0, 0], [0, 0, 6, 0], [0, 0, 0, 6], [0, 0, 0, 0]]), 'discrete');
    expect(entryTerms(cf, 0, 0)).toEqual(['1@0']);
    expect(entryTerms(cf, 0, 2)).toEqual(['36@2']);
    expect(entryTerms(cf, 0, 3)).toEqual(['216@3']);
    expect(evaluateTransition(cf, 4).flat().every((x) => x === 0)).toBe(true);
  });

  it('a rotation by π/2 gives cos/sin terms with angle π/2 (standard identity)', () => {
    const cf = closed(ints([[0, 1], [-1, 0]]), 'discrete');
    const t = cf.entries[0][1];
    expect(t.length).toBe(1);
    expect('angle' in t[0] && Math.abs(t[0].angle - Math.PI / 2) <= DEFAULT_REL).toBe(true);
    expect(relativeError(evaluateTransition(cf, 3), [[0, -1], [1, 0]])).toBeLessThanOrEqual(DEFAULT_REL);
  });
});

describe('mixed exact/numeric and the numeric path', () => {
  it('a degree-3 factor runs numerically while the rational root keeps its exact text', () => {
    // x³ − x − 1 (companion block, irreducible over Q by the rational root test) ⊕ [−2].
    const A = ints([[0, 1, 0, 0], [0, 0, 1, 0], [1, 1, 0, 0], [0, 0, 0, -2]]);
    const cf = closed(A);
    expect(cf.exactCoefficients).toBe(false);
    expect(entryTerms(cf, 3, 3)).toEqual([e('1', 0, '-2')]);
    expect(cf.entries[0][0].every((t) => t.exact === undefined)).toBe(true);
    expect(cf.check.passed).toBe(true);
    expect(cf.check.residual).toBeLessThanOrEqual(1e-12);
  });

  function floatSpectrum(n: number, eigs: { re: number; im: number; algebraic: number }[]): Spectrum {
    return {
      n,
      exact: false,
      charPoly: { coeffs: [], exactCoeffs: null },
      minimalPoly: null,
      factors: null,
      eigenvalues: eigs.map((x) => ({ ...x, exact: null, text: '', geometric: 1, blocks: [x.algebraic] })),
      defective: false,
      clusterTolerance: 1e-8,
      nearRepeated: [],
      notes: [],
    };
  }

  it('#1 in floating point with a float spectrum matches the source values (Moler & Van Loan 1978, from memory)', () => {
    const cf = transitionClosedForm([[-49, 24], [-64, 31]], floatSpectrum(2, [{ re: -1, im: 0, algebraic: 1 }, { re: -17, im: 0, algebraic: 1 }]), 'continuous');
    expect(cf.exactCoefficients).toBe(false);
    const at1 = [[-0.73575875814475308, 0.5518190996580977], [-1.4715175990882605, 1.1036382407155726]];
    expect(relativeError(evaluateTransition(cf, 1), at1)).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
  });

  it('#4 in floating point with the algebraic multiplicity as exponent (SciPy test_burkardt_8)', () => {
    const spec = floatSpectrum(3, [{ re: 16, im: 0, algebraic: 2 }, { re: 4, im: 0, algebraic: 1 }]);
    const cf = transitionClosedForm([[21, 17, 6], [-5, -1, -6], [4, 4, 16]], spec, 'continuous');
    const t = 0.25;
    const a = Math.exp(4 * t);
    const b = Math.exp(16 * t);
    const ref = [
      [((5 + 8 * t) * b - a) / 4, ((5 + 8 * t) * b - 5 * a) / 4, (b - a) / 2],
      [(a - (1 + 8 * t) * b) / 4, (5 * a - (1 + 8 * t) * b) / 4, (a - b) / 2],
      [4 * t * b, 4 * t * b, b],
    ];
    expect(relativeError(evaluateTransition(cf, t), ref)).toBeLessThanOrEqual(DEFAULT_REL);
    const corner = cf.entries[2][0];
    expect(corner.length).toBe(1);
    expect('power' in corner[0] && corner[0].power === 1 && Math.abs(corner[0].coef - 4) <= 1e-13).toBe(true);
  });

  it('#3 in floating point as a complex pair, discrete rotation with decay (standard identity)', () => {
    const spec = floatSpectrum(2, [{ re: -1, im: 2, algebraic: 1 }, { re: -1, im: -2, algebraic: 1 }]);
    const cf = transitionClosedForm([[-1, 2], [-2, -1]], spec, 'continuous');
    const at = [[0.32770991402245983, 0.51037795154457281], [-0.51037795154457281, 0.32770991402245983]];
    expect(relativeError(evaluateTransition(cf, 0.5), at)).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.entries[0][0].map((t) => ('wave' in t ? t.wave : 'at'))).toEqual(['cos']);
  });
});

describe('check against a multiprecision reference', () => {
  // A strongly non-normal integer matrix (similar to a Jordan block of −1 ⊕ the pair −2 ± 3j),
  // entries ~10³. Reference: mpmath `expm` at 40 digits (general-purpose reference library).
  const A4 = [[-872, -855, -1137, -1709], [361, 355, 471, 714], [523, 513, 682, 1027], [-85, -84, -111, -171]];
  const mpmathAt1 = [
    [-2.9816594299562636, 2.5365321876153712, -7.1762948095912023, -5.4876652197918721],
    [6.226416144337913, 4.7548983796521437, 9.1108191884897826, 13.420628267894725],
    [-2.6878731090364583, -6.3666675207508816, -1.3926055609094396, -6.4322178799798932],
    [0.060613483657272194, 0.42849292482871452, -0.14533646631013009, 0.087163663697358869],
  ];

  it('the fixed-point exponential agrees with mpmath to double precision', () => {
    expect(relativeError(multiprecisionExpm(ints(A4), 1), mpmathAt1)).toBeLessThanOrEqual(DEFAULT_REL);
  });

  it('the exact closed form of a non-normal matrix agrees with mpmath and its check passes', () => {
    const cf = closed(ints(A4));
    expect(cf.exactCoefficients).toBe(true);
    expect(relativeError(evaluateTransition(cf, 1), mpmathAt1)).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
  });

  it('exact powers: [[1,1],[1,0]]^30 = [[F31, F30], [F30, F29]] (Knuth, TAOCP vol. 1, §1.2.8, from memory)', () => {
    expect(exactPower(ints([[1, 1], [1, 0]]), 30)).toEqual([[1346269, 832040], [832040, 514229]]);
    expect(exactPower([[Q(1, 2)]], 3)).toEqual([[0.125]]);
  });

  it('#9 still fails against the multiprecision reference: the double evaluation is what is wrong (Moler & Van Loan 1978, from memory)', () => {
    const eps = Q(1n, 2n ** 52n);
    const cf = closed([[Q(1).add(eps), Q(1)], [Q(0), Q(1).sub(eps)]]);
    expect(cf.check.reference).toBe('multiprecision');
    expect(cf.check.passed).toBe(false);
  });
});

describe('degenerate and extreme input', () => {
  it('the zero matrix: e^{0t} = I and 0^k is I only at k = 0 (standard identity)', () => {
    const Z = ints([[0, 0, 0], [0, 0, 0], [0, 0, 0]]);
    const cont = closed(Z);
    expect(entryTerms(cont, 1, 1)).toEqual([e('1', 0, '0')]);
    expect(entryTerms(cont, 0, 1)).toEqual([]);
    const disc = closed(Z, 'discrete');
    expect(entryTerms(disc, 2, 2)).toEqual(['1@0']);
    expect(evaluateTransition(disc, 1).flat().every((x) => x === 0)).toBe(true);
  });

  it('entries of 1e200 stay exact and finite: [[λ, 1], [0, −λ]] gives sinh(λt)/λ in entry (1,2) (standard identity)', () => {
    const big = Rational.fromNumber(1e200);
    const A = [[big, Q(1)], [Q(0), big.neg()]];
    const root = (v: Rational) => ({ re: v.toNumber(), im: 0, exact: { p: v, r: Q(0), d: Q(1) }, text: v.toString() });
    const factor = (v: Rational) => ({ coeffs: [v.neg(), Q(1)], degree: 1, algebraic: 1, index: 1, blocks: [1], geometric: 1, roots: [root(v)] });
    // Hand-built exact spectrum (the spectrum code is not what is tested here).
    const spectrum: Spectrum = {
      n: 2, exact: true, charPoly: { coeffs: [], exactCoeffs: null }, minimalPoly: null,
      factors: [factor(big), factor(big.neg())],
      eigenvalues: [big, big.neg()].map((v) => ({ ...root(v), algebraic: 1, geometric: 1, blocks: [1] })),
      defective: false, clusterTolerance: null, nearRepeated: [], notes: [],
    };
    const cf = transitionClosedForm(A, spectrum, 'continuous');
    expect(cf.exactCoefficients).toBe(true);
    const t = 1e-200; // λt = 1 up to the rounding of 1e200: e^{At} = [[e, sinh(1)/λ], [0, 1/e]].
    const value = evaluateTransition(cf, t);
    expect(relativeError([[value[0][1] * 1e200]], [[Math.sinh(1)]])).toBeLessThanOrEqual(DEFAULT_REL);
    expect(cf.check.passed).toBe(true);
  });
});

describe('bad input gets a clear error', () => {
  const spec = exactSpectrum(ints([[1, 0], [0, 2]]));
  it('rejects non-square, oversized and mismatched input with a RangeError that says why', () => {
    expect(() => transitionClosedForm([[1, 2, 3], [4, 5, 6]], spec, 'continuous')).toThrow(/square/);
    expect(() => transitionClosedForm(ints([[1, 0], [0, 2]]), spec, 'continuous', { maxN: 1 })).toThrow(/cap/);
    expect(() => transitionClosedForm(ints([[1]]), spec, 'continuous')).toThrow(/spectrum/);
    expect(() => transitionClosedForm([[NaN, 0], [0, 1]], spec, 'continuous')).toThrow(/finite/);
  });
  it('an empty matrix gives an empty closed form', () => {
    const cf = transitionClosedForm([], { ...spec, n: 0, eigenvalues: [], factors: [] }, 'discrete');
    expect(cf.entries).toEqual([]);
  });
});
