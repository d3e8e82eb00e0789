/**
 * Memoised matrix building: a literal whose text, surroundings and visible constants are the
 * same as in an earlier extraction is not converted and evaluated again; the earlier result is
 * reused with every span shifted to where the literal is now.
 *
 * Method: memoisation with recorded dependencies (the technique of build systems and
 * incremental compilers; A. Mokhov, N. Mitchell and S. Peyton Jones, "Build Systems à la
 * Carte", ICFP 2018, §3 "verifying traces"). The key holds everything `buildMatrix` reads
 * apart from the constants: the literal's text, the language, name, qualified name, role from
 * the name, group key override, array-call flag, the pragma settings that change the result,
 * and where the top list, name and statement lie relative to the literal. The constants it
 * read are recorded while it runs (every `scope.get`, found or not) and checked against the
 * current scope on reuse, so an unrelated constant changing elsewhere does not miss, and a
 * used one changing always does.
 *
 * Invariants:
 *  - only literals whose syntax subtree has no error are memoised: without an error node,
 *    the same text parses to the same subtree wherever it stands, so the key determines the
 *    list shape `buildMatrix` sees;
 *  - stored spans are relative to the literal's start; every reuse returns fresh objects
 *    (matrix, rows, entries, spans, problems) so callers may not affect the memo;
 *  - the pragma object handed out is the caller's current one (its span is where it is now);
 *  - the memo is bounded (entries and characters) and evicts least recently used first.
 *
 * Inert statements: the extractors also remember the text of top-level statements (function
 * and class definitions and the like) whose walk found nothing at all — no assignment,
 * declaration or matrix anywhere inside. Such a statement, unchanged and without syntax
 * errors, is skipped without visiting its nodes (same reasoning: same text, same subtree,
 * and nothing in it reads or changes the constants). Walking those nodes through the WASM
 * boundary was most of an extraction once the literals were reused.
 */
import { buildMatrixSteps, type LiteralInput, type LiteralNode } from './literal';
import { runToEnd, stepsOrValue } from '../engine/steps';
import type { EntryValue, MatrixLiteral, Problem, SourceLanguage, Span } from './types';

/** What to build, with the top list made on demand (converting it is the work being saved). */
export interface MemoLiteralInput extends Omit<LiteralInput, 'top'> {
  topSpan: Span;
  /** The literal's syntax subtree contains an error (then it is always rebuilt). */
  topHasError: boolean;
  /** Converts the top list; a long literal's conversion yields offsets read so far (see buildMatrixSteps). */
  top: () => LiteralNode | Generator<number, LiteralNode, void>;
}

interface MemoEntry {
  /** Constants read while building, with what they were (undefined: not defined). */
  reads: Array<[string, EntryValue | undefined]>;
  /**
   * The matrix as handed out last, at offset `base` with `pragma`. It is handed out again while
   * neither changed (every matrix above an edit, and all of them after a same-length edit), so
   * an edit allocates only for what moved, later stages can key caches on the object, and the
   * memo holds no second copy of the entries of the open documents.
   */
  matrix: MatrixLiteral | null;
  base: number;
  pragma: MatrixLiteral['pragma'];
  /** Problems relative to `base` 0. */
  problems: Problem[];
  size: number;
}

function samePragma(a: MatrixLiteral['pragma'], b: MatrixLiteral['pragma']): boolean {
  if (a === b) return true;
  if (a === null || b === null) return false;
  return (
    a.span.start === b.span.start &&
    a.span.end === b.span.end &&
    a.domain === b.domain &&
    a.role === b.role &&
    a.model === b.model &&
    a.ignore === b.ignore &&
    sameValue(a.period, b.period)
  );
}

/**
 * Bounds. A built entry costs roughly 100 bytes per character of literal text (an object, a
 * span and a value per entry), so a million characters of keys keeps the memo near 100 MB in
 * the worst case; a typical file needs a few hundred thousand.
 */
const MAX_ENTRIES = 20_000;
const MAX_CHARS = 1_000_000;

