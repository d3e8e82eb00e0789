// Enforces the import rules of the design (data flows one way: syntax → model → engine →
// analysis → ide → lsp) by scanning every import in server/src and client/src. The rule set
// follows the layering habit of rust-analyzer's architecture notes (common practice for
// language servers): the protocol is known only at the outermost layer.
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync, existsSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';

const ROOT = process.cwd();
const SERVER = join(ROOT, 'server', 'src');
const CLIENT = join(ROOT, 'client', 'src');

function tsFiles(dir: string): string[] {
  if (!existsSync(dir)) return [];
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) out.push(...tsFiles(path));
    else if (/\.ts$/.test(name)) out.push(path);
  }
  return out;
}

/** Every module specifier in static imports, re-exports, dynamic imports and require calls. */
export function importsOf(source: string): string[] {
  const specs: string[] = [];
  const patterns = [/\b(?:import|export)\s+(?:type\s+)?(?:[^'";]*?\s+from\s+)?['"]([^'"]+)['"]/g, /\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g, /\brequire\s*\(\s*['"]([^'"]+)['"]\s*\)/g];
  for (const pattern of patterns) for (const m of source.matchAll(pattern)) specs.push(m[1]);
  return specs;
}

/** Layer of a server file: its first folder under server/src, or "main" for the entry. */
function layerOf(file: string): string {
  const rel = relative(SERVER, file).split(/[\\/]/);
  return rel.length === 1 ? rel[0].replace(/\.ts$/, '') : rel[0];
}

interface Edge {
  from: string;
  spec: string;
  /** Target layer for relative imports inside server/src, else null. */
  target: string | null;
  targetFile: string | null;
}

function edgesOf(files: string[]): Edge[] {
  const edges: Edge[] = [];
  for (const file of files) {
    for (const spec of importsOf(readFileSync(file, 'utf8'))) {
      let target: string | null = null;
      let targetFile: string | null = null;
      if (spec.startsWith('.')) {
        targetFile = resolve(dirname(file), spec);
        if (targetFile.startsWith(SERVER)) target = layerOf(`${targetFile}.ts`);
      }
      edges.push({ from: relative(ROOT, file), spec, target, targetFile });
    }
  }
  return edges;
}

const LSP_PACKAGES = /^(vscode-languageserver|vscode-languageserver-protocol|vscode-languageserver-textdocument|vscode-jsonrpc)(\/|$)/;

// What each server layer may import of ours. syntax/ may use the exact number type the shared
// contracts are written in (engine/rational) and the runner of stepwise computations
// (engine/steps, no mathematics in it), nothing else of the engine.
const ALLOWED: Record<string, string[]> = {
  engine: ['engine'],
  syntax: ['syntax', 'engine/rational', 'engine/steps'],
  model: ['model', 'syntax', 'engine/rational'],
  analysis: ['analysis', 'engine', 'syntax', 'model'],
  cli: ['cli', 'analysis', 'engine', 'syntax', 'model', 'shared'],
  ide: ['ide', 'analysis', 'engine', 'syntax', 'model', 'shared'],
  lsp: ['lsp', 'ide', 'analysis', 'engine', 'syntax', 'model', 'shared'],
  shared: ['shared'],
  main: ['lsp'],
};

function allowed(edge: Edge): boolean {
  const fromLayer = layerOf(join(ROOT, edge.from));
  const rules = ALLOWED[fromLayer];
  if (!rules || edge.target === null || edge.targetFile === null) return true;
  const relTarget = relative(SERVER, edge.targetFile).replace(/\\/g, '/');
  return rules.some((rule) => (rule.includes('/') ? relTarget === rule : edge.target === rule));
}

describe('import rules (DESIGN.md §2)', () => {
  const serverEdges = edgesOf(tsFiles(SERVER));

  it('finds the layers it checks (the scan itself works)', () => {
    expect(serverEdges.some((e) => e.from.includes('server/src/lsp/'))).toBe(true);
    expect(importsOf("import { a } from './x';\nimport type { B } from \"../y\";\nexport * from './z';\nconst c = require('w');")).toEqual(['./x', '../y', './z', 'w']);
  });

  it('each server layer imports only the layers below it', () => {
    const bad = serverEdges.filter((e) => !allowed(e)).map((e) => `${e.from} imports ${e.spec}`);
    expect(bad).toEqual([]);
  });

  it('only lsp/ and the entry file import the protocol packages', () => {
    const bad = serverEdges
      .filter((e) => LSP_PACKAGES.test(e.spec))
      .filter((e) => !/^server\/src\/(lsp\/|main\.ts$)/.test(e.from.replace(/\\/g, '/')))
      .map((e) => `${e.from} imports ${e.spec}`);
    expect(bad).toEqual([]);
  });

  it('the client imports nothing of the server except shared/protocol', () => {
    const bad = edgesOf(tsFiles(CLIENT))
      .filter((e) => e.targetFile !== null && e.targetFile.startsWith(join(ROOT, 'server')))
      .filter((e) => relative(ROOT, e.targetFile!).replace(/\\/g, '/') !== 'server/src/shared/protocol')
      .map((e) => `${e.from} imports ${e.spec}`);
    expect(bad).toEqual([]);
  });

  it('shared/protocol imports nothing at all (the client bundles it alone)', () => {
    const source = readFileSync(join(SERVER, 'shared', 'protocol.ts'), 'utf8');
    expect(importsOf(source)).toEqual([]);
  });
});
