// The whole discrete-time path on the invented kiln demo, through the real server over stdio:
// a continuous plant with a sample period → "Insert discrete model (ZOH …)" → the inserted
// matrices are read back as a discrete model, whose float32 rounding is checked again.
// test/demo/kiln_zones_firmware.py is the committed result of this path (regenerate it with
// UPDATE_EXPECT=1); the test fails if the action's output and that file drift apart.
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CodeAction, TextDocumentEdit } from 'vscode-languageserver-protocol';
import { applyTextEdits, positionAt, startClient, type TestClient } from './client';

let client: TestClient;
beforeAll(async () => {
  client = await startClient();
});
afterAll(async () => {
  await client.shutdown();
});

describe('kiln demo: continuous plant → inserted discrete model → float32 check', () => {
  it('inserts Ad, Bd, Cd, Dd at T = 100 µs and the server then warns about float32 on the inserted Ad', async () => {
    const source = join(process.cwd(), 'test', 'demo', 'kiln_zones.py');
    const text = readFileSync(source, 'utf8');
    const uri = pathToFileURL(source).href;
    await client.open(uri, 'python', text);
    await client.diagnostics(uri, 1);
    const at = text.indexOf('A = np.array');
    const actions = (await client.connection.sendRequest('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: positionAt(text, at), end: positionAt(text, at) },
      context: { diagnostics: [] },
    })) as CodeAction[];
    const zoh = actions.find((a) => /^Insert discrete model of A \(ZOH, T = 0\.0001 s\)$/.test(a.title));
    expect(zoh, actions.map((a) => a.title).join(' / ')).toBeDefined();
    const after = applyTextEdits(text, (zoh!.edit!.documentChanges![0] as TextDocumentEdit).edits as never);

    const target = join(process.cwd(), 'test', 'demo', 'kiln_zones_firmware.py');
    if (process.env.UPDATE_EXPECT === '1') writeFileSync(target, after.replace('"""Three heating zones', '"""Generated from kiln_zones.py by the "Insert discrete model" action (invented scenario).\n\nThree heating zones'));
    const committed = readFileSync(target, 'utf8');
    expect(committed.replace(/^"""Generated from[^\n]*\n\n/, '"""')).toBe(after);

    await client.change(uri, after);
    const diags = await client.diagnostics(uri, 2);
    const f32 = diags.diagnostics.filter((d) => d.code === 'float32-sensitive');
    // One on the continuous A (its ZOH matrix) and one on the inserted discrete Ad itself.
    expect(f32.length).toBe(2);
    const adLine = after.split('\n').findIndex((l) => /^Ad = /.test(l));
    expect(f32.some((d) => d.range.start.line === adLine)).toBe(true);
  });
});
