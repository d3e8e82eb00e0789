// The opening pass of a large document (ide/opening.ts): where it cuts, and that it shows
// only what the prefix settles. The texts are invented; the rule being checked is ours
// (a prefix can only lack findings, never change one), so the reference is the full analysis.
import { beforeAll, describe, expect, it } from 'vitest';
import { AnalysisCache, analyzeDocument, DEFAULT_SETTINGS, initAnalysis } from '../../server/src/analysis/analyze';
import { diagnosticsOf } from '../../server/src/ide/diagnostics';
import { openingCut, openingDiagnostics } from '../../server/src/ide/opening';

beforeAll(async () => {
  await initAnalysis();
});

describe('openingCut', () => {
  it('leaves small documents whole', () => {
    expect(openingCut('A = [[1, 2], [3, 4]]\n'.repeat(100))).toBeNull();
  });

  it('cuts at a top-level line after the target, never inside a bracket that goes on', () => {
    // Rows continue on indented lines and after a trailing comma: neither is a place to cut.
    const block = 'A_k = np.array([[1, 2],\n                [3, 4]])\nB_k = [[1,\n0]]\n';
    const text = 'import numpy as np\n' + block.repeat(4000);
    const cut = openingCut(text, 1000, 10_000)!;
    expect(cut).toBeGreaterThan(1000);
    expect(['A_k ', 'B_k ']).toContain(text.slice(cut, cut + 4));
    expect(text[cut - 1]).toBe('\n');
  });

  it('gives up when no line within twice the target can start a statement', () => {
    const text = 'A = [\n' + '  1,\n'.repeat(40_000) + ']\n';
    expect(openingCut(text, 1000, 10_000)).toBeNull();
  });
});

describe('openingDiagnostics', () => {
  // Invented matrices: one unstable ([[1, 0], [0, -2]]: λ = 1 grows), one stable, repeated.
  const block = (i: number) => `A_${i} = [[1, 0], [0, -2]]\nS_${i} = [[-1, 0], [0, -3]]\nk_${i} = 2\n`;
  const text = Array.from({ length: 3000 }, (_, i) => block(i)).join('');

  it('keeps the findings of matrices the prefix holds whole, each as the full analysis reports it', () => {
    const cut = openingCut(text)!;
    expect(cut).not.toBeNull();
    const prefix = text.slice(0, cut);
    const early = openingDiagnostics(analyzeDocument(prefix, 'python', DEFAULT_SETTINGS, { cache: new AnalysisCache() }), prefix, 9001);
    expect(early[0].code).toBe('analysis-limit');
    expect(early[0].message).toMatch(/^eigenlens is still analysing this file \(9,001 lines\): the diagnostics so far cover lines 1–\d+; the rest follow\.$/);
    const full = diagnosticsOf(analyzeDocument(text, 'python', { ...DEFAULT_SETTINGS, timeBudgetMs: Number.POSITIVE_INFINITY }));
    const key = (d: { code: string; span: { start: number; end: number }; message: string }) => `${d.code}@${d.span.start}-${d.span.end} ${d.message}`;
    const fullKeys = new Set(full.map(key));
    const rest = early.slice(1);
    expect(rest.filter((d) => d.code === 'unstable-mode').length).toBeGreaterThan(10);
    for (const d of rest) expect(fullKeys.has(key(d)), key(d)).toBe(true);
    // Nothing from the last matrix of the prefix, which the cut may have truncated.
    const lastStatement = prefix.lastIndexOf('\nA_') + 1;
    for (const d of rest) expect(d.span.end).toBeLessThanOrEqual(Math.max(lastStatement, prefix.lastIndexOf('\nS_') + 1));
  });
});
