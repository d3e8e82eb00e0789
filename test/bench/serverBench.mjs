// The language server measured from outside, as an editor sees it: a real LSP client over
// stdio (vscode-languageserver-protocol's createProtocolConnection with stream reader and
// writer) talking to a spawned `node dist/server.js --stdio` on this machine.
//
// Per language, a fresh server: spawn → initialize response; open a generated 5,000-line file
// with 300 matrices → its first publishDiagnostics; hovers on the names of matrices with
// n ≤ 8; one-character edits inside integer matrices → diagnostics for that version. Then a
// fresh server opens ten such files and its resident memory is read from /proc/<pid>/status.
import { spawn } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
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

/** The node flags the VS Code client starts the server with (client/src/serverArgs.ts reads the same field). */
export function manifestNodeArgs(root) {
  const args = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).eigenlensServerNodeArgs;
  return Array.isArray(args) ? args.filter((a) => typeof a === 'string') : [];
}

class ServerSession {
  constructor(root) {
    this.root = root;
    this.waiters = [];
    this.latest = new Map();
    this.latestAt = new Map();
    this.stderr = '';
  }

  async start() {
    this.t0 = performance.now();
    // The server runs with the node flags the VS Code client gives it (package.json,
    // "eigenlensServerNodeArgs"); EIGENLENS_BENCH_SERVER_NODE_ARGS adds more after them, e.g.
    // "--cpu-prof --cpu-prof-dir=prof" (a later flag of the same name wins).
    const nodeArgs = [...manifestNodeArgs(this.root), ...(process.env.EIGENLENS_BENCH_SERVER_NODE_ARGS ?? '').split(' ').filter(Boolean)];
    this.proc = spawn(process.execPath, [...nodeArgs, join(this.root, 'dist', 'server.js'), '--stdio'], { cwd: this.root, stdio: ['pipe', 'pipe', 'pipe'] });
    this.proc.stderr.on('data', (d) => {
      if (this.stderr.length < (process.env.EIGENLENS_BENCH_STDERR ? 5_000_000 : 20_000)) this.stderr += d;
    });
    this.exited = new Promise((resolve) => this.proc.on('exit', (code, signal) => resolve({ code, signal })));
    this.conn = createProtocolConnection(new StreamMessageReader(this.proc.stdout), new StreamMessageWriter(this.proc.stdin));
    this.conn.onNotification('textDocument/publishDiagnostics', (params) => {
      const now = performance.now();
      this.latest.set(params.uri, params);
      this.latestAt.set(params.uri, now);
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

  /** The next publishDiagnostics for uri at or after version, ignoring any already received (timeout rejects). */
  nextDiagnostics(uri, version, timeoutMs = 60_000) {
    return this.diagnosticsFor(uri, version, timeoutMs);
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

/**
 * The document-level note of a pass that did not cover everything: the opening pass over a
 * large document's first lines ("still analysing"), or a slice whose time budget ran out.
 */
function pendingNote(params) {
  return params.diagnostics.find(
    (d) => d.code === 'analysis-limit' && d.range.start.line === 0 && d.range.end.line === 0 && d.range.start.character === 0 && d.range.end.character === 0 && /time budget|still analysing/.test(d.message),
  );
}

/** Matrices a slice left unanalysed, from its note (0 for an opening pass, which counts lines instead). */
function unanalysedCount(params) {
  const note = pendingNote(params);
  if (!note) return 0;
  return Number(/(\d+) matri\S* (was|were) not analysed/.exec(note.message)?.[1] ?? 0);
}

/**
 * The server continues an unfinished document by itself, pass after pass, each published for
 * the same version; wait for the pass that leaves nothing pending. Returns its diagnostics,
 * when they arrived and how many passes were published.
 */
async function untilComplete(session, uri, first, version) {
  let { params, at } = first;
  let passes = 1;
  // Passes published while the caller was busy elsewhere count: start from the latest one.
  const latest = session.latest.get(uri);
  if (latest && latest !== params && latest.version === version) {
    params = latest;
    at = session.latestAt.get(uri);
    passes++;
  }
  while (pendingNote(params)) {
    ({ at, params } = await session.nextDiagnostics(uri, version, 180_000));
    passes++;
  }
  return { params, at, passes, version };
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
    out.firstPassNote = pendingNote(first.params)?.message ?? null;
    // The opening pass covers the first lines; a slice covers everything above its first unanalysed matrix.
    out.firstPassLines = Number(/lines 1–(\d+)/.exec(out.firstPassNote ?? '')?.[1] ?? (out.firstPassNote ? NaN : out.lines));
    log(`server ${language}: initialize ${out.spawnToInitializeMs.toFixed(0)} ms, first diagnostics ${out.spawnToFirstDiagnosticsMs.toFixed(0)} ms after spawn (${out.diagnostics} diagnostics; ${out.firstPassNote ?? 'complete'})`);
    const complete = await untilComplete(session, uri, first, 1);
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
      // Like a typist's next keystroke, the next edit comes after the server has finished this
      // version (its continuation pass, if any): the figure is the latency of one edit, not
      // of a queue of them.
      await untilComplete(session, uri, got, version);
      await new Promise((r) => setTimeout(r, 20));
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
  if (!lines.length) return;
  // EIGENLENS_BENCH_STDERR=1 prints all of it (with the server's EIGENLENS_TRACE=1, its pass timings).
  if (process.env.EIGENLENS_BENCH_STDERR) for (const line of lines) log(`server stderr: ${line}`);
  else log(`server stderr (${lines.length} lines), first: ${lines[0].slice(0, 200)}`);
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
    for (const p of pending) await untilComplete(session, p.uri, p.first, 1);
    const allDiagnosticsMs = performance.now() - t0;
    // Settle as an editor does between edits: after 2 s of quiet the server runs its idle
    // collection (lsp/idleCollect.ts); read memory after 3 s.
    await new Promise((r) => setTimeout(r, 3000));
    const mem = memoryOf(session.proc.pid);
    mem.serverCpuSeconds = cpuSecondsOf(session.proc.pid);
    // EIGENLENS_BENCH_SMAPS=<file> keeps the server's /proc/<pid>/smaps for a look at where the resident memory is.
    if (process.env.EIGENLENS_BENCH_SMAPS) writeFileSync(process.env.EIGENLENS_BENCH_SMAPS, readFileSync(`/proc/${session.proc.pid}/smaps`, 'utf8'));
    // EIGENLENS_BENCH_SNAPSHOT=1, with EIGENLENS_BENCH_SERVER_NODE_ARGS=--heapsnapshot-signal=SIGUSR2,
    // has the server write a heap snapshot into the working directory here.
    if (process.env.EIGENLENS_BENCH_SNAPSHOT) {
      process.kill(session.proc.pid, 'SIGUSR2');
      await new Promise((r) => setTimeout(r, 20_000));
    }
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
