/**
 * .lti model files (our own language, grammar in syntaxes/LTI.md). The sample is an
 * invented reaction-wheel pendulum; the expected A(2,1) = m·g·l/Jp is plain arithmetic on
 * the declared parameters (0.4·9.81·0.35/0.012 = 114.45 = 2289/20).
 */
import { describe, expect, it } from 'vitest';
import { extract } from '../../server/src/syntax/extract';
import { entrySlices, entryValues, expectProblem, matrixNamed } from './helpers';

const SAMPLE = [
  '# Reaction-wheel pendulum, linearized upright (invented parameters)',
  'param g  = 9.81      # m/s^2',
  'param l  = 0.35      # pivot to centre of mass, m',
  'param Jp = 0.012     # pendulum inertia about the pivot, kg m^2',
  'param Jw = 2.4e-4    # wheel inertia, kg m^2',
  'param m  = 0.4       # total mass, kg',
  '',
  'system wheel_pendulum continuous',
  '  states   theta  omega  wheel_speed',
  '  inputs   torque',
  '  outputs  theta',
  '  A:',
  '    0            1     0',
  '    m*g*l/Jp     0     0',
  '',
  '    0            0     0   # blank line above is allowed',
  '  B:',
  '    0',
  '   -1/Jp',
  '    1/Jw',
  '  C:',
  '    1, 0, (2 * 0)',
  'end',
  '',
].join('\n');

describe('lti: the sample model', () => {
  const f = extract(SAMPLE, 'lti');
  it('reads params, blocks, roles and system info without problems', () => {
    expect(f.problems).toEqual([]);
    expect(f.constants.map((c) => c.name)).toEqual(['g', 'l', 'Jp', 'Jw', 'm']);
    expect(f.matrices.map((x) => [x.name, x.role, x.groupKey, x.nRows, x.nCols])).toEqual([
      ['A', 'state', 'wheel_pendulum', 3, 3],
      ['B', 'input', 'wheel_pendulum', 3, 1],
      ['C', 'output', 'wheel_pendulum', 1, 3],
    ]);
    expect(f.systems).toHaveLength(1);
    expect(f.systems[0]).toMatchObject({ name: 'wheel_pendulum', domain: 'continuous', period: null, states: ['theta', 'omega', 'wheel_speed'], inputs: ['torque'], outputs: ['theta'] });
    expect(SAMPLE.slice(f.systems[0].nameSpan.start, f.systems[0].nameSpan.end)).toBe('wheel_pendulum');
    expect(SAMPLE.slice(f.systems[0].span.start, f.systems[0].span.end).endsWith('end')).toBe(true);
  });
  it('entries are exact with exact ranges', () => {
    const A = matrixNamed(f, 'A');
    expect(entrySlices(SAMPLE, A)).toEqual([['0', '1', '0'], ['m*g*l/Jp', '0', '0'], ['0', '0', '0']]);
    expect(entryValues(A)[1][0]).toBe('2289/20');
    expect(entryValues(matrixNamed(f, 'B'))).toEqual([['0'], ['-250/3'], ['12500/3']]);
    expect(entrySlices(SAMPLE, matrixNamed(f, 'C'))).toEqual([['1', '0', '(2 * 0)']]);
    expect(A.exact).toBe(true);
  });
});

describe('lti: problems at exact ranges', () => {
  it('ragged rows, unknown names, unknown keywords, missing end', () => {
    const src = 'param k = 2\nsystem s discrete period=0.1\n  states a b\n  A:\n    1 2\n    3\n  B:\n    -zz\n    1\n  frobnicate 3\n';
    const f = extract(src, 'lti');
    expectProblem(src, f, 'ragged-rows', '3');
    expectProblem(src, f, 'unknown-name', 'zz');
    expectProblem(src, f, 'unknown-keyword', 'frobnicate');
    expectProblem(src, f, 'missing-end', 's');
    expect(f.systems[0].domain).toBe('discrete');
    expect(f.systems[0].period?.kind === 'exact' && f.systems[0].period.value.toString()).toBe('1/10');
  });
  it('shape mismatch against declared states and duplicate blocks', () => {
    const src = 'system s continuous\n  states a b\n  inputs u\n  A:\n    1 2 3\n    4 5 6\n  B:\n    1\n    2\n  B:\n    3\n    4\nend\n';
    const f = extract(src, 'lti');
    const mismatch = expectProblem(src, f, 'shape-mismatch', 'A:\n    1 2 3\n    4 5 6');
    expect(mismatch.message).toMatch(/2×3/);
    expect(mismatch.message).toMatch(/2×2/);
    expectProblem(src, f, 'duplicate-block', 'B');
    expect(f.matrices.filter((m) => m.name === 'B')).toHaveLength(1);
  });
  it('spaced operators get a hint; ^ is a power; period line', () => {
    const src = 'system s discrete\n  period 0.5\n  A:\n    2^2 m * g\nend\n';
    const f = extract(src, 'lti');
    const p = f.problems.find((q) => q.code === 'syntax-error');
    expect(p?.message).toMatch(/parentheses/);
    expect(f.systems[0].period?.kind === 'exact' && f.systems[0].period.value.toString()).toBe('1/2');
  });
  it('unexpected end and blocks outside a system', () => {
    const src = 'end\nA:\n  1\n';
    const f = extract(src, 'lti');
    expectProblem(src, f, 'unexpected-end', 'end');
    expect(f.problems.some((q) => q.code === 'syntax-error' && src.slice(q.span.start, q.span.end) === 'A')).toBe(true);
  });
  it('pragmas in .lti comments', () => {
    const src = 'system s continuous\n  # eigenlens: ignore\n  Q:\n    1\n  A:\n    -1\nend\n';
    const f = extract(src, 'lti');
    expect(f.matrices.map((m) => m.name)).toEqual(['A']);
  });
});
