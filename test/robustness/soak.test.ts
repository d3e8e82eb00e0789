/**
 * Soak test: the real language server (dist/server.js --stdio, a process on this machine)
 * takes 10,000 random operations — incremental edits inside and outside matrices, opens and
 * closes across Python, TypeScript and .lti — interleaved with hover, codeLens and codeAction
 * requests. Every request must answer within a per-request timeout, the server's resident
 * memory (VmRSS, /proc/<pid>/status) must stay under 300 MB, and the server must neither exit
 * nor log an unhandled rejection or exception. Bounds are common practice for an editor
 * helper process. EIGENLENS_SOAK_SCALE multiplies the operation count locally (default 1).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { startClient, positionAt } from '../lsp/client';
// @ts-expect-error plain JavaScript module shared with the fuzz runs
import { seededRandom } from '../fuzz/targets.mjs';

const SCALE = Number(process.env.EIGENLENS_SOAK_SCALE ?? '1');
const OPERATIONS = Math.round(10_000 * SCALE);
const REQUEST_TIMEOUT_MS = 15_000;
const RSS_LIMIT_MB = 300;

function rssMb(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const m = /VmRSS:\s+(\d+) kB/.exec(status);
  return m ? Number(m[1]) / 1024 : NaN;
}

function withTimeout<T>(p: Promise<T>, what: string): Promise<T> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`${what}: no answer within ${REQUEST_TIMEOUT_MS} ms`)), REQUEST_TIMEOUT_MS);
    p.then(
      (v) => {
        clearTimeout(timer);
        resolve(v);
      },
      (e) => {
        clearTimeout(timer);
        reject(e);
      },
    );
  });
}

const DOCS = [
  { languageId: 'python', ext: 'py', text: readFileSync('test/demo/motor_speed.py', 'utf8') },
  { languageId: 'python', ext: 'py', text: readFileSync('test/demo/tank_cascade.py', 'utf8') },
  { languageId: 'typescript', ext: 'ts', text: readFileSync('test/demo/drone_altitude.ts', 'utf8') },
  { languageId: 'typescript', ext: 'ts', text: readFileSync('test/demo/gimbal_resonance.ts', 'utf8') },
  { languageId: 'lti', ext: 'lti', text: readFileSync('test/demo/tracker.lti', 'utf8') },
  { languageId: 'lti', ext: 'lti', text: readFileSync('test/demo/wheel_pendulum.lti', 'utf8') },
];
const INSERTS = ['1', '-', '0.5', ', ', '[', ']', '\n', ' ', '2x', 'e-3', '**2', '/7', '#', '//', 'A = [[1, 2], [3, 4]]\n', '  A:\n    1 0\n    0 1\n', '\u202E', '(', ')'];

describe('soak over stdio', () => {
  it(`${OPERATIONS} random edits, opens, closes and requests`, async () => {
    const client = await startClient();
    const pid = client.process.pid!;
    let exited = false;
    client.process.on('exit', () => {
      exited = true;
    });
    const rnd: () => number = seededRandom(20250101);
    const pick = <T>(xs: T[]): T => xs[Math.floor(rnd() * xs.length)];
    const open = new Map<string, { text: string; version: number; languageId: string }>();
    let requests = 0;
    let maxRss = 0;
    let nextId = 0;
    const started = performance.now();
    for (let op = 0; op < OPERATIONS; op++) {
      const kind = rnd();
      if (open.size === 0 || kind < 0.03) {
        const d = pick(DOCS);
        const uri = `file:///soak/doc${nextId++ % 12}.${d.ext}`;
        if (open.has(uri)) await client.connection.sendNotification('textDocument/didClose', { textDocument: { uri } });
        open.set(uri, { text: d.text, version: 1, languageId: d.languageId });
        await client.connection.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: d.languageId, version: 1, text: d.text } });
        continue;
      }
      const uri = pick([...open.keys()]);
      const doc = open.get(uri)!;
      if (kind < 0.05) {
        open.delete(uri);
        await client.connection.sendNotification('textDocument/didClose', { textDocument: { uri } });
        continue;
      }
      if (kind < 0.88) {
        // Incremental edit; half of them aimed at a matrix bracket so edits land inside literals.
        const brackets = [...doc.text.matchAll(/\[|^\s+-?\d/gm)].map((m) => m.index ?? 0);
        const at = rnd() < 0.5 && brackets.length > 0 ? pick(brackets) + 1 : Math.floor(rnd() * (doc.text.length + 1));
        const del = rnd() < 0.4 ? Math.floor(rnd() * 6) : 0;
        const end = Math.min(doc.text.length, at + del);
        const insert = rnd() < 0.8 ? pick(INSERTS) : '';
        const range = { start: positionAt(doc.text, at), end: positionAt(doc.text, end) };
        doc.text = doc.text.slice(0, at) + insert + doc.text.slice(end);
        if (doc.text.length > 20_000) doc.text = doc.text.slice(0, 20_000);
        doc.version++;
        await client.connection.sendNotification('textDocument/didChange', {
          textDocument: { uri, version: doc.version },
          contentChanges: doc.text.length === 20_000 ? [{ text: doc.text }] : [{ range, text: insert }],
        });
        continue;
      }
      const position = positionAt(doc.text, Math.floor(rnd() * (doc.text.length + 1)));
      const method = pick(['textDocument/hover', 'textDocument/codeLens', 'textDocument/codeAction']);
      const params =
        method === 'textDocument/hover'
          ? { textDocument: { uri }, position }
          : method === 'textDocument/codeLens'
            ? { textDocument: { uri } }
            : { textDocument: { uri }, range: { start: position, end: position }, context: { diagnostics: [] } };
      requests++;
      await withTimeout(client.connection.sendRequest(method, params), `${method} #${requests} (op ${op})`);
      if (requests % 50 === 0) maxRss = Math.max(maxRss, rssMb(pid));
      expect(exited, `server exited at op ${op}; stderr: ${client.stderr.join('').slice(-2000)}`).toBe(false);
    }
    // A last request after the storm: still answering.
    const last = [...open.keys()][0];
    if (last) await withTimeout(client.connection.sendRequest('textDocument/codeLens', { textDocument: { uri: last } }), 'final codeLens');
    maxRss = Math.max(maxRss, rssMb(pid));
    const seconds = (performance.now() - started) / 1000;
    console.log(`soak: ${OPERATIONS} operations, ${requests} requests in ${seconds.toFixed(1)} s; peak VmRSS ${maxRss.toFixed(0)} MB`);
    const log = client.stderr.join('');
    expect(exited).toBe(false);
    expect(log).not.toMatch(/Unhandled|unhandledRejection|uncaught|TypeError|RangeError|Maximum call stack/i);
    expect(maxRss).toBeLessThan(RSS_LIMIT_MB);
    await client.shutdown();
  }, 180_000);
});
