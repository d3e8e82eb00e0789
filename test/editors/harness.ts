/**
 * Shared plumbing of the real-editor tests: find an editor, run it headless in its own
 * process group with a time limit (the group is killed afterwards, so a hung server cannot
 * outlive the test), and read LSP answers the way an editor shows them.
 */
import { spawn } from 'node:child_process';
import { accessSync, constants } from 'node:fs';
import { delimiter, join } from 'node:path';

export const repoRoot = join(__dirname, '..', '..');

/** The server command exactly as an editor user configures it. */
export const serverCommand = ['node', join(repoRoot, 'bin', 'eigenlens-server.js'), '--stdio'];

export function findOnPath(program: string): string | undefined {
  for (const dir of (process.env.PATH ?? '').split(delimiter)) {
    const candidate = join(dir, program);
    try {
      accessSync(candidate, constants.X_OK);
      return candidate;
    } catch {
      // not here
    }
  }
  return undefined;
}

export interface RunResult {
  code: number | null;
  stdout: string;
  stderr: string;
  timedOut: boolean;
}

export function runHeadless(
  program: string,
  args: string[],
  options: { env?: NodeJS.ProcessEnv; timeoutMs: number; cwd?: string },
): Promise<RunResult> {
  return new Promise((resolve) => {
    const child = spawn(program, args, {
      cwd: options.cwd,
      env: { ...process.env, ...options.env },
      detached: true,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    let timedOut = false;
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    const killGroup = () => {
      try {
        if (child.pid) process.kill(-child.pid, 'SIGKILL');
      } catch {
        // group already gone
      }
    };
    const timer = setTimeout(() => {
      timedOut = true;
      killGroup();
    }, options.timeoutMs);
    child.on('error', (err) => {
      clearTimeout(timer);
      resolve({ code: null, stdout, stderr: stderr + String(err), timedOut });
    });
    child.on('close', (code) => {
      clearTimeout(timer);
      killGroup();
      resolve({ code, stdout, stderr, timedOut });
    });
  });
}

/** 0-based LSP position of the first occurrence of `needle` (UTF-16 columns, like LSP). */
export function positionOf(text: string, needle: string): { line: number; character: number } {
  const offset = text.indexOf(needle);
  if (offset < 0) throw new Error(`fixture does not contain ${JSON.stringify(needle)}`);
  const before = text.slice(0, offset).split('\n');
  return { line: before.length - 1, character: before[before.length - 1].length };
}

/** The text of an LSP Hover in any of its three content shapes. */
export function hoverText(hover: unknown): string {
  if (!hover || typeof hover !== 'object') return '';
  const contents = (hover as { contents?: unknown }).contents;
  const one = (c: unknown): string =>
    typeof c === 'string' ? c : c && typeof c === 'object' && 'value' in c ? String((c as { value: unknown }).value) : '';
  return Array.isArray(contents) ? contents.map(one).join('\n') : one(contents);
}

/**
 * Whether an editor test runs. Absent editor: skipped locally, but a failure when `required`
 * (CI=true for Neovim, which .ci/run installs), so CI cannot pass without having looked.
 */
export function editorPlan(program: string, required: boolean): { path?: string; missingMessage?: string } {
  const path = findOnPath(program);
  if (path) return { path };
  return required
    ? { missingMessage: `${program} is not on PATH, and this run requires it (CI=true). Install it (Debian: see .ci/run).` }
    : {};
}

export interface PublishedDiagnostics {
  uri: string;
  diagnostics: { code?: string | number; message: string; severity?: number; range: unknown; source?: string }[];
}

/** The last diagnostics set published for the file (each publish replaces the one before). */
export function lastDiagnosticsFor(all: PublishedDiagnostics[], fileName: string): PublishedDiagnostics['diagnostics'] {
  const mine = all.filter((p) => p.uri.endsWith('/' + fileName));
  return mine.length ? mine[mine.length - 1].diagnostics : [];
}
