/**
 * Extraction in slices (extract.ts `extractSlice`) gives the same extraction as a parse from
 * scratch, however finely it is cut and however the slices of several documents interleave.
 *
 * Reference: the from-scratch path (`extract(text, lang, { reuse: false })`). tree-sitter
 * documents that a parse halted by its progress callback resumes where it stopped on the next
 * `Parser.parse` call unless `Parser.reset` is called (M. Brunsfeld, tree-sitter documentation,
 * web-tree-sitter `Parser.parse` / `Parser.reset`); these checks hold us to that and to our
 * own resumable walk. Files are generated invented ones (test/bench/generate.mjs).
 */
import { describe, expect, it } from 'vitest';
import {
  abandonExtractions,
  clearExtractCaches,
  extract,
  extractCacheStats,
  extractionReady,
  extractSlice,
  initParsers,
  MAX_JOBS,
  needsSlicedExtraction,
  pendingExtractions,
  retainExtractionsOf,
  SLICED_EXTRACTION_CHARS,
} from '../../server/src/syntax/extract';
import type { SourceLanguage } from '../../server/src/syntax/types';
// @ts-expect-error plain JavaScript module without type declarations
import { generateSourceFile } from '../bench/generate.mjs';

await initParsers();

/** JSON of an extraction, bigints (exact rationals) written as strings. */
const json = (x: unknown) => JSON.stringify(x, (_k, v: unknown) => (typeof v === 'bigint' ? v.toString() : v));

function bigFile(seed: number, language: SourceLanguage): string {
  const { text } = generateSourceFile(seed, language, { lines: 6000, count: 360 }) as { text: string };
  expect(text.length).toBeGreaterThan(SLICED_EXTRACTION_CHARS);
  return text;
}

/** Slices until done; returns how many it took. */
function readInSlices(text: string, language: SourceLanguage, sliceMs: number, owner?: string): number {
  let n = 0;
  for (;;) {
    n++;
    if (extractSlice(text, language, undefined, sliceMs, owner).done) return n;
    if (n > 100_000) throw new Error('no progress');
  }
}

