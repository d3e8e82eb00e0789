/**
 * Python extraction. What counts as a comment or string follows The Python Language
 * Reference §2.1.3 (comments) and §2.4 (string literals); numeric literal forms follow §2.4.5
 * and PEP 515 (underscores in numeric literals). Exact decimal values (0.1 = 1/10) follow
 * from the definition of decimal notation.
 */
import { describe, expect, it } from 'vitest';
import { extract, initParsers } from '../../server/src/syntax/extract';
import { entrySlices, entryValues, expectProblem, matrixNamed, problemsWith } from './helpers';

await initParsers();

describe('python: literals, constants, ranges', () => {
  const src = [
    'import numpy as np',
    'import math',
    'm = 1.5  # kg (invented example)',
    'g = 9.81',
    'k = m*g',
    'A = [[0, 1],',
    '     [-k/m, -0.1]]',
    'B: np.ndarray = np.array([[0], [1/m]], dtype=float)',
    'C = numpy.array([[1, 0]])',
    'D = np.asarray([[0]])',
    'F = jnp.array([[1, 0.01], [0, 1]])',
    'G = np.matrix([[math.sqrt(2)], [np.pi]])',
    'm = 3  # later constant does not apply to earlier matrices',
    'H = [[m, 1_000, 1e-3]]',
    '',
  ].join('\n');
  const file = extract(src, 'python');

  it('finds every matrix with its role', () => {
    expect(file.matrices.map((m) => [m.name, m.role, m.nRows, m.nCols])).toEqual([
      ['A', 'state', 2, 2],
      ['B', 'input', 2, 1],
      ['C', 'output', 1, 2],
      ['D', 'feedthrough', 1, 1],
      ['F', 'state', 2, 2],
      ['G', 'noise-input', 2, 1],
      ['H', 'output', 1, 3],
    ]);
    expect(file.problems).toEqual([]);
  });
  it('every entry span reads back the entry text', () => {
    expect(entrySlices(src, matrixNamed(file, 'A'))).toEqual([['0', '1'], ['-k/m', '-0.1']]);
    expect(entrySlices(src, matrixNamed(file, 'B'))).toEqual([['0'], ['1/m']]);
    expect(entrySlices(src, matrixNamed(file, 'G'))).toEqual([['math.sqrt(2)'], ['np.pi']]);
    for (const m of file.matrices) for (const row of m.rows) for (const e of row) expect(src.slice(e.span.start, e.span.end)).toBe(e.text);
  });
  it('constants resolve in order and exactly', () => {
    // k = 1.5 * 9.81 = 14.715 = 2943/200; -k/m = -9.81 = -981/100.
    expect(entryValues(matrixNamed(file, 'A'))).toEqual([['0', '1'], ['-981/100', '-1/10']]);
    expect(entryValues(matrixNamed(file, 'B'))).toEqual([['0'], ['2/3']]);
    expect(entryValues(matrixNamed(file, 'H'))).toEqual([['3', '1000', '1/1000']]);
    expect(file.constants.map((c) => c.name)).toEqual(['m', 'g', 'k', 'm']);
  });
  it('sqrt and pi make the matrix a float matrix', () => {
    const G = matrixNamed(file, 'G');
    expect(G.exact).toBe(false);
    expect(entryValues(G)).toEqual([[Math.SQRT2], [Math.PI]]);
    expect(matrixNamed(file, 'A').exact).toBe(true);
  });
  it('spans of names, literals and statements', () => {
    const B = matrixNamed(file, 'B');
    expect(src.slice(B.nameSpan!.start, B.nameSpan!.end)).toBe('B');
    expect(src.slice(B.span.start, B.span.end)).toBe('np.array([[0], [1/m]], dtype=float)');
    expect(src.slice(B.statementSpan.start, B.statementSpan.end)).toBe('B: np.ndarray = np.array([[0], [1/m]], dtype=float)');
    const A = matrixNamed(file, 'A');
    expect(A.rowSpans.map((s) => src.slice(s.start, s.end))).toEqual(['[0, 1]', '[-k/m, -0.1]']);
  });
});

