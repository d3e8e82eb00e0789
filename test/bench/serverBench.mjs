// The language server measured from outside, as an editor sees it: a real LSP client over
// stdio (vscode-languageserver-protocol's createProtocolConnection with stream reader and
// writer) talking to a spawned `node dist/server.js --stdio` on this machine.
//
// Per language, a fresh server: spawn → initialize response; open a generated 5,000-line file
// with 300 matrices → its first publishDiagnostics; hovers on the names of matrices with
// n ≤ 8; one-character edits inside integer matrices → diagnostics for that version. Then a
// fresh server opens ten such files and its resident memory is read from /proc/<pid>/status.
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import { createProtocolConnection, StreamMessageReader, StreamMessageWriter } from 'vscode-languageserver-protocol/node';
import { generateSourceFile, makeRng } from './generate.mjs';
import { summary } from './stats.mjs';

const LANGUAGE_ID = { python: 'python', typescript: 'typescript' };
const EXTENSION = { python: 'py', typescript: 'ts' };

/** VmRSS and VmHWM of a process in MB (Linux /proc; null elsewhere). */
function memoryOf(pid) {
  try {
    const status = readFileSync(`/proc/${pid}/status`, 'utf8');
    const kb = (key) => Number(new RegExp(`^${key}:\\s+(\\d+) kB`, 'm').exec(status)?.[1] ?? NaN);
    return { rssMB: kb('VmRSS') / 1024, peakRssMB: kb('VmHWM') / 1024 };
  } catch {
    return { rssMB: null, peakRssMB: null };
  }
}

/**
 * User + system CPU seconds a process has used (Linux /proc/<pid>/stat fields 14 and 15, in
 * clock ticks of 1/100 s, the Linux USER_HZ). Compared with wall time it shows how much of a
 * latency was the server computing and how much was waiting for a core on a busy machine.
 */
function cpuSecondsOf(pid) {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return (Number(fields[11]) + Number(fields[12])) / 100;
  } catch {
    return null;
  }
}

class ServerSession {
  constructor(root) {
    this.root = root;
    this.waiters = [];
    this.latest = new Map();
    this.stderr = '';
  }

  async start() {
    this.t0 = performance.now();
    // EIGENLENS_BENCH_SERVER_NODE_ARGS passes extra node flags to the server, e.g. "--cpu-prof --cpu-prof-dir=prof".
    const nodeArgs = (process.env.EIGENLENS_BENCH_SERVER_NODE_ARGS ?? '').split(' ').filter(Boolean);
    this.proc = spawn(process.execPath, [...nodeArgs, join(this.root, 'dist', 'server.js'), '--stdio'], { cwd: this.root, stdio: ['pipe', 'pipe', 'pipe'] });
    this.proc.stderr.on('data', (d) => {
      if (this.stderr.length < 20_000) this.stderr += d;
    });
    this.exited = new Promise((resolve) => this.proc.on('exit', (code, signal) => resolve({ code, signal })));
    this.conn = createProtocolConnection(new StreamMessageReader(this.proc.stdout), new StreamMessageWriter(this.proc.stdin));
    this.conn.onNotification('textDocument/publishDiagnostics', (params) => {
      this.latest.set(params.uri, params);
      const now = performance.now();
      this.waiters = this.waiters.filter((w) => {
        if (w.uri !== params.uri || (params.version !== undefined && params.version !== null && params.version < w.version)) return true;
        w.resolve({ at: now, params });
        return false;
      });
    });
    this.conn.onNotification(() => undefined);
    this.conn.onRequest(() => null);
    this.conn.listen();
    const init = await this.conn.sendRequest('initialize', {
      processId: process.pid,
      rootUri: null,
      workspaceFolders: null,
      capabilities: {
        textDocument: {
          synchronization: { dynamicRegistration: false },
          hover: { contentFormat: ['markdown', 'plaintext'] },
          publishDiagnostics: { versionSupport: true },
        },
        workspace: {},
      },
    });
    this.initializeMs = performance.now() - this.t0;
    this.capabilities = init.capabilities;
    this.conn.sendNotification('initialized', {});
    return this;
  }

  /** Resolves with the first publishDiagnostics for uri at or after version (timeout rejects). */
  diagnosticsFor(uri, version, timeoutMs = 60_000) {
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`no diagnostics for ${uri} v${version} within ${timeoutMs} ms`)), timeoutMs);
      this.waiters.push({ uri, version, resolve: (r) => (clearTimeout(timer), resolve(r)) });
    });
  }

  open(uri, languageId, text) {
    this.conn.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId, version: 1, text } });
  }

  async stop() {
    try {
      await Promise.race([this.conn.sendRequest('shutdown'), new Promise((r) => setTimeout(r, 3000))]);
      this.conn.sendNotification('exit');
    } catch {
      // Fall through to the kill below.
    }
    const done = await Promise.race([this.exited, new Promise((r) => setTimeout(() => r(null), 3000))]);
    if (done === null) this.proc.kill('SIGKILL');
    this.conn.dispose();
  }
}

