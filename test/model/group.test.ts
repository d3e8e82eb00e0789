/**
 * Model grouping and dimension checks. The dimension rules are the standard state-space
 * shapes x' = Ax + Bu + Gw, y = Cx + Du with A n×n, B n×m, C p×n, D p×m, G n×q, Q q×q
 * (e.g. Franklin, Powell & Workman, "Digital Control of Dynamic Systems", ch. 4; from memory).
 */
import { describe, expect, it } from 'vitest';
import { extract, initParsers } from '../../server/src/syntax/extract';
import { groupModels, type GroupSettings } from '../../server/src/model/group';

await initParsers();
const settings: GroupSettings = { defaultDomain: 'continuous', defaultPeriod: null };

function group(src: string, lang: 'python' | 'typescript' | 'lti' = 'python', s = settings) {
  const file = extract(src, lang);
  const g = groupModels(file, s);
  const name = (i: number | null) => (i === null ? null : file.matrices[i].name);
  return { file, ...g, name, slice: (p: { span: { start: number; end: number } }) => src.slice(p.span.start, p.span.end) };
}

describe('groupModels', () => {
  it('groups by suffix and infers the domain from the name', () => {
    const g = group('A = [[0, 1], [-2, -3]]\nB = [[0], [1]]\nC = [[1, 0]]\nD = [[0]]\nAd = [[1, 0.1], [0, 1]]\nBd = [[0], [0.1]]\n');
    expect(g.problems).toEqual([]);
    expect(g.models.map((m) => [m.id, g.name(m.state), g.name(m.input), g.name(m.output), g.name(m.feedthrough), m.domain, m.domainSource])).toEqual([
      ['A', 'A', 'B', 'C', 'D', 'continuous', 'setting'],
      ['d', 'Ad', 'Bd', null, null, 'discrete', 'name'],
    ]);
  });
  it('pragma beats name; period from pragma, exact text kept', () => {
    const g = group('# eigenlens: continuous\nA_d = [[-1]]\nF = [[0.5]]  # eigenlens: discrete period=0.02\n');
    expect(g.models.map((m) => [g.name(m.state), m.domain, m.domainSource, m.period, m.periodExact])).toEqual([
      ['A_d', 'continuous', 'pragma', null, null],
      ['F', 'discrete', 'pragma', 0.02, '1/50'],
    ]);
  });
  it('file pragma and settings as fallbacks', () => {
    const g = group('# eigenlens: discrete period=0.1\n\nimport numpy as np\nA = [[0.9]]\n', 'python');
    expect([g.models[0].domain, g.models[0].domainSource, g.models[0].periodExact]).toEqual(['discrete', 'pragma', '1/10']);
    const h = group('A = [[0.9]]\n', 'python', { defaultDomain: 'discrete', defaultPeriod: 0.5 });
    expect([h.models[0].domain, h.models[0].domainSource, h.models[0].period]).toEqual(['discrete', 'setting', 0.5]);
  });
  it('shape errors name expected and found, on the offending matrix', () => {
    const src = 'A = [[0, 1], [-2, -3]]\nB = [[0], [1], [2]]\nC = [[1, 0, 0]]\nG = [[1], [0]]\nQ = [[1, 0], [0, 1]]\n';
    const g = group(src);
    const byCode = g.problems.map((p) => [p.code, g.slice(p)]);
    expect(byCode).toEqual([
      ['shape-mismatch', '[[0], [1], [2]]'],
      ['shape-mismatch', '[[1, 0, 0]]'],
      ['shape-mismatch', '[[1, 0], [0, 1]]'],
    ]);
    expect(g.problems[0].message).toMatch(/3×1 but should be 2×1/);
    expect(g.problems[2].message).toMatch(/should be 1×1/);
    const m = g.models[0];
    expect([m.input, m.output, m.noiseCovariance]).toEqual([null, null, null]);
    expect(g.name(m.noiseInput)).toBe('G');
  });
  it('D must be outputs × inputs; non-square state matrix', () => {
    const g = group('A = [[0, 1], [-2, -3]]\nB = [[0], [1]]\nC = [[1, 0]]\nD = [[0, 0]]\nA_x = [[1, 2]]\n');
    expect(g.problems.map((p) => [p.code, g.slice(p)])).toEqual([
      ['shape-mismatch', '[[0, 0]]'],
      ['non-square-state', '[[1, 2]]'],
    ]);
  });
  it('redefinitions pair each A with the B that follows it', () => {
    const g = group('A = [[1]]\nB = [[2]]\nA = [[3, 0], [0, 3]]\nB = [[1], [1]]\n');
    expect(g.problems).toEqual([]);
    expect(g.models.map((m) => [m.id, m.state, m.input])).toEqual([
      ['A', 0, 1],
      ['A#2', 2, 3],
    ]);
  });
  it('Qc joins the plain model', () => {
    const g = group('A = [[-1]]\nG = [[1]]\nQc = [[0.1]]\n');
    expect(g.name(g.models[0].noiseCovariance)).toBe('Qc');
  });
  it('.lti systems give domain, period, names; no duplicate shape errors', () => {
    const src = 'system s discrete period=0.1\n  states a b\n  inputs u\n  A:\n    1 0.1\n    0 1\n  B:\n    0\n    0.1\n    9\nend\n';
    const g = group(src, 'lti');
    const m = g.models[0];
    expect([m.id, m.domain, m.domainSource, m.periodExact, m.stateNames, m.inputNames]).toEqual(['s', 'discrete', 'system', '1/10', ['a', 'b'], ['u']]);
    // lti.ts already reports B against the declared states; grouping does not repeat it.
    expect(g.file.problems.filter((p) => p.code === 'shape-mismatch')).toHaveLength(1);
    expect(g.problems).toEqual([]);
    expect(m.input).toBeNull();
  });
  it('TypeScript objects group by the object name', () => {
    const g = group('const motor = { A: [[-2]], B: [[1]] };\nconst pump = { A: [[-5]], B: [[3]] };\n', 'typescript');
    expect(g.models.map((m) => [m.id, m.state, m.input])).toEqual([
      ['motor', 0, 1],
      ['pump', 2, 3],
    ]);
  });
});
