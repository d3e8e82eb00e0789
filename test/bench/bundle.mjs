// Bundles the engine and analysis entry points the benchmark calls into one CommonJS file
// under dist/ (gitignored), so the benchmark runs with plain node and no TypeScript loader.
// Same esbuild settings as scripts/build.mjs, including the web-tree-sitter alias.
import { build } from 'esbuild';
import { createRequire } from 'node:module';
import { join } from 'node:path';

const require = createRequire(import.meta.url);

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
  const outfile = join(root, 'dist', 'bench-engine.cjs');
  await build({
    stdin: { contents: ENTRY, resolveDir: root, loader: 'ts', sourcefile: 'bench-entry.ts' },
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
