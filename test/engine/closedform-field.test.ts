/**
 * Exact arithmetic in Q(√d) (quadField.ts) and polynomials over a field (fieldPoly.ts).
 * References: field identities of Q(√d) — (a + b√d)(a − b√d) = a² − d·b², units of Z[√2]
 * (Stewart & Tall, Algebraic Number Theory, §3.1 and §4, from memory); Bézout identity
 * s·p + t·q = gcd(p, q) of the extended Euclidean algorithm (Knuth, TAOCP vol. 2, §4.6.1,
 * from memory); Taylor's theorem for polynomials (standard identity). Numeric cross-checks
 * use IEEE doubles directly (Math.sqrt), independent of the code under test.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { Q } from '../../server/src/engine/rational';
import { QuadField, isqrt, parseQuadText, quadToNumber, rationalSqrt, splitSquare } from '../../server/src/engine/quadField';
import {
  complexField,
  linearPower,
  polyAdd,
  polyDivmod,
  polyEval,
  polyExtendedGcd,
  polyMul,
  quadAsField,
  seriesInverse,
  taylorShift,
  type Poly,
} from '../../server/src/engine/fieldPoly';
import type { QuadElement } from '../../server/src/engine/quadField';
import { closeTo } from '../../server/src/engine/tolerance';

const sqrt2 = new QuadField(2n);
const sqrtMinus3 = new QuadField(-3n);

describe('QuadField', () => {
  it('1 + √2 is a unit with inverse √2 − 1 (Stewart & Tall §4, from memory)', () => {
    const x = sqrt2.elem(Q(1), Q(1));
    const inv = sqrt2.inv(x);
    expect(inv.a.toString()).toBe('-1');
    expect(inv.b.toString()).toBe('1');
    expect(sqrt2.eq(sqrt2.mul(x, inv), sqrt2.one)).toBe(true);
    expect(sqrt2.norm(x).toString()).toBe('-1');
  });

  it('(−1 + j√3)/2 is a primitive cube root of unity (standard identity)', () => {
    const omega = sqrtMinus3.elem(Q(-1, 2), Q(1, 2));
    expect(sqrtMinus3.eq(sqrtMinus3.pow(omega, 3), sqrtMinus3.one)).toBe(true);
    expect(sqrtMinus3.eq(sqrtMinus3.pow(omega, -1), sqrtMinus3.conj(omega))).toBe(true);
    const z = sqrtMinus3.toComplex(omega);
    expect(closeTo(z.re, -0.5)).toBe(true);
    expect(closeTo(z.im, Math.sqrt(3) / 2)).toBe(true);
  });

  it('field axioms hold on random elements of Q(√5): distributivity, inverse, conjugate is multiplicative', () => {
    const F = new QuadField(5n);
    const rat = fc.tuple(fc.integer({ min: -50, max: 50 }), fc.integer({ min: 1, max: 20 })).map(([n, d]) => Q(n, d));
    const el = fc.tuple(rat, rat).map(([a, b]) => F.elem(a, b));
    fc.assert(
      fc.property(el, el, el, (x, y, z) => {
        expect(F.eq(F.mul(x, F.add(y, z)), F.add(F.mul(x, y), F.mul(x, z)))).toBe(true);
        expect(F.eq(F.conj(F.mul(x, y)), F.mul(F.conj(x), F.conj(y)))).toBe(true);
        if (!F.isZero(x)) expect(F.eq(F.mul(x, F.inv(x)), F.one)).toBe(true);
      }),
      { seed: 7, numRuns: 150 },
    );
  });

  it('normalizes radicands: √12 = 2√3, √(1/2) = √2/2, √(−4) = 2j, √9 = 3', () => {
    let n = QuadField.normalize(Q(1), Q(12));
    expect([n.field.d, n.r.toString()]).toEqual([3n, '2']);
    n = QuadField.normalize(Q(1), Q(1, 2));
    expect([n.field.d, n.r.toString()]).toEqual([2n, '1/2']);
    n = QuadField.normalize(Q(1), Q(-4));
    expect([n.field.d, n.r.toString()]).toEqual([-1n, '2']);
    n = QuadField.normalize(Q(1), Q(9));
    expect([n.field.d, n.r.toString()]).toEqual([1n, '3']);
    expect(() => new QuadField(12n)).toThrow(RangeError);
    expect(() => new QuadField(9n)).toThrow(RangeError);
  });

  it('integer square roots and square splitting agree with direct arithmetic', () => {
    expect(isqrt(10n ** 40n)).toBe(10n ** 20n);
    expect(isqrt(10n ** 40n - 1n)).toBe(10n ** 20n - 1n);
    expect(isqrt(2n ** 2001n) ** 2n <= 2n ** 2001n).toBe(true);
    expect((isqrt(2n ** 2001n) + 1n) ** 2n > 2n ** 2001n).toBe(true);
    expect(splitSquare(-72n)).toEqual({ s: 6n, core: -2n });
    expect(rationalSqrt(Q(9, 4))?.toString()).toBe('3/2');
    expect(rationalSqrt(Q(2))).toBeNull();
  });

  it('writes exact texts and parses them back', () => {
    const F = new QuadField(5n);
    const cases: [QuadElement, string][] = [
      [F.elem(Q(3, 2)), '3/2'],
      [F.elem(Q(0), Q(-2, 3)), '-2√5/3'],
      [F.elem(Q(1, 2), Q(1, 10)), '1/2 + √5/10'],
      [F.elem(Q(1, 2), Q(-1)), '1/2 - √5'],
    ];
    for (const [x, text] of cases) {
      expect(F.toText(x)).toBe(text);
      const back = parseQuadText(text)!;
      expect(back.a.eq(x.a) && back.b.eq(x.b) && (back.b.isZero() || back.d === 5n)).toBe(true);
    }
    expect(sqrtMinus3.toText(sqrtMinus3.elem(Q(-1), Q(1)))).toBe('-1 + j√3');
    expect(parseQuadText('not a number')).toBeNull();
  });

  it('evaluates a + b√d without cancellation: (3 − √5)/2 and 10^8 − √(10^16 − 1)', () => {
    // (3 − √5)/2 = 0.3819660112501051 (standard value of 1/φ², from memory).
    expect(closeTo(quadToNumber(Q(3, 2), Q(-1, 2), 5n), 0.3819660112501051)).toBe(true);
    // 10^8 − √(10^16 − 1) = 1/(10^8 + √(10^16 − 1)) ≈ 5e-9 (conjugate identity); naive
    // double evaluation gives 0 here.
    const value = quadToNumber(Q(10n ** 8n), Q(-1), 10n ** 16n - 1n);
    expect(closeTo(value, 1 / (2e8))).toBe(true);
  });
});

describe('fieldPoly over Q(√2)', () => {
  const F = quadAsField(sqrt2);
  const c = (a: number, b = 0): QuadElement => sqrt2.elem(Q(a), Q(b));
  const polyEq = (p: Poly<QuadElement>, q: Poly<QuadElement>): boolean =>
    p.length === q.length && p.every((x, i) => sqrt2.eq(x, q[i]));

  it('divmod: p = q·quotient + remainder with deg remainder < deg q (Knuth §4.6.1, from memory)', () => {
    const p = [c(1), c(0, 1), c(3), c(-2), c(1)];
    const q = [c(0, -1), c(1)]; // x − √2
    const { quotient, remainder } = polyDivmod(F, p, q);
    expect(remainder.length).toBeLessThanOrEqual(1);
    expect(polyEq(polyAdd(F, polyMul(F, quotient, q), remainder), p)).toBe(true);
    // Remainder theorem: p(√2) is the remainder.
    expect(sqrt2.eq(polyEval(F, p, c(0, 1)), remainder[0] ?? sqrt2.zero)).toBe(true);
  });

  it('extended Euclid gives the Bézout identity; x² − 2 and x − √2 have gcd x − √2', () => {
    const p = [c(-2), c(0), c(1)];
    const q = [c(0, -1), c(1)];
    const { gcd, s, t } = polyExtendedGcd(F, p, q);
    expect(polyEq(gcd, q)).toBe(true);
    expect(polyEq(polyAdd(F, polyMul(F, s, p), polyMul(F, t, q)), gcd)).toBe(true);
    // Coprime case: (x − √2)² and (x + √2)³ have gcd 1.
    const a = linearPower(F, c(0, 1), 2);
    const b = linearPower(F, c(0, -1), 3);
    const r = polyExtendedGcd(F, a, b);
    expect(polyEq(r.gcd, [sqrt2.one])).toBe(true);
    expect(polyEq(polyAdd(F, polyMul(F, r.s, a), polyMul(F, r.t, b)), [sqrt2.one])).toBe(true);
  });

  it('Taylor shift: p(c + y) has coefficients p^(k)(c)/k! (Taylor, standard identity)', () => {
    const p = [c(1), c(2), c(0), c(1)]; // 1 + 2x + x³
    const shifted = taylorShift(F, p, c(0, 1)); // at √2: p = 1 + 4√2, p' = 8, p''/2 = 3√2, p'''/6 = 1
    expect(polyEq(shifted, [c(1, 4), c(8), c(0, 3), c(1)])).toBe(true);
  });

  it('series inverse: (1 − y)⁻¹ = 1 + y + y² + … (geometric series)', () => {
    const inv = seriesInverse(F, [c(1), c(-1)], 5);
    expect(polyEq(inv, [c(1), c(1), c(1), c(1), c(1)])).toBe(true);
  });
});

describe('fieldPoly over complex doubles', () => {
  it('series inverse of 1 + j·y times the polynomial is 1 up to the truncation order', () => {
    const C = complexField;
    const g = [C.one, { re: 0, im: 1 }];
    const inv = seriesInverse(C, g, 4);
    const prod = polyMul(C, g, inv);
    const deviation = prod.slice(0, 4).reduce((acc, z, i) => acc + Math.abs(z.re - (i === 0 ? 1 : 0)) + Math.abs(z.im), 0);
    expect(deviation).toBe(0);
    expect(() => C.inv(C.zero)).toThrow(RangeError);
  });

  it('rejects division by the zero polynomial', () => {
    const F = quadAsField(QuadField.RATIONALS);
    expect(() => polyDivmod(F, [QuadField.RATIONALS.one], [])).toThrow(RangeError);
  });
});
