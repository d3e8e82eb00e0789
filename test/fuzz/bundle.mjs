// Bundles the analysis and engine entry points the long fuzz run calls into one CommonJS
// file, dist/fuzz-entry.js (dist/ is gitignored), so the run needs only plain node.
import { bundleEntry } from '../support/bundleEntry.mjs';

const ENTRY = `
export { Rational } from './server/src/engine/rational';
export { exactSpectrum } from './server/src/engine/spectrumExact';
export { floatSpectrum } from './server/src/engine/spectrumFloat';
export { transitionClosedForm } from './server/src/engine/closedForm';
export { expm, expmTimes } from './server/src/engine/expm';
export { evaluateTransition } from './server/src/engine/transitionEval';
export { evaluateEntry } from './server/src/syntax/evaluate';
export { extract } from './server/src/syntax/extract';
export { analyzeDocument, initAnalysis, AnalysisCache, DEFAULT_SETTINGS } from './server/src/analysis/analyze';
`;

export async function bundleFuzzEntry(root) {
  return bundleEntry(root, ENTRY, 'fuzz-entry.js');
}
