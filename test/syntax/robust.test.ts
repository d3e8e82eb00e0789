/**
 * extract() never throws, whatever the text (property-based, seeded; fast-check as the
 * general-purpose generator). Also checks that every reported span lies inside the text.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { extract, initParsers } from '../../server/src/syntax/extract';
import type { ExtractedFile, SourceLanguage } from '../../server/src/syntax/types';

await initParsers();

const SEEDS: Record<SourceLanguage, string> = {
  python: '# eigenlens: discrete period=0.01\nm = 1.5\nA = np.array([[0, 1], [-m**2, -0.1]], dtype=float)\nB = [0, 1/m]  # eigenlens: role=input\ns = "[[1]]"\n',
  typescript: '// eigenlens: continuous\nconst k = 40;\nexport const A: number[][] = [[0, 1], [-k, -2]] as const;\nconst sys = { B: [[0], [1]] };\n',
  javascript: 'const A = [[0, 1], [-2, -3]];\nlet C = math.matrix([[1, 0]]);\n',
  lti: 'param g = 9.81\nsystem s continuous\n  states a b\n  inputs u\n  A:\n    0 1\n    -g 0\n  B:\n    0\n    1\nend\n',
};

const ALPHABET = ['[', ']', '(', ')', ',', '\n', ' ', '#', '//', '"', "'", '=', '-', '*', '**', '^', '/', '0', '1', '.5', 'e', 'A', 'B', 'np.array(', 'eigenlens:', 'system', 'end', 'param', ':', '\u202E', '\u2212', 'ω', '𝛚', '\\'];

function checkFile(text: string, f: ExtractedFile): void {
  const inside = (s: { start: number; end: number }) => s.start >= 0 && s.end <= text.length && s.start <= s.end;
  for (const p of f.problems) expect(inside(p.span), JSON.stringify(p)).toBe(true);
  for (const m of f.matrices) {
    expect(inside(m.span)).toBe(true);
    for (const row of m.rows) {
      expect(row.length).toBe(m.nCols);
      for (const e of row) expect(text.slice(e.span.start, e.span.end)).toBe(e.text);
    }
  }
  expect(f.problems.some((p) => p.code === 'internal-error'), JSON.stringify(f.problems)).toBe(false);
}

describe('extract never throws', () => {
  for (const lang of Object.keys(SEEDS) as SourceLanguage[]) {
    it(`${lang}: random token soup`, () => {
      fc.assert(
        fc.property(fc.array(fc.constantFrom(...ALPHABET), { maxLength: 80 }), (parts) => {
          const text = parts.join('');
          checkFile(text, extract(text, lang));
        }),
        { seed: 20240601, numRuns: 300 },
      );
    });
    it(`${lang}: mutated valid source`, () => {
      const seed = SEEDS[lang];
      fc.assert(
        fc.property(
          fc.array(fc.tuple(fc.nat(seed.length), fc.nat(4), fc.constantFrom(...ALPHABET)), { minLength: 1, maxLength: 6 }),
          (edits) => {
            let text = seed;
            for (const [at, del, ins] of edits) {
              const p = Math.min(at, text.length);
              text = text.slice(0, p) + ins + text.slice(p + del);
            }
            checkFile(text, extract(text, lang));
          },
        ),
        { seed: 7, numRuns: 300 },
      );
    });
  }
  it('arbitrary unicode strings', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'grapheme', maxLength: 200 }), fc.constantFrom<SourceLanguage>('python', 'typescript', 'lti'), (text, lang) => {
        checkFile(text, extract(text, lang));
      }),
      { seed: 99, numRuns: 300 },
    );
  });
  it('deeply nested brackets do not overflow the stack', () => {
    const text = 'A = ' + '['.repeat(5000) + '1' + ']'.repeat(5000) + '\n';
    const f = extract(text, 'python');
    checkFile(text, f);
    expect(f.matrices).toEqual([]);
  });
});
