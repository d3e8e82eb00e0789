// Bundles the engine and analysis entry points the benchmark calls into one CommonJS file
// under dist/ (gitignored), so the benchmark runs with plain node and no TypeScript loader.
import { bundleEntry } from '../support/bundleEntry.mjs';

const ENTRY = `
export { Rational } from './server/src/engine/rational';
export { exactSpectrum } from './server/src/engine/spectrumExact';
export { floatSpectrum } from './server/src/engine/spectrumFloat';
export { stabilityOf } from './server/src/engine/stability';
export { modesOf } from './server/src/engine/modes';
export { transitionClosedForm } from './server/src/engine/closedForm';
export { expmTimes } from './server/src/engine/expm';
export { evaluateTransition } from './server/src/engine/transitionEval';
export { analyzeDocument, initAnalysis, AnalysisCache, DEFAULT_SETTINGS } from './server/src/analysis/analyze';
// The debounce the server documents, so edit latencies can be reported without it.
export { DIAGNOSTIC_DEBOUNCE_MS } from './server/src/lsp/server';
`;

export async function bundleBenchEngine(root) {
  return bundleEntry(root, ENTRY, 'bench-engine.cjs');
}
