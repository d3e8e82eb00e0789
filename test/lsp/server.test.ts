// End-to-end over real stdio against the built dist/server.js (built once by the global
// setup). One server process for the whole file. Each check() opens a fixture with a cursor
// marker ($0), asks the server as an editor would, and compares the answer with an
// expectation file beside the fixture (UPDATE_EXPECT=1 rewrites them). Beside each snapshot,
// facts from outside sources are asserted directly, with the source named.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { extname, join } from 'node:path';
import { transformSync } from 'esbuild';
import type { CodeAction, CodeLens, Diagnostic, Hover, MarkupContent, TextDocumentEdit } from 'vscode-languageserver-protocol';
import { applyTextEdits, positionAt, startClient, type TestClient } from './client';
import { expectFile, readFixture, scrubPlot } from './expect';
// @ts-expect-error plain JavaScript module without type declarations
import { generateSourceFile } from '../bench/generate.mjs';

const LANGUAGE: Record<string, string> = { '.py': 'python', '.ts': 'typescript', '.lti': 'lti', '.js': 'javascript' };
const hasScipy = spawnSync('python3', ['-c', 'import numpy, scipy.linalg']).status === 0;
// CI installs numpy and scipy (.ci/run); there a missing reference library is a failure, not a skip.
if (process.env.CI && !hasScipy) throw new Error('numpy and scipy are required when CI is set (see .ci/run)');
const work = mkdtempSync(join(tmpdir(), 'eigenlens-lsp-'));
let client: TestClient;
let opened = 0;

beforeAll(async () => {
  client = await startClient({});
});

afterAll(async () => {
  await client?.shutdown();
});

async function openFixture(name: string): Promise<{ uri: string; text: string; cursor: number }> {
  const { text, cursor } = readFixture(name);
  const uri = `file:///fixtures/${opened++}/${name}`;
  await client.open(uri, LANGUAGE[extname(name)], text);
  return { uri, text, cursor };
}

function excerpt(text: string, start: number, end: number): string {
  const s = text.slice(start, end).replace(/\s+/g, ' ');
  return s.length > 40 ? `${s.slice(0, 37)}...` : s;
}

function offsetOf(text: string, line: number, character: number): number {
  return text.split('\n').slice(0, line).reduce((n, l) => n + l.length + 1, 0) + character;
}

async function hoverAt(uri: string, text: string, offset: number): Promise<string | null> {
  const hover = (await client.connection.sendRequest('textDocument/hover', { textDocument: { uri }, position: positionAt(text, offset) })) as Hover | null;
  return hover ? (hover.contents as MarkupContent).value : null;
}

async function checkHover(name: string): Promise<string> {
  const { uri, text, cursor } = await openFixture(name);
  const markdown = await hoverAt(uri, text, cursor);
  expectFile(`${name}.hover.md`, scrubPlot(markdown ?? '(no hover)'));
  return markdown ?? '';
}

function renderDiagnostics(text: string, diagnostics: Diagnostic[]): string {
  return diagnostics
    .map((d) => {
      const start = offsetOf(text, d.range.start.line, d.range.start.character);
      const end = offsetOf(text, d.range.end.line, d.range.end.character);
      return `${d.range.start.line + 1}:${d.range.start.character + 1}-${d.range.end.line + 1}:${d.range.end.character + 1} ${d.severity} ${d.code} [${d.source}] "${excerpt(text, start, end)}"\n  ${d.message}`;
    })
    .join('\n');
}

async function checkDiagnostics(name: string): Promise<Diagnostic[]> {
  const { uri, text } = await openFixture(name);
  const published = await client.diagnostics(uri, 1);
  expectFile(`${name}.diagnostics.txt`, renderDiagnostics(text, published.diagnostics) || '(none)');
  return published.diagnostics;
}

async function lensesOf(uri: string): Promise<CodeLens[]> {
  return (await client.connection.sendRequest('textDocument/codeLens', { textDocument: { uri } })) as CodeLens[];
}

