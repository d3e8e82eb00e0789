/**
 * Incremental re-parsing and literal reuse give the same extraction as a parse from scratch.
 *
 * Reference: the from-scratch path (`extract(text, lang, { reuse: false })`: tree-sitter's own
 * full parse, every literal rebuilt). tree-sitter documents that a tree re-parsed after
 * `Tree.edit` describes the new text exactly as a fresh parse would (M. Brunsfeld, tree-sitter
 * documentation, "Using Parsers — Editing"); these properties check that our edit descriptions
 * and caches keep that promise on random edit sequences (fast-check, seeded) of the invented
 * demo files and of generated invented files (test/bench/generate.mjs).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { clearExtractCaches, extract, extractCacheStats, initParsers } from '../../server/src/syntax/extract';
import { ParseCache, singleEdit } from '../../server/src/syntax/incrementalParse';
import { loadedParsers } from '../../server/src/syntax/treeSitter';
import type { SourceLanguage } from '../../server/src/syntax/types';
// @ts-expect-error plain JavaScript module without type declarations
import { generateSourceFile } from '../bench/generate.mjs';

await initParsers();

const demo = (name: string) => readFileSync(join(__dirname, '..', 'demo', name), 'utf8');

/** Pieces an edit inserts: entry syntax, brackets, comments, pragmas, strings, non-BMP and hidden characters. */
const INSERTS = [
  '', '7', '0.5', '-', ',', ', 3', '[', ']', '(', ')', '[1, 2]', ' ', '\n', '\n    ', '#', '//', '/*', '*/', '"', "'", 'x',
  'k', '=', ' = ', '**2', '/0', 'pi', 'np.array(', 'A = [[1, 2], [3, 4]]\n', 'const A = [[1, 0], [0, 1]];\n',
  '# eigenlens: discrete period=0.1\n', '// eigenlens: ignore\n', 'k = 4\n', 'const k = 4;\n', '\u{1F600}', '\u200B', 'def f():\n',
  '{', '}', ':', ';', '\\', '\t',
];

const editArb = fc.record({ at: fc.double({ min: 0, max: 1, noNaN: true }), remove: fc.nat(12), insert: fc.constantFrom(...INSERTS) });

function applyEdit(text: string, e: { at: number; remove: number; insert: string }): string {
  const at = Math.min(text.length, Math.floor(e.at * text.length));
  return text.slice(0, at) + e.insert + text.slice(Math.min(text.length, at + e.remove));
}

function checkSequence(seedText: string, lang: SourceLanguage, edits: { at: number; remove: number; insert: string }[]) {
  let text = seedText;
  expect(extract(text, lang)).toEqual(extract(text, lang, { reuse: false }));
  for (const e of edits) {
    text = applyEdit(text, e);
    const reused = extract(text, lang);
    const fresh = extract(text, lang, { reuse: false });
    expect(reused).toEqual(fresh);
    // Again: now every unchanged statement and literal is served from the caches.
    expect(extract(text, lang)).toEqual(fresh);
  }
}

describe('singleEdit: one range replacement that rebuilds the new text', () => {
  // A long shared base makes the chunked comparison cross chunk boundaries.
  const base = 'A = [[1, 2], [3, 4]]\n'.repeat(300) + '\u{1F600} mid \u{1F601}\n' + 'B = [[5], [6]]\n'.repeat(200);
  it('old prefix + new middle + old suffix = new text, and no surrogate pair is split', () => {
    fc.assert(
      fc.property(fc.array(editArb, { minLength: 1, maxLength: 3 }), fc.boolean(), (edits, short) => {
        const oldText = short ? base.slice(0, 40) : base;
        let newText = oldText;
        for (const e of edits) newText = applyEdit(newText, e);
        const d = singleEdit(oldText, newText);
        expect(oldText.slice(0, d.startIndex) + newText.slice(d.startIndex, d.newEndIndex) + oldText.slice(d.oldEndIndex)).toBe(newText);
        expect(d.startIndex).toBeLessThanOrEqual(Math.min(d.oldEndIndex, d.newEndIndex));
        for (const [t, i] of [[oldText, d.startIndex], [oldText, d.oldEndIndex], [newText, d.newEndIndex]] as const) {
          const before = t.charCodeAt(i - 1);
          const after = t.charCodeAt(i);
          expect(before >= 0xd800 && before <= 0xdbff && after >= 0xdc00 && after <= 0xdfff, `split pair at ${i}`).toBe(false);
        }
      }),
      { seed: 11, numRuns: 300 },
    );
  });
  it('equal texts give an empty edit', () => {
    expect(singleEdit(base, base)).toEqual({ startIndex: base.length, oldEndIndex: base.length, newEndIndex: base.length });
  });
});

