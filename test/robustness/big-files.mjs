// Big-file limits over stdio (a script, not a timed test): a ~2 MB Python file of generated
// matrices, a 200×200 literal, and 10,000 one-line matrices. For each: time to the first and
// to the complete diagnostics, hover, codeLens and codeAction latencies both while the server
// is reading and analysing the file (asked every 20 ms from the open on; the slowest answer
// counts) and after, one edit, and
// the server's memory (VmRSS after a quiet 3 s, VmHWM peak). Targets (common practice for
// editor responsiveness): every answer within 250 ms, memory under 200 MB.
// Writes test/robustness/limits-results.json.
// All data is generated here (invented matrices). Usage: node test/robustness/big-files.mjs
import { spawn } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { createProtocolConnection, StreamMessageReader, StreamMessageWriter } from 'vscode-languageserver-protocol/node';
import { seededRandom } from '../fuzz/targets.mjs';
import { manifestNodeArgs } from '../bench/serverBench.mjs';

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


function memory(pid) {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (key) => Number(new RegExp(`^${key}:\\s+(\\d+) kB`, 'm').exec(status)?.[1] ?? NaN) / 1024;
  return { rss: kb('VmRSS'), peak: kb('VmHWM') };
}

/** The document-level note of a pass that left work for later passes. */
const pending = (p) => p.diagnostics.some((d) => d.code === 'analysis-limit' && d.range.start.line === 0 && d.range.end.line === 0 && d.range.end.character === 0 && /time budget|still analysing/.test(d.message));

async function measure(label, text) {
  const child = spawn(process.execPath, [...manifestNodeArgs('.'), ...(process.env.EIGENLENS_CPU_PROF ? ['--cpu-prof', '--cpu-prof-dir=dist/prof'] : []), ...(process.env.EIGENLENS_SERVER_NODE_ARGS ?? '').split(' ').filter(Boolean), join('dist', 'server.js'), '--stdio'], { stdio: ['pipe', 'pipe', process.env.EIGENLENS_TRACE ? 'inherit' : 'pipe'] });
  const conn = createProtocolConnection(new StreamMessageReader(child.stdout), new StreamMessageWriter(child.stdin));
  const diag = [];
  let onDiag = null;
  conn.onNotification('textDocument/publishDiagnostics', (p) => {
    diag.push(p);
    onDiag?.(p);
  });
  conn.onRequest('workspace/configuration', (p) => p.items.map(() => null));
  conn.onRequest('client/registerCapability', () => null);
  conn.onRequest('workspace/codeLens/refresh', () => null);
  conn.listen();
  await conn.sendRequest('initialize', { processId: process.pid, rootUri: null, capabilities: { workspace: { configuration: true }, textDocument: { publishDiagnostics: { versionSupport: true } } }, workspaceFolders: null });
  await conn.sendNotification('initialized', {});
  const uri = `file:///limits/${label.replace(/\W+/g, '_')}.py`;
  const t0 = performance.now();
  const until = (test) =>
    new Promise((resolve) => {
      const last = diag.at(-1);
      if (last && test(last)) return resolve(last);
      onDiag = (p) => test(p) && resolve(p);
      setTimeout(() => resolve(null), 120_000);
    });
  const timed = async (method, params) => {
    const s = performance.now();
    await conn.sendRequest(method, params);
    return performance.now() - s;
  };
  const lines = text.split('\n');
  const mid = Math.floor(lines.length / 2);
  const lineOfA = lines.findIndex((l, i) => i >= mid && /^A/.test(l));
  const position = { line: lineOfA >= 0 ? lineOfA : 2, character: 1 };
  const matrixLines = lines.flatMap((l, i) => (/^A/.test(l) ? [i] : []));
  const requests = async (at = position) => ({
    hoverMs: await timed('textDocument/hover', { textDocument: { uri }, position: at }),
    codeLensMs: await timed('textDocument/codeLens', { textDocument: { uri } }),
    codeActionMs: await timed('textDocument/codeAction', { textDocument: { uri }, range: { start: at, end: at }, context: { diagnostics: [] } }),
  });
  // A user who keeps asking while the file is read and analysed: from the open until every pass
  // is done, a hover, code lens and code action on a random matrix every 20 ms; every answer timed.
  let probing = true;
  const probes = { hoverMs: [], codeLensMs: [], codeActionMs: [] };
  // The server's own memory account every half second from the open to the end: where the peak is.
  const samples = [];
  let phase = 'open';
  let sampling = true;
  const sampler = (async () => {
    while (sampling) {
      const at = performance.now();
      const s = await conn.sendRequest('eigenlens/stats', {}).catch(() => null);
      if (s) samples.push({ phase, atMs: Math.round(at - t0), ...s.memoryMB, peak: Math.round(memory(child.pid).peak) });
      await new Promise((res) => setTimeout(res, 500));
    }
  })();
  const probeLoop = (async () => {
    while (probing) {
      const line = matrixLines.length > 0 ? matrixLines[Math.floor(rnd() * matrixLines.length)] : 0;
      const r = await requests({ line, character: 1 });
      for (const k of Object.keys(probes)) probes[k].push(r[k]);
      await new Promise((res) => setTimeout(res, 20));
    }
  })();
  const first = until(() => true);
  await conn.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: 'python', version: 1, text } });
  await first;
  const diagnosticsMs = performance.now() - t0;
  await until((p) => p.version === 1 && !pending(p));
  const completeMs = performance.now() - t0;
  probing = false;
  await probeLoop;
  const stat = (xs) => {
    const s = [...xs].sort((a, b) => a - b);
    return { count: s.length, p50: s[Math.floor(s.length / 2)] ?? null, p95: s[Math.floor(s.length * 0.95)] ?? null, max: s.at(-1) ?? null };
  };
  const during = { hoverMs: stat(probes.hoverMs).max, codeLensMs: stat(probes.codeLensMs).max, codeActionMs: stat(probes.codeActionMs).max, detail: Object.fromEntries(Object.entries(probes).map(([k, v]) => [k, stat(v)])) };
  const after = await requests();
  // One edit, then diagnostics again (cached matrices elsewhere in the file).
  phase = 'edit';
  const e0 = performance.now();
  const again = until((p) => p.version === 2);
  await conn.sendNotification('textDocument/didChange', { textDocument: { uri, version: 2 }, contentChanges: [{ range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } }, text: '# edit\n' }] });
  await again;
  const editDiagnosticsMs = performance.now() - e0;
  await until((p) => p.version === 2 && !pending(p));
  // Quiet for a while, as an editor is between edits: the server's idle collection runs.
  phase = 'quiet';
  await new Promise((r) => setTimeout(r, 3000));
  sampling = false;
  await sampler;
  const mem = memory(child.pid);
  // The server's own account of where the memory is (JS heap spaces, external, WASM is in rss only).
  const stats = await conn.sendRequest('eigenlens/stats', {}).catch(() => null);
  // EIGENLENS_LIMITS_SNAPSHOT=1 with EIGENLENS_SERVER_NODE_ARGS=--heapsnapshot-signal=SIGUSR2: a heap snapshot here (profiling).
  if (process.env.EIGENLENS_LIMITS_SNAPSHOT) {
    child.kill('SIGUSR2');
    await new Promise((r) => setTimeout(r, 20_000));
  }
  await conn.sendRequest('shutdown').catch(() => {});
  await conn.sendNotification('exit').catch(() => {});
  await new Promise((r) => (child.exitCode !== null ? r() : child.on('exit', r)));
  conn.dispose();
  return { label, chars: text.length, diagnosticsMs, completeMs, during, after, editDiagnosticsMs, rssMb: mem.rss, peakRssMb: mem.peak, serverMemoryMB: stats?.memoryMB ?? null, heapSpacesMB: stats?.heapSpacesMB ?? null, details: stats?.details ?? null, closedForms: stats?.closedForms ?? null, diagnosticsCount: diag.at(-1)?.diagnostics.length ?? null, duringMemoryMB: samples };
}