async function checkLenses(name: string): Promise<CodeLens[]> {
  const { uri } = await openFixture(name);
  const lenses = await lensesOf(uri);
  expectFile(
    `${name}.lenses.txt`,
    lenses.map((l) => `${l.range.start.line + 1}:${l.range.start.character + 1} ${l.command?.title} -> ${l.command?.command}`).join('\n') || '(none)',
  );
  return lenses;
}

async function actionsAt(uri: string, text: string, offset: number, diagnostics: Diagnostic[] = []): Promise<CodeAction[]> {
  const position = positionAt(text, offset);
  return (await client.connection.sendRequest('textDocument/codeAction', {
    textDocument: { uri },
    range: { start: position, end: position },
    context: { diagnostics },
  })) as CodeAction[];
}

function applyAction(text: string, action: CodeAction): string {
  const change = action.edit!.documentChanges![0] as TextDocumentEdit;
  return applyTextEdits(text, change.edits as never);
}

/** Inserts the Φ function at the fixture's cursor, snapshots the result and returns it. */
async function checkInsertPhi(name: string, titlePrefix: RegExp): Promise<{ uri: string; after: string; action: CodeAction }> {
  const { uri, text, cursor } = await openFixture(name);
  const actions = await actionsAt(uri, text, cursor);
  expectFile(`${name}.actions.txt`, actions.map((a) => `${a.kind}: ${a.title}`).join('\n') || '(none)');
  const action = actions.find((a) => titlePrefix.test(a.title));
  expect(action, `no action matching ${titlePrefix} in ${actions.map((a) => a.title).join(' / ')}`).toBeDefined();
  const after = applyAction(text, action!);
  expectFile(`${name}.after${extname(name)}`, after);
  return { uri, after, action: action! };
}

function scipyJson(expression: string): unknown {
  return JSON.parse(execFileSync('python3', ['-c', `import json, numpy as np; from scipy.linalg import expm; print(json.dumps(${expression}))`], { encoding: 'utf8' }));
}

