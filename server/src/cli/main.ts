/**
 * `eigenlens check [paths…]` — the same analysis as the editor, for CI and for people
 * without the editor. Exit codes: 0 done, 1 a --fail-on condition was met, 2 usage or I/O error.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { extname, join, relative } from 'node:path';
import { analyzeDocument, initAnalysis } from '../analysis/analyze';
import { DEFAULT_SETTINGS, type AnalysisSettings } from '../analysis/settings';
import { jsonReport, type JsonFileInput } from '../analysis/json';
import { sarifReport } from '../analysis/sarif';
import { SAFETY_CAUTION } from '../analysis/caution';
import type { SourceLanguage } from '../syntax/types';
import { textReport } from './textReport';

const VERSION = '0.1.0';

const LANGUAGE_BY_EXT: Record<string, SourceLanguage> = {
  '.py': 'python',
  '.pyi': 'python',
  '.ts': 'typescript',
  '.tsx': 'typescript',
  '.mts': 'typescript',
  '.cts': 'typescript',
  '.js': 'javascript',
  '.mjs': 'javascript',
  '.cjs': 'javascript',
  '.jsx': 'javascript',
  '.lti': 'lti',
};

const USAGE = `usage: eigenlens check [paths…] [options]

Analyses every state matrix found in Python, TypeScript/JavaScript and .lti files
(directories are searched recursively; node_modules and dot-folders are skipped).

options:
  --domain continuous|discrete   domain when a file does not say (default continuous)
  --period T                      sample period in seconds when a file does not say
  --discretize zoh|tustin|euler|backward-euler
                                  method for the discrete model shown when a period is known
  --format text|json|sarif        output format (default text)
  --fail-on unstable|warning|never
                                  exit 1 when a state matrix is unstable, or when any warning
                                  or error is found (default never)
  --precision N                   significant digits in text output (default 6)
  -h, --help                      this help
  --version                       print the version`;

interface CliOptions {
  paths: string[];
  format: 'text' | 'json' | 'sarif';
  failOn: 'unstable' | 'warning' | 'never';
  settings: AnalysisSettings;
}

class UsageError extends Error {}

function parseArgs(argv: string[]): CliOptions | 'help' | 'version' {
  const args = [...argv];
  if (args[0] === 'check') args.shift();
  else if (args[0] === '-h' || args[0] === '--help' || args.length === 0) return 'help';
  else if (args[0] === '--version') return 'version';
  else if (!args[0].startsWith('-')) throw new UsageError(`unknown command "${args[0]}" (did you mean "eigenlens check ${args[0]}"?)`);
  const settings: AnalysisSettings = { ...DEFAULT_SETTINGS };
  const opts: CliOptions = { paths: [], format: 'text', failOn: 'never', settings };
  const value = (flag: string): string => {
    const v = args.shift();
    if (v === undefined || v.startsWith('--')) throw new UsageError(`${flag} needs a value`);
    return v;
  };
  const oneOf = <T extends string>(flag: string, v: string, allowed: readonly T[]): T => {
    if (!(allowed as readonly string[]).includes(v)) throw new UsageError(`${flag} must be one of ${allowed.join(', ')} (got "${v}")`);
    return v as T;
  };
  while (args.length) {
    const a = args.shift()!;
    const eq = a.indexOf('=');
    if (a.startsWith('--') && eq > 0) {
      args.unshift(a.slice(eq + 1));
      args.unshift(a.slice(0, eq));
      continue;
    }
    switch (a) {
      case '-h':
      case '--help':
        return 'help';
      case '--version':
        return 'version';
      case '--domain':
        settings.defaultDomain = oneOf(a, value(a), ['continuous', 'discrete'] as const);
        break;
      case '--period': {
        const v = value(a);
        const t = Number(v);
        if (!Number.isFinite(t) || t <= 0) throw new UsageError(`--period must be a positive number of seconds (got "${v}")`);
        settings.defaultPeriod = t;
        break;
      }
      case '--discretize':
        settings.discretizeMethod = oneOf(a, value(a), ['zoh', 'tustin', 'euler', 'backward-euler'] as const);
        break;
      case '--format':
        opts.format = oneOf(a, value(a), ['text', 'json', 'sarif'] as const);
        break;
      case '--fail-on':
        opts.failOn = oneOf(a, value(a), ['unstable', 'warning', 'never'] as const);
        break;
      case '--precision': {
        const v = Number(value(a));
        if (!Number.isInteger(v) || v < 1 || v > 17) throw new UsageError('--precision must be an integer from 1 to 17');
        settings.precision = v;
        break;
      }
      default:
        if (a.startsWith('-')) throw new UsageError(`unknown option ${a}`);
        opts.paths.push(a);
    }
  }
  if (opts.paths.length === 0) opts.paths.push('.');
  return opts;
}

function collectFiles(path: string, out: string[]): void {
  const st = statSync(path);
  if (st.isDirectory()) {
    for (const name of readdirSync(path).sort()) {
      if (name.startsWith('.') || name === 'node_modules') continue;
      const full = join(path, name);
      const s = statSync(full);
      if (s.isDirectory()) collectFiles(full, out);
      else if (LANGUAGE_BY_EXT[extname(name)]) out.push(full);
    }
  } else {
    out.push(path);
  }
}

export async function runCli(argv: string[], write: (s: string) => void = (s) => process.stdout.write(s), writeErr: (s: string) => void = (s) => process.stderr.write(s)): Promise<number> {
  let opts: ReturnType<typeof parseArgs>;
  try {
    opts = parseArgs(argv);
  } catch (err) {
    writeErr(`eigenlens: ${(err as Error).message}\n\n${USAGE}\n`);
    return 2;
  }
  if (opts === 'help') {
    write(USAGE + '\n');
    return 0;
  }
  if (opts === 'version') {
    write(VERSION + '\n');
    return 0;
  }
  const files: string[] = [];
  for (const p of opts.paths) {
    try {
      collectFiles(p, files);
    } catch (err) {
      writeErr(`eigenlens: cannot read ${p}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}\n`);
      return 2;
    }
  }
  await initAnalysis();
  const results: JsonFileInput[] = [];
  let ioError = false;
  for (const file of files) {
    const language = LANGUAGE_BY_EXT[extname(file)];
    const shown = relative(process.cwd(), file) || file;
    if (!language) {
      writeErr(`eigenlens: ${shown}: not a Python, TypeScript, JavaScript or .lti file; skipped\n`);
      continue;
    }
    let text: string;
    try {
      text = readFileSync(file, 'utf8');
    } catch (err) {
      writeErr(`eigenlens: cannot read ${shown}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}\n`);
      ioError = true;
      continue;
    }
    results.push({ path: shown, text, report: analyzeDocument(text, language, opts.settings) });
  }

  if (opts.format === 'json') write(JSON.stringify(jsonReport(results), null, 2) + '\n');
  else if (opts.format === 'sarif') write(JSON.stringify(sarifReport(results, VERSION), null, 2) + '\n');
  else {
    for (const r of results) write(textReport(r.path, r.text, r.report, opts.settings.precision) + '\n\n');
    const nUnstable = results.reduce((n, r) => n + r.report.matrices.filter((m) => m.stability === 'unstable').length, 0);
    const nState = results.reduce((n, r) => n + r.report.matrices.filter((m) => m.role === 'state').length, 0);
    write(`${results.length} file${results.length === 1 ? '' : 's'}, ${nState} state matri${nState === 1 ? 'x' : 'ces'}, ${nUnstable} unstable.\n`);
    write(SAFETY_CAUTION + '\n');
  }

  if (ioError) return 2;
  const all = results.flatMap((r) => [...r.report.findings, ...r.report.matrices.flatMap((m) => m.findings)]);
  if (opts.failOn === 'unstable' && results.some((r) => r.report.matrices.some((m) => m.stability === 'unstable'))) return 1;
  if (opts.failOn === 'warning' && all.some((f) => f.severity === 'warning' || f.severity === 'error')) return 1;
  return 0;
}

/** Entry used by bin/eigenlens.js. */
export function main(): void {
  runCli(process.argv.slice(2)).then(
    (code) => {
      process.exitCode = code;
    },
    (err) => {
      process.stderr.write(`eigenlens: internal error: ${(err as Error).stack ?? err}\n`);
      process.exitCode = 2;
    },
  );
}
