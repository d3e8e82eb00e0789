/**
 * One large matrix does not hold the thread: its literal is read row by row and its float
 * eigenvalues are computed in steps, and the results are the ones computed in one go.
 *
 * References: the eigenvalues of the 64×64 and 200×200 invented matrices below are those of
 * our one-go Hessenberg QR (itself checked against published values elsewhere); for a
 * symmetric tridiagonal Toeplitz matrix with diagonal a and off-diagonals b the eigenvalues
 * are a + 2b·cos(kπ/(n+1)), k = 1..n (G. D. Smith, "Numerical Solution of Partial
 * Differential Equations", 3rd ed., 1985, §2.11; also R. M. Gray, "Toeplitz and Circulant
 * Matrices: A Review", 2006, §4.5), which checks the stepped path on its own.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { AnalysisCache, analyzeDocument, analyzeDocumentSteps, DEFAULT_SETTINGS, DEFERRED_SPECTRUM_N, initAnalysis, STEPPED_SPECTRUM_N } from '../../server/src/analysis/analyze';
import type { DocumentReport } from '../../server/src/analysis/report';
import { eigenFloat, eigenvalueSteps, hessenbergQrEigenvalues } from '../../server/src/engine/eigenFloat';
import { clearExtractCaches, extract, extractSlice } from '../../server/src/syntax/extract';
import { STEPPED_LITERAL_CHARS } from '../../server/src/syntax/literal';
// @ts-expect-error plain JavaScript module without type declarations
import { seededRandom } from '../fuzz/targets.mjs';

beforeAll(async () => {
  await initAnalysis();
});

const json = (x: unknown) => JSON.stringify(x, (_k, v: unknown) => (typeof v === 'bigint' ? v.toString() : v));
const reportJson = (r: DocumentReport) => json({ ...r, incomplete: undefined, findings: r.findings.filter((f) => f.code !== 'analysis-limit'), matrices: r.matrices.map((m) => ({ ...m, transition: m.transition })) });

/** Runs a stepwise computation to its end: its result and how many times it yielded. */
function drain<T>(steps: Generator<unknown, T, void>): { value: T; yields: number } {
  let yields = 0;
  let r = steps.next();
  while (!r.done) {
    yields++;
    r = steps.next();
  }
  return { value: r.value, yields };
}

function randomMatrix(n: number, seed: number): number[][] {
  const rnd = seededRandom(seed);
  return Array.from({ length: n }, () => Array.from({ length: n }, () => Math.round((rnd() * 20 - 10) * 1000) / 1000));
}

/** An invented source file with one n×n state matrix `A` (Python list or TypeScript array). */
function source(A: number[][], language: 'python' | 'typescript'): string {
  const rows = A.map((r) => `[${r.join(', ')}]`).join(',\n     ');
  return language === 'python' ? `# invented ${A.length}x${A.length} state matrix\nA = [${rows}]\n` : `// invented ${A.length}x${A.length} state matrix\nconst A = [${rows}];\n`;
}

describe('float eigenvalues in steps', () => {
  it('give exactly the one-go eigenvalues, in several steps, and a later eigenFloat of the same entries reuses them', () => {
    const A = randomMatrix(200, 3);
    const { value, yields } = drain(eigenvalueSteps(A));
    expect(yields).toBeGreaterThan(20);
    const oneGo = eigenFloat(A.map((row) => row.slice()));
    expect(value).toEqual(oneGo.values);
    // A changed entry is not the matrix remembered: computed afresh, so the values differ.
    const B = A.map((row) => row.slice());
    B[17][42] += 1;
    expect(eigenFloat(B).values).not.toEqual(oneGo.values);
  });

  it('match the closed-form eigenvalues of a tridiagonal Toeplitz matrix', () => {
    const n = 80;
    const a = -2;
    const b = 1;
    const T = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? a : Math.abs(i - j) === 1 ? b : 0)));
    const { value: eigenvalues } = drain(eigenvalueSteps(T));
    const got = eigenvalues.map((v) => v.re).sort((x, y) => x - y);
    const want = Array.from({ length: n }, (_, k) => a + 2 * b * Math.cos(((k + 1) * Math.PI) / (n + 1))).sort((x, y) => x - y);
    for (let k = 0; k < n; k++) expect(Math.abs(got[k] - want[k])).toBeLessThan(1e-12);
    for (const v of eigenvalues) expect(v.im).toBe(0);
    expect(hessenbergQrEigenvalues(T).map((v) => v.re).sort((x, y) => x - y)).toEqual(got);
  });
});

