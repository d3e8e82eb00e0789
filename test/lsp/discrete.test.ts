// End-to-end over real stdio for the discrete-time workflow: sampling and structure
// diagnostics reaching the client, the insert-discrete-model actions (Python must parse,
// TypeScript must type-check, C must compile; numbers equal the engine's discretize output to
// the printed precision and match published values), re-running updates instead of
// duplicating, eigenlens/discretize and eigenlens/cCode, model hovers and entry hovers.
// One server process for the whole file; snapshots beside the fixtures (UPDATE_EXPECT=1).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { extname, join } from 'node:path';
import { transformSync } from 'esbuild';
import type { CodeAction, Diagnostic, Hover, MarkupContent, TextDocumentEdit, WorkspaceEdit } from 'vscode-languageserver-protocol';
import { applyTextEdits, positionAt, startClient, type TestClient } from './client';
import { expectFile, readFixture, scrubPlot } from './expect';
import { discretize, type DiscretizationMethod } from '../../server/src/engine/discretize';
import { processNoise } from '../../server/src/engine/vanLoan';
import { Rational } from '../../server/src/engine/rational';

const LANGUAGE: Record<string, string> = { '.py': 'python', '.ts': 'typescript', '.lti': 'lti', '.js': 'javascript' };
const hasScipy = spawnSync('python3', ['-c', 'import numpy, scipy.signal']).status === 0;
// CI installs numpy and scipy (.ci/run); there a missing reference library is a failure, not a skip.
if (process.env.CI && !hasScipy) throw new Error('numpy and scipy are required when CI is set (see .ci/run)');
const hasGcc = spawnSync('gcc', ['--version']).status === 0;
if (process.env.CI && !hasGcc) throw new Error('gcc is required when CI is set');
const work = mkdtempSync(join(tmpdir(), 'eigenlens-discrete-'));
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
  const uri = `file:///fixtures/discrete/${opened++}/${name}`;
  await client.open(uri, LANGUAGE[extname(name)], text);
  return { uri, text, cursor };
}

async function openText(name: string, text: string): Promise<string> {
  const uri = `file:///fixtures/discrete/${opened++}/${name}`;
  await client.open(uri, LANGUAGE[extname(name)], text);
  return uri;
}

async function hoverAt(uri: string, text: string, offset: number): Promise<string | null> {
  const hover = (await client.connection.sendRequest('textDocument/hover', { textDocument: { uri }, position: positionAt(text, offset) })) as Hover | null;
  return hover ? (hover.contents as MarkupContent).value : null;
}

async function actionsAt(uri: string, text: string, offset: number): Promise<CodeAction[]> {
  const position = positionAt(text, offset);
  return (await client.connection.sendRequest('textDocument/codeAction', {
    textDocument: { uri },
    range: { start: position, end: position },
    context: { diagnostics: [] },
  })) as CodeAction[];
}

function applyEdit(text: string, edit: WorkspaceEdit): string {
  const change = edit.documentChanges![0] as TextDocumentEdit;
  return applyTextEdits(text, change.edits as never);
}

function findAction(actions: CodeAction[], pattern: RegExp): CodeAction {
  const action = actions.find((a) => pattern.test(a.title));
  expect(action, `no action matching ${pattern} in ${actions.map((a) => a.title).join(' / ')}`).toBeDefined();
  return action!;
}

function offsetOf(text: string, line: number, character: number): number {
  return text.split('\n').slice(0, line).reduce((n, l) => n + l.length + 1, 0) + character;
}

function renderDiagnostics(text: string, diagnostics: Diagnostic[]): string {
  return diagnostics
    .map((d) => {
      const start = offsetOf(text, d.range.start.line, d.range.start.character);
      const end = offsetOf(text, d.range.end.line, d.range.end.character);
      const s = text.slice(start, end).replace(/\s+/g, ' ');
      return `${d.range.start.line + 1}:${d.range.start.character + 1} ${d.severity} ${d.code} [${d.source}] "${s.length > 40 ? `${s.slice(0, 37)}...` : s}"\n  ${d.message}`;
    })
    .join('\n');
}

const q = (s: string) => Rational.parse(s)!;
const exactMatrix = (rows: string[][]) => rows.map((r) => r.map(q));

