// Bundles the analysis and engine entry points the long fuzz run calls into one CommonJS
// file, dist/fuzz-entry.js (dist/ is gitignored), so the run needs only plain node.
// Same esbuild settings as scripts/build.mjs, including the web-tree-sitter alias.
import { build } from 'esbuild';
import { createRequire } from 'node:module';
import { join } from 'node:path';

const require = createRequire(import.meta.url);

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
  const outfile = join(root, 'dist', 'fuzz-entry.js');
  await build({
    stdin: { contents: ENTRY, resolveDir: root, loader: 'ts', sourcefile: 'fuzz-entry.ts' },
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    logLevel: 'warning',
    outfile,
    alias: { 'web-tree-sitter': require.resolve('web-tree-sitter').replace(/\.js$/, '.cjs') },
  });
  return outfile;
}
