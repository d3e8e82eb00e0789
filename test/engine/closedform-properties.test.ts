/**
 * Property tests of the closed forms (fast-check, seeded).
 *
 * Identities checked (Higham, Functions of Matrices, 2008, §1.2, from memory; Horn &
 * Johnson, Topics in Matrix Analysis, §6.1, from memory):
 * - the closed form of e^{At} equals an independent numeric exponential (Padé scaling and
 *   squaring, expm.ts) and that of A^k equals repeated float products;
 * - Φ(0) = I exactly, checked on the exact coefficient texts;
 * - a Jordan block of size s of λ produces t^{s−1}·e^{λt} (k^{s−1}·λ^k) and no higher power.
 * The numeric path is run on the same S·J·S⁻¹ matrices given as doubles.
 * Matrices: random small integer matrices, and S·J·S⁻¹ with unimodular integer S and J made
 * of Jordan blocks of rational eigenvalues and real Jordan blocks of complex pairs
 * [[a, b], [−b, a]] — the eigenvalues and block sizes are known by construction.
 *
 * Tolerance (common practice, Higham, Accuracy and Stability of Numerical Algorithms, 2nd
 * ed., ch. 3): evaluating a sum of terms in doubles errs by a few ulps of Σ|terms|, so each
 * entry may differ from the reference by 64·EPS·Σ|terms| plus the reference's own error,
 * bounded by 1e-12·max(1, ‖Φ‖_max) (scaling and squaring reaches ~1e-15 on such matrices;
 * the margin covers ‖A‖t up to ~10²).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { Rational, Q } from '../../server/src/engine/rational';
import { exactSpectrum } from '../../server/src/engine/spectrumExact';
import { floatSpectrum } from '../../server/src/engine/spectrumFloat';
import { transitionClosedForm } from '../../server/src/engine/closedForm';
import { evaluateTerm } from '../../server/src/engine/transitionEval';
import { expmTimes } from '../../server/src/engine/expm';
import { parseQuadText } from '../../server/src/engine/quadField';
import { EPS } from '../../server/src/engine/tolerance';
import type { TransitionClosedForm, TransitionTerm } from '../../server/src/engine/types';

const REFERENCE_REL = 1e-12;
const TERM_ULPS = 64;

function matMulQ(a: Rational[][], b: Rational[][]): Rational[][] {
  return a.map((row) => b[0].map((_, j) => row.reduce((acc, x, k) => acc.add(x.mul(b[k][j])), Rational.ZERO)));
}

function identityQ(n: number): Rational[][] {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? Rational.ONE : Rational.ZERO)));
}

function floatPower(A: number[][], k: number): number[][] {
  const n = A.length;
  let P: number[][] = A.map((_, i) => A.map((__, j) => (i === j ? 1 : 0)));
  for (let s = 0; s < k; s++) P = P.map((row) => A[0].map((_, j) => row.reduce((acc, x, l) => acc + x * A[l][j], 0)));
  return n === 0 ? [] : P;
}

/** Failure text, or null when every entry agrees within the documented tolerance. */
function compareWithReference(cf: TransitionClosedForm, ref: number[][], at: number, referenceRel = REFERENCE_REL): string | null {
  const refNorm = Math.max(1, ...ref.flat().map(Math.abs));
  for (let r = 0; r < ref.length; r++) {
    for (let c = 0; c < ref.length; c++) {
      const values = cf.entries[r][c].map((t) => evaluateTerm(t, at));
      const sum = values.reduce((a, b) => a + b, 0);
      const absSum = values.reduce((a, b) => a + Math.abs(b), 0);
      const tol = TERM_ULPS * EPS * absSum + referenceRel * refNorm;
      if (!(Math.abs(sum - ref[r][c]) <= tol)) return `entry (${r},${c}) at ${at}: ${sum} vs ${ref[r][c]} (tol ${tol})`;
    }
  }
  return null;
}

/** Σ of the exact coefficients that survive at t = 0 (or k = 0), per entry, must be δ_ij. */
function identityAtZeroExactly(cf: TransitionClosedForm): boolean {
  const n = cf.entries.length;
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) {
      let rational = Rational.ZERO;
      const surds = new Map<bigint, Rational>();
      for (const t of cf.entries[r][c]) {
        const counts = 'at' in t ? t.at === 0 : t.power === 0 && t.wave === 'cos';
        if (!counts) continue;
        const parsed = t.exact === undefined ? null : parseQuadText(t.exact);
        if (!parsed) return false;
        rational = rational.add(parsed.a);
        if (!parsed.b.isZero()) surds.set(parsed.d, (surds.get(parsed.d) ?? Rational.ZERO).add(parsed.b));
      }
      if (!rational.eq(r === c ? Rational.ONE : Rational.ZERO)) return false;
      for (const b of surds.values()) if (!b.isZero()) return false;
    }
  }
  return true;
}

