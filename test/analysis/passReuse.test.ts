// Passes over the same text that take over what earlier passes settled (AnalyzeOptions.previous)
// must give exactly the report of one unhurried pass. Reference: the single pass with no time
// budget (its own correctness is what the engine and analysis tests check); the files are
// generated invented ones (test/bench/generate.mjs) with models (A with B, C, D) and with
// uncontrollable pairs (Kalman rank test, CHECKS check 20) in the hand-written one below.
import { beforeAll, describe, expect, it } from 'vitest';
import { AnalysisCache, analyzeDocument, analyzeDocumentSteps, DEFAULT_SETTINGS, initAnalysis } from '../../server/src/analysis/analyze';
import type { DocumentReport } from '../../server/src/analysis/report';
import type { SourceLanguage } from '../../server/src/syntax/types';
// @ts-expect-error plain JavaScript module without type declarations
import { generateSourceFile } from '../bench/generate.mjs';

beforeAll(async () => {
  await initAnalysis();
});

/** The report as data (closed forms read through the getter, bigints as strings). */
const json = (r: DocumentReport) =>
  JSON.stringify({ ...r, incomplete: undefined, findings: r.findings.filter((f) => f.code !== 'analysis-limit'), matrices: r.matrices.map((m) => ({ ...m, transition: m.transition })) }, (_k, v: unknown) =>
    typeof v === 'bigint' ? v.toString() : v,
  );

const unhurried = { ...DEFAULT_SETTINGS, timeBudgetMs: Number.POSITIVE_INFINITY };

function inPasses(text: string, language: SourceLanguage, budgetMs: number, opts: { deferFirst?: boolean } = {}) {
  const cache = new AnalysisCache();
  let report: DocumentReport | undefined;
  let passes = 0;
  do {
    report = analyzeDocument(text, language, { ...DEFAULT_SETTINGS, timeBudgetMs: budgetMs }, { cache, previous: report, deferChecks: opts.deferFirst === true && passes === 0 });
    passes++;
  } while (report.incomplete && passes < 10_000);
  return { report, passes };
}

const handWritten = [
  '# invented: two models, the first neither controllable nor observable',
  'A = [[0, 1], [0, 0]]', 'B = [[1], [0]]', 'C = [[0, 1]]',
  '# eigenlens: period=0.5', 'A2 = [[0, 1], [-100, -1]]', 'B2 = [[0], [1]]', 'C2 = [[1, 0]]', 'D2 = [[0]]',
  'A3 = [[-1, 1, 0], [0, -1, 1], [0, 0, -1]]',
].join('\n') + '\n';

