// Whole-document analysis in process (no protocol): the same generated 5,000-line files the
// server bench opens, analysed by analyzeDocument with a cold matrix cache and with a warm
// one. This separates the analysis cost from the protocol and process costs seen by the
// server bench, and points at where a slow first diagnostics comes from.
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { generateSourceFile } from './generate.mjs';
import { summary } from './stats.mjs';

export async function runDocumentBench(E, root, { log = () => {} } = {}) {
  const t0 = performance.now();
  await E.initAnalysis({ wasmDir: join(root, 'dist') });
  const initMs = performance.now() - t0;
  // No time budget here: this measures what analysing every matrix costs.
  const settings = { ...E.DEFAULT_SETTINGS, timeBudgetMs: Number.POSITIVE_INFINITY };
  const out = [];
  for (const [language, seed] of [['python', 5001], ['typescript', 5002]]) {
    const { text } = generateSourceFile(seed, language);
    const cold = [];
    let report;
    for (let i = 0; i < 2; i++) {
      const cache = new E.AnalysisCache();
      const s = performance.now();
      report = E.analyzeDocument(text, language, settings, { cache });
      cold.push(performance.now() - s);
    }
    const cache = new E.AnalysisCache();
    E.analyzeDocument(text, language, settings, { cache });
    const warm = [];
    for (let i = 0; i < 10; i++) {
      const s = performance.now();
      E.analyzeDocument(text, language, settings, { cache });
      warm.push(performance.now() - s);
    }
    const analysed = report.matrices.filter((m) => m.spectrum).length;
    const withClosedForm = report.matrices.filter((m) => m.transition).length;
    const row = { language, parserInitMs: initMs, matrices: report.matrices.length, analysed, withClosedForm, cold: summary(cold), warm: summary(warm) };
    log(`document ${language}: cold ${row.cold.median.toFixed(0)} ms, warm ${row.warm.median.toFixed(1)} ms; ${analysed}/${row.matrices} analysed, ${withClosedForm} closed forms`);
    out.push(row);
  }
  return out;
}
