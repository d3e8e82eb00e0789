import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { lineColumnAt } from '../../server/src/analysis/position';

// Definition: the line is 1 + the number of "\n" before the offset; the column counts UTF-16
// units from the last line start, starting at 1 (the convention of compilers and SARIF).
function naive(text: string, offset: number) {
  const before = text.slice(0, offset);
  const line = before.split('\n').length;
  return { line, column: offset - (before.lastIndexOf('\n') + 1) + 1 };
}

describe('lineColumnAt', () => {
  it('agrees with the definition on random texts and offsets', () => {
    fc.assert(
      fc.property(fc.string({ unit: fc.constantFrom('a', '\n', 'é', '𝛌', ' ') }), fc.nat(), (text, k) => {
        const offset = text.length === 0 ? 0 : k % (text.length + 1);
        expect(lineColumnAt(text, offset)).toEqual(naive(text, offset));
      }),
      { seed: 11, numRuns: 300 },
    );
  });

  it('clamps offsets outside the text', () => {
    expect(lineColumnAt('ab\ncd', 99)).toEqual({ line: 2, column: 3 });
    expect(lineColumnAt('ab\ncd', -4)).toEqual({ line: 1, column: 1 });
  });
});
