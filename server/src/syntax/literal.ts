/**
 * Builds a MatrixLiteral from the nested-list shape an extractor found (language-neutral),
 * and attaches pragma comments to statements by line position.
 *
 * Shape rules (documented for users):
 *  - a list of lists is a matrix, one inner list per row; every row must have as many
 *    entries as the first (`ragged-rows` error at the offending row otherwise);
 *  - a flat list is a 1×n row, except for input (B) and noise-input (G) roles, where it is an
 *    n×1 column, because a single-input B is conventionally written as a list of gains;
 *  - lists nested three deep are `not-a-matrix`.
 * "Strict" literals (names with a role, array calls, pragma-marked) report every problem;
 * other literals become matrices only when they are entirely numeric, and are otherwise
 * ignored silently (e.g. `names = [["a", "b"]]` is neither a matrix nor an error).
 * A literal with shape errors is not returned as a matrix (only its problems are), so
 * every MatrixLiteral handed on is rectangular.
 */
import { evaluateEntry } from './evaluate';
import { isPragmaComment, mergePragmas, parsePragma } from './pragma';
import { runToEnd } from '../engine/steps';
import type { NameRole } from './roles';
import type { EntryValue, MatrixEntry, MatrixLiteral, Pragma, Problem, SourceLanguage, Span } from './types';

/** A list (items non-null) or a leaf entry (items null) found by an extractor. */
export interface LiteralNode {
  span: Span;
  items: LiteralNode[] | null;
  /** Leaves that are obviously not numbers, so lenient literals can be skipped without evaluating. */
  obviouslyNonNumeric?: boolean;
  /** The parser could not read this leaf (an ERROR node, or one with a missing token inside). */
  syntaxError?: boolean;
}

/**
 * Invisible and direction-changing characters (soft hyphen, zero-width space/joiners, marks,
 * bidi embeddings/overrides/isolates, word joiner, byte-order mark). The parsers treat some of
 * them as white space, so an entry can look different from what is read ("Trojan Source",
 * Boucher & Anderson, USENIX Security 2023); a literal holding one is never analysed.
 */
const HIDDEN_CHARACTER = /[\u00AD\u200B-\u200F\u202A-\u202E\u2060-\u2069\uFEFF]/g;

/**
 * The source range of the comma-separated item of a bracketed row that contains `offset`,
 * trimmed of white space. Used when the parser's own nodes do not line up with what the user
 * wrote as one entry (`2x`, `2 pi`, `x = 1` inside a row). Brackets nest; quotes are not
 * tracked (an item with a quoted comma is split early, which only narrows the range).
 */
function itemRangeAt(text: string, row: Span, offset: number): Span | null {
  let depth = 0;
  let itemStart = row.start + 1;
  const close = row.end - 1;
  for (let i = row.start + 1; i <= close; i++) {
    const c = i < close ? text[i] : ',';
    if (c === '[' || c === '(' || c === '{') depth++;
    else if ((c === ']' || c === ')' || c === '}') && depth > 0) depth--;
    else if (c === ',' && depth === 0) {
      if (offset >= itemStart && offset < i) {
        let s = itemStart;
        let e = i;
        while (s < e && /\s/.test(text[s])) s++;
        while (e > s && /\s/.test(text[e - 1])) e--;
        return s < e ? { start: s, end: e } : null;
      }
      itemStart = i + 1;
    }
  }
  return null;
}

export interface LiteralInput {
  name: string | null;
  qualifiedName?: string;
  nameSpan: Span | null;
  /** Whole literal: the outer bracket, or the array call. */
  span: Span;
  statementSpan: Span;
  top: LiteralNode;
  nameRole: NameRole | null;
  pragma: Pragma | null;
  /** True for `np.array(...)`-style calls: a flat list is still a matrix. */
  arrayCall: boolean;
  /** Group key to use instead of the name's own (object properties: the object's name). */
  groupKeyOverride?: string;
}

/**
 * A literal at least this long is read in steps: its builders yield after every row, so a
 * stepped extraction (extract.ts) can stop inside one 200×200 literal rather than only
 * between statements. Smaller literals are read in one go (no step overhead).
 */