/** A read-only view of the scope that records every lookup. Only `get` is used by the evaluator; the rest delegate. */
class ReadTrackingScope implements ReadonlyMap<string, EntryValue> {
  readonly reads = new Map<string, EntryValue | undefined>();
  constructor(private readonly inner: ReadonlyMap<string, EntryValue>) {}
  get(key: string): EntryValue | undefined {
    const v = this.inner.get(key);
    if (!this.reads.has(key)) this.reads.set(key, v);
    return v;
  }
  has(key: string): boolean {
    return this.get(key) !== undefined;
  }
  get size(): number {
    return this.inner.size;
  }
  // Whole-scope reads make the result depend on everything: record that by refusing to memoise.
  wholeScopeRead = false;
  forEach(cb: (value: EntryValue, key: string, map: ReadonlyMap<string, EntryValue>) => void): void {
    this.wholeScopeRead = true;
    this.inner.forEach((v, k) => cb(v, k, this));
  }
  entries(): MapIterator<[string, EntryValue]> {
    this.wholeScopeRead = true;
    return this.inner.entries();
  }
  keys(): MapIterator<string> {
    this.wholeScopeRead = true;
    return this.inner.keys();
  }
  values(): MapIterator<EntryValue> {
    this.wholeScopeRead = true;
    return this.inner.values();
  }
  [Symbol.iterator](): MapIterator<[string, EntryValue]> {
    return this.entries();
  }
}

function sameValue(a: EntryValue | undefined, b: EntryValue | undefined): boolean {
  if (a === b) return true;
  if (a === undefined || b === undefined || a.kind !== b.kind) return false;
  return a.kind === 'exact' ? a.value.eq((b as typeof a).value) : Object.is(a.value, b.value);
}

const shift = (s: Span, by: number): Span => ({ start: s.start + by, end: s.end + by });
const shiftOrNull = (s: Span | null, by: number): Span | null => (s === null ? null : shift(s, by));

/**
 * Called with each literal copied to a new position: caches keyed on the literal object
 * (analysis/analyze.ts: content key, hash, entry values) carry over to the copy, as its
 * content is the same. Without it, an edit near the top of a file of 10,000 matrices
 * re-hashed and re-converted every one of them (about 250 ms).
 */
let movedListener: ((from: MatrixLiteral, to: MatrixLiteral) => void) | null = null;

export function onLiteralMoved(listener: (from: MatrixLiteral, to: MatrixLiteral) => void): void {
  movedListener = listener;
}

/** A fresh copy of `m` with every span moved by `by` and the given pragma. */
function moved(m: MatrixLiteral, by: number, pragma: MatrixLiteral['pragma']): MatrixLiteral {
  const copy: MatrixLiteral = {
    ...m,
    nameSpan: shiftOrNull(m.nameSpan, by),
    span: shift(m.span, by),
    statementSpan: shift(m.statementSpan, by),
    rows: m.rows.map((row) => row.map((e) => ({ span: shift(e.span, by), text: e.text, value: e.value }))),
    rowSpans: m.rowSpans.map((s) => shift(s, by)),
    pragma,
  };
  movedListener?.(m, copy);
  return copy;
}

function movedProblems(ps: Problem[], by: number): Problem[] {
  return ps.map((p) => ({ ...p, span: shift(p.span, by) }));
}

/** A bounded set of statement texts, oldest first out (no reordering on a hit: hashing each text twice per lookup showed in profiles). */
export class InertStatements {
  private readonly texts = new Set<string>();
  private chars = 0;
  constructor(
    private readonly maxEntries = 50_000,
    private readonly maxChars = 4_000_000,
  ) {}
  has(text: string): boolean {
    return this.texts.has(text);
  }
  add(text: string): void {
    if (this.texts.has(text)) return;
    this.texts.add(text);
    this.chars += text.length;
    while (this.texts.size > this.maxEntries || this.chars > this.maxChars) {
      const oldest = this.texts.values().next();
      if (oldest.done) break;
      this.texts.delete(oldest.value);
      this.chars -= oldest.value.length;
    }
  }
  clear(): void {
    this.texts.clear();
    this.chars = 0;
  }
}

export class LiteralMemo {
  private readonly entries = new Map<string, MemoEntry>();
  private chars = 0;
  /** Top-level statements known to hold nothing the extractors collect (see the file header). */
  readonly inert = new InertStatements();
  /** Reuse counts (for tests and measurements). */
  readonly stats = { hits: 0, misses: 0, unmemoised: 0, skippedStatements: 0 };

