/**
 * Coefficient quantization of discrete matrices (quantize.ts). Sources beside each check.
 */
import { describe, expect, it } from 'vitest';
import { quantizeMatrix, toFixedPoint, type QuantizationResult, type QuantizationSuccess } from '../../server/src/engine/quantize';

function ok(r: QuantizationResult): QuantizationSuccess {
  if (!r.ok) throw new Error(r.error);
  return r;
}

/** Companion (direct-form) matrix of Π(z − p_i): last row holds −a_0 … −a_{n−1}. */
function companion(poles: number[]): number[][] {
  let c = [1]; // ascending coefficients of Π(z − p)
  for (const p of poles) {
    const next = new Array(c.length + 1).fill(0);
    c.forEach((x, k) => {
      next[k + 1] += x;
      next[k] -= p * x;
    });
    c = next;
  }
  const n = poles.length;
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i < n - 1 ? (j === i + 1 ? 1 : 0) : -c[j])));
}

describe('quantization formats', () => {
  it('float32 rounds to the nearest single: fround(0.1) = 0.100000001490116119384765625 (IEEE 754 binary32, standard)', () => {
    const r = ok(quantizeMatrix([[0.1]], { kind: 'float32' }));
    expect(r.quantized[0][0]).toBe(0.100000001490116119384765625);
    // The double 0.1 is 0.1000000000000000055511151231257827…, so the error is 1.4901161138336505e-9.
    expect(Math.abs(r.maxEntryError - 1.4901161138336505e-9)).toBeLessThan(1e-24);
  });
  it('Q1.3: 0.3 → 0.25 (nearest multiple of 1/8), 5 saturates to 2 − 1/8, −5 to −2 (two’s-complement Qm.n range, common practice)', () => {
    expect(toFixedPoint(0.3, 1, 3)).toEqual({ value: 0.25, saturated: false });
    expect(toFixedPoint(5, 1, 3)).toEqual({ value: 1.875, saturated: true });
    expect(toFixedPoint(-5, 1, 3)).toEqual({ value: -2, saturated: true });
    expect(toFixedPoint(-0.0625, 1, 3)).toEqual({ value: -0.125, saturated: false }); // tie away from zero
    const r = ok(quantizeMatrix([[0.3, 5], [0, 0.5]], { kind: 'fixed', integerBits: 1, fractionalBits: 3 }));
    expect(r.saturated).toEqual([{ row: 0, col: 1, value: 5, saturatedTo: 1.875 }]);
    expect(r.quantized).toEqual([[0.25, 1.875], [0, 0.5]]);
  });
  it('a pole 1e-8 inside the unit circle is rounded onto it by float32 (spacing below 1 is 2^-24 ≈ 6e-8, IEEE 754 binary32)', () => {
    const r = ok(quantizeMatrix([[0.99999999]], { kind: 'float32' }));
    expect(r.quantized[0][0]).toBe(1);
    expect(r.crossedUnitCircle).toBe(true);
    expect(r.sensitive).toBe(true);
  });
  it('Q0.4 moves the pole 0.95 to 0.9375 (arithmetic: round(0.95·16)/16 = 15/16)', () => {
    const r = ok(quantizeMatrix([[0.95]], { kind: 'fixed', integerBits: 0, fractionalBits: 4 }));
    expect(r.poles[0].after.re).toBe(0.9375);
    expect(r.poles[0].movement).toBeCloseTo(0.0125, 15);
    expect(r.crossedUnitCircle).toBe(false);
  });
});

describe('clustered poles are sensitive (Kaiser, "Digital filters", 1966; Oppenheim & Schafer, Discrete-Time Signal Processing, coefficient quantization; both from memory)', () => {
  const poles = [0.99, 0.985, 0.98, 0.975];
  it('direct (companion) form moves far more than the coefficient error; diagonal form moves by at most the rounding of its entries', () => {
    const direct = ok(quantizeMatrix(companion(poles), { kind: 'float32' }));
    const diagonal = ok(quantizeMatrix(poles.map((p, i) => poles.map((_, j) => (i === j ? p : 0))), { kind: 'float32' }));
    // Diagonal: each pole is an entry, so it moves by ≤ half a float32 spacing (2^-25 relative).
    expect(diagonal.maxRelativeMovement).toBeLessThanOrEqual(2 ** -24);
    expect(diagonal.sensitive).toBe(false);
    // Direct form: the root sensitivity 1/|p'(z_i)| ~ 1e6 amplifies ~1e-7 coefficient errors.
    expect(direct.maxRelativeMovement).toBeGreaterThan(1000 * diagonal.maxRelativeMovement);
    expect(direct.sensitive).toBe(true);
  });
  it('threshold is a parameter', () => {
    const r = ok(quantizeMatrix([[0.5, 0], [0, 0.25]], { kind: 'float32' }, { relativeThreshold: 0 }));
    expect(r.maxRelativeMovement).toBe(0); // both entries are exact in float32
    expect(r.sensitive).toBe(false);
  });
});

describe('bad input', () => {
  it('is an error result', () => {
    expect(quantizeMatrix([[1, 2]], { kind: 'float32' }).ok).toBe(false);
    expect(quantizeMatrix([[Number.NaN]], { kind: 'float32' }).ok).toBe(false);
    expect(quantizeMatrix([[1e300]], { kind: 'float32' }).ok).toBe(false);
    expect(quantizeMatrix([[1]], { kind: 'fixed', integerBits: -1, fractionalBits: 3 }).ok).toBe(false);
  });
});

describe('time-constant shift under rounding', () => {
  it('a slow pole near z = 1 is sensitive although |Δz|/|z| is tiny', () => {
    // z = e^{−T/τ} with T/τ = 1e-5: float32 (unit roundoff 2^−24) moves z by up to ~6e-8, so the
    // time constant τ = −T/ln z moves by |Δ ln z|/|ln z| ≈ 6e-8/1e-5 (definition of τ; IEEE 754 binary32).
    const z = Math.exp(-1e-5);
    const r = quantizeMatrix([[z]], { kind: 'float32' });
    if (!r.ok) throw new Error(r.error);
    const expected = Math.abs(Math.log(Math.fround(z)) - Math.log(z)) / Math.abs(Math.log(z));
    expect(r.poles[0].equivalentShift).toBeCloseTo(expected, 12);
    expect(r.poles[0].relativeMovement).toBeLessThan(1e-7);
    expect(r.sensitive).toBe(expected > 1e-3);
  });
});