export const STEPPED_LITERAL_CHARS = 20_000;

/** A top list converted row by row, yielding the offset reached after each row (long literals, see STEPPED_LITERAL_CHARS). */
export function* literalRowsSteps<T>(span: Span, rows: readonly T[], convert: (row: T) => LiteralNode, endOf: (row: T) => number): Generator<number, LiteralNode, void> {
  const items: LiteralNode[] = [];
  for (const row of rows) {
    items.push(convert(row));
    yield endOf(row);
  }
  return { span, items };
}

export function buildMatrix(
  text: string,
  lang: SourceLanguage,
  scope: ReadonlyMap<string, EntryValue>,
  input: LiteralInput,
  problems: Problem[],
): MatrixLiteral | null {
  return runToEnd(buildMatrixSteps(text, lang, scope, input, problems));
}

/** `buildMatrix` in steps: yields the offset read up to after each row of a long literal (STEPPED_LITERAL_CHARS). */
export function* buildMatrixSteps(
  text: string,
  lang: SourceLanguage,
  scope: ReadonlyMap<string, EntryValue>,
  input: LiteralInput,
  problems: Problem[],
): Generator<number, MatrixLiteral | null, void> {
  const { top, pragma, nameRole } = input;
  const stepped = input.span.end - input.span.start >= STEPPED_LITERAL_CHARS;
  if (pragma?.ignore) return null;
  const role = pragma?.role ?? nameRole?.role ?? 'unknown';
  const strict = role !== 'unknown' || pragma !== null || input.arrayCall;
  const items = top.items ?? [];
  if (items.length === 0) return null;
  const local: Problem[] = [];
  const error = (span: Span, code: string, message: string) => local.push({ span, severity: 'error', code, message });

  // Unreadable entries (parser ERROR nodes): report the whole written entry and hand on no
  // matrix. Checked before the shape, because an ERROR node splits one entry into several.
  const unreadable = (rowNodes: LiteralNode[][], rowSpans: Span[]): boolean => {
    for (let r = 0; r < rowNodes.length; r++) {
      const bad = rowNodes[r].find((e) => e.syntaxError);
      if (!bad) continue;
      const range = itemRangeAt(text, rowSpans[r], bad.span.start) ?? bad.span;
      // The evaluator usually names the fault more precisely (implicit-multiplication, assignment, suspicious-character).
      const r2 = evaluateEntry(text.slice(range.start, range.end), scope, lang);
      if ('error' in r2 && r2.error.code !== 'syntax-error') {
        const s = range.start + r2.error.start;
        error({ start: s, end: Math.max(range.start + r2.error.end, s) }, r2.error.code, r2.error.message);
      } else {
        error(range, 'syntax-error', `This entry cannot be read as a number: "${clip(text.slice(range.start, range.end))}".`);
      }
    }
    return local.length > 0;
  };

  const firstIsList = items[0].items !== null;
  const mixed = items.find((it) => (it.items !== null) !== firstIsList);
  if (mixed) {
    if (!strict) return null;
    error(mixed.span, 'ragged-rows', firstIsList ? 'This entry is not a row: every row must be a list.' : 'A list mixed with plain entries: write every row as a list.');
    problems.push(...local);
    return null;
  }

  let rowNodes: LiteralNode[][];
  let rowSpans: Span[];
  if (!firstIsList) {
    if (!strict && !input.arrayCall) return null;
    if (role === 'input' || role === 'noise-input') {
      rowNodes = items.map((it) => [it]);
      rowSpans = items.map((it) => it.span);
    } else {
      rowNodes = [items];
      rowSpans = [top.span];
    }
  } else {
    rowNodes = items.map((row) => row.items ?? []);
    rowSpans = items.map((row) => row.span);
    if (unreadable(rowNodes, rowSpans)) {
      if (!strict) return null;
      problems.push(...local);
      return null;
    }
    const nCols = rowNodes[0].length;
    for (let r = 0; r < rowNodes.length; r++) {
      const deep = rowNodes[r].find((e) => e.items !== null);
      if (deep) {
        if (!strict) return null;
        error(deep.span, 'not-a-matrix', 'Lists nested three deep are not a matrix: each row must hold plain entries.');
      }
      if (rowNodes[r].length !== nCols) {
        if (!strict) return null;
        error(
          rowSpans[r],
          'ragged-rows',
          `Row ${r + 1} has ${rowNodes[r].length} entr${rowNodes[r].length === 1 ? 'y' : 'ies'} but row 1 has ${nCols}: all rows of a matrix need the same length.`,
        );
      }
    }
    if (nCols === 0) {
      if (strict && local.length === 0) error(top.span, 'empty-matrix', 'The matrix has no columns.');
      problems.push(...local);
      return null;
    }
    if (local.length > 0) {
      problems.push(...local);
      return null;
    }
  }

  if (!strict && rowNodes.some((row) => row.some((e) => e.obviouslyNonNumeric))) return null;
  if (!firstIsList && unreadable(rowNodes, rowSpans)) {
    if (!strict) return null;
    problems.push(...local);
    return null;
  }

  let exact = true;
  const rows: MatrixEntry[][] = [];
  for (const row of rowNodes) {
    const out: MatrixEntry[] = [];
    for (const node of row) {
      const entryText = text.slice(node.span.start, node.span.end);
      const r = evaluateEntry(entryText, scope, lang);
      if ('error' in r) {
        if (!strict) return null;
        const s = node.span.start + r.error.start;
        error({ start: s, end: Math.max(node.span.start + r.error.end, s) }, r.error.code, r.error.message);
        out.push({ span: node.span, text: entryText, value: null });
        exact = false;
      } else {
        if (r.value.kind !== 'exact') exact = false;
        out.push({ span: node.span, text: entryText, value: r.value });
      }
    }
    rows.push(out);
    if (stepped && row.length > 0) yield row[row.length - 1].span.end;
  }
  // Hidden characters anywhere in the literal (also between tokens, where the parsers skip them).
  for (const hit of text.slice(input.span.start, input.span.end).matchAll(HIDDEN_CHARACTER)) {
    const at = input.span.start + (hit.index ?? 0);
    const code = `U+${hit[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`;
    let where: Span = { start: at, end: at + 1 };
    for (let r = 0; r < rows.length; r++) {
      if (at < rowSpans[r].start || at >= rowSpans[r].end) continue;
      const range = itemRangeAt(text, rowSpans[r], at);
      if (!range) break;
      where = range;
      for (const entry of rows[r]) {
        if (entry.span.start < range.end && entry.span.end > range.start && entry.value !== null) {
          entry.value = null;
          exact = false;
        }
      }
      break;
    }
    if (!strict) return null;
    error(where, 'suspicious-character', `An invisible or text-direction character (${code}) is in this entry: what is shown may differ from what is read, so the matrix is not analysed. Delete it.`);
  }
  problems.push(...local);
  const matrix: MatrixLiteral = {
    name: input.name,
    nameSpan: input.nameSpan,
    span: input.span,
    statementSpan: input.statementSpan,
    rows,
    rowSpans,
    nRows: rows.length,
    nCols: rows[0].length,
    exact,
    role,
    groupKey: pragma?.model ?? input.groupKeyOverride ?? nameRole?.groupKey ?? '',
    pragma,
  };
  if (input.qualifiedName !== undefined && input.qualifiedName !== input.name) matrix.qualifiedName = input.qualifiedName;
  return matrix;
}

