// Releasing cold documents (setting documentsKept): with every document analysed, the server
// keeps the analyses of the most recently used open documents only; the others keep their
// published diagnostics, and are analysed again when next asked about. Over real stdio.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Hover, MarkupContent } from 'vscode-languageserver-protocol';
import { positionAt, startClient, type TestClient } from './client';
import type { StatsRequestResult } from '../../server/src/shared/protocol';

let client: TestClient;

beforeAll(async () => {
  client = await startClient({ documentsKept: 1 });
});

afterAll(async () => {
  await client?.shutdown();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function stats(): Promise<StatsRequestResult> {
  return (await client.connection.sendRequest('eigenlens/stats', {})) as StatsRequestResult;
}

/** Waits (bounded) until the server's counts satisfy `test`. */
async function statsWhere(test: (s: StatsRequestResult) => boolean, timeoutMs = 5000): Promise<StatsRequestResult> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const s = await stats();
    if (test(s) || Date.now() > until) return s;
    await sleep(20);
  }
}

// Companion-matrix eigenvalues: [[0, 1], [-a0, -a1]] has characteristic polynomial
// s² + a1·s + a0 (Ogata, Modern Control Engineering, 5th ed., §9-2, controllable canonical form).
// s² + 3s + 2 = (s + 1)(s + 2); s² + 5s + 6 = (s + 2)(s + 3); s² + 7s + 12 = (s + 3)(s + 4).
const docs = [
  { uri: 'file:///release/a.py', text: 'import numpy as np\nA = np.array([[0, 1], [-2, -3]])\n', poles: ['−1', '−2'] },
  { uri: 'file:///release/b.py', text: 'import numpy as np\nA = np.array([[0, 1], [-6, -5]])\n', poles: ['−2', '−3'] },
  { uri: 'file:///release/c.py', text: 'import numpy as np\nA = np.array([[0, 1], [-12, -7]])\n', poles: ['−3', '−4'] },
];

async function hover(uri: string, text: string): Promise<string> {
  const offset = text.indexOf('A =');
  const h = (await client.connection.sendRequest('textDocument/hover', { textDocument: { uri }, position: positionAt(text, offset) })) as Hover | null;
  return h ? (h.contents as MarkupContent).value : '';
}

describe('documentsKept', () => {
  it('frees the analyses of the least recently used documents, keeps their diagnostics, and revives one when asked', async () => {
    for (const d of docs) {
      await client.open(d.uri, 'python', d.text);
      await client.diagnostics(d.uri, 1);
    }
    // Every document analysed: two of the three are released, and only the kept one's matrix stays cached.
    const after = await statsWhere((s) => s.released === 2);
    expect(after.released).toBe(2);
    expect(after.matrixCache.size).toBe(1);
    const publishedBefore = docs.map((d) => client.publishedFor(d.uri).length);

    // A hover on the oldest (released) document is answered from a fresh analysis.
    const answer = await hover(docs[0].uri, docs[0].text);
    expect(answer).toContain('Asymptotically stable');
    for (const p of docs[0].poles) expect(answer).toContain(`λ = ${p}`);

    // It becomes the kept one; the one used last before it is released in its place.
    const later = await statsWhere((s) => s.released === 2 && s.matrixCache.size === 1);
    expect(later.released).toBe(2);
    expect(later.matrixCache.size).toBe(1);
    // Released documents did not lose their diagnostics: nothing was republished for them.
    expect(client.publishedFor(docs[1].uri).length).toBe(publishedBefore[1]);
    expect(client.publishedFor(docs[2].uri).length).toBe(publishedBefore[2]);

    // An edit to a released document analyses it again and publishes for the new version.
    const edited = docs[1].text.replace('-6, -5', '-20, -9'); // s² + 9s + 20 = (s + 4)(s + 5)
    await client.change(docs[1].uri, edited);
    await client.diagnostics(docs[1].uri, 2);
    const answer2 = await hover(docs[1].uri, edited);
    expect(answer2).toContain('λ = −4');
    expect(answer2).toContain('λ = −5');
  });
});

describe('after edits', () => {
  it('only the current version of a kept document stays cached: the earlier analysis of a changed matrix goes', async () => {
    const own = await startClient();
    try {
      const uri = 'file:///release/edited.py';
      // Companion matrices as above: s² + 3s + 2, then s² + 7s + 12.
      const v1 = 'import numpy as np\nA = np.array([[0, 1], [-2, -3]])\n';
      const v2 = v1.replace('-2, -3', '-12, -7');
      await own.open(uri, 'python', v1);
      await own.diagnostics(uri, 1);
      await own.change(uri, v2);
      await own.diagnostics(uri, 2);
      const until = Date.now() + 5000;
      let s = (await own.connection.sendRequest('eigenlens/stats', {})) as StatsRequestResult;
      while (s.matrixCache.size !== 1 && Date.now() < until) {
        await sleep(20);
        s = (await own.connection.sendRequest('eigenlens/stats', {})) as StatsRequestResult;
      }
      expect(s.matrixCache.size).toBe(1);
      expect(s.released).toBe(0);
      // The kept analysis is the current one.
      const h = (await own.connection.sendRequest('textDocument/hover', { textDocument: { uri }, position: positionAt(v2, v2.indexOf('A =')) })) as Hover | null;
      const text = h ? (h.contents as MarkupContent).value : '';
      expect(text).toContain('λ = −3');
      expect(text).toContain('λ = −4');
    } finally {
      await own.shutdown();
    }
  });
});