type Block = { kind: 'real'; lambda: Rational; size: number } | { kind: 'pair'; a: number; b: number; size: number };

const blockArb: fc.Arbitrary<Block> = fc.oneof(
  fc.record({ kind: fc.constant('real' as const), lambda: fc.integer({ min: -6, max: 6 }).map((x) => Q(x, 2)), size: fc.integer({ min: 1, max: 3 }) }),
  fc.record({ kind: fc.constant('pair' as const), a: fc.integer({ min: -2, max: 2 }), b: fc.integer({ min: 1, max: 3 }), size: fc.integer({ min: 1, max: 2 }) }),
);

const dimension = (b: Block): number => (b.kind === 'real' ? b.size : 2 * b.size);

/** J = ⊕ blocks (real Jordan form), n ≤ 6. */
function jordanMatrix(blocks: Block[]): Rational[][] {
  const n = blocks.reduce((acc, b) => acc + dimension(b), 0);
  const J = Array.from({ length: n }, () => new Array<Rational>(n).fill(Rational.ZERO));
  let o = 0;
  for (const b of blocks) {
    if (b.kind === 'real') {
      for (let i = 0; i < b.size; i++) {
        J[o + i][o + i] = b.lambda;
        if (i + 1 < b.size) J[o + i][o + i + 1] = Rational.ONE;
      }
    } else {
      for (let i = 0; i < b.size; i++) {
        const p = o + 2 * i;
        J[p][p] = Q(b.a);
        J[p + 1][p + 1] = Q(b.a);
        J[p][p + 1] = Q(b.b);
        J[p + 1][p] = Q(-b.b);
        if (i + 1 < b.size) {
          J[p][p + 2] = Rational.ONE;
          J[p + 1][p + 3] = Rational.ONE;
        }
      }
    }
    o += dimension(b);
  }
  return J;
}

const similarArb = fc
  .array(blockArb, { minLength: 1, maxLength: 4 })
  .map((blocks) => {
    const kept: Block[] = [];
    let n = 0;
    for (const b of blocks) if (n + dimension(b) <= 6) {
      kept.push(b);
      n += dimension(b);
    }
    return kept;
  })
  .chain((blocks) => {
    const n = blocks.reduce((acc, b) => acc + dimension(b), 0);
    const op = fc.record({ i: fc.nat({ max: n - 1 }), j: fc.nat({ max: n - 1 }), c: fc.integer({ min: -2, max: 2 }) });
    return fc.record({ blocks: fc.constant(blocks), ops: fc.array(op, { maxLength: 6 }) });
  })
  .map(({ blocks, ops }) => {
    const J = jordanMatrix(blocks);
    const n = J.length;
    let S = identityQ(n);
    let Sinv = identityQ(n);
    // S = Π (I + c·E_ij), S⁻¹ = Π (I − c·E_ij) in reverse order: unimodular with integer inverse.
    for (const { i, j, c } of ops) {
      if (i === j || c === 0) continue;
      const E = identityQ(n);
      E[i][j] = Q(c);
      const Einv = identityQ(n);
      Einv[i][j] = Q(-c);
      S = matMulQ(S, E);
      Sinv = matMulQ(Einv, Sinv);
    }
    return { blocks, A: matMulQ(matMulQ(S, J), Sinv) };
  });

const randomIntegerMatrixArb = fc
  .integer({ min: 1, max: 6 })
  .chain((n) => fc.array(fc.array(fc.integer({ min: -4, max: 4 }), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }))
  .map((rows) => rows.map((r) => r.map((x) => Q(x))));

function sampleTimes(cf: TransitionClosedForm, A: number[][]): number[] {
  // Keep growth below e^10 so the reference stays in its accurate range (common practice).
  let maxRate = 0;
  for (const row of cf.entries) for (const terms of row) for (const t of terms) if ('rate' in t) maxRate = Math.max(maxRate, t.rate);
  const norm = Math.max(1, ...A.flat().map(Math.abs));
  return [0.1, 0.5, 1].map((t) => Math.min(t, maxRate > 0 ? 10 / maxRate : Infinity, 20 / norm));
}