describe('python: what is not a matrix', () => {
  it('brackets in strings and comments are ignored', () => {
    const src = 's = "[[1, 2], [3, 4]]"\n# A = [[1, 2], [3, 4]]\nt = """\nA = [[5]]\n"""\nnames = [["a", "b"], ["c", "d"]]\n';
    const file = extract(src, 'python');
    expect(file.matrices).toEqual([]);
    expect(file.problems).toEqual([]);
  });
  it('unknown-role names become matrices only when fully numeric', () => {
    const src = 'M = [[1, 2], [3, 4]]\npoints = [[x0, y0]]\nvec = [1, 2, 3]\n';
    const file = extract(src, 'python');
    expect(file.matrices.map((m) => [m.name, m.role])).toEqual([['M', 'unknown']]);
    expect(file.problems).toEqual([]);
  });
  it('role rules: Data, Bad, Gain are not role names; Acl, A_plant, Aplant, A1 are', () => {
    const src = 'Data = [[1]]\nBad = [[1]]\nGain = [[2]]\nAcl = [[1]]\nA_plant = [[2]]\nAplant = [[3]]\nA1 = [[4]]\nAd = [[5]]\nQc = [[6]]\n';
    const file = extract(src, 'python');
    const roles = Object.fromEntries(file.matrices.map((m) => [m.name, [m.role, m.groupKey]]));
    expect(roles).toEqual({
      Data: ['unknown', ''],
      Bad: ['unknown', ''],
      Gain: ['unknown', ''],
      Acl: ['state', 'cl'],
      A_plant: ['state', 'plant'],
      Aplant: ['state', 'plant'],
      A1: ['state', '1'],
      Ad: ['state', 'd'],
      Qc: ['noise-covariance', 'c'],
    });
  });
  it('extra state-matrix name patterns', () => {
    const file = extract('Phi_fast = [[1, 2], [3, 4]]\n', 'python', { stateMatrixNames: ['Phi(_\\w+)?', '(['] });
    expect(file.matrices[0].role).toBe('state');
    expect(file.matrices[0].groupKey).toBe('fast');
  });
});

describe('python: problems at exact ranges', () => {
  it('ragged rows', () => {
    const src = 'A = [[1, 2], [3]]\n';
    const file = extract(src, 'python');
    expectProblem(src, file, 'ragged-rows', '[3]');
    expect(file.matrices).toEqual([]);
  });
  it('unknown names and the XOR caret', () => {
    const src = 'A = [[1, x], [2^3, 4]]\n';
    const file = extract(src, 'python');
    expectProblem(src, file, 'unknown-name', 'x');
    expectProblem(src, file, 'xor-operator', '^');
    const A = matrixNamed(file, 'A');
    expect(entryValues(A)).toEqual([['1', null], [null, '4']]);
    expect(A.exact).toBe(false);
  });
  it('a constant defined later is unknown', () => {
    const src = 'A = [[-k]]\nk = 2\n';
    expectProblem(src, extract(src, 'python'), 'unknown-name', 'k');
  });
  it('a failed re-assignment forgets the old value', () => {
    const src = 'k = 2\nk = compute()\nA = [[k]]\n';
    expectProblem(src, extract(src, 'python'), 'unknown-name', 'k');
  });
  it('three-deep lists', () => {
    const src = 'A = [[[1]], [2]]\n';
    expectProblem(src, extract(src, 'python'), 'not-a-matrix', '[1]');
  });
});

