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

describe('passes that run out of time', () => {
  it('a model whose state matrix a pass did not reach gets its findings in the pass that does', () => {
    // Same Kalman rank case as above (CHECKS, check 20): the double integrator with B = [[1],[0]]
    // is uncontrollable and with C = [[0, 1]] unobservable.
    const cache = new AnalysisCache();
    const first = analyzeDocument(source, 'python', { ...DEFAULT_SETTINGS, timeBudgetMs: -1 }, { cache });
    expect(first.incomplete).toBe(true);
    expect(first.models[0].controllability).toBeNull();
    const next = summary(source, cache);
    expect(next).toEqual(summary(source));
    expect(next.findings.map((f) => f.code)).toEqual(expect.arrayContaining(['uncontrollable-mode', 'unobservable-mode']));
  });
});

describe('closed forms built on demand', () => {
  // Moler & Van Loan 1978 ("Nineteen dubious ways", the [[−49, 24], [−64, 31]] example):
  // e^{A} ≈ [[−0.735759, 0.551819], [−1.471518, 1.103638]] (CHECKS.md #1). A Jordan block
  // [[−1, 1], [0, −1]] gives e^{At} = e^{−t}[[1, t], [0, 1]] (standard).
  const text = 'A1 = [[-49, 24], [-64, 31]]\nA2 = [[-1, 1], [0, -1]]\nA3 = [[0, 1], [-4, 0]]\n';
  const value = (m: { transition: import('../../server/src/engine/types').TransitionClosedForm | null }, t: number) =>
    m.transition!.entries.map((row) =>
      row.map((terms) => terms.reduce((s, term) => ('rate' in term ? s + term.coef * t ** term.power * Math.exp(term.rate * t) * (term.wave === 'cos' ? Math.cos(term.freq * t) : Math.sin(term.freq * t)) : s), 0)),
    );

  it('the analysis checks every closed form but keeps only as many terms as the store allows', () => {
    const cache = new AnalysisCache(2000, 1);
    const report = analyzeDocument(text, 'python', DEFAULT_SETTINGS, { cache });
    // Every check ran during the analysis (three builds), yet the store held on to one closed form.
    expect(cache.closedForms.builds).toBe(3);
    expect(cache.closedForms.size).toBe(1);
    expect(report.incomplete).toBe(false);
    // Reading an evicted closed form rebuilds it, with the published values.
    const [a1, a2] = report.matrices;
    const e1 = value(a1, 1);
    expect(cache.closedForms.builds).toBe(4);
    [[-0.735759, 0.551819], [-1.471518, 1.103638]].forEach((row, r) => row.forEach((x, c) => expect(e1[r][c]).toBeCloseTo(x, 5)));
    const e2 = value(a2, 2);
    expect(e2[0][1]).toBeCloseTo(2 * Math.exp(-2), 12);
    // A rebuild is the first build exactly, its check included (taken over, not run again).
    const fresh = analyzeDocument(text, 'python', DEFAULT_SETTINGS, { cache: new AnalysisCache() });
    expect(JSON.stringify(a1.transition)).toBe(JSON.stringify(fresh.matrices[0].transition));
    expect(JSON.stringify(a2.transition)).toBe(JSON.stringify(fresh.matrices[1].transition));
    // A copy of a report does not build anything.
    const before = cache.closedForms.builds;
    const copy = { ...report.matrices[2] };
    expect(cache.closedForms.builds).toBe(before);
    expect('transition' in copy).toBe(false);
    expect(report.matrices[2].closedFormAvailable).toBe(true);
  });

  it('a pass whose budget runs out leaves checks for the next pass and says so', () => {
    const cache = new AnalysisCache();
    // Stop after the verdicts: isCancelled is asked once per matrix before its analysis, then
    // before each check, so answering "go on" three times lets exactly the verdicts through.
    let asked = 0;
    const first = analyzeDocument(text, 'python', DEFAULT_SETTINGS, { cache, isCancelled: () => ++asked > 3 });
    expect(first.matrices.every((m) => m.stability !== null)).toBe(true);
    expect(first.incomplete).toBe(true);
    expect(first.findings.find((f) => f.code === 'analysis-limit')?.message).toMatch(/not yet checked/);
    expect(cache.closedForms.builds).toBe(0);
    const next = analyzeDocument(text, 'python', DEFAULT_SETTINGS, { cache });
    expect(next.incomplete).toBe(false);
    expect(cache.closedForms.builds).toBe(3);
  });
});