describe('hover', () => {
  it('two real modes (Python)', async () => {
    const md = await checkHover('hover_two_modes.py');
    // Moler & Van Loan, "Nineteen Dubious Ways…", SIAM Review 20(4), 1978 (from memory;
    // CHECKS.md #1): eigenvalues −1 and −17, e^{At} built from e^{−t} and e^{−17t}.
    expect(md).toMatch(/λ = −1\b/);
    expect(md).toMatch(/λ = −17\b/);
    expect(md).toContain('**Asymptotically stable**');
    expect(md).toMatch(/e\^\(−17t\)/);
    // λ = −1 decays with τ = 1/|λ| = 1 s (standard definition of the time constant).
    expect(md).toMatch(/τ = 1 s/);
    expect(md).toContain('not proof of safety');
    const svg = /data:image\/svg\+xml;base64,([A-Za-z0-9+/=]+)/.exec(md);
    expect(svg).not.toBeNull();
    const decoded = Buffer.from(svg![1], 'base64').toString('utf8');
    expect(decoded).toMatch(/^<svg [^>]*width="(\d+)" height="(\d+)"/);
    const [, w, h] = /width="(\d+)" height="(\d+)"/.exec(decoded)!;
    expect(Number(w)).toBeLessThanOrEqual(700);
    expect(Number(h)).toBeLessThanOrEqual(200);
  });

  it('defective 3×3 (TypeScript)', async () => {
    const md = await checkHover('hover_defective.ts');
    // SciPy expm tests `test_burkardt_8` (CHECKS.md #4): eigenvalue 4 simple, 16 with
    // algebraic multiplicity 2 and geometric 1; the exponential has t·e^{16t} terms.
    expect(md).toMatch(/λ = 16, algebraic 2, geometric 1 \(Jordan block of size 2\)/);
    expect(md).toMatch(/λ = 4, simple/);
    expect(md).toContain('**Unstable**');
    expect(md).toContain('**defective**');
    expect(md).toMatch(/t·e\^\(16t\)/);
  });

  it('reaction-wheel pendulum (.lti model file)', async () => {
    const md = await checkHover('hover_wheel.lti');
    // Linearized upright pendulum: λ = ±√(m·g·l/Jp) = ±√114.45 ≈ ±10.698 and a free wheel
    // λ = 0 (standard result, from memory); the positive root doubles every
    // ln 2/10.698 ≈ 64.8 ms.
    expect(md).toContain('**Unstable**');
    expect(md).toMatch(/λ = √11445\/10 ≈ 10\.698, simple: grows, doubling every 64\.8 ms/);
    expect(md).toMatch(/λ = 0\b/);
  });

  it('input matrix: shape, role and its model', async () => {
    const md = await checkHover('hover_input.py');
    expect(md).toContain('input matrix');
    expect(md).toContain('2×1');
    expect(md).toContain('state matrix is **A**');
    expect(md).toContain('Shape fits');
  });

  it('discrete Jordan block: A^k and per-step wording', async () => {
    const md = await checkHover('hover_discrete.py');
    // [[λ,1],[0,λ]]^k = [[λ^k, kλ^{k−1}],[0,λ^k]], λ = 1/2 (standard identity; CHECKS.md #11).
    expect(md).toMatch(/λ = 1\/2, algebraic 2, geometric 1 \(Jordan block of size 2\)/);
    expect(md).toContain('Φ(k) = A_d^k');
    expect(md).toContain('**Asymptotically stable**');
  });

  it('no hover outside matrices, and garbage text never kills the server', async () => {
    const { uri, text } = await openFixture('hover_two_modes.py');
    expect(await hoverAt(uri, text, 2)).toBeNull();
    const garbage = 'A = np.array([[1, 2], [3\n((((( ]]]] ⚠ \u{1F600} ' + '['.repeat(5000);
    const bad = `file:///fixtures/${opened++}/garbage.py`;
    await client.open(bad, 'python', garbage);
    await hoverAt(bad, garbage, 3);
    await client.diagnostics(bad, 1);
    // Still answering afterwards.
    expect(await hoverAt(uri, text, text.indexOf('A = np') + 1)).toContain('Asymptotically stable');
  });
});