describe('extraction in slices', () => {
  for (const language of ['python', 'typescript'] as SourceLanguage[]) {
    it(`${language}: many small slices give the from-scratch extraction`, () => {
      clearExtractCaches();
      const text = bigFile(language === 'python' ? 11 : 12, language);
      expect(needsSlicedExtraction(text, language)).toBe(true);
      const slices = readInSlices(text, language, 1);
      expect(slices).toBeGreaterThan(3);
      expect(extractionReady(text, language)).toBe(true);
      expect(needsSlicedExtraction(text, language)).toBe(false);
      expect(pendingExtractions()).toBe(0);
      expect(json(extract(text, language))).toBe(json(extract(text, language, { reuse: false })));
    });
  }

  it('interleaved slices of several documents, with other parses in between, each give their own extraction', () => {
    clearExtractCaches();
    const texts = [bigFile(21, 'python'), bigFile(22, 'typescript'), bigFile(23, 'python')];
    const langs: SourceLanguage[] = ['python', 'typescript', 'python'];
    const done = [false, false, false];
    for (let round = 0; round < 100_000 && done.includes(false); round++) {
      for (let i = 0; i < texts.length; i++) {
        if (!done[i]) done[i] = extractSlice(texts[i], langs[i], undefined, 1, `doc${i}`).done;
      }
      // A small document parsed synchronously between slices uses the shared parser.
      extract(`A${round} = [[1, 2], [3, ${round}]]\n`, 'python');
    }
    expect(done).toEqual([true, true, true]);
    for (let i = 0; i < texts.length; i++) expect(json(extract(texts[i], langs[i]))).toBe(json(extract(texts[i], langs[i], { reuse: false })));
  });

  it('more documents than jobs still all finish (none is restarted by another)', () => {
    clearExtractCaches();
    const texts = Array.from({ length: 7 }, (_, i) => bigFile(40 + i, i % 2 === 0 ? 'python' : 'typescript'));
    const langs = texts.map((_, i): SourceLanguage => (i % 2 === 0 ? 'python' : 'typescript'));
    const done = texts.map(() => false);
    let rounds = 0;
    let waited = 0;
    let mostJobs = 0;
    while (done.includes(false) && rounds < 10_000) {
      rounds++;
      for (let i = 0; i < texts.length; i++) {
        if (done[i]) continue;
        const p = extractSlice(texts[i], langs[i], undefined, 1, `d${i}`);
        done[i] = p.done;
        if (p.phase === 'waiting') waited++;
        mostJobs = Math.max(mostJobs, pendingExtractions());
      }
    }
    expect(done.every(Boolean)).toBe(true);
    // Past MAX_JOBS a text waits its turn rather than being parsed at once (the WASM heap never shrinks).
    expect(mostJobs).toBe(MAX_JOBS);
    expect(waited).toBeGreaterThan(0);
    expect(pendingExtractions()).toBe(0);
    for (let i = 0; i < texts.length; i++) expect(json(extract(texts[i], langs[i]))).toBe(json(extract(texts[i], langs[i], { reuse: false })));
  });

  it('retaining some texts drops the others\' extractions, and they are read again identically', () => {
    clearExtractCaches();
    const a = bigFile(51, 'python');
    const b = bigFile(52, 'typescript');
    const before = json(extract(b, 'typescript'));
    extract(a, 'python');
    expect(extractionReady(a, 'python')).toBe(true);
    expect(extractionReady(b, 'typescript')).toBe(true);
    retainExtractionsOf([a]);
    expect(extractionReady(a, 'python')).toBe(true);
    expect(extractionReady(b, 'typescript')).toBe(false);
    expect(json(extract(b, 'typescript'))).toBe(before);
  });

  it('a newer text of the same document replaces its unfinished job; abandoning drops it', () => {
    clearExtractCaches();
    const text = bigFile(31, 'python');
    expect(extractSlice(text, 'python', undefined, 1, 'doc').done).toBe(false);
    expect(pendingExtractions()).toBe(1);
    const edited = `# edited\n${text}`;
    expect(extractSlice(edited, 'python', undefined, 1, 'doc').done).toBe(false);
    expect(pendingExtractions()).toBe(1);
    abandonExtractions('doc');
    expect(pendingExtractions()).toBe(0);
    expect(extractionReady(text, 'python')).toBe(false);
    readInSlices(edited, 'python', 5, 'doc');
    expect(json(extract(edited, 'python'))).toBe(json(extract(edited, 'python', { reuse: false })));
  });

  it('small texts and edits inside one entry are extracted at once; other edits of a large text are read in slices from its updated tree', () => {
    clearExtractCaches();
    expect(extractSlice('A = [[0, 1], [-2, -3]]\n', 'python', undefined, 1).done).toBe(true);
    const text = bigFile(51, 'typescript');
    extract(text, 'typescript');
    // A digit typed inside an entry: re-read without the parser.
    const digit = text.replace(/(\[\s*-?)(\d)/, '$1$2$2');
    expect(digit).not.toBe(text);
    expect(needsSlicedExtraction(digit, 'typescript')).toBe(false);
    expect(extractSlice(digit, 'typescript', undefined, 1).done).toBe(true);
    // A line added: the tree is reused (no full parse), the statements are read in slices.
    const edited = text.replace('\n', '\n// one more line\n');
    expect(needsSlicedExtraction(edited, 'typescript')).toBe(true);
    const full = extractCacheStats().parses.full;
    const slices = readInSlices(edited, 'typescript', 1, 'doc');
    expect(slices).toBeGreaterThan(1);
    expect(extractCacheStats().parses.full).toBe(full);
    expect(pendingExtractions()).toBe(0);
    expect(json(extract(edited, 'typescript'))).toBe(json(extract(edited, 'typescript', { reuse: false })));
  });
});