function clip(s: string): string {
  return s.length > 40 ? `${s.slice(0, 37)}...` : s;
}

// ---------------------------------------------------------------------------------------
// Pragma attachment by line

export interface CommentSpan {
  start: number;
  end: number;
}

/** Line starts of a text, for offset → line lookups. */
export class LineIndex {
  readonly starts: number[] = [0];
  constructor(readonly text: string) {
    // indexOf is a native scan, several times faster than a loop per character on long files.
    for (let nl = text.indexOf('\n'); nl >= 0; nl = text.indexOf('\n', nl + 1)) this.starts.push(nl + 1);
  }
  lineOf(offset: number): number {
    let lo = 0;
    let hi = this.starts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.starts[mid] <= offset) lo = mid;
      else hi = mid - 1;
    }
    return lo;
  }
  lineText(line: number): string {
    const end = line + 1 < this.starts.length ? this.starts[line + 1] - 1 : this.text.length;
    return this.text.slice(this.starts[line], end).replace(/\r$/, '');
  }
}

/**
 * Finds pragma comments in a text and attaches them to statements. `isComment(offset)` lets
 * the caller confirm with its syntax tree that an occurrence really is inside a comment.
 */
export class PragmaAttacher {
  private readonly byLine = new Map<number, CommentSpan>();
  private readonly used = new Set<number>();
  private lineIndex: LineIndex | null = null;

