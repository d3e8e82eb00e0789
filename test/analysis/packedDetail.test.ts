// Analyses held packed while nobody reads them (packedDetail.ts) must read back exactly as
// they were: the same rationals, the same doubles (negative zero and non-finite ones too), and
// the same hovers and JSON report as analyses that were never packed.
import { readFileSync } from 'node:fs';
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { AnalysisCache, analyzeDocument, DEFAULT_SETTINGS, initAnalysis } from '../../server/src/analysis/analyze';
import { detailStats, HOT_DETAILS, packDetail, setHotDetailLimit, unpackDetail, type MatrixDetail } from '../../server/src/analysis/packedDetail';
import { jsonReport } from '../../server/src/analysis/json';
import { hoverAt } from '../../server/src/ide/hover';
import type { SourceLanguage } from '../../server/src/syntax/types';

beforeAll(async () => {
  await initAnalysis();
});
afterEach(() => setHotDetailLimit(HOT_DETAILS));

// Matrices whose analyses take every path of the detail (from memory, textbook cases): the
// double integrator (λ = 0 twice, one Jordan block: defective, no time constant), the
// undamped oscillator (λ = ±j, marginally stable), a stable pair with irrational complex
// eigenvalues, a float matrix (√2 is not rational), a discrete matrix with a period, and a
// continuous one with a period (so it has a sampled model).
const cases = `
A1 = [[0, 1], [0, 0]]
A2 = [[0, 1], [-1, 0]]
A3 = [[1.25, -2.5], [3.75, -4.125]]
A4 = [[0, 1], [-2, -sqrt(2)]]
# eigenlens: discrete period=0.01
A5 = [[0.5, 0.25], [0, -0.5]]
# eigenlens: period=0.1
A6 = [[-1, 0, 0], [0, -2, 1], [0, 0, -2]]
B6 = [[1], [0], [1]]
`;

function details(text: string, language: SourceLanguage = 'python'): MatrixDetail[] {
  const cache = new AnalysisCache();
  const report = analyzeDocument(text, language, DEFAULT_SETTINGS, { cache });
  return report.matrices.flatMap((m) => cache.peek(m.hash)?.detail ?? []);
}

/** Hovers on every matrix name and the whole JSON report of a document. */
function views(text: string, language: SourceLanguage) {
  const report = analyzeDocument(text, language, DEFAULT_SETTINGS, { cache: new AnalysisCache() });
  const hovers = report.matrices.map((m) => hoverAt(report, text, (m.nameSpan ?? m.span).start, { precision: 6 })?.markdown ?? null);
  return { hovers, json: JSON.stringify(jsonReport([{ path: 'demo', text, report }])) };
}

describe('packed matrix analyses', () => {
  it('read back equal: rationals, multiplicities, modes, sampled models', () => {
    const all = details(cases);
    expect(all.length).toBe(6);
    expect(all.some((d) => d.spectrum.defective)).toBe(true);
    expect(all.some((d) => d.discrete !== null)).toBe(true);
    expect(all.some((d) => !d.spectrum.exact)).toBe(true);
    for (const d of all) {
      const text = packDetail(d);
      // One byte per character: the packed form is deflated bytes.
      expect(/^[\x00-\xff]*$/.test(text)).toBe(true);
      expect(unpackDetail(text)).toEqual(d);
    }
  });

  it('is several times smaller than its JSON', () => {
    const d = details('A = [[1.25, -2.5], [3.75, -4.125]]\n')[0];
    expect(packDetail(d).length * 3).toBeLessThan(JSON.stringify(d, (_k, v) => (typeof v === 'bigint' ? v.toString() : v)).length);
  });

  it('keeps negative zero, infinities and NaN, which JSON alone cannot', () => {
    const d = details('A = [[-1, 0], [0, -2]]\n')[0];
    const odd = { ...d, modes: d.modes.map((m, i) => ({ ...m, timeConstant: [-0, Infinity][i] ?? m.timeConstant, dampingRatio: i === 0 ? Number.NaN : -Infinity })) };
    const back = unpackDetail(packDetail(odd));
    expect(Object.is(back.modes[0].timeConstant, -0)).toBe(true);
    expect(back.modes[1].timeConstant).toBe(Infinity);
    expect(back.modes[0].dampingRatio).toBeNaN();
    expect(back.modes[1].dampingRatio).toBe(-Infinity);
  });

  it('random integer and decimal matrices read back equal (property)', () => {
    const entry = fc.oneof(fc.integer({ min: -9, max: 9 }).map(String), fc.integer({ min: -999, max: 999 }).map((k) => (k / 100).toString()));
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4 }).chain((n) => fc.array(fc.array(entry, { minLength: n, maxLength: n }), { minLength: n, maxLength: n })), (rows) => {
        const text = `A = [${rows.map((r) => `[${r.join(', ')}]`).join(', ')}]\n`;
        for (const d of details(text)) expect(unpackDetail(packDetail(d))).toEqual(d);
      }),
      { numRuns: 60, seed: 11 },
    );
  });

  it('hovers and the JSON report are the same whether the analyses were packed or not', () => {
    const before = detailStats().unpacks;
    for (const [file, language] of [
      ['', 'python'],
      ['test/demo/kiln_zones.py', 'python'],
      ['test/demo/motor_speed.py', 'python'],
      ['test/demo/tank_cascade.py', 'python'],
      ['test/demo/drone_altitude.ts', 'typescript'],
    ] as const) {
      // '' stands for the six cases above, one file with several state matrices.
      const text = file === '' ? cases : readFileSync(file, 'utf8');
      const hot = views(text, language);
      // One analysis held as objects at a time: every other one is packed and read back.
      setHotDetailLimit(1);
      const cold = views(text, language);
      setHotDetailLimit(HOT_DETAILS);
      expect(cold).toEqual(hot);
    }
    // The file with several state matrices read packed ones back.
    expect(detailStats().unpacks).toBeGreaterThan(before);
  });
});
