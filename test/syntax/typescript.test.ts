/**
 * TypeScript / JavaScript extraction. Comment and string forms follow ECMA-262 §12.4
 * (comments) and §12.9.4 (string literals); `as const` and `satisfies` are TypeScript
 * expression forms that do not change the value (TypeScript handbook, from memory).
 */
import { describe, expect, it } from 'vitest';
import { extract, initParsers } from '../../server/src/syntax/extract';
import { entrySlices, entryValues, expectProblem, matrixNamed } from './helpers';

await initParsers();

describe('typescript: literals and constants', () => {
  const src = [
    "import * as math from 'mathjs';",
    'const m = 1.5, g = 9.81; // invented example',
    'let k = m * g;',
    'export const A: number[][] = [',
    '  [0, 1],',
    '  [-k / m, -0.1],',
    '] as const;',
    'const B = math.matrix([[0], [1 / m]]);',
    'var C = [[1, 0]] satisfies number[][];',
    "const s = '[[1, 2]]'; /* [[3]] */ const t = `[[4]]`;",
    'const names = [["a", "b"]];',
    'const motor = { A: [[-2]], "B": [[1]], label: "x" };',
    'class Plant {',
    '  Ad = [[1, 0.1], [0, 1]];',
    '  constructor() { this.Bd = [[0.005], [Math.sqrt(2) ** 2]]; }',
    '}',
    '',
  ].join('\n');
  const file = extract(src, 'typescript');
  it('finds the matrices, not the strings and comments', () => {
    expect(file.matrices.map((x) => [x.name, x.role, x.groupKey, x.nRows, x.nCols])).toEqual([
      ['A', 'state', '', 2, 2],
      ['B', 'input', '', 2, 1],
      ['C', 'output', '', 1, 2],
      ['A', 'state', 'motor', 1, 1],
      ['B', 'input', 'motor', 1, 1],
      ['Ad', 'state', 'd', 2, 2],
      ['Bd', 'input', 'd', 2, 1],
    ]);
    expect(file.problems).toEqual([]);
  });
  it('entry ranges and exact values', () => {
    const A = matrixNamed(file, 'A');
    expect(entrySlices(src, A)).toEqual([['0', '1'], ['-k / m', '-0.1']]);
    expect(entryValues(A)).toEqual([['0', '1'], ['-981/100', '-1/10']]);
    expect(src.slice(A.statementSpan.start, A.statementSpan.end).startsWith('export const A')).toBe(true);
    expect(entryValues(matrixNamed(file, 'B'))).toEqual([['0'], ['2/3']]);
    const Bd = matrixNamed(file, 'Bd');
    expect(Bd.qualifiedName).toBe('this.Bd');
    expect(Bd.exact).toBe(false);
  });
  it('javascript uses the same reader', () => {
    const js = 'const A = [[0, 1], [-2, -3]];\n';
    const f = extract(js, 'javascript');
    expect(f.language).toBe('javascript');
    expect(entryValues(matrixNamed(f, 'A'))).toEqual([['0', '1'], ['-2', '-3']]);
  });
});

describe('typescript: problems and pragmas', () => {
  it('XOR caret, ragged rows, unknown names at exact ranges', () => {
    const src = 'const A = [[1, 2^2], [w, 3]];\nconst C = [[1, 2], [3]];\n';
    const f = extract(src, 'typescript');
    expectProblem(src, f, 'xor-operator', '^');
    expectProblem(src, f, 'unknown-name', 'w');
    expectProblem(src, f, 'ragged-rows', '[3]');
  });
  it('pragmas in // comments', () => {
    const src = '// eigenlens: discrete period=0.05\n\n// eigenlens: continuous\nconst A = [[-1]];\nconst F = [[0.5]]; // eigenlens: discrete\n';
    const f = extract(src, 'typescript');
    expect(f.filePragma?.domain).toBe('discrete');
    expect(matrixNamed(f, 'A').pragma?.domain).toBe('continuous');
    expect(matrixNamed(f, 'F').pragma?.domain).toBe('discrete');
  });
});
