// Big-file limits over stdio (a script, not a timed test): a ~2 MB Python file of generated
// matrices, a 200×200 literal, and 10,000 one-line matrices. For each, measures time to the
// first diagnostics, then hover, codeLens and codeAction latencies, and the server's VmRSS.
// Targets (common practice for editor responsiveness): every answer within 250 ms after the
// diagnostics arrive, memory under 200 MB. Writes test/robustness/limits-results.json.
// All data is generated here (invented matrices). Usage: node test/robustness/big-files.mjs
import { spawn } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { createProtocolConnection, StreamMessageReader, StreamMessageWriter } from 'vscode-languageserver-protocol/node';
import { seededRandom } from '../fuzz/targets.mjs';

const TARGET_MS = 250;
const RSS_LIMIT_MB = 200;
const rnd = seededRandom(7);
const num = () => (Math.round((rnd() * 20 - 10) * 1000) / 1000).toString();

function twoMegabytePython() {
  const parts = ['# invented matrices for a size limit check\nimport numpy as np\n'];
  let i = 0;
  let size = parts[0].length;
  while (size < 2_000_000) {
    const n = 2 + (i % 4);
    const rows = Array.from({ length: n }, () => `[${Array.from({ length: n }, num).join(', ')}]`).join(',\n     ');
    const s = `A_${i} = np.array([${rows}])\n# ${'filler comment '.repeat(20)}\n`;
    parts.push(s);
    size += s.length;
    i++;
  }
  return parts.join('');
}
function bigLiteral() {
  const rows = Array.from({ length: 200 }, () => `[${Array.from({ length: 200 }, num).join(', ')}]`).join(',\n     ');
  return `# invented 200x200 state matrix\nA = [${rows}]\n`;
}
function manyOneLiners() {
  const lines = ['# invented one-line matrices'];
  for (let i = 0; i < 10_000; i++) lines.push(`A_${i} = [[${num()}, ${num()}], [${num()}, ${num()}]]`);
  return lines.join('\n') + '\n';
}

function rssMb(pid) {
  const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
  return m ? Number(m[1]) / 1024 : NaN;
}

async function measure(label, text) {
  const child = spawn(process.execPath, [...(process.env.EIGENLENS_CPU_PROF ? ['--cpu-prof', '--cpu-prof-dir=dist/prof'] : []), join('dist', 'server.js'), '--stdio'], { stdio: ['pipe', 'pipe', process.env.EIGENLENS_TRACE ? 'inherit' : 'pipe'] });
  const conn = createProtocolConnection(new StreamMessageReader(child.stdout), new StreamMessageWriter(child.stdin));
  const diag = [];
  let onDiag = null;
  conn.onNotification('textDocument/publishDiagnostics', (p) => {
    diag.push(p);
    onDiag?.();
  });
  conn.onRequest('workspace/configuration', (p) => p.items.map(() => null));
  conn.onRequest('client/registerCapability', () => null);
  conn.onRequest('workspace/codeLens/refresh', () => null);
  conn.listen();
  await conn.sendRequest('initialize', { processId: process.pid, rootUri: null, capabilities: { workspace: { configuration: true }, textDocument: { publishDiagnostics: { versionSupport: true } } }, workspaceFolders: null });
  await conn.sendNotification('initialized', {});
  const uri = `file:///limits/${label.replace(/\W+/g, '_')}.py`;
  const t0 = performance.now();
  const arrived = new Promise((resolve) => (onDiag = resolve));
  await conn.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: 'python', version: 1, text } });
  await Promise.race([arrived, new Promise((r) => setTimeout(r, 60_000))]);
  const diagnosticsMs = performance.now() - t0;
  const timed = async (method, params) => {
    const s = performance.now();
    await conn.sendRequest(method, params);
    return performance.now() - s;
  };
  const lines = text.split('\n');
  const mid = Math.floor(lines.length / 2);
  const lineOfA = lines.findIndex((l, i) => i >= mid && /^A/.test(l));
  const position = { line: lineOfA >= 0 ? lineOfA : 2, character: 1 };
  const hoverMs = await timed('textDocument/hover', { textDocument: { uri }, position });
  const codeLensMs = await timed('textDocument/codeLens', { textDocument: { uri } });
  const codeActionMs = await timed('textDocument/codeAction', { textDocument: { uri }, range: { start: position, end: position }, context: { diagnostics: [] } });
  // One edit, then diagnostics again (cached matrices elsewhere in the file).
  const e0 = performance.now();
  const again = new Promise((resolve) => (onDiag = resolve));
  await conn.sendNotification('textDocument/didChange', { textDocument: { uri, version: 2 }, contentChanges: [{ range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, text: '# edit\n' }] });
  await Promise.race([again, new Promise((r) => setTimeout(r, 60_000))]);
  const editDiagnosticsMs = performance.now() - e0;
  const rss = rssMb(child.pid);
  await conn.sendRequest('shutdown').catch(() => {});
  await conn.sendNotification('exit').catch(() => {});
  await new Promise((r) => (child.exitCode !== null ? r() : child.on('exit', r)));
  conn.dispose();
  return { label, chars: text.length, diagnosticsMs, editDiagnosticsMs, hoverMs, codeLensMs, codeActionMs, rssMb: rss, diagnosticsCount: diag.at(-1)?.diagnostics.length ?? null };
}

const cases = [
  ['2 MB Python file', twoMegabytePython()],
  ['200x200 literal', bigLiteral()],
  ['10,000 one-line matrices', manyOneLiners()],
];
const results = [];
for (const [label, text] of cases) results.push(await measure(label, text));
const fmt = (x) => (typeof x === 'number' ? x.toFixed(0).padStart(8) : String(x).padStart(8));
console.log(`${'case'.padEnd(26)}${'chars'.padStart(9)}${'diag'.padStart(8)}${'editDiag'.padStart(9)}${'hover'.padStart(8)}${'lens'.padStart(8)}${'action'.padStart(8)}${'RSS MB'.padStart(8)}  within`);
for (const r of results) {
  const ok = [r.hoverMs, r.codeLensMs, r.codeActionMs].every((x) => x <= TARGET_MS) && r.rssMb < RSS_LIMIT_MB;
  r.withinTargets = ok;
  console.log(`${r.label.padEnd(26)}${fmt(r.chars).padStart(9)}${fmt(r.diagnosticsMs)}${fmt(r.editDiagnosticsMs).padStart(9)}${fmt(r.hoverMs)}${fmt(r.codeLensMs)}${fmt(r.codeActionMs)}${fmt(r.rssMb)}  ${ok ? 'yes' : 'NO'}`);
}
writeFileSync(join('test', 'robustness', 'limits-results.json'), JSON.stringify({ targetMs: TARGET_MS, rssLimitMb: RSS_LIMIT_MB, node: process.version, results }, null, 2) + '\n');