describe('python: 1-D lists, attributes, dictionaries', () => {
  it('1-D B is a column, 1-D C is a row', () => {
    const src = 'B = np.array([0, 1, 2])\nC = np.array([1, 0, 0])\n';
    const file = extract(src, 'python');
    expect([matrixNamed(file, 'B').nRows, matrixNamed(file, 'B').nCols]).toEqual([3, 1]);
    expect([matrixNamed(file, 'C').nRows, matrixNamed(file, 'C').nCols]).toEqual([1, 3]);
  });
  it('self.A and self constants inside a class', () => {
    const src = 'class Plant:\n    def __init__(self):\n        self.k = 4\n        self.A = [[0, 1], [-self.k, 0]]\n';
    const file = extract(src, 'python');
    const A = matrixNamed(file, 'A');
    expect(A.qualifiedName).toBe('self.A');
    expect(entryValues(A)).toEqual([['0', '1'], ['-4', '0']]);
  });
  it('dictionary values grouped by the dictionary name', () => {
    const src = 'motor = {"A": [[-2]], "B": [[1]], "label": "x"}\n';
    const file = extract(src, 'python');
    expect(file.matrices.map((m) => [m.name, m.groupKey])).toEqual([['A', 'motor'], ['B', 'motor']]);
  });
});

describe('python: pragmas', () => {
  it('file pragma, pragma above a matrix, pragma at the end of the first line', () => {
    const src = [
      '# eigenlens: discrete period=0.01',
      'import numpy as np',
      '# eigenlens: continuous model=plant',
      'A = [[0, 1], [0, 0]]',
      'Ad = [[1, 0.1],  # eigenlens: period=0.1 role=state',
      '      [0, 1]]',
      '# eigenlens: ignore',
      'A2 = [[1]]',
      '',
    ].join('\n');
    const file = extract(src, 'python');
    expect(file.filePragma?.domain).toBe('discrete');
    expect(file.filePragma?.period?.kind === 'exact' && file.filePragma.period.value.toString()).toBe('1/100');
    const A = matrixNamed(file, 'A');
    expect(A.pragma?.domain).toBe('continuous');
    expect(A.groupKey).toBe('plant');
    const Ad = matrixNamed(file, 'Ad');
    expect(Ad.pragma?.period?.kind === 'exact' && Ad.pragma.period.value.toString()).toBe('1/10');
    expect(file.matrices.map((m) => m.name)).toEqual(['A', 'Ad']);
    expect(file.problems).toEqual([]);
  });
  it('pragma marks a matrix that has no role name', () => {
    const src = '# eigenlens: role=state\nJ = [[0, 1], [-1, 0]]\n';
    expect(matrixNamed(extract(src, 'python'), 'J').role).toBe('state');
  });
  it('bad pragma keys and values warn at the key', () => {
    const src = '# eigenlens: discrete sample=0.1 period=-1 role=plant\nA = [[1]]\n';
    const file = extract(src, 'python');
    const bad = problemsWith(file, 'bad-pragma').map((p) => src.slice(p.span.start, p.span.end));
    expect(bad).toEqual(['sample', '-1', 'plant']);
    expect(matrixNamed(file, 'A').pragma?.domain).toBe('discrete');
  });
  it('a pragma in a string is not a pragma; a pragma after code with no matrix is stray', () => {
    const src = 'x = 1\ns = "# eigenlens: discrete"\n# eigenlens: discrete\n\ny = 2\n';
    const file = extract(src, 'python');
    expect(file.filePragma).toBeNull();
    expectProblem(src, file, 'stray-pragma', '# eigenlens: discrete');
    expect(file.problems).toHaveLength(1);
  });
});

describe('python: offsets are UTF-16 code units', () => {
  it('entries after non-ASCII text', () => {
    const src = '# Füße and 𝛚 (astral) — invented\nω = 2\nA = [[0, 1], [-ω**2, 0]]\n';
    const file = extract(src, 'python');
    const A = matrixNamed(file, 'A');
    expect(entrySlices(src, A)).toEqual([['0', '1'], ['-ω**2', '0']]);
    expect(entryValues(A)).toEqual([['0', '1'], ['-4', '0']]);
  });
});
