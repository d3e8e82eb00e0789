/**
 * Loads web-tree-sitter and the Python and TypeScript grammars once.
 *
 * Where the .wasm files are: the build copies them next to the bundle (dist/server.js), so
 * `__dirname` is tried first when it is defined; when running from source (tests) they are
 * resolved from node_modules through module.createRequire. An explicit directory wins.
 */
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { Language, Parser } from 'web-tree-sitter';

export interface LoadedParsers {
  python: Parser;
  typescript: Parser;
}

let loading: Promise<LoadedParsers> | null = null;
let loaded: LoadedParsers | null = null;

declare const __dirname: string | undefined;
declare const __filename: string | undefined;

function candidateDirs(wasmDir?: string): string[] {
  const dirs: string[] = [];
  if (wasmDir) dirs.push(wasmDir);
  if (typeof __dirname === 'string') dirs.push(__dirname);
  return dirs;
}

function resolveFromPackages(file: string): string | null {
  const bases = [typeof __filename === 'string' ? __filename : null, join(process.cwd(), 'package.json')].filter(
    (b): b is string => b !== null,
  );
  const packageOf: Record<string, string> = {
    'web-tree-sitter.wasm': 'web-tree-sitter',
    'tree-sitter-python.wasm': 'tree-sitter-python',
    'tree-sitter-typescript.wasm': 'tree-sitter-typescript',
  };
  for (const base of bases) {
    const req = createRequire(base);
    // Packages differ in what their `exports` allow: try the file itself, then package.json.
    for (const spec of [`${packageOf[file]}/${file}`, `${packageOf[file]}/package.json`]) {
      try {
        const resolved = req.resolve(spec);
        const path = resolved.endsWith('.wasm') ? resolved : join(dirname(resolved), file);
        if (existsSync(path)) return path;
      } catch {
        // try the next form
      }
    }
  }
  return null;
}

export function locateWasm(file: string, wasmDir?: string): string {
  for (const dir of candidateDirs(wasmDir)) {
    const path = join(dir, file);
    if (existsSync(path)) return path;
  }
  const resolved = resolveFromPackages(file);
  if (resolved) return resolved;
  throw new Error(`cannot find ${file} (looked in ${candidateDirs(wasmDir).join(', ') || 'no directory'} and node_modules)`);
}

/** Idempotent: concurrent and repeated calls share one load. */
export function loadParsers(wasmDir?: string): Promise<LoadedParsers> {
  if (loading) return loading;
  loading = (async () => {
    const runtime = locateWasm('web-tree-sitter.wasm', wasmDir);
    await Parser.init({ locateFile: () => runtime });
    const [py, ts] = await Promise.all([
      Language.load(locateWasm('tree-sitter-python.wasm', wasmDir)),
      Language.load(locateWasm('tree-sitter-typescript.wasm', wasmDir)),
    ]);
    const python = new Parser();
    python.setLanguage(py);
    const typescript = new Parser();
    typescript.setLanguage(ts);
    loaded = { python, typescript };
    return loaded;
  })();
  loading.catch(() => {
    // Allow a later retry (e.g. with a different wasmDir) after a failed load.
    loading = null;
  });
  return loading;
}

export function loadedParsers(): LoadedParsers | null {
  return loaded;
}

/** A new parser for the language of `like` (for a parse that must not share another's state; delete it after use). */
export function newParserFor(like: Parser): Parser {
  const parser = new Parser();
  parser.setLanguage(like.language);
  return parser;
}