  constructor(
    private readonly text: string,
    private readonly lang: SourceLanguage,
    isComment: (offset: number) => CommentSpan | null,
    private readonly firstCodeOffset: number,
    private readonly problems: Problem[],
  ) {
    let from = 0;
    for (;;) {
      const at = text.indexOf('eigenlens', from);
      if (at < 0) break;
      from = at + 9;
      const comment = isComment(at);
      if (!comment || !isPragmaComment(text.slice(comment.start, comment.end))) continue;
      const line = this.lines.lineOf(comment.start);
      if (!this.byLine.has(line)) this.byLine.set(line, comment);
      from = Math.max(from, comment.end);
    }
  }

  /** Built on first use: a file without pragmas never needs it (this saves a scan of the text per extraction). */
  get lines(): LineIndex {
    if (!this.lineIndex) this.lineIndex = new LineIndex(this.text);
    return this.lineIndex;
  }

  get hasPragmas(): boolean {
    return this.byLine.size > 0;
  }

  private parse(c: CommentSpan, scope: ReadonlyMap<string, EntryValue>): Pragma | null {
    const parsed = parsePragma(this.text.slice(c.start, c.end), c.start, scope, this.lang);
    if (!parsed) return null;
    this.problems.push(...parsed.problems);
    return parsed.pragma;
  }

  private isCommentOnlyLine(line: number): boolean {
    const t = this.lines.lineText(line).trim();
    return this.lang === 'python' || this.lang === 'lti' ? t.startsWith('#') : t.startsWith('//') || t.startsWith('/*') || t.startsWith('*');
  }

  /** The pragma for a statement starting at `statementStart` and ending at `statementEnd`, if any. */
  attach(statementStart: number, scope: ReadonlyMap<string, EntryValue>): Pragma | null {
    if (this.byLine.size === 0) return null;
    const line = this.lines.lineOf(statementStart);
    const found: CommentSpan[] = [];
    for (let l = line - 1; l >= 0 && this.isCommentOnlyLine(l); l--) {
      const c = this.byLine.get(l);
      if (c && !this.used.has(c.start) && this.text.slice(this.lines.starts[l], c.start).trim() === '') found.unshift(c);
    }
    const sameLine = this.byLine.get(line);
    if (sameLine && sameLine.start > statementStart && !this.used.has(sameLine.start)) found.push(sameLine);
    const pragmas: Pragma[] = [];
    for (const c of found) {
      this.used.add(c.start);
      const p = this.parse(c, scope);
      if (p) pragmas.push(p);
    }
    return mergePragmas(pragmas);
  }

  /** After all statements: the file pragma (first unattached pragma before any code) and stray-pragma warnings. */
  finish(): Pragma | null {
    let filePragma: Pragma | null = null;
    const rest = [...this.byLine.values()].filter((c) => !this.used.has(c.start)).sort((a, b) => a.start - b.start);
    for (const c of rest) {
      if (c.start < this.firstCodeOffset) {
        const p = this.parse(c, new Map());
        if (p) filePragma = filePragma ? mergePragmas([filePragma, p]) : p;
      } else {
        this.parse(c, new Map());
        this.problems.push({
          span: { start: c.start, end: c.end },
          severity: 'warning',
          code: 'stray-pragma',
          message: 'This pragma applies to nothing: put it directly above a matrix, at the end of its first line, or before any code for the whole file.',
        });
      }
    }
    return filePragma;
  }
}