  /** `buildMatrix` with reuse; pushes the same problems and returns the same matrix as `buildMatrix` would. */
  build(text: string, lang: SourceLanguage, scope: ReadonlyMap<string, EntryValue>, input: MemoLiteralInput, problems: Problem[]): MatrixLiteral | null {
    return runToEnd(this.buildSteps(text, lang, scope, input, problems));
  }

  /**
   * `build` in steps (long literals yield after each row, see buildMatrixSteps). Other
   * extractions may use the memo between steps, so the entry stored at the end replaces
   * whatever is under its key then.
   */
  *buildSteps(text: string, lang: SourceLanguage, scope: ReadonlyMap<string, EntryValue>, input: MemoLiteralInput, problems: Problem[]): Generator<number, MatrixLiteral | null, void> {
    const { top, topSpan, topHasError, ...rest } = input;
    const topList = () => stepsOrValue(top());
    if (topHasError) {
      this.stats.unmemoised++;
      return yield* buildMatrixSteps(text, lang, scope, { ...rest, top: yield* topList() }, problems);
    }
    const base = input.span.start;
    const pragma = input.pragma;
    const rel = (s: Span | null) => (s === null ? '-' : `${s.start - base}:${s.end - base}`);
    const key = [
      lang,
      input.name ?? '',
      input.qualifiedName ?? '',
      rel(input.nameSpan),
      rel(input.statementSpan),
      rel(topSpan),
      input.nameRole ? `${input.nameRole.role}/${input.nameRole.groupKey}` : '-',
      pragma === null ? '-' : `${pragma.ignore === true}/${pragma.role ?? ''}/${pragma.model ?? ''}`,
      input.arrayCall ? '1' : '0',
      input.groupKeyOverride ?? '\u0001',
      text.slice(input.span.start, input.span.end),
    ].join('\u0000');

    const found = this.entries.get(key);
    if (found && found.reads.every(([name, value]) => sameValue(scope.get(name), value))) {
      this.entries.delete(key);
      this.entries.set(key, found);
      this.stats.hits++;
      problems.push(...movedProblems(found.problems, base));
      if (!found.matrix) return null;
      if (found.base === base && samePragma(found.pragma, pragma)) return found.matrix;
      const copy = moved(found.matrix, base - found.base, pragma);
      found.matrix = copy;
      found.base = base;
      found.pragma = pragma;
      return copy;
    }

    this.stats.misses++;
    const tracked = new ReadTrackingScope(scope);
    const local: Problem[] = [];
    const matrix = yield* buildMatrixSteps(text, lang, tracked, { ...rest, top: yield* topList() }, local);
    problems.push(...local);
    if (!tracked.wholeScopeRead) {
      const current = this.entries.get(key);
      if (current) this.forget(key, current);
      const entry: MemoEntry = {
        reads: [...tracked.reads],
        matrix,
        base,
        pragma,
        problems: movedProblems(local, -base),
        size: key.length,
      };
      this.entries.set(key, entry);
      this.chars += entry.size;
      this.evict();
    }
    return matrix;
  }

  clear(): void {
    this.entries.clear();
    this.chars = 0;
    this.inert.clear();
  }

  /**
   * Keeps only the entries whose matrix is one of `matrices` (those of the texts still held),
   * and forgets the inert statements unless told not to: the rest belonged to documents whose
   * analysis was released, or to their earlier versions. Results do not change; the next
   * extraction of a released text builds again.
   */
  retainMatrices(matrices: ReadonlySet<MatrixLiteral>, forgetInert = true): void {
    for (const [key, e] of [...this.entries]) if (e.matrix === null || !matrices.has(e.matrix)) this.forget(key, e);
    if (forgetInert) this.inert.clear();
  }

  get size(): number {
    return this.entries.size;
  }

  private forget(key: string, e: MemoEntry): void {
    // Only the entry under its key: one looked up before a stepped build may have been replaced since.
    if (this.entries.get(key) !== e) return;
    this.entries.delete(key);
    this.chars -= e.size;
  }

  private evict(): void {
    while (this.entries.size > MAX_ENTRIES || this.chars > MAX_CHARS) {
      const oldest = this.entries.keys().next();
      if (oldest.done) break;
      this.forget(oldest.value, this.entries.get(oldest.value)!);
    }
  }
}