/** Runs a Python file and prints the named globals as JSON (numpy arrays as lists). */
function pythonGlobals(file: string, names: string[]): Record<string, number[][]> {
  const out = execFileSync(
    'python3',
    ['-c', `import runpy, json, sys
ns = runpy.run_path(sys.argv[1], run_name='discrete_check')
print(json.dumps({k: [list(map(float, r)) for r in ns[k]] for k in sys.argv[2:]}))`, file, ...names],
    { encoding: 'utf8' },
  );
  return JSON.parse(out.trim().split('\n').pop()!);
}

describe('sampling and structure diagnostics reach the client', () => {
  it('each code, at the matrix concerned, with source eigenlens', async () => {
    const { uri, text } = await openFixture('discrete_codes.py');
    const { diagnostics } = await client.diagnostics(uri, 1);
    expectFile('discrete_codes.py.diagnostics.txt', renderDiagnostics(text, diagnostics) || '(none)');
    expect(diagnostics.every((d) => d.source === 'eigenlens')).toBe(true);
    const at = (code: string) => diagnostics.filter((d) => d.code === code).map((d) => text.split('\n')[d.range.start.line]);
    // A_slow: λ = −10 ⇒ τ_min = 0.1 s; T = 0.5 s breaks T ≤ τ_min/10 (CHECKS.md #25, common practice).
    expect(at('period-too-long').some((l) => l.startsWith('A_slow'))).toBe(true);
    // A_alias: λ = −0.5 ± j√99.75 ≈ −0.5 ± j9.99; |Im λ|·T = 4.0 ≥ π is aliased (CHECKS.md #25, common practice).
    expect(at('aliasing').some((l) => l.startsWith('A_alias'))).toBe(true);
    // A_few: the same mode at T = 0.1 s: 2π/(9.99·0.1) ≈ 6.3 samples per oscillation < 10 (CHECKS.md #25).
    expect(at('few-samples-per-period').some((l) => l.startsWith('A_few'))).toBe(true);
    expect(at('aliasing').some((l) => l.startsWith('A_few'))).toBe(false);
    // A_path: λ = ±j; T = π makes e^{±jT} coincide, so the sampled model loses controllability
    // (Kalman, Ho & Narendra 1963, pathological sampling; from memory).
    expect(at('pathological-period').some((l) => l.startsWith('A_path'))).toBe(true);
    expect(at('uncontrollable-mode').some((l) => l.startsWith('B_path'))).toBe(true);
    // A_split = diag(−1, −2), B = [1, 0]ᵀ, C = [1, 0]: the second state is neither reached nor
    // seen (Kalman rank test, CHECKS.md #20 pattern).
    expect(at('uncontrollable-mode').some((l) => l.startsWith('B_split'))).toBe(true);
    expect(at('unobservable-mode').some((l) => l.startsWith('C_split'))).toBe(true);
    // Four poles at 0.99: a float32 rounding of about 6e-8 in the coefficients moves a
    // fourfold root by about (6e-8)^(1/4) ≈ 0.016 (root sensitivity of a multiple root;
    // Wilkinson, Rounding Errors in Algebraic Processes, 1963, from memory).
    const f32 = diagnostics.find((d) => d.code === 'float32-sensitive');
    expect(f32 && text.split('\n')[f32.range.start.line].startsWith('A_d')).toBe(true);
    for (const code of ['period-too-long', 'aliasing', 'few-samples-per-period', 'pathological-period', 'float32-sensitive']) {
      expect(diagnostics.find((d) => d.code === code)?.severity, code).toBeLessThanOrEqual(2);
    }
    // λ = −2 decays, so losing it is information, not a warning; losing the undamped λ = ±j by
    // sampling (B_path) is a warning.
    expect(diagnostics.find((d) => d.code === 'unobservable-mode')?.severity).toBe(3);
    expect(diagnostics.find((d) => d.code === 'uncontrollable-mode' && text.split('\n')[d.range.start.line].startsWith('B_path'))?.severity).toBe(2);
  });

  it('the state hover carries the model: ranks, period advice with its source and range, rounding', async () => {
    const { uri, text } = await openFixture('discrete_codes.py');
    const path = await hoverAt(uri, text, text.indexOf('A_path') + 1);
    expectFile('discrete_codes.py.A_path.hover.md', scrubPlot(path ?? '(no hover)'));
    expect(path).toContain('(A_path, B_path) controllable (rank 2 of 2, exact)');
    expect(path).toMatch(/Sampled at T = 3\.14159\d* s \(zoh\): \*\*not controllable\*\* \(rank 1 of 2/);
    // e^{±jT} at T = π is −1 twice: the mode lost is z = −1 (Euler's formula).
    expect(path).toContain('the input cannot move λ ≈ −1');
    expect(path).toContain('pathological-period');
    expect(path).toContain('Kalman, Ho & Narendra');
    // Transfer function of ẍ = −x + u from the input to nothing: no C, so none is shown.
    expect(path).not.toContain('G(s)');
    const slow = await hoverAt(uri, text, text.indexOf('A_slow') + 1);
    // τ_min = 0.1 s ⇒ T ≤ 10 ms by the τ/10 rule (CHECKS.md #25); the range ends there.
    expect(slow).toMatch(/recommended [\d.]+ ms – 10 ms/);
    const split = await hoverAt(uri, text, text.indexOf('A_split') + 1);
    expect(split).toMatch(/\(A_split, B_split\) \*\*not controllable\*\* \(rank 1 of 2, exact\): the input cannot move λ = −2/);
    expect(split).toMatch(/\(A_split, C_split\) \*\*not observable\*\* \(rank 1 of 2, exact\): the outputs do not see λ = −2/);
    // G(s) = C(sI − A)⁻¹B = 1/(s + 1): the λ = −2 mode cancels (standard algebra).
    expect(split).toMatch(/G\(s\) = 1\/\(s \+ 1\); poles −1; zeros none/);
    const discreteHover = await hoverAt(uri, text, text.indexOf('A_d') + 1);
    expect(discreteHover).toMatch(/Rounding A_d to float32: poles move by at most 0\.016\d* .*\*\*a pole crossed onto or outside the unit circle\*\*/);
    const input = await hoverAt(uri, text, text.indexOf('B_split') + 1);
    expect(input).toContain('(A_split, B_split) is **not controllable** (rank 1 of 2, exact): the input cannot move λ = −2.');
    const output = await hoverAt(uri, text, text.indexOf('C_split') + 1);
    expect(output).toContain('(A_split, C_split) is **not observable**');
  });

  it('the full report has every period rule, the sampled ranks, transfer functions and the caution', async () => {
    const { uri } = await openFixture('discrete_codes.py');
    const report = (await client.connection.sendRequest('eigenlens/report', { uri })) as { title: string; markdown: string };
    expect(report.markdown).toContain('**Model `path`**');
    expect(report.markdown).toMatch(/Sampled at T = .*\(zoh\): \*\*not controllable\*\*/);
    expect(report.markdown).toContain('numerator 1, denominator s + 1');
    expect(report.markdown).toContain('`uncontrollable-mode` (information, on B_split)');
    expect(report.markdown).toContain('not proof that a machine is safe');
  });
});

describe('insert the discrete model', () => {
  it('Python ZOH with Qd: parses, equals the engine and the published values, re-running updates', async () => {
    const { uri, text, cursor } = await openFixture('discrete_zoh.py');
    const actions = await actionsAt(uri, text, cursor);
    expectFile('discrete_zoh.py.actions.txt', actions.map((a) => `${a.kind}: ${a.title}`).join('\n'));
    const zoh = findAction(actions, /^Insert discrete model of A \(ZOH, T = 0\.5 s\)$/);
    const after = applyEdit(text, zoh.edit!);
    expectFile('discrete_zoh.py.after.py', after);
    const file = join(work, 'discrete_zoh.py');
    writeFileSync(file, after);
    execFileSync('python3', ['-c', 'import ast,sys; ast.parse(open(sys.argv[1]).read())', file]);
    if (hasScipy) {
      const got = pythonGlobals(file, ['Ad', 'Bd', 'Cd', 'Qd']);
      // Same doubles as the engine (17 significant digits round-trip).
      const engine = discretize({ A: exactMatrix([['0', '1'], ['0', '0']]), B: exactMatrix([['0'], ['1']]), C: exactMatrix([['1', '0']]) }, 0.5, 'zoh');
      expect(engine.ok).toBe(true);
      if (engine.ok) {
        expect(got.Ad).toEqual(engine.Ad);
        expect(got.Bd).toEqual(engine.Bd);
        expect(got.Cd).toEqual(engine.Cd);
      }
      const noise = processNoise(exactMatrix([['0', '1'], ['0', '0']]), exactMatrix([['2']]), 0.5, exactMatrix([['0'], ['1']]));
      expect(noise.ok && got.Qd).toEqual(noise.ok ? noise.Qd : null);
      // Double integrator under ZOH: Ad = [[1, T], [0, 1]], Bd = [[T²/2], [T]] (CHECKS.md #13,
      // Franklin, Powell & Workman, ch. 4, from memory), T = 0.5.
      expect(got.Ad).toEqual([[1, 0.5], [0, 1]]);
      expect(got.Bd).toEqual([[0.125], [0.5]]);
      // Qd = q[[T³/3, T²/2], [T²/2, T]], q = 2, T = 0.5 ⇒ [[1/12, 0.25], [0.25, 1]] (CHECKS.md #17,
      // Bar-Shalom, Li & Kirubarajan 2001, §6.2.2, from memory).
      expect(got.Qd[0][0]).toBeCloseTo(1 / 12, 15);
      expect(got.Qd.slice(0, 1).map((r) => r[1]).concat(got.Qd[1])).toEqual([0.25, 0.25, 1]);
      // And SciPy's cont2discrete (a general-purpose signal library) agrees on Ad, Bd.
      const ref = JSON.parse(
        execFileSync('python3', ['-c', `import json, numpy as np; from scipy.signal import cont2discrete
Ad, Bd, *_ = cont2discrete((np.array([[0., 1], [0, 0]]), np.array([[0.], [1]]), np.array([[1., 0]]), np.array([[0.]])), 0.5, method='zoh')
print(json.dumps([Ad.tolist(), Bd.tolist()]))`], { encoding: 'utf8' }),
      ) as number[][][];
      expect(Math.max(...got.Ad.flat().map((x, i) => Math.abs(x - ref[0].flat()[i])))).toBeLessThan(1e-14);
      expect(Math.max(...got.Bd.flat().map((x, i) => Math.abs(x - ref[1].flat()[i])))).toBeLessThan(1e-14);
    }
    // The inserted model is itself read as a discrete model at the same period.
    await client.change(uri, after);
    const hover = await hoverAt(uri, after, after.indexOf('Ad = np') + 1);
    expect(hover).toContain('discrete time, period 0.5 s');
    // Re-running: the action now updates the block; applying it changes nothing.
    const again = await actionsAt(uri, after, after.indexOf('A = np') + 1);
    const update = findAction(again, /^Update discrete model of A \(ZOH, T = 0\.5 s\)$/);
    expect(applyEdit(after, update.edit!)).toBe(after);
    // Switching to Tustin replaces the block: still one Ad, now the Tustin one.
    const tustin = applyEdit(after, findAction(again, /^Update discrete model of A \(Tustin/).edit!);
    expect(tustin.match(/^Ad = /gm)).toHaveLength(1);
    expect(tustin).toContain('by Tustin');
    expect(tustin).not.toContain('by ZOH');
  });

  it('TypeScript Tustin: type-checks, keeps exact fractions, equals the published values', async () => {
    const { uri, text, cursor } = await openFixture('discrete_tustin.ts');
    const actions = await actionsAt(uri, text, cursor);
    const after = applyEdit(text, findAction(actions, /^Insert discrete model of A \(Tustin, T = 0\.5 s\)$/).edit!);
    expectFile('discrete_tustin.ts.after.ts', after);
    const file = join(work, 'discrete_tustin.ts');
    writeFileSync(file, after);
    const tsc = join(process.cwd(), 'node_modules', 'typescript', 'bin', 'tsc');
    const result = spawnSync(process.execPath, [tsc, '--noEmit', '--strict', '--skipLibCheck', '--target', 'ES2022', '--module', 'ESNext', '--moduleResolution', 'bundler', '--types', 'node', file], { encoding: 'utf8' });
    expect(result.stdout + result.stderr).toBe('');
    const js = transformSync(after.replace(/^export .*$/gm, ''), { loader: 'ts' }).code;
    const got = new Function(`${js}\nreturn { Ad, Bd, Cd, Dd };`)() as Record<string, number[][]>;
    // SciPy cont2discrete tests, `test_bilinear` (CHECKS.md #15): Ad = (5/3)I, Bd = [[1/3], [1/3]],
    // Cd = [[1, 4/3], [4/3, 4/3], [4/3, 1/3]], Dd = [[7/24], [1/3], [−0.1216666…]], T = 0.5.
    expect(got.Ad).toEqual([[5 / 3, 0], [0, 5 / 3]]);
    expect(got.Bd).toEqual([[1 / 3], [1 / 3]]);
    expect(got.Cd).toEqual([[1, 4 / 3], [4 / 3, 4 / 3], [4 / 3, 1 / 3]]);
    expect(got.Dd[0][0]).toBe(7 / 24);
    expect(got.Dd[1][0]).toBe(1 / 3);
    expect(got.Dd[2][0]).toBeCloseTo(-0.121666666666666, 14);
    expect(after).toContain('const Ad: number[][] = [');
    expect(after).toContain('[5/3, 0]');
    expect(after).toContain('alpha = 1/2');
    // Equal to the engine's own Tustin output.
    const engine = discretize(
      { A: exactMatrix([['1', '0'], ['0', '1']]), B: exactMatrix([['1/2'], ['1/2']]), C: exactMatrix([['3/4', '1'], ['1', '1'], ['1', '1/4']]), D: exactMatrix([['0'], ['0'], ['-33/100']]) },
      0.5,
      'tustin',
    );
    expect(engine.ok && [engine.Ad, engine.Bd, engine.Cd, engine.Dd]).toEqual([got.Ad, got.Bd, got.Cd, got.Dd]);
  });

  it('model file Tustin: a new discrete system block, read back as discrete', async () => {
    const { uri, text, cursor } = await openFixture('discrete_lag.lti');
    const actions = await actionsAt(uri, text, cursor);
    const after = applyEdit(text, findAction(actions, /^Insert discrete model of A \(Tustin, T = 0\.1 s\)$/).edit!);
    expectFile('discrete_lag.lti.after.lti', after);
    // Scalar lag a = b = c = 1, d = 0, T = 0.1 under Tustin: Ad = 19/21, Bd = 2/21, Cd = 20/21,
    // Dd = 1/21 (CHECKS.md #16, exact).
    expect(after).toMatch(/system lag_d discrete period=0\.1\n  A:\n    19\/21\n  B:\n    2\/21\n  C:\n    20\/21\n  D:\n    1\/21\nend/);
    await client.change(uri, after);
    const { diagnostics } = await client.diagnostics(uri, 2);
    expect(diagnostics.filter((d) => d.severity === 1)).toEqual([]);
    const hover = await hoverAt(uri, after, after.indexOf('  A:', after.indexOf('system lag_d')) + 2);
    expect(hover).toContain('discrete time, period 0.1 s');
    // Its pole is 19/21 (inside the unit circle): stable.
    expect(hover).toContain('**Asymptotically stable**');
  });

  it('eigenlens/discretize at a chosen period and method; bad input is an error, not a crash', async () => {
    const { uri, text } = await openFixture('discrete_zoh.py');
    const lenses = (await client.connection.sendRequest('textDocument/codeLens', { textDocument: { uri } })) as { command?: { arguments?: unknown[] } }[];
    const matrixIndex = 0;
    expect(lenses.length).toBeGreaterThan(0);
    const edit = (await client.connection.sendRequest('eigenlens/discretize', { uri, matrixIndex, period: 0.25, method: 'backward-euler' })) as WorkspaceEdit;
    const after = applyEdit(text, edit);
    expect(after).toContain('# eigenlens: discrete period=0.25');
    expect(after).toContain('by backward Euler');
    // Double integrator, backward Euler, T = 1/4: Ad = (I − AT)⁻¹ = [[1, T], [0, 1]] (the
    // inverse of a unit upper-triangular matrix; standard algebra).
    expect(after).toContain('    [1, 1/4],');
    await expect(client.connection.sendRequest('eigenlens/discretize', { uri, matrixIndex, period: -1, method: 'zoh' })).rejects.toThrow(/positive/);
    await expect(client.connection.sendRequest('eigenlens/discretize', { uri, matrixIndex, period: 0.1, method: 'magic' })).rejects.toThrow(/Unknown discretization method/);
    expect(await client.connection.sendRequest('eigenlens/discretize', { uri, matrixIndex: 99, period: 0.1, method: 'zoh' })).toBeNull();
  });
});

describe('C initializers', () => {
  const methods: [DiscretizationMethod, 'double' | 'float'][] = [
    ['zoh', 'double'],
    ['tustin', 'float'],
  ];
  for (const [method, type] of methods) {
    it(`${method} as ${type}: compiles with gcc and equals the engine to the printed digits`, async () => {
      const { uri } = await openFixture('discrete_zoh.py');
      const result = (await client.connection.sendRequest('eigenlens/cCode', { uri, matrixIndex: 0, method, type })) as { text: string | null; error: string | null };
      expect(result.error).toBeNull();
      const c = result.text!;
      expectFile(`discrete_zoh.py.${method}.${type}.c`, c);
      expect(c).toMatch(new RegExp(`^static const ${type} Ad\\[2\\]\\[2\\] = \\{\\{`, 'm'));
      if (hasGcc) {
        const file = join(work, `discrete_${method}_${type}.c`);
        writeFileSync(file, `${c}\nconst ${type} *use_all(void) { return Ad[0]; }\n`);
        const gcc = spawnSync('gcc', ['-fsyntax-only', '-std=c99', '-Wall', '-Wno-unused-const-variable', file], { encoding: 'utf8' });
        expect(gcc.stderr).toBe('');
        expect(gcc.status).toBe(0);
      }
      const engine = discretize({ A: exactMatrix([['0', '1'], ['0', '0']]), B: exactMatrix([['0'], ['1']]), C: exactMatrix([['1', '0']]) }, 0.5, method);
      expect(engine.ok).toBe(true);
      if (!engine.ok) return;
      const parsed = (name: string) => {
        const m = new RegExp(`${name}\\[\\d+\\]\\[\\d+\\] = \\{(.*)\\};`).exec(c)!;
        return m[1].split('}, {').map((row) => row.replace(/[{}]/g, '').split(', ').map((x) => Number(x.replace(/f$/, ''))));
      };
      for (const [name, want] of [['Ad', engine.Ad], ['Bd', engine.Bd!], ['Cd', engine.Cd!]] as const) {
        const got = parsed(name);
        // double: shortest round-trip text, so equal; float: 9 significant digits (round-trips float32).
        if (type === 'double') expect(got, name).toEqual(want);
        else got.flat().forEach((x, i) => expect(Math.abs(x - want.flat()[i]), name).toBeLessThanOrEqual(5e-9 * Math.max(1, Math.abs(want.flat()[i]))));
      }
    });
  }

  it('without a period the request says why', async () => {
    const uri = await openText('noperiod.py', 'import numpy as np\nA = np.array([[0, 1], [0, 0]])\n');
    const result = (await client.connection.sendRequest('eigenlens/cCode', { uri, matrixIndex: 0 })) as { text: string | null; error: string | null };
    expect(result.text).toBeNull();
    expect(result.error).toMatch(/No sample period/);
  });

  it('the comment-block action inserts C text that compiles once uncommented', async () => {
    const { uri, text, cursor } = await openFixture('discrete_zoh.py');
    const actions = await actionsAt(uri, text, cursor);
    const after = applyEdit(text, findAction(actions, /^Insert C initializers of the discrete model of A as a comment/).edit!);
    const block = after.split('\n').filter((l) => /^# (static const|\/\*| \*)/.test(l)).map((l) => l.slice(2)).join('\n');
    expect(block).toContain('static const double Qd[2][2]');
    if (hasGcc) {
      const file = join(work, 'comment_block.c');
      writeFileSync(file, `${block}\n`);
      const gcc = spawnSync('gcc', ['-fsyntax-only', '-std=c99', file], { encoding: 'utf8' });
      expect(gcc.status, gcc.stderr).toBe(0);
    }
    execFileSync('python3', ['-c', 'import ast,sys; ast.parse(sys.stdin.read())'], { input: after });
  });
});

describe('entry hover in the real server', () => {
  it('shows the entry and its exact value', async () => {
    const { uri, text, cursor } = await openFixture('hover_entry.py');
    const md = await hoverAt(uri, text, cursor);
    expect(md).toBe('**A**[1, 2] = 24 (exact)');
    const fraction = '# Invented example.\nimport numpy as np\nA = np.array([[-1/3, 0], [0, -2]])\n';
    const furi = await openText('entry_fraction.py', fraction);
    // 1/3 ≈ 0.333333 to the default 6 significant digits.
    expect(await hoverAt(furi, fraction, fraction.indexOf('1/3') + 1)).toBe('**A**[1, 1] = −1/3 (exact) ≈ −0.333333');
  });
});
