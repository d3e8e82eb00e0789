/**
 * Incremental re-parsing: keeps the last few (language, text, syntax tree) triples and, when a
 * new text shares a long common prefix and suffix with one of them, describes the difference
 * as one edit, applies it to a copy of the old tree and lets tree-sitter reuse every subtree
 * outside the edit (`Tree.edit` then `Parser.parse(text, oldTree)`; M. Brunsfeld, tree-sitter
 * documentation, "Using Parsers — Editing"; the reuse algorithm follows T. A. Wagner and
 * S. L. Graham, "Efficient and Flexible Incremental Parsing", ACM TOPLAS 20(5), 1998).
 *
 * The one edit is the smallest single range replacement turning the old text into the new one:
 * common prefix p, common suffix s (not overlapping the prefix), old range [p, oldLen − s),
 * new range [p, newLen − s). Editors send keystrokes and pastes, which are exactly that.
 *
 * Invariants:
 *  - every cached tree is a parse of exactly its cached text: the cached tree is never edited
 *    in place, a copy is (`Tree.copy` is a cheap reference-counted copy);
 *  - a tree handed to the caller stays cached until evicted, and the caller must not delete
 *    it; eviction deletes the tree (trees are WASM objects, not garbage-collected), and the tree
 *    just returned is the newest entry, so it is never the one evicted by its own insertion;
 *  - positions passed to tree-sitter are (row, column) in UTF-16 code units, as web-tree-sitter
 *    counts them for JavaScript strings; the edit never splits a surrogate pair.
 */
import type { Parser, Tree } from 'web-tree-sitter';

interface CachedParse {
  language: string;
  text: string;
  tree: Tree;
}

/**
 * How many texts are kept: the documents being edited. A tree is needed only when a text
 * changes (an unchanged text reuses its extraction, see extract.ts), so a document not
 * edited lately gives its tree up and pays one full parse at its next edit. Three, as the
 * server keeps the analyses of three documents by default (eigenlens.documentsKept).
 */
export const PARSE_CACHE_SIZE = 3;
/**
 * And at most this many characters of text in all: a tree of a file of generated matrices
 * takes about 65 bytes per character of source in tree-sitter's WASM heap (measured: 9 MB for
 * a 138,000-character Python file), and that heap never shrinks, so this bounds it to about
 * 16 MB; the newest tree is always kept. With 5,000-line files that is one tree: a document
 * edited after another pays one full parse (110–140 ms measured here) at its first edit that is not inside a
 * number (those are read without the parser, entryEdit.ts). At 600,000 characters (three such
 * trees) ten open files held 14 MB more resident memory (npm run bench, Node 20 here).
 */
export const PARSE_CACHE_CHARS = 250_000;

/**
 * Reuse pays off when most of the text is unchanged; below this share of the longer text a
 * full parse is about as fast and the texts are probably different documents (common practice).
 */
const MIN_SHARED_FRACTION = 0.5;

/** Compare in chunks: comparing two substrings is a native memory compare, much faster than a loop per character. */
const CHUNK = 2048;

/** Length of the common prefix of a and b. */
export function commonPrefixLength(a: string, b: string): number {
  const n = Math.min(a.length, b.length);
  let i = 0;
  while (i + CHUNK <= n && a.slice(i, i + CHUNK) === b.slice(i, i + CHUNK)) i += CHUNK;
  while (i < n && a.charCodeAt(i) === b.charCodeAt(i)) i++;
  return i;
}

/** Length of the common suffix of a and b, not reaching into the first `skip` characters of either. */
export function commonSuffixLength(a: string, b: string, skip: number): number {
  const n = Math.min(a.length, b.length) - skip;
  let i = 0;
  while (i + CHUNK <= n && a.slice(a.length - i - CHUNK, a.length - i) === b.slice(b.length - i - CHUNK, b.length - i)) i += CHUNK;
  while (i < n && a.charCodeAt(a.length - 1 - i) === b.charCodeAt(b.length - 1 - i)) i++;
  return i;
}

const isHighSurrogate = (c: number) => c >= 0xd800 && c <= 0xdbff;
const isLowSurrogate = (c: number) => c >= 0xdc00 && c <= 0xdfff;

export interface TextEdit {
  startIndex: number;
  oldEndIndex: number;
  newEndIndex: number;
}

/** The single range replacement turning `oldText` into `newText` (empty range when they are equal). */
export function singleEdit(oldText: string, newText: string): TextEdit {
  let prefix = commonPrefixLength(oldText, newText);
  // Do not cut a character written as a surrogate pair in two (shrinking the shared part is always valid).
  if (prefix > 0 && isHighSurrogate(oldText.charCodeAt(prefix - 1))) prefix--;
  let suffix = commonSuffixLength(oldText, newText, prefix);
  if (suffix > 0 && isLowSurrogate(newText.charCodeAt(newText.length - suffix))) suffix--;
  return { startIndex: prefix, oldEndIndex: oldText.length - suffix, newEndIndex: newText.length - suffix };
}