function histogram(diagnostics) {
  const counts = {};
  for (const d of diagnostics) counts[d.code] = (counts[d.code] ?? 0) + 1;
  return counts;
}

/** Matrices left unanalysed by a pass that ran out of the server's per-document time budget. */
function unanalysedCount(params) {
  const limit = params.diagnostics.find((d) => d.code === 'analysis-limit');
  if (!limit) return 0;
  return Number(/(\d+) matri/.exec(limit.message)?.[1] ?? NaN);
}

/**
 * The server analyses a document within a time budget per pass and publishes what it has;
 * only a new version starts another pass. To reach complete diagnostics the way a typing user
 * would, toggle a trailing space on the first line (a comment) until a pass finishes everything.
 * Returns the diagnostics that were complete, the time they arrived, the passes and the version.
 */
async function nudgeUntilComplete(session, uri, first, firstLine, version) {
  let params = first.params;
  let at = first.at;
  let passes = 1;
  let spaced = false;
  while (unanalysedCount(params) > 0 && passes < 60) {
    version++;
    const next = session.diagnosticsFor(uri, version, 180_000);
    const end = firstLine.length + (spaced ? 1 : 0);
    session.conn.sendNotification('textDocument/didChange', {
      textDocument: { uri, version },
      contentChanges: [spaced ? { range: { start: { line: 0, character: end - 1 }, end: { line: 0, character: end } }, text: '' } : { range: { start: { line: 0, character: end }, end: { line: 0, character: end } }, text: ' ' }],
    });
    spaced = !spaced;
    ({ at, params } = await next);
    passes++;
  }
  return { params, at, passes, version, spaced };
}

/** One language: spawn, open, hover, edit. */
export async function languageRun(root, language, { seed, hoverCount, editCount, debounceMs, log }) {
  const file = generateSourceFile(seed, language);
  const uri = pathToFileURL(join(root, 'dist', `bench-${language}-${seed}.${EXTENSION[language]}`)).href;
  const session = await new ServerSession(root).start();
  try {
    const openAt = performance.now();
    const firstDiagnostics = session.diagnosticsFor(uri, 1);
    session.open(uri, LANGUAGE_ID[language], file.text);
    const first = await firstDiagnostics;
    const out = {
      language,
      lines: file.text.split('\n').length - 1,
      matrices: file.matrices.length,
      spawnToInitializeMs: session.initializeMs,
      spawnToFirstDiagnosticsMs: first.at - session.t0,
      openToFirstDiagnosticsMs: first.at - openAt,
      diagnostics: first.params.diagnostics.length,
      diagnosticCodes: histogram(first.params.diagnostics),
      serverCpuSecondsAtFirstDiagnostics: cpuSecondsOf(session.proc.pid),
      rssAfterOneFile: memoryOf(session.proc.pid),
    };
    out.firstPassUnanalysed = unanalysedCount(first.params);
    log(`server ${language}: initialize ${out.spawnToInitializeMs.toFixed(0)} ms, first diagnostics ${out.spawnToFirstDiagnosticsMs.toFixed(0)} ms after spawn (${out.diagnostics} diagnostics, ${out.firstPassUnanalysed} matrices left for later passes)`);
    const complete = await nudgeUntilComplete(session, uri, first, file.text.slice(0, file.text.indexOf('\n')), 1);
    out.openToCompleteDiagnosticsMs = complete.at - openAt;
    out.passesToComplete = complete.passes;
    out.completeDiagnostics = complete.params.diagnostics.length;
    out.completeDiagnosticCodes = histogram(complete.params.diagnostics);
    out.serverCpuSecondsAtCompleteDiagnostics = cpuSecondsOf(session.proc.pid);
    log(`server ${language}: complete diagnostics ${out.openToCompleteDiagnosticsMs.toFixed(0)} ms after didOpen, ${complete.passes} passes`);

    // Hovers on the names of matrices with n ≤ 8, in random order; sequential, one in flight.
    const rng = makeRng(seed + 17);
    const small = file.matrices.filter((m) => m.n <= 8);
    const hoverTimes = [];
    let emptyHovers = 0;
    for (let i = 0; i < 20; i++) await session.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: small[0].nameLine, character: small[0].nameCharacter + 1 } });
    for (let i = 0; i < hoverCount; i++) {
      const m = rng.pick(small);
      const t0 = performance.now();
      const hover = await session.conn.sendRequest('textDocument/hover', { textDocument: { uri }, position: { line: m.nameLine, character: m.nameCharacter + 1 } });
      hoverTimes.push(performance.now() - t0);
      if (!hover || !hover.contents) emptyHovers++;
    }
    out.hover = { ...summary(hoverTimes), emptyHovers };
    log(`server ${language}: hover p50 ${out.hover.median.toFixed(2)} ms, p95 ${out.hover.p95.toFixed(2)} ms (${emptyHovers} empty of ${hoverCount})`);

    // One-character edits: a single-digit entry of an integer matrix gets another digit.
    const candidates = file.matrices.filter((m) => m.kind === 'integer');
    const totals = [];
    const cpuBeforeEdits = cpuSecondsOf(session.proc.pid);
    let version = complete.version;
    for (let i = 0; i < editCount; i++) {
      const m = rng.pick(candidates);
      const entry = rng.pick(rng.pick(m.entries));
      const last = entry.text[entry.text.length - 1];
      const replacement = String((Number(last) + 1 + rng.int(0, 7)) % 10);
      const character = entry.character + entry.text.length - 1;
      entry.text = entry.text.slice(0, -1) + replacement;
      version++;
      const updated = session.diagnosticsFor(uri, version);
      const t0 = performance.now();
      session.conn.sendNotification('textDocument/didChange', {
        textDocument: { uri, version },
        contentChanges: [{ range: { start: { line: entry.line, character }, end: { line: entry.line, character: character + 1 } }, text: replacement }],
      });
      const got = await updated;
      totals.push(got.at - t0);
    }
    const total = summary(totals);
    const cpuAfterEdits = cpuSecondsOf(session.proc.pid);
    out.edit = {
      serverCpuMsPerEdit: cpuBeforeEdits === null || cpuAfterEdits === null ? null : ((cpuAfterEdits - cpuBeforeEdits) * 1000) / editCount,
      total,
      debounceMs,
      excludingDebounce: { median: total.median - debounceMs, p95: total.p95 - debounceMs },
    };
    log(`server ${language}: edit → diagnostics median ${total.median.toFixed(1)} ms total, ${(total.median - debounceMs).toFixed(1)} ms without the ${debounceMs} ms debounce`);
    out.rssAfterEdits = memoryOf(session.proc.pid);
    return out;
  } finally {
    out_stderr(session, log);
    await session.stop();
  }
}