describe('ParseCache: trees equal a fresh parse; bounded by count and characters', () => {
  it('the re-parsed tree prints as the fresh tree after each random edit', () => {
    const parser = loadedParsers()!.python;
    const seedText = demo('kiln_zones.py');
    fc.assert(
      fc.property(fc.array(editArb, { minLength: 1, maxLength: 6 }), (edits) => {
        const cache = new ParseCache(2);
        let text = seedText;
        cache.parse(parser, 'python', text);
        for (const e of edits) {
          text = applyEdit(text, e);
          const fresh = parser.parse(text)!;
          expect(cache.parse(parser, 'python', text)!.rootNode.toString()).toBe(fresh.rootNode.toString());
          fresh.delete();
        }
        expect(cache.stats.incremental + cache.stats.unchanged).toBe(edits.length);
        cache.clear();
      }),
      { seed: 5, numRuns: 40 },
    );
  });

  it('keeps at most its count and its characters (the newest always), and parses evicted texts afresh', () => {
    const parser = loadedParsers()!.python;
    const cache = new ParseCache(3, 100);
    const texts = ['a = 1\n', 'b = [[1, 2]]\n', 'c = 3\n', 'd = 4\n'];
    for (const t of texts) cache.parse(parser, 'python', t);
    expect(cache.size).toBe(3);
    const big = 'x = 1\n'.repeat(40);
    cache.parse(parser, 'python', big);
    expect(cache.size).toBe(1);
    const fullBefore = cache.stats.full;
    expect(cache.parse(parser, 'python', texts[0])!.rootNode.toString()).toContain('assignment');
    expect(cache.stats.full).toBe(fullBefore + 1);
    cache.clear();
    expect(cache.size).toBe(0);
  });
});