function maxPowerFor(terms: TransitionTerm[][][], match: (t: TransitionTerm) => boolean): number {
  let p = -1;
  for (const row of terms) for (const ts of row) for (const t of ts) if (match(t) && 'power' in t) p = Math.max(p, t.power);
  return p;
}

describe('closed form properties', () => {
  it('random integer matrices n ≤ 6: e^{At} matches expm at 3 times and A^k matches repeated products, k = 0..8', () => {
    fc.assert(
      fc.property(randomIntegerMatrixArb, (A) => {
        const spectrum = exactSpectrum(A);
        const Af = A.map((r) => r.map((x) => x.toNumber()));
        const cont = transitionClosedForm(A, spectrum, 'continuous');
        for (const t of sampleTimes(cont, Af)) {
          const failure = compareWithReference(cont, expmTimes(Af, t), t);
          expect(failure).toBeNull();
        }
        const disc = transitionClosedForm(A, spectrum, 'discrete');
        for (let k = 0; k <= 8; k++) expect(compareWithReference(disc, floatPower(Af, k), k)).toBeNull();
        // The built-in check agrees with the independent comparison above.
        expect(cont.check.passed).toBe(true);
        expect(disc.check.passed).toBe(true);
      }),
      { seed: 7, numRuns: 150 },
    );
  });

  it('S·J·S⁻¹: exact Φ(0) = I, Jordan block sizes give the highest powers, values match the references', () => {
    fc.assert(
      fc.property(similarArb, ({ blocks, A }) => {
        const spectrum = exactSpectrum(A);
        const Af = A.map((r) => r.map((x) => x.toNumber()));
        const cont = transitionClosedForm(A, spectrum, 'continuous');
        const disc = transitionClosedForm(A, spectrum, 'discrete');
        expect(cont.exactCoefficients).toBe(true);
        expect(disc.exactCoefficients).toBe(true);
        expect(identityAtZeroExactly(cont)).toBe(true);
        expect(identityAtZeroExactly(disc)).toBe(true);
        // Largest block per eigenvalue, from the construction.
        for (const b of blocks) {
          const largest = Math.max(
            ...blocks
              .filter((o) => (b.kind === 'real' ? o.kind === 'real' && o.lambda.eq(b.lambda) : o.kind === 'pair' && o.a === b.a && o.b === b.b))
              .map((o) => o.size),
          );
          const lambda = b.kind === 'real' ? b.lambda.toNumber() : b.a;
          const freq = b.kind === 'real' ? 0 : b.b;
          const p = maxPowerFor(cont.entries, (t) => 'rate' in t && Math.abs(t.rate - lambda) < 1e-12 && Math.abs(t.freq - freq) < 1e-12);
          expect(p).toBe(largest - 1);
        }
        for (const t of sampleTimes(cont, Af)) expect(compareWithReference(cont, expmTimes(Af, t), t)).toBeNull();
        for (let k = 0; k <= 8; k++) expect(compareWithReference(disc, floatPower(Af, k), k)).toBeNull();
        expect(cont.check.passed).toBe(true);
        expect(disc.check.passed).toBe(true);
      }),
      { seed: 7, numRuns: 150 },
    );
  });
});

describe('closed form properties, numeric path (floatSpectrum → closed form on number[][])', () => {
  // Float eigenvalues are accurate to ~SPECTRUM_BACKWARD_ERROR·‖A‖ (1e-11, tolerance.ts) for
  // simple ones and to that level for the mean of a Jordan cluster; that error enters
  // e^{λt} as δλ·t with ‖A‖t ≤ 20 here, so the reference part of the tolerance is 1e-9.
  const NUMERIC_REFERENCE_REL = 1e-9;
  it('S·J·S⁻¹ in doubles: the check passes and values match expm and repeated products', () => {
    fc.assert(
      fc.property(similarArb, ({ A }) => {
        const Af = A.map((r) => r.map((x) => x.toNumber()));
        const spectrum = floatSpectrum(Af);
        const cont = transitionClosedForm(Af, spectrum, 'continuous');
        const disc = transitionClosedForm(Af, spectrum, 'discrete');
        expect(cont.exactCoefficients).toBe(false);
        expect(cont.check.passed).toBe(true);
        expect(disc.check.passed).toBe(true);
        for (const t of sampleTimes(cont, Af)) expect(compareWithReference(cont, expmTimes(Af, t), t, NUMERIC_REFERENCE_REL)).toBeNull();
        for (let k = 0; k <= 8; k++) expect(compareWithReference(disc, floatPower(Af, k), k, NUMERIC_REFERENCE_REL)).toBeNull();
      }),
      { seed: 7, numRuns: 150 },
    );
  });
});
