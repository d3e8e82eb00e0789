// The diagnostics cap over real stdio: a file with more findings than eigenlens.maxDiagnostics
// publishes that many, with the note first, and a hover still has the analysis of a matrix
// whose finding was left out. Invented matrices: A_k = [[k, 0], [0, -1]] has the eigenvalue
// k > 0, so each is unstable (standard: a continuous-time eigenvalue with positive real part).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Hover, MarkupContent } from 'vscode-languageserver-protocol';
import { positionAt, startClient, type TestClient } from './client';

let client: TestClient;

beforeAll(async () => {
  client = await startClient({ maxDiagnostics: 10 });
});

afterAll(async () => {
  await client?.shutdown();
});

describe('maxDiagnostics', () => {
  it('publishes at most that many, the note first, and hovers still analyse every matrix', async () => {
    const text = Array.from({ length: 30 }, (_, i) => `A_${i + 1} = [[${i + 1}, 0], [0, -1]]`).join('\n') + '\n';
    const uri = 'file:///cap/many-unstable.py';
    await client.open(uri, 'python', text);
    const published = await client.diagnostics(uri, 1);
    expect(published.diagnostics).toHaveLength(10);
    expect(published.diagnostics[0].code).toBe('diagnostics-limit');
    expect(published.diagnostics[0].message).toMatch(/shows 9 of \d+ findings/);
    // The last matrix's findings were left out (file order), but its hover has its analysis.
    expect(published.diagnostics.some((d) => d.range.start.line === 29)).toBe(false);
    const h = (await client.connection.sendRequest('textDocument/hover', { textDocument: { uri }, position: positionAt(text, text.indexOf('A_30')) })) as Hover | null;
    expect(h && (h.contents as MarkupContent).value).toContain('λ = 30');
  });
});