describe('incremental extraction equals extraction from scratch', () => {
  const cases: Array<[string, SourceLanguage, () => string]> = [
    ['demo kiln_zones.py', 'python', () => demo('kiln_zones.py')],
    ['demo tank_cascade.py', 'python', () => demo('tank_cascade.py')],
    ['demo motor_speed.py', 'python', () => demo('motor_speed.py')],
    ['demo drone_altitude.ts', 'typescript', () => demo('drone_altitude.ts')],
    ['demo gimbal_resonance.ts', 'typescript', () => demo('gimbal_resonance.ts')],
    ['demo gimbal_resonance.ts as javascript', 'javascript', () => demo('gimbal_resonance.ts')],
    ['generated python', 'python', () => generateSourceFile(3, 'python', { lines: 400, count: 30 }).text],
    ['generated typescript', 'typescript', () => generateSourceFile(4, 'typescript', { lines: 400, count: 30 }).text],
  ];
  for (const [label, lang, load] of cases) {
    it(label, () => {
      const seedText = load();
      const before = extractCacheStats();
      fc.assert(
        fc.property(fc.array(editArb, { minLength: 1, maxLength: 8 }), (edits) => checkSequence(seedText, lang, edits)),
        { seed: 20250101 + label.length, numRuns: 25 },
      );
      // The property is about the reuse paths: make sure they were taken.
      const after = extractCacheStats();
      expect(after.parses.incremental).toBeGreaterThan(before.parses.incremental);
      expect(after.literals.hits).toBeGreaterThan(before.literals.hits);
      // The generated files have many helper functions with nothing to collect.
      if (label.startsWith('generated')) expect(after.literals.skippedStatements).toBeGreaterThan(before.literals.skippedStatements);
    });
  }

  it('a one-digit edit inside a matrix of the generated file changes that entry only', () => {
    const { text, matrices } = generateSourceFile(5, 'python', { lines: 400, count: 30 });
    const first = extract(text, 'python');
    const target = matrices[10].entries[0][0];
    const lineStart = text.split('\n').slice(0, target.line).join('\n').length + 1;
    const at = lineStart + target.character + target.text.search(/\d/);
    const edited = text.slice(0, at) + (text[at] === '7' ? '3' : '7') + text.slice(at + 1);
    const second = extract(edited, 'python');
    expect(second).toEqual(extract(edited, 'python', { reuse: false }));
    const changed = second.matrices.filter((m, i) => JSON.stringify(m.rows.map((r) => r.map((e) => e.text))) !== JSON.stringify(first.matrices[i].rows.map((r) => r.map((e) => e.text))));
    expect(changed.map((m) => m.name)).toEqual([`A11`]);
  });

  // Keystrokes inside entries: digits, a sign, a decimal point, an exponent, deletions, at
  // either end of an entry or inside it. Most take the entry-edit path (entryEdit.ts); those
  // that change the shape (a comma, a letter, a bracket) go the ordinary way; all must give
  // exactly the fresh extraction.
  const ENTRY_INSERTS = ['', '7', '0', '5', '-', '.', 'e', 'e-3', '.25', '12', ',', ' ', 'x', ']', '2j'];
  const entryEditArb = fc.record({ matrix: fc.nat(), entry: fc.nat(), offset: fc.nat(), remove: fc.nat(3), insert: fc.constantFrom(...ENTRY_INSERTS) });
  for (const lang of ['python', 'typescript'] as const) {
    it(`${lang}: typing inside entries equals a fresh extraction, mostly without the parser`, () => {
      const seedText = generateSourceFile(lang === 'python' ? 21 : 22, lang, { lines: 400, count: 30 }).text;
      const before = extractCacheStats();
      fc.assert(
        fc.property(fc.array(entryEditArb, { minLength: 1, maxLength: 10 }), (edits) => {
          let text = seedText;
          extract(text, lang);
          for (const e of edits) {
            const file = extract(text, lang, { reuse: false });
            const matrices = file.matrices.filter((m) => m.rows.length > 0);
            if (matrices.length === 0) break;
            const m = matrices[e.matrix % matrices.length];
            const entries = m.rows.flat();
            const target = entries[e.entry % entries.length];
            const at = target.span.start + (e.offset % (target.span.end - target.span.start + 1));
            text = text.slice(0, at) + e.insert + text.slice(Math.min(target.span.end, at + e.remove));
            expect(extract(text, lang)).toEqual(extract(text, lang, { reuse: false }));
          }
        }),
        { seed: 20251203, numRuns: 40 },
      );
      expect(extractCacheStats().parses.entryEdits).toBeGreaterThan(before.parses.entryEdits + 40);
    });
  }

  it('an unchanged text is served from its extraction: no parse, no walk, the same result', () => {
    const { text } = generateSourceFile(6, 'typescript', { lines: 300, count: 20 });
    const first = extract(text, 'typescript');
    const before = extractCacheStats();
    // A copy of the string (not the same object), as a new version with the same text would be.
    const again = extract(text.split('').join(''), 'typescript');
    const after = extractCacheStats();
    expect(again).toBe(first);
    expect(after.parses.unchangedExtractions).toBe(before.parses.unchangedExtractions + 1);
    expect(after.parses.full + after.parses.incremental + after.parses.unchanged).toBe(before.parses.full + before.parses.incremental + before.parses.unchanged);
    // Other state-matrix names are another extraction.
    expect(extract(text, 'typescript', { stateMatrixNames: ['^M\\d+$'] })).not.toBe(first);
  });

  it('many documents in turn (more than the cache keeps) and cleared caches still extract correctly', () => {
    const texts = Array.from({ length: 12 }, (_, k) => generateSourceFile(100 + k, 'python', { lines: 120, count: 8 }).text);
    for (let round = 0; round < 2; round++) {
      for (const t of texts) {
        const edited = t.replace('[', '[ ');
        expect(extract(edited, 'python')).toEqual(extract(edited, 'python', { reuse: false }));
      }
    }
    clearExtractCaches();
    expect(extract(texts[0], 'python')).toEqual(extract(texts[0], 'python', { reuse: false }));
  });
});

