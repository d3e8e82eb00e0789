// The language server under Emacs 28 + eglot (Debian `emacs-nox elpa-eglot`), the second
// real LSP client. Same invented unstable model and the same user-visible facts as the
// Neovim test. Runs wherever emacs with eglot is installed; .ci/run does not install Emacs,
// so CI requires it only when EIGENLENS_REQUIRE_EMACS=1.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { editorPlan, hoverText, lastDiagnosticsFor, positionOf, runHeadless, serverCommand, type PublishedDiagnostics } from './harness';

const required = process.env.EIGENLENS_REQUIRE_EMACS === '1';
const plan = editorPlan('emacs', required);
const hasEglot =
  !!plan.path && spawnSync(plan.path, ['--batch', '-q', '--eval', "(require 'eglot)"], { timeout: 20_000 }).status === 0;
const missing = plan.missingMessage ?? (plan.path && !hasEglot && required ? 'emacs has no eglot (Debian: elpa-eglot).' : undefined);
const fixture = join(__dirname, 'fixtures', 'balance_bot.py');
const work = mkdtempSync(join(tmpdir(), 'eigenlens-emacs-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

interface EmacsResult {
  attached: boolean;
  errors: string[];
  diagnostics: PublishedDiagnostics[];
  hover: unknown;
  lenses: unknown;
}

async function probe(): Promise<EmacsResult> {
  const at = positionOf(readFileSync(fixture, 'utf8'), 'A = np.array');
  const outFile = join(work, 'emacs.json');
  const run = await runHeadless(plan.path!, ['--batch', '-q', '-l', join(__dirname, 'emacs_probe.el')], {
    timeoutMs: 50_000,
    cwd: work,
    env: {
      HOME: work, // no user init files, no package state from the machine
      EL_SERVER_JSON: JSON.stringify(serverCommand),
      EL_FILE: fixture,
      EL_MODE: 'python-mode',
      EL_LANG: 'python',
      EL_LINE: String(at.line),
      EL_COL: String(at.character),
      EL_OUT: outFile,
      EL_WAIT_S: '15',
    },
  });
  if (run.timedOut) throw new Error(`emacs did not finish within 50 s\n${run.stderr}`);
  try {
    return JSON.parse(readFileSync(outFile, 'utf8')) as EmacsResult;
  } catch {
    throw new Error(`emacs wrote no result (exit ${run.code})\n${run.stderr}`);
  }
}

describe.skipIf(!hasEglot && !missing)('Emacs + eglot', () => {
  if (missing) {
    it('has emacs with eglot to run with', () => {
      throw new Error(missing);
    });
    return;
  }

  let result: EmacsResult;
  it('connects, manages the buffer and gets answers without errors', async () => {
    result = await probe();
    expect(result.errors).toEqual([]);
    expect(result.attached).toBe(true);
  });

  it('hover on A names both eigenvalues, +5 and -5', () => {
    // A = [[0, 1], [25, 0]]: characteristic polynomial s^2 - 25, roots ±5
    // (standard result for the companion form of theta'' = (g/l) theta; from memory).
    const text = hoverText(result.hover);
    expect(text).toMatch(/(^|[^\d.])5(?![\d.])/);
    expect(text).toMatch(/[-−]\s?5(?![\d.])/);
    expect(text.toLowerCase()).toContain('unstable');
  });

  it('publishes an unstable-mode diagnostic for the file', () => {
    const diagnostics = lastDiagnosticsFor(result.diagnostics, 'balance_bot.py');
    expect(diagnostics.some((d) => d.code === 'unstable-mode'), JSON.stringify(diagnostics)).toBe(true);
  });
});
