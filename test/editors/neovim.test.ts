// The language server in a real LSP client: headless Neovim (0.7, Debian's `neovim`) with its
// built-in client, started exactly as a Neovim user would (`node bin/eigenlens-server.js
// --stdio`). It opens an invented unstable model and checks what the user would see: the
// hover names the eigenvalues, and an `unstable-mode` diagnostic arrives.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { editorPlan, hoverText, lastDiagnosticsFor, positionOf, runHeadless, serverCommand, type PublishedDiagnostics } from './harness';

const plan = editorPlan('nvim', process.env.CI === 'true');
const fixture = join(__dirname, 'fixtures', 'balance_bot.py');
const work = mkdtempSync(join(tmpdir(), 'eigenlens-nvim-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

interface NvimResult {
  attached: boolean;
  errors: string[];
  diagnostics: PublishedDiagnostics[];
  hover: unknown;
  lenses: { range: unknown; command?: { title: string } }[] | null;
}

async function probe(): Promise<NvimResult> {
  const text = readFileSync(fixture, 'utf8');
  const at = positionOf(text, 'A = np.array');
  const outFile = join(work, 'nvim.json');
  const run = await runHeadless(plan.path!, ['--headless', '-u', 'NONE', '-i', 'NONE', '-n', '-c', 'lua dofile(os.getenv("EL_SCRIPT"))'], {
    timeoutMs: 45_000,
    cwd: work,
    env: {
      EL_SCRIPT: join(__dirname, 'nvim_probe.lua'),
      EL_SERVER_JSON: JSON.stringify(serverCommand),
      EL_FILE: fixture,
      EL_LANG: 'python',
      EL_LINE: String(at.line),
      EL_COL: String(at.character),
      EL_OUT: outFile,
      EL_WAIT_MS: '15000',
      XDG_STATE_HOME: work,
      XDG_DATA_HOME: work,
      XDG_CACHE_HOME: work,
    },
  });
  if (run.timedOut) throw new Error(`nvim did not finish within 45 s\n${run.stderr}`);
  let raw: string;
  try {
    raw = readFileSync(outFile, 'utf8');
  } catch {
    throw new Error(`nvim wrote no result (exit ${run.code})\nstdout: ${run.stdout}\nstderr: ${run.stderr}`);
  }
  return JSON.parse(raw) as NvimResult;
}

describe.skipIf(!plan.path && !plan.missingMessage)('Neovim built-in LSP client', () => {
  if (plan.missingMessage) {
    it('has nvim to run with', () => {
      throw new Error(plan.missingMessage);
    });
    return;
  }

  let result: NvimResult;
  it('attaches to the server and gets answers without errors', async () => {
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
    const unstable = diagnostics.filter((d) => d.code === 'unstable-mode');
    expect(unstable.length, JSON.stringify(diagnostics)).toBeGreaterThan(0);
    expect(unstable[0].source).toBe('eigenlens');
  });
});