/** Row and column (UTF-16 code units) of `index`, counting rows by '\n' as tree-sitter does. */
function pointAt(text: string, index: number, from = { index: 0, row: 0, lineStart: 0 }): { row: number; column: number } {
  let row = from.row;
  let lineStart = from.lineStart;
  for (let nl = text.indexOf('\n', from.index); nl >= 0 && nl < index; nl = text.indexOf('\n', nl + 1)) {
    row++;
    lineStart = nl + 1;
  }
  return { row, column: index - lineStart };
}

export class ParseCache {
  private entries: CachedParse[] = [];
  /** How each parse was served (for tests and measurements). */
  readonly stats = { unchanged: 0, incremental: 0, full: 0 };

  constructor(
    private readonly capacity = PARSE_CACHE_SIZE,
    private readonly maxChars = PARSE_CACHE_CHARS,
  ) {}

  /**
   * A syntax tree of `text`, owned by the cache (do not delete it). Null when the parser gives
   * up (it then returns null itself); a parser exception propagates, leaving the cache intact.
   */
  parse(parser: Parser, language: string, text: string): Tree | null {
    const reuse = this.bestMatch(language, text);
    let tree: Tree | null;
    if (reuse && reuse.text === text) {
      this.touch(reuse);
      this.stats.unchanged++;
      return reuse.tree;
    }
    if (reuse) {
      const edit = singleEdit(reuse.text, text);
      const start = pointAt(text, edit.startIndex);
      const startFrom = { index: edit.startIndex, row: start.row, lineStart: edit.startIndex - start.column };
      const base = reuse.tree.copy();
      try {
        base.edit({
          startIndex: edit.startIndex,
          oldEndIndex: edit.oldEndIndex,
          newEndIndex: edit.newEndIndex,
          startPosition: start,
          oldEndPosition: pointAt(reuse.text, edit.oldEndIndex, startFrom),
          newEndPosition: pointAt(text, edit.newEndIndex, startFrom),
        } as Parameters<Tree['edit']>[0]);
        tree = parser.parse(text, base);
        this.stats.incremental++;
      } finally {
        base.delete();
      }
    } else {
      tree = parser.parse(text);
      this.stats.full++;
    }
    if (tree) this.insert({ language, text, tree });
    return tree;
  }

  /** A parse of `text` would reuse a cached tree (the same text, or one sharing enough of it). */
  canReuse(language: string, text: string): boolean {
    return this.bestMatch(language, text) !== null;
  }

  /**
   * Takes ownership of a tree parsed elsewhere (a parse done in slices, see extract.ts), as if
   * `parse` had made it: the caller must no longer delete it.
   */
  adopt(language: string, text: string, tree: Tree): void {
    const same = this.entries.findIndex((e) => e.language === language && e.text === text);
    if (same >= 0) {
      this.touch(this.entries[same]);
      tree.delete();
      return;
    }
    this.stats.full++;
    this.insert({ language, text, tree });
  }

  /** Deletes every cached tree. */
  clear(): void {
    for (const e of this.entries) e.tree.delete();
    this.entries = [];
  }

  /** Deletes the trees of every text not in `texts`. */
  retainTexts(texts: ReadonlySet<string>): void {
    const kept: CachedParse[] = [];
    for (const e of this.entries) {
      if (texts.has(e.text)) kept.push(e);
      else e.tree.delete();
    }
    this.entries = kept;
  }

  get size(): number {
    return this.entries.length;
  }

  /** The cached text of this language sharing the most prefix + suffix with `text`, if it shares enough. */
  private bestMatch(language: string, text: string): CachedParse | null {
    let best: CachedParse | null = null;
    let bestShared = -1;
    for (let i = this.entries.length - 1; i >= 0; i--) {
      const e = this.entries[i];
      if (e.language !== language) continue;
      if (e.text === text) return e;
      const prefix = commonPrefixLength(e.text, text);
      const shared = prefix + commonSuffixLength(e.text, text, prefix);
      if (shared > bestShared) {
        best = e;
        bestShared = shared;
      }
    }
    if (!best || bestShared < MIN_SHARED_FRACTION * Math.max(best.text.length, text.length)) return null;
    return best;
  }

  private touch(e: CachedParse): void {
    const i = this.entries.indexOf(e);
    if (i >= 0) this.entries.splice(i, 1);
    this.entries.push(e);
  }

  private insert(e: CachedParse): void {
    this.entries.push(e);
    let chars = 0;
    for (const x of this.entries) chars += x.text.length;
    while (this.entries.length > 1 && (this.entries.length > this.capacity || chars > this.maxChars)) {
      const evicted = this.entries.shift()!;
      chars -= evicted.text.length;
      evicted.tree.delete();
    }
  }
}