describe('reused matrices follow what they depend on', () => {
  const same = (text: string, lang: SourceLanguage = 'python') => {
    const fresh = extract(text, lang, { reuse: false });
    // Twice: the first extraction of a text fills the caches, the second is served from them.
    expect(extract(text, lang)).toEqual(fresh);
    const reused = extract(text, lang);
    expect(reused).toEqual(fresh);
    return reused;
  };
  const value = (text: string, name: string, lang: SourceLanguage = 'python') => {
    const m = same(text, lang).matrices.find((x) => x.name === name);
    return m ? m.rows.map((r) => r.map((e) => (e.value === null ? null : e.value.kind === 'exact' ? e.value.value.toString() : e.value.value))) : undefined;
  };
  const tail = '\nA = [[k, 1], [0, -k/2]]\nB = [[0], [1]]\n';

  it('a changed constant the literal reads changes its values; an unrelated one does not matter', () => {
    // Exact arithmetic: 3/2 = 1.5 by the definition of decimal notation.
    expect(value('k = 2\nj = 1' + tail, 'A')).toEqual([['2', '1'], ['0', '-1']]);
    expect(value('k = 3\nj = 1' + tail, 'A')).toEqual([['3', '1'], ['0', '-3/2']]);
    expect(value('k = 3\nj = 5' + tail, 'A')).toEqual([['3', '1'], ['0', '-3/2']]);
    expect(value('k = 0.5\nj = 5' + tail, 'A')).toEqual([['1/2', '1'], ['0', '-1/4']]);
  });

  it('a constant removed or made unreadable above the literal turns its entries into errors', () => {
    same('k = 2' + tail);
    const file = same('k = "two"' + tail);
    expect(file.matrices.find((m) => m.name === 'A')?.rows[0][0].value).toBeNull();
    expect(file.problems.map((p) => p.code)).toContain('unknown-name');
  });

  it('lines inserted above move every span of a reused matrix and of its problems', () => {
    const body = 'A = [[1, 2], [3, x]]\n';
    same(body);
    const moved = '# invented note\n\n' + body;
    const file = same(moved);
    const a = file.matrices[0];
    expect(a.rows.map((r) => r.map((e) => moved.slice(e.span.start, e.span.end)))).toEqual([['1', '2'], ['3', 'x']]);
    expect(moved.slice(a.span.start, a.span.end)).toBe('[[1, 2], [3, x]]');
    expect(file.problems.map((p) => moved.slice(p.span.start, p.span.end))).toEqual(['x']);
  });

  it('a pragma added or changed above a reused literal applies', () => {
    const body = 'A = [[0, 1], [-2, -3]]\n';
    expect(same(body).matrices).toHaveLength(1);
    expect(same('x = 1\n# eigenlens: ignore\n' + body).matrices).toHaveLength(0);
    const grouped = same('x = 1\n# eigenlens: model=pump\n' + body);
    expect(grouped.matrices[0].groupKey).toBe('pump');
    expect(grouped.matrices[0].pragma?.span.start).toBe('x = 1\n'.length);
  });

  it('a skipped statement that gains an assignment or a matrix is read again', () => {
    const inert = 'def helper(x):\n    return x\n\nclass Plant:\n    pass\n';
    expect(value(inert + 'A = [[k]]\n', 'A')).toEqual([[null]]);
    expect(value(inert + 'A = [[k]]\n', 'A')).toEqual([[null]]);
    const withConstant = inert.replace('    return x', '    k = 2\n    return x');
    expect(value(withConstant + 'A = [[k]]\n', 'A')).toEqual([['2']]);
    const withMatrix = inert.replace('    pass', '    A = [[0, 1], [-1, 0]]');
    expect(value(withMatrix, 'A')).toEqual([['0', '1'], ['-1', '0']]);
    const ts = 'export function helper(x: number): number {\n  return x;\n}\n';
    expect(value(ts + 'const A = [[k]];\n', 'A', 'typescript')).toEqual([[null]]);
    expect(value(ts.replace('return x;', 'const k = 3;\n  return x;') + 'const A = [[k]];\n', 'A', 'typescript')).toEqual([['3']]);
  });

  it('typescript object properties and math.matrix calls', () => {
    const ts = 'const k = 2;\nconst sys = { A: [[0, 1], [-k, -1]], B: math.matrix([[0], [1]]) };\n';
    expect(value(ts, 'A', 'typescript')).toEqual([['0', '1'], ['-2', '-1']]);
    expect(value(ts.replace('k = 2', 'k = 4'), 'A', 'typescript')).toEqual([['0', '1'], ['-4', '-1']]);
    expect(value('\n' + ts.replace('k = 2', 'k = 4'), 'B', 'typescript')).toEqual([['0'], ['1']]);
  });
});