function out_stderr(session, log) {
  const lines = session.stderr.split('\n').filter(Boolean);
  if (lines.length) log(`server stderr (${lines.length} lines), first: ${lines[0].slice(0, 200)}`);
}

/** A fresh server opens ten generated files (five Python, five TypeScript); memory after all diagnostics. */
export async function memoryRun(root, { log }) {
  const session = await new ServerSession(root).start();
  try {
    const t0 = performance.now();
    const pending = [];
    for (let i = 0; i < 10; i++) {
      const language = i % 2 === 0 ? 'python' : 'typescript';
      const file = generateSourceFile(9000 + i, language);
      const uri = pathToFileURL(join(root, 'dist', `bench-memory-${i}.${EXTENSION[language]}`)).href;
      pending.push({ uri, firstLine: file.text.slice(0, file.text.indexOf('\n')), first: session.diagnosticsFor(uri, 1, 180_000) });
      session.open(uri, LANGUAGE_ID[language], file.text);
    }
    for (const p of pending) p.first = await p.first;
    const afterFirstPass = memoryOf(session.proc.pid);
    // Every file analysed completely, so the memory figure covers all 3,000 matrices.
    for (const p of pending) await nudgeUntilComplete(session, p.uri, p.first, p.firstLine, 1);
    const allDiagnosticsMs = performance.now() - t0;
    // Settle: let a pending garbage collection or timer finish before reading memory.
    await new Promise((r) => setTimeout(r, 500));
    const mem = memoryOf(session.proc.pid);
    mem.serverCpuSeconds = cpuSecondsOf(session.proc.pid);
    // The server's own split: JS heap, memory outside it (tree-sitter's WASM heap), caches.
    mem.serverStats = await session.conn.sendRequest('eigenlens/stats', { collectGarbage: true }).catch(() => null);
    if (mem.serverStats) log(`server memory split: ${JSON.stringify(mem.serverStats)}`);
    log(`server memory: ${mem.rssMB?.toFixed(1)} MB resident after ten files (peak ${mem.peakRssMB?.toFixed(1)} MB), all diagnostics in ${allDiagnosticsMs.toFixed(0)} ms`);
    return { files: 10, allDiagnosticsMs, afterFirstPass, ...mem };
  } finally {
    out_stderr(session, log);
    await session.stop();
  }
}

export async function runServerBench(root, { debounceMs, hoverCount = 300, editCount = 15, log = () => {} }) {
  const python = await languageRun(root, 'python', { seed: 5001, hoverCount, editCount, debounceMs, log });
  const typescript = await languageRun(root, 'typescript', { seed: 5002, hoverCount, editCount, debounceMs, log });
  const memory = await memoryRun(root, { log });
  return { python, typescript, memory };
}
