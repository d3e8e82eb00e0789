// Expectation files kept beside the fixtures (rust-analyzer style): compare, or rewrite them
// when UPDATE_EXPECT=1 after a deliberate change. A missing file fails outside update mode.
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { expect } from 'vitest';

export const FIXTURES = join(process.cwd(), 'test', 'lsp', 'fixtures');
const UPDATE = process.env.UPDATE_EXPECT === '1';

export function expectFile(name: string, actual: string): void {
  const path = join(FIXTURES, name);
  const text = actual.endsWith('\n') ? actual : `${actual}\n`;
  if (UPDATE) {
    writeFileSync(path, text);
    return;
  }
  if (!existsSync(path)) throw new Error(`missing expectation ${name}; run UPDATE_EXPECT=1 npx vitest run test/lsp to create it`);
  expect(text, `${name} differs; if the change is deliberate, run UPDATE_EXPECT=1 npx vitest run test/lsp`).toBe(readFileSync(path, 'utf8'));
}

export const CURSOR = '$0';

/** Reads a fixture and removes its cursor marker; `cursor` is the marker's offset (or -1). */
export function readFixture(name: string): { text: string; cursor: number } {
  const raw = readFileSync(join(FIXTURES, name), 'utf8');
  const cursor = raw.indexOf(CURSOR);
  return { text: cursor < 0 ? raw : raw.slice(0, cursor) + raw.slice(cursor + CURSOR.length), cursor };
}

/** Hover Markdown with the inline plot replaced by a short, stable placeholder. */
export function scrubPlot(markdown: string): string {
  return markdown.replace(/data:image\/svg\+xml;base64,[A-Za-z0-9+/=]+/g, (uri) => `data:image/svg+xml;base64,…(${uri.length} chars)`);
}