describe('diagnostics', () => {
  it('every code, with source eigenlens, at the literal or entry concerned', async () => {
    const diagnostics = await checkDiagnostics('diagnostics_codes.py');
    const codes = new Set(diagnostics.map((d) => d.code));
    expect(diagnostics.every((d) => d.source === 'eigenlens')).toBe(true);
    // A_up = [[0,1],[9,0]] has λ = ±3 (characteristic polynomial λ² − 9; standard algebra).
    expect(codes.has('unstable-mode')).toBe(true);
    // A_osc = [[0,1],[−4,0]] has λ = ±j2, simple (undamped oscillator; standard).
    expect(codes.has('marginally-stable')).toBe(true);
    // A_dbl = [[−1,1],[0,−1]] is a Jordan block (one eigenvector; standard).
    expect(codes.has('defective-matrix')).toBe(true);
    // A_res = [[0,1],[−100,−1]]: ω_n = 10, ζ = 1/(2·10) = 0.05 < 0.1 (CHECKS.md #21 formula).
    expect(codes.has('light-damping')).toBe(true);
    expect(codes.has('near-repeated-eigenvalues')).toBe(true);
    expect(codes.has('shape-mismatch')).toBe(true);
    expect(codes.has('unknown-name')).toBe(true);
    expect(codes.has('non-square-state')).toBe(true);
    const unknown = diagnostics.find((d) => d.code === 'unknown-name')!;
    expect(unknown.severity).toBe(1);
  });

  it('a large file: the first lines come first, and what they show is exactly what the full analysis shows there', async () => {
    // Invented generated file (test/bench/generate.mjs): 3,000 lines, 150 matrices of mixed kinds.
    const { text } = generateSourceFile(77, 'python', { lines: 3000, count: 150 }) as { text: string };
    const uri = `file:///fixtures/${opened++}/large.py`;
    await client.open(uri, 'python', text);
    const pendingNote = (p: { diagnostics: Diagnostic[] }) => p.diagnostics.find((d) => d.code === 'analysis-limit' && d.range.start.line === 0 && d.range.end.character === 0 && d.range.end.line === 0);
    const complete = await client.diagnosticsWhere(uri, (p) => p.version === 1 && !pendingNote(p), 60_000);
    const passes = client.publishedFor(uri);
    const first = passes[0];
    const note = pendingNote(first)!;
    expect(note.message).toMatch(/still analysing this file \(3,00\d lines\): the diagnostics so far cover lines 1–(\d+)/);
    const covered = Number(/lines 1–(\d+)/.exec(String(note.message))![1]);
    expect(covered).toBeGreaterThan(50);
    expect(covered).toBeLessThan(1000);
    const key = (d: Diagnostic) => `${d.code}@${d.range.start.line}:${d.range.start.character}-${d.range.end.line}:${d.range.end.character} ${typeof d.message === 'string' ? d.message : d.message.value}`;
    const finalKeys = new Set(complete.diagnostics.map(key));
    const early = first.diagnostics.filter((d) => d !== note);
    expect(early.length).toBeGreaterThan(0);
    // Nothing the first pass said is changed or withdrawn by the full analysis …
    for (const d of early) expect(finalKeys.has(key(d)), key(d)).toBe(true);
    // … and everything it said lies in the lines it claims to cover.
    for (const d of early) expect(d.range.end.line).toBeLessThan(covered);
    expect(passes.length).toBeGreaterThan(1);
  });

  it('a newer version replaces the older diagnostics (debounced, versioned)', async () => {
    const uri = `file:///fixtures/${opened++}/edits.py`;
    await client.open(uri, 'python', 'import numpy as np\nA = np.array([[1, 0], [0, -2]])\n');
    const first = await client.diagnostics(uri, 1);
    expect(first.diagnostics.map((d) => d.code)).toContain('unstable-mode');
    // Two quick edits: only the last one matters.
    await client.change(uri, 'import numpy as np\nA = np.array([[1, 0], [0, -3]])\n');
    await client.change(uri, 'import numpy as np\nA = np.array([[-1, 0], [0, -3]])\n');
    const last = await client.diagnostics(uri, 3);
    expect(last.version).toBe(3);
    expect(last.diagnostics.map((d) => d.code)).not.toContain('unstable-mode');
  });
});

