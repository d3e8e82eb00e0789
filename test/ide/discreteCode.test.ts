// Generated discrete-model code on real analyses (no server): number texts, name clashes,
// the precision setting, plain JavaScript and nested lists without numpy. Values are checked
// against the first-order lag under ZOH, Ad = e^{−aT}, Bd = (b/a)(1 − e^{−aT}), a = b = 1,
// T = 0.5 ⇒ 0.60653065971263342, 0.39346934028736658 (CHECKS.md #14; Franklin, Powell &
// Workman, ch. 4, from memory).
import { beforeAll, describe, expect, it } from 'vitest';
import { analyzeDocument, initAnalysis } from '../../server/src/analysis/analyze';
import { DEFAULT_SETTINGS } from '../../server/src/analysis/settings';
import { cNumber, codeNumber, discreteInsertEdit } from '../../server/src/ide/discreteCode';
import type { SourceLanguage } from '../../server/src/syntax/types';

beforeAll(async () => {
  await initAnalysis();
});

function insert(text: string, language: SourceLanguage, precision = 17, method: 'zoh' | 'tustin' = 'zoh') {
  const report = analyzeDocument(text, language, DEFAULT_SETTINGS, {});
  const matrix = report.matrices.find((m) => m.role === 'state' && m.domain === 'continuous')!;
  const result = discreteInsertEdit(report, matrix, language, text, { period: 0.5, method, precision });
  if (!('edit' in result)) throw new Error(result.error);
  return text.slice(0, result.edit.span.start) + result.edit.newText + text.slice(result.edit.span.end);
}

describe('number texts', () => {
  it('exact fractions within 2^53, shortest round-trip otherwise, C literals always decimal', () => {
    expect(codeNumber(1 / 3, '1/3', 17)).toBe('1/3');
    // 2^53 + 1 is not a double: the fraction would not be read correctly, so a decimal is written.
    expect(codeNumber(1 / 9007199254740993, '1/9007199254740993', 17)).toBe(String(1 / 9007199254740993));
    expect(codeNumber(0.60653065971263342, null, 17)).toBe('0.6065306597126334');
    expect(codeNumber(0.60653065971263342, null, 6)).toBe('0.606531');
    expect(cNumber(1, 17, 'double')).toBe('1.0');
    expect(cNumber(1e-7, 17, 'float')).toBe('1e-7f');
    expect(cNumber(1 / 3, 17, 'float')).toBe('0.333333333f');
  });
});

describe('generated blocks', () => {
  it('Python without numpy: nested lists with the ZOH values of the first-order lag', () => {
    const after = insert('# eigenlens: continuous period=0.5\nA = [[-1]]\nB = [[1]]\n', 'python');
    expect(after).toContain('Ad = [[0.6065306597126334]]');
    // Bd within a few units in the last place of the published 0.39346934028736658.
    expect(Number(/^Bd = \[\[([^\]]+)\]\]$/m.exec(after)![1])).toBeCloseTo(0.39346934028736658, 15);
    expect(after).not.toContain('np.');
  });

  it('names already used elsewhere move to A_d2, B_d2', () => {
    const after = insert('import numpy as np\n# eigenlens: continuous period=0.5\nA = np.array([[-1]])\nB = np.array([[1]])\nAd = 3\n', 'python');
    expect(after).toContain('A_d2 = np.array([[0.6065306597126334]], dtype=float)');
    expect(after).toMatch(/^B_d2 = np\.array\(\[\[0\.393469340287366\d*\]\], dtype=float\)$/m);
  });

  it('the precision setting rounds inexact entries', () => {
    const after = insert('# eigenlens: continuous period=0.5\nA = [[-1]]\nB = [[1]]\n', 'python', 6);
    expect(after).toContain('Ad = [[0.606531]]');
  });

  it('plain JavaScript gets no type annotation; A_cl gets A_cl_d', () => {
    const after = insert('// eigenlens: continuous period=0.5\nconst A_cl = [[-1]];\nconst B_cl = [[1]];\n', 'javascript', 17, 'tustin');
    // Tustin of ẋ = −x + u at T = 0.5: Ad = (1 − 1/4)/(1 + 1/4) = 3/5, Bd = 0.5/(1 + 1/4) = 2/5 (CHECKS.md #15 formulas).
    expect(after).toContain('const A_cl_d = [[3/5]];');
    expect(after).toContain('const B_cl_d = [[2/5]];');
  });
});
