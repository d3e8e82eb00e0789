// Bundles a small TypeScript entry (re-exports from server/src) into one CommonJS file under
// dist/ (gitignored), so benchmark, fuzz and timing scripts run with plain node. Same esbuild
// settings as scripts/build.mjs, including the web-tree-sitter alias to its CommonJS build.
import { build } from 'esbuild';
import { createRequire } from 'node:module';
import { join } from 'node:path';

const require = createRequire(import.meta.url);

export async function bundleEntry(root, contents, name) {
  const outfile = join(root, 'dist', name);
  await build({
    stdin: { contents, resolveDir: root, loader: 'ts', sourcefile: name.replace(/\.c?js$/, '.ts') },
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