const cases = [
  ['2 MB Python file', twoMegabytePython()],
  ['200x200 literal', bigLiteral()],
  ['10,000 one-line matrices', manyOneLiners()],
];
const results = [];
// EIGENLENS_LIMITS_CASE=<substring of a label> runs only the matching cases (profiling).
const only = process.env.EIGENLENS_LIMITS_CASE;
for (const [label, text] of cases) if (!only || label.includes(only)) results.push(await measure(label, text));
const fmt = (x, w = 8) => (typeof x === 'number' ? x.toFixed(0) : String(x)).padStart(w);
console.log('Requests (hover, code lens, code action) in ms: the slowest of each kind asked every 20 ms from the open until the analysis is done ("during"), then once more ("after"); memory after a quiet 3 s.');
console.log(`${'case'.padEnd(26)}${'chars'.padStart(9)}${'first'.padStart(7)}${'done'.padStart(7)}${'edit'.padStart(6)}${'  during h/l/a'.padEnd(17)}${'  after h/l/a'.padEnd(16)}${'RSS'.padStart(6)}${'peak'.padStart(6)}  within`);
for (const r of results) {
  const all = [r.during, r.after].flatMap((x) => [x.hoverMs, x.codeLensMs, x.codeActionMs]);
  r.slowestRequestMs = Math.max(...all);
  r.withinTargets = r.slowestRequestMs <= TARGET_MS && r.peakRssMb < RSS_LIMIT_MB;
  const hla = (x) => `${fmt(x.hoverMs, 5)}${fmt(x.codeLensMs, 5)}${fmt(x.codeActionMs, 5)}`;
  console.log(`${r.label.padEnd(26)}${fmt(r.chars, 9)}${fmt(r.diagnosticsMs, 7)}${fmt(r.completeMs, 7)}${fmt(r.editDiagnosticsMs, 6)}  ${hla(r.during)}  ${hla(r.after)}${fmt(r.rssMb, 6)}${fmt(r.peakRssMb, 6)}  ${r.withinTargets ? 'yes' : 'NO'}`);
}
writeFileSync(join('test', 'robustness', 'limits-results.json'), JSON.stringify({ targetMs: TARGET_MS, rssLimitMb: RSS_LIMIT_MB, node: process.version, date: new Date().toISOString(), results }, null, 2) + '\n');
