// The matrix and model caches must never change a result: a cached analysis after an edit
// elsewhere equals a fresh one, with every finding at the literal's new position.
import { beforeAll, describe, expect, it } from 'vitest';
import { AnalysisCache, analyzeDocument, DEFAULT_SETTINGS, initAnalysis } from '../../server/src/analysis/analyze';

beforeAll(async () => {
  await initAnalysis();
});

// Kalman rank test (CHECKS, check 20): B = [[1],[0]] leaves the double integrator uncontrollable,
// C = [[0,1]] leaves it unobservable.
const source = 'A = [[0, 1], [0, 0]]\nB = [[1], [0]]\nC = [[0, 1]]\n# eigenlens: period=0.5\nA2 = [[0, 1], [-100, 0]]\nB2 = [[0], [1]]\n';

function summary(text: string, cache?: AnalysisCache) {
  const r = analyzeDocument(text, 'python', DEFAULT_SETTINGS, { cache });
  return {
    findings: r.matrices.flatMap((m) => m.findings.map((f) => ({ name: m.name, code: f.code, text: text.slice(f.span.start, f.span.end), message: f.message }))),
    models: r.models.map((m) => ({ id: m.id, state: m.state, controllable: m.controllability?.controllable, observable: m.observability?.controllable })),
  };
}

describe('analysis cache', () => {
  it('cached results after an edit above equal fresh ones, findings at the moved literals', () => {
    const cache = new AnalysisCache();
    summary(source, cache);
    const edited = '# a comment line added above everything\nk = 3\n' + source;
    const cached = summary(edited, cache);
    expect(cache.hits).toBeGreaterThan(0);
    expect(cached).toEqual(summary(edited));
    expect(cached.findings.map((f) => f.code)).toEqual(expect.arrayContaining(['uncontrollable-mode', 'unobservable-mode', 'aliasing']));
    const b = cached.findings.find((f) => f.code === 'uncontrollable-mode')!;
    expect(b.text).toBe('[[1], [0]]');
  });
});