describe('code lenses and commands', () => {
  it('verdict and dominant mode above each state matrix', async () => {
    const lenses = await checkLenses('hover_two_modes.py');
    // Slowest mode λ = −1 ⇒ τ = 1 s (Moler & Van Loan 1978 eigenvalues, from memory).
    expect(lenses[0].command?.title).toMatch(/^stable · slowest τ = 1 s/);
    expect(lenses.map((l) => l.command?.command)).toEqual(['eigenlens.showFullAnalysis', 'eigenlens.copyTransitionMatrix', 'eigenlens.server.switchDomain']);
  });

  it('copy Φ(t) names the matrix; eigenlens/transitionText builds the text on demand', async () => {
    const { uri } = await openFixture('hover_two_modes.py');
    const copy = (await lensesOf(uri)).find((l) => l.command?.command === 'eigenlens.copyTransitionMatrix')!;
    expect(copy.command!.title).toBe('copy Φ(t)');
    expect(copy.command!.arguments).toEqual([uri, 0]);
    const [, matrixIndex] = copy.command!.arguments as [string, number];
    const result = (await client.connection.sendRequest('eigenlens/transitionText', { uri, matrixIndex })) as { text: string | null; error: string | null };
    // Moler & Van Loan 1978: the eigenvalues of [[−49, 24], [−64, 31]] are −1 and −17, so every
    // entry is a combination of e^(−t) and e^(−17t); ASCII minus signs for pasting into code.
    expect(result.error).toBeNull();
    expect(result.text!.split('\n')[0]).toMatch(/^Φ\(t\) = e\^\(A·t\)/);
    expect(result.text).toContain('e^(-17t)');
    expect(result.text).toContain('e^(-t)');
    expect(result.text).not.toContain('−');
    const missing = (await client.connection.sendRequest('eigenlens/transitionText', { uri, matrixIndex: 99 })) as { text: string | null; error: string | null };
    expect(missing.text).toBeNull();
    expect(missing.error).toMatch(/No closed-form/);
  });

  it('a file with more than 200 state matrices gets verdict lenses whose titles come from codeLens/resolve', async () => {
    // Invented one-line matrices; A_k = [[−k, 0], [0, −2k]] has eigenvalues −k and −2k, so its
    // slowest time constant is τ = 1/k (standard, τ = 1/|λ|).
    const text = Array.from({ length: 210 }, (_, i) => `A_${i + 1} = [[-${i + 1}, 0], [0, -${2 * (i + 1)}]]`).join('\n') + '\n';
    const uri = `file:///fixtures/${opened++}/many.py`;
    await client.open(uri, 'python', text);
    await client.diagnostics(uri, 1);
    const lenses = await lensesOf(uri);
    expect(lenses).toHaveLength(210);
    expect(lenses.every((l) => l.command === undefined && l.data !== undefined)).toBe(true);
    const resolved = (await client.connection.sendRequest('codeLens/resolve', lenses[1])) as CodeLens;
    expect(resolved.command?.title).toBe('stable · slowest τ = 500 ms (λ = −2)');
    expect(resolved.command?.command).toBe('eigenlens.showFullAnalysis');
    expect(resolved.range).toEqual(lenses[1].range);
    // The data is a short key, not the URI (10,000 of these go out for a large file), and the
    // same answer comes again for the same report.
    expect(JSON.stringify(lenses[1].data)).not.toContain('many.py');
    expect(JSON.stringify(lenses[1]).length).toBeLessThan(100);
    expect(await lensesOf(uri)).toEqual(lenses);
    // Once the document is closed its lenses resolve to nothing, also after another document opens.
    await client.close(uri);
    const other = `file:///fixtures/${opened++}/many-other.py`;
    await client.open(other, 'python', text);
    await client.diagnostics(other, 1);
    const stale = (await client.connection.sendRequest('codeLens/resolve', lenses[1])) as CodeLens;
    expect(stale.command).toBeUndefined();
    const fresh = (await client.connection.sendRequest('codeLens/resolve', (await lensesOf(other))[1])) as CodeLens;
    expect(fresh.command?.title).toBe('stable · slowest τ = 500 ms (λ = −2)');
  });

  it('right after an edit of a large file, its lenses come from the new text before any pass, and resolve there', async () => {
    // Invented one-line matrices as above, 2,600 of them (about 80,000 characters: a large
    // document, whose lenses are unresolved). The edit adds a matrix at the top, so every lens
    // moves down a line; the lens request arrives within the debounce, before any pass of the
    // new version has run.
    const line = (k: number) => `A_${k} = [[-${k}, 0], [0, -${2 * k}]]`;
    const text = Array.from({ length: 2600 }, (_, i) => line(i + 1)).join('\n') + '\n';
    expect(text.length).toBeGreaterThan(60_000);
    const uri = `file:///fixtures/${opened++}/many-large.py`;
    await client.open(uri, 'python', text);
    await client.diagnosticsWhere(uri, (p) => !p.diagnostics.some((d) => d.code === 'analysis-limit'), 60_000);
    await client.change(uri, `${line(9999)}\n${text}`);
    const lenses = await lensesOf(uri);
    expect(lenses).toHaveLength(2601);
    expect(lenses.every((l) => l.command === undefined)).toBe(true);
    expect(lenses.map((l) => l.range.start.line)).toEqual(Array.from({ length: 2601 }, (_, i) => i));
    // The lens on the line of A_2 (now line 2) resolves to A_2's verdict: τ = 1/2 s.
    const resolved = (await client.connection.sendRequest('codeLens/resolve', lenses[2])) as CodeLens;
    expect(resolved.command?.title).toBe('stable · slowest τ = 500 ms (λ = −2)');
  });

  it('unstable model file lens names the growing mode', async () => {
    const lenses = await checkLenses('hover_wheel.lti');
    expect(lenses[0].command?.title).toBe('⚠ unstable: λ ≈ 10.7 doubles every 64.8 ms');
  });

  it('switching the domain inserts our pragma through workspace/applyEdit', async () => {
    const { uri } = await openFixture('hover_two_modes.py');
    const lens = (await lensesOf(uri)).find((l) => l.command?.command === 'eigenlens.server.switchDomain')!;
    const before = client.appliedEdits.length;
    const applied = await client.connection.sendRequest('workspace/executeCommand', { command: lens.command!.command, arguments: lens.command!.arguments });
    expect(applied).toBe(true);
    const edit = client.appliedEdits[before].documentChanges![0] as TextDocumentEdit;
    expect((edit.edits[0] as { newText: string }).newText).toBe('# eigenlens: discrete\n');
  });

  it('a 140×140 matrix: the full analysis asked at once has its spectrum, and hovers have it once the passes are done', async () => {
    // Invented: diag(−1, …, −140) written out in full; a diagonal matrix's eigenvalues are its
    // diagonal entries (standard), so the slowest is λ = −1 (τ = 1 s) and the fastest λ = −140
    // (floating point here: n is over the exact limit, so values are shown with ≈).
    const n = 140;
    const rows = Array.from({ length: n }, (_, i) => `[${Array.from({ length: n }, (_, j) => (i === j ? `${-(i + 1)}.0` : '0.0')).join(', ')}]`);
    const text = `# invented diagonal state matrix\nA = [${rows.join(',\n     ')}]\n`;
    expect(text.length).toBeGreaterThan(60_000);
    const uri = `file:///fixtures/${opened++}/diag140.py`;
    await client.open(uri, 'python', text);
    const report = (await client.connection.sendRequest('eigenlens/report', { uri, matrixIndex: 0 })) as { markdown: string } | null;
    expect(report?.markdown).toContain('−140');
    expect(report?.markdown).not.toMatch(/later pass analyses it/);
    await client.diagnosticsWhere(uri, (p) => !p.diagnostics.some((d) => d.code === 'analysis-limit' && d.range.start.line === 0), 60_000);
    const h = (await client.connection.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: 1, character: 0 } })) as Hover | null;
    expect(h && (h.contents as MarkupContent).value).toContain('λ ≈ −1, simple: decays with time constant τ = 1 s');
  });

  it('eigenlens/report returns the full analysis with the full caution', async () => {
    const { uri } = await openFixture('hover_defective.ts');
    const report = (await client.connection.sendRequest('eigenlens/report', { uri })) as { title: string; markdown: string };
    expect(report.title).toContain('hover_defective.ts');
    expect(report.markdown).toContain('Characteristic polynomial');
    expect(report.markdown).toContain('not proof that a machine is safe');
    // (λ − 4)(λ − 16)² = λ³ − 36λ² + 384λ − 1024 (SciPy test_burkardt_8 eigenvalues; expanded by hand).
    expect(report.markdown).toMatch(/λ\^3 − 36·λ\^2 \+ 384·λ − 1024/);
  });

  it('settings: codeLens.enabled = false hides lenses after didChangeConfiguration', async () => {
    const { uri } = await openFixture('hover_two_modes.py');
    expect((await lensesOf(uri)).length).toBeGreaterThan(0);
    client.settings = { codeLens: { enabled: false } };
    await client.connection.sendNotification('workspace/didChangeConfiguration', { settings: null });
    expect(await lensesOf(uri)).toEqual([]);
    client.settings = {};
    await client.connection.sendNotification('workspace/didChangeConfiguration', { settings: null });
    expect((await lensesOf(uri)).length).toBeGreaterThan(0);
  });
});

