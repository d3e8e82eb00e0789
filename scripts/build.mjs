// Bundles the language server, the command line and the VS Code client to CommonJS.
// web-tree-sitter is aliased to its CommonJS build: its ESM build relies on import.meta,
// which esbuild empties in CJS output. The .wasm grammars are copied next to the bundles.
import { build } from 'esbuild';
import { copyFileSync, mkdirSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

const require = createRequire(import.meta.url);
const out = 'dist';
mkdirSync(out, { recursive: true });

const common = {
  bundle: true,
  platform: 'node',
  format: 'cjs',
  target: 'node20',
  sourcemap: true,
  logLevel: 'warning',
  alias: { 'web-tree-sitter': require.resolve('web-tree-sitter').replace(/\.js$/, '.cjs') },
};

await Promise.all([
  build({ ...common, entryPoints: ['server/src/main.ts'], outfile: join(out, 'server.js') }),
  build({ ...common, entryPoints: ['server/src/cli/main.ts'], outfile: join(out, 'cli.js') }),
  build({ ...common, entryPoints: ['client/src/extension.ts'], outfile: join(out, 'client.js'), external: ['vscode'] }),
]);

const wasm = [
  require.resolve('web-tree-sitter/web-tree-sitter.wasm'),
  join(dirname(require.resolve('tree-sitter-python/package.json')), 'tree-sitter-python.wasm'),
  join(dirname(require.resolve('tree-sitter-typescript/package.json')), 'tree-sitter-typescript.wasm'),
  join(dirname(require.resolve('tree-sitter-typescript/package.json')), 'tree-sitter-tsx.wasm'),
];
for (const file of wasm) copyFileSync(file, join(out, file.split('/').pop()));