describe('passes that reuse what earlier passes settled', () => {
  it('a hand-written file analysed one matrix per pass equals one pass', () => {
    const { report, passes } = inPasses(handWritten, 'python', 0, { deferFirst: true });
    expect(passes).toBeGreaterThan(1);
    const whole = analyzeDocument(handWritten, 'python', unhurried, { cache: new AnalysisCache() });
    expect(json(report)).toBe(json(whole));
    // The model findings are on B and C once each, not once per pass.
    const codes = report.matrices.flatMap((m) => m.findings.map((f) => `${m.name}:${f.code}`));
    expect(codes.filter((c) => c === 'B:uncontrollable-mode')).toHaveLength(1);
    expect(codes.filter((c) => c === 'C:unobservable-mode')).toHaveLength(1);
  });

  for (const language of ['python', 'typescript'] as SourceLanguage[]) {
    it(`${language}: a generated 120-matrix file analysed in 5 ms passes equals one pass`, () => {
      const { text } = generateSourceFile(language === 'python' ? 61 : 62, language, { lines: 1500, count: 120 }) as { text: string };
      const { report, passes } = inPasses(text, language, 5, { deferFirst: true });
      expect(passes).toBeGreaterThan(2);
      const whole = analyzeDocument(text, language, unhurried, { cache: new AnalysisCache() });
      expect(json(report)).toBe(json(whole));
    });
  }

  it('a pass that again runs out of budget takes over the reports it left for later, and their model findings are not added twice', () => {
    const { text } = generateSourceFile(63, 'python', { lines: 1500, count: 120 }) as { text: string };
    const cache = new AnalysisCache();
    const hurried = { ...DEFAULT_SETTINGS, timeBudgetMs: 0 };
    const waiting = (r: DocumentReport) => new Map(r.matrices.filter((m) => m.role === 'state' && m.spectrum === null && m.skipped.some((x) => x.startsWith('Not analysed'))).map((m) => [m.index, m]));
    const codes = (r: DocumentReport, index: number) => r.matrices.filter((m) => m.index === index || m.modelId !== null && m.modelId === r.matrices.find((x) => x.index === index)?.modelId).map((m) => m.findings.map((f) => f.code).join(',')).join(';');
    let previous = analyzeDocument(text, 'python', hurried, { cache });
    let checked = 0;
    for (let pass = 0; pass < 3; pass++) {
      const before = waiting(previous);
      // Read before the next pass, which takes these very objects over.
      const codesBefore = new Map([...before.keys()].map((i) => [i, codes(previous, i)]));
      const next = analyzeDocument(text, 'python', hurried, { cache, previous });
      for (const [index, report] of waiting(next)) {
        if (!before.has(index)) continue;
        // The same report, not one built again, with the same findings on it and its model's
        // matrices; a copy, so the earlier report (still the one requests read while a pass is
        // suspended, see analyzeDocumentSteps) keeps its own findings.
        expect(json({ ...next, matrices: [report] })).toBe(json({ ...next, matrices: [before.get(index)!] }));
        expect(codes(next, index)).toBe(codesBefore.get(index));
        expect(codes(previous, index)).toBe(codesBefore.get(index));
        checked++;
      }
      previous = next;
    }
    expect(checked).toBeGreaterThan(0);
    // A pass with time finishes them as one unhurried pass would.
    const last = analyzeDocument(text, 'python', unhurried, { cache, previous });
    expect(json(last)).toBe(json(analyzeDocument(text, 'python', unhurried, { cache: new AnalysisCache() })));
  });

  it('a pass in steps, with other passes run while it is suspended, equals one pass and leaves the earlier report as it was', () => {
    const { text } = generateSourceFile(64, 'python', { lines: 1500, count: 120 }) as { text: string };
    const cache = new AnalysisCache();
    // An earlier, unfinished report of the same text, as requests read it meanwhile.
    const earlier = analyzeDocument(text, 'python', { ...DEFAULT_SETTINGS, timeBudgetMs: 0 }, { cache });
    const earlierJson = json(earlier);
    const steps = analyzeDocumentSteps(text, 'python', unhurried, { cache, previous: earlier }, 1);
    let suspended = 0;
    let step = steps.next();
    while (!step.done) {
      suspended++;
      // A hover on some matrix while the pass is suspended: its own pass over the same report.
      const focus = earlier.matrices[(suspended * 37) % earlier.matrices.length].statementSpan.start;
      analyzeDocument(text, 'python', { ...DEFAULT_SETTINGS, timeBudgetMs: 0 }, { cache, previous: earlier, focus });
      step = steps.next();
    }
    expect(suspended).toBeGreaterThan(3);
    expect(json(earlier)).toBe(earlierJson);
    expect(json(step.value)).toBe(json(analyzeDocument(text, 'python', unhurried, { cache: new AnalysisCache() })));
  });

  it('a focused-only report has the matrix at the focus and its model, as the whole report has them', () => {
    const cache = new AnalysisCache();
    const whole = analyzeDocument(handWritten, 'python', unhurried, { cache: new AnalysisCache() });
    const at = (name: string) => whole.matrices.find((m) => m.name === name)!;
    // On an entry of B2: the model of A2 (A2, B2, C2, D2), and nothing else.
    const part = analyzeDocument(handWritten, 'python', unhurried, { cache, focus: at('B2').span.start + 2, focusOnly: true });
    expect(part.partial).toBe(true);
    expect(part.matrices.map((m) => m.name)).toEqual(['A2', 'B2', 'C2', 'D2']);
    expect(json({ ...part, partial: undefined, findings: [], models: [] })).toBe(json({ ...whole, findings: [], models: [], matrices: whole.matrices.filter((m) => m.modelId === at('A2').modelId) }));
    expect(JSON.stringify(part.models)).toBe(JSON.stringify(whole.models.filter((m) => m.state === at('A2').index)));
    // A matrix with no model of others: itself only; outside every statement: nothing.
    expect(analyzeDocument(handWritten, 'python', unhurried, { cache, focus: at('A3').nameSpan!.start, focusOnly: true }).matrices.map((m) => m.name)).toEqual(['A3']);
    expect(analyzeDocument(handWritten, 'python', unhurried, { cache, focus: 3, focusOnly: true }).matrices).toEqual([]);
  });

  it('a pass with no step length runs in one step', () => {
    const steps = analyzeDocumentSteps(handWritten, 'python', unhurried, { cache: new AnalysisCache() }, 0);
    const step = steps.next();
    expect(step.done).toBe(true);
  });

  it('a previous report of another text or other settings is not used', () => {
    const cache = new AnalysisCache();
    const first = analyzeDocument(handWritten, 'python', unhurried, { cache });
    const other = handWritten.replace('B = [[1], [0]]', 'B = [[0], [1]]');
    const next = analyzeDocument(other, 'python', unhurried, { cache, previous: first });
    expect(json(next)).toBe(json(analyzeDocument(other, 'python', unhurried, { cache: new AnalysisCache() })));
    const discrete = { ...unhurried, defaultDomain: 'discrete' as const };
    const again = analyzeDocument(handWritten, 'python', discrete, { cache, previous: first });
    expect(json(again)).toBe(json(analyzeDocument(handWritten, 'python', discrete, { cache: new AnalysisCache() })));
  });

  it('after lines are added above, moved matrices keep their analyses and every span is the fresh one', () => {
    // The literals below the edit are copies moved by the edit (syntax/literalMemo.ts); their
    // cached keys and values carry over, their spans must not.
    const { text } = generateSourceFile(61, 'python', { lines: 400, count: 40 }) as { text: string };
    const cache = new AnalysisCache();
    analyzeDocument(text, 'python', unhurried, { cache });
    const edited = `# two lines\n# added above\n${text}`;
    const misses = cache.misses;
    const moved = analyzeDocument(edited, 'python', unhurried, { cache });
    expect(cache.misses).toBe(misses); // nothing analysed again
    expect(json(moved)).toBe(json(analyzeDocument(edited, 'python', unhurried, { cache: new AnalysisCache() })));
    expect(moved.matrices[0]?.entrySpans?.[0]?.[0]?.start ?? 0).toBeGreaterThan(text.indexOf("[") + 20);
  });
});