describe('code actions', () => {
  it('quick fix for unstable-mode: read the matrix as discrete-time', async () => {
    const uri = `file:///fixtures/${opened++}/quickfix.py`;
    const text = 'import numpy as np\nA = np.array([[0.5, 0], [0, 0.2]])\n';
    await client.open(uri, 'python', text);
    const { diagnostics } = await client.diagnostics(uri, 1);
    const unstable = diagnostics.filter((d) => d.code === 'unstable-mode');
    expect(unstable).toHaveLength(1);
    const actions = await actionsAt(uri, text, text.indexOf('0.5'), unstable);
    const fix = actions.find((a) => a.kind === 'quickfix')!;
    expect(fix.title).toBe('Read A as discrete-time (eigenlens pragma)');
    expect(fix.diagnostics?.map((d) => d.code)).toEqual(['unstable-mode']);
    expect(applyAction(text, fix)).toBe('import numpy as np\n# eigenlens: discrete\nA = np.array([[0.5, 0], [0, 0.2]])\n');
  });

  it('insert Φ(t) in Python: parses, matches scipy expm at t = 0.7, re-running replaces', async () => {
    const { uri, after } = await checkInsertPhi('action_phi.py', /^Insert Φ\(t\) of A/);
    const file = join(work, 'action_phi.py');
    writeFileSync(file, after);
    execFileSync('python3', ['-c', 'import ast,sys; ast.parse(open(sys.argv[1]).read())', file]);
    if (hasScipy) {
      // Reference: scipy.linalg.expm; matrix from Moler & Van Loan 1978 (CHECKS.md #1).
      const err = Number(
        execFileSync('python3', ['-c', `import runpy, numpy as np; from scipy.linalg import expm
ns = runpy.run_path(${JSON.stringify(file)}, run_name='phi_check')
ref = expm(np.array([[-49, 24], [-64, 31]], dtype=float) * 0.7)
print(float(np.max(np.abs(ns['phi_A'](0.7) - ref)) / max(1.0, float(np.max(np.abs(ref))))))`], { encoding: 'utf8' }).trim().split('\n').pop(),
      );
      expect(err).toBeLessThan(1e-9);
    }
    await client.change(uri, after);
    const again = await actionsAt(uri, after, after.indexOf('A = np') + 1);
    const regenerate = again.find((a) => /^Regenerate Φ\(t\) of A/.test(a.title));
    expect(regenerate).toBeDefined();
    const twice = applyAction(after, regenerate!);
    expect(twice.match(/def phi_A\(/g)).toHaveLength(1);
    expect(twice).toBe(after);
  });

  it('a client that cannot resolve edits gets the every-matrix source action only when it asks for source actions', async () => {
    const { uri, text, cursor } = await openFixture('action_phi.py');
    const position = positionAt(text, cursor);
    const ask = async (only?: string[]) =>
      (await client.connection.sendRequest('textDocument/codeAction', { textDocument: { uri }, range: { start: position, end: position }, context: { diagnostics: [], ...(only ? { only } : {}) } })) as CodeAction[];
    expect((await ask()).some((a) => a.kind === 'source.eigenlens.insertAllTransitions')).toBe(false);
    const source = (await ask(['source'])).find((a) => a.kind === 'source.eigenlens.insertAllTransitions')!;
    expect(source.title).toBe('Insert the transition function of every state matrix (1)');
    expect(applyAction(text, source)).toContain('def phi_A(t):');
  });

  it('a client that resolves edits gets the Φ(t) actions without edits, and codeAction/resolve fills in the same edit', async () => {
    const lazy = await startClient({}, { resolveActionEdits: true });
    try {
      const { text, cursor } = readFixture('action_phi.py');
      const uri = `file:///fixtures/${opened++}/action_phi.py`;
      await lazy.open(uri, 'python', text);
      const position = positionAt(text, cursor);
      const request = { textDocument: { uri }, range: { start: position, end: position }, context: { diagnostics: [] } };
      const deferred = (await lazy.connection.sendRequest('textDocument/codeAction', request)) as CodeAction[];
      const insert = deferred.find((a) => /^Insert Φ\(t\) of A/.test(a.title))!;
      expect(insert.edit).toBeUndefined();
      expect(insert.data).toBeDefined();
      const every = deferred.find((a) => a.kind === 'source.eigenlens.insertAllTransitions')!;
      expect(every.edit).toBeUndefined();
      const resolved = (await lazy.connection.sendRequest('codeAction/resolve', insert)) as CodeAction;
      // The eager answer of a client without resolve support is the reference.
      const { uri: eagerUri } = await openFixture('action_phi.py');
      const eager = (await actionsAt(eagerUri, text, cursor)).find((a) => a.title === insert.title)!;
      const edits = (a: CodeAction) => (a.edit!.documentChanges![0] as TextDocumentEdit).edits;
      expect(edits(resolved)).toEqual(edits(eager));
      expect(applyTextEdits(text, edits(resolved) as never)).toContain('def phi_A(t):');
    } finally {
      await lazy.shutdown();
    }
  });

  it('insert Φ(t) in TypeScript: type-checks and matches scipy expm at t = 0.7', async () => {
    const { after } = await checkInsertPhi('action_phi.ts', /^Insert Φ\(t\) of A/);
    const file = join(work, 'action_phi.ts');
    writeFileSync(file, after);
    const tsc = join(process.cwd(), 'node_modules', 'typescript', 'bin', 'tsc');
    const result = spawnSync(process.execPath, [tsc, '--noEmit', '--strict', '--skipLibCheck', '--target', 'ES2022', '--module', 'ESNext', '--moduleResolution', 'bundler', '--types', 'node', file], { encoding: 'utf8' });
    expect(result.stdout + result.stderr).toBe('');
    const js = transformSync(after.replace(/^export /gm, ''), { loader: 'ts' }).code;
    const phi = new Function(`${js}\nreturn phi_A(0.7);`)() as number[][];
    // Rotation with decay (CHECKS.md #3): e^{At} = e^{−t}[[cos 2t, sin 2t], [−sin 2t, cos 2t]].
    const ref = hasScipy ? (scipyJson('expm(np.array([[-1, 2], [-2, -1]], dtype=float) * 0.7).tolist()') as number[][]) : [
      [Math.exp(-0.7) * Math.cos(1.4), Math.exp(-0.7) * Math.sin(1.4)],
      [-Math.exp(-0.7) * Math.sin(1.4), Math.exp(-0.7) * Math.cos(1.4)],
    ];
    const err = Math.max(...phi.flatMap((row, r) => row.map((x, c) => Math.abs(x - ref[r][c]))));
    expect(err).toBeLessThan(1e-9);
  });

  it('insert A^k in Python for a discrete matrix: matches numpy matrix_power', async () => {
    const { after } = await checkInsertPhi('action_powers.py', /^Insert A\^k of A/);
    const file = join(work, 'action_powers.py');
    writeFileSync(file, after);
    execFileSync('python3', ['-c', 'import ast,sys; ast.parse(open(sys.argv[1]).read())', file]);
    if (hasScipy) {
      // [[λ,1],[0,λ]]^k, λ = 0.5, k = 5 ⇒ [[0.03125, 0.3125],[0, 0.03125]] (CHECKS.md #11).
      const out = execFileSync('python3', ['-c', `import runpy, numpy as np
ns = runpy.run_path(${JSON.stringify(file)}, run_name='powers_check')
A = np.array([[0.5, 1], [0, 0.5]])
print(max(float(np.max(np.abs(ns['powers_A'](k) - np.linalg.matrix_power(A, k)))) for k in range(0, 8)))
print(ns['powers_A'](5).tolist())`], { encoding: 'utf8' }).trim().split('\n');
      expect(Number(out[0])).toBeLessThan(1e-12);
      expect(JSON.parse(out[1])).toEqual([[0.03125, 0.3125], [0, 0.03125]]);
    }
  });

  it('model files get no code-writing action', async () => {
    const { uri, text, cursor } = await openFixture('hover_wheel.lti');
    const actions = await actionsAt(uri, text, cursor);
    expect(actions.some((a) => /Φ|A\^k/.test(a.title))).toBe(false);
  });
});