describe('a long literal is read in steps', () => {
  for (const language of ['python', 'typescript'] as const) {
    it(`${language}: a 120×120 literal alone in its file is read across many slices and gives the one-go extraction`, () => {
      const text = source(randomMatrix(120, 5), language);
      expect(text.length).toBeGreaterThan(STEPPED_LITERAL_CHARS);
      clearExtractCaches();
      const oneGo = json(extract(text, language, { reuse: false }));
      clearExtractCaches();
      const phases: string[] = [];
      for (let i = 0; i < 100_000; i++) {
        const p = extractSlice(text, language, undefined, 0);
        phases.push(p.phase);
        if (p.done) break;
      }
      // The statement is one top-level statement: more than one reading slice means the walk stopped inside it.
      expect(phases.filter((p) => p === 'reading').length).toBeGreaterThan(3);
      expect(phases.at(-1)).toBe('done');
      expect(json(extract(text, language))).toBe(oneGo);
    });
  }
});

describe('a pass in steps over one large matrix', () => {
  it(`suspends inside the matrix's spectrum (n = 64 ≥ ${STEPPED_SPECTRUM_N}) and equals a pass in one go`, () => {
    const text = source(randomMatrix(64, 9), 'python');
    const unhurried = { ...DEFAULT_SETTINGS, timeBudgetMs: Number.POSITIVE_INFINITY };
    const oneGo = analyzeDocument(text, 'python', unhurried, { cache: new AnalysisCache() });
    expect(oneGo.matrices[0].spectrum).not.toBeNull();
    extract(text, 'python');
    // A step length of a hundredth of a millisecond: every step of the eigenvalue computation is a suspension.
    const { value, yields } = drain(analyzeDocumentSteps(text, 'python', unhurried, { cache: new AnalysisCache() }, 0.01));
    expect(yields).toBeGreaterThan(5);
    expect(reportJson(value)).toBe(reportJson(oneGo));
  });

  it(`a pass in one go that defers large spectra leaves the matrix (n = ${DEFERRED_SPECTRUM_N}) for later, even at the focus; a stepped pass then analyses it`, () => {
    const text = source(randomMatrix(DEFERRED_SPECTRUM_N, 10), 'python');
    const cache = new AnalysisCache();
    const focus = text.indexOf('A =') + 1;
    const deferred = analyzeDocument(text, 'python', DEFAULT_SETTINGS, { cache, focus, deferLargeSpectra: true });
    expect(deferred.matrices[0].spectrum).toBeNull();
    expect(deferred.matrices[0].skipped.join(' ')).toMatch(/later pass analyses it/);
    expect(deferred.incomplete).toBe(true);
    const { value: stepped } = drain(analyzeDocumentSteps(text, 'python', DEFAULT_SETTINGS, { cache, previous: deferred }, 40));
    expect(stepped.matrices[0].spectrum?.eigenvalues.length).toBeGreaterThan(0);
    // Once analysed (cached), a deferring pass has it too.
    expect(analyzeDocument(text, 'python', DEFAULT_SETTINGS, { cache, focus, deferLargeSpectra: true }).matrices[0].spectrum).not.toBeNull();
    // Smaller matrices are not deferred.
    const smaller = analyzeDocument(source(randomMatrix(DEFERRED_SPECTRUM_N - 1, 11), 'python'), 'python', DEFAULT_SETTINGS, { cache, deferLargeSpectra: true });
    expect(smaller.matrices[0].spectrum).not.toBeNull();
  });
});
