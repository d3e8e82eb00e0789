/**
 * The commonest edit, done without the parser: a number typed over inside one matrix entry.
 *
 * When the only difference between a text already extracted and the new one lies inside one
 * entry of one matrix, and that entry was and still is a plain number (`3` → `35`, `0.5` →
 * `-0.25`), the syntax tree around it has exactly the same shape: the new extraction is the
 * old one with that entry re-read and every later offset moved by the change in length. This
 * skips the incremental parse and the statement walk, which cost most of an edit's time on
 * a long file. Anything else — an edit touching brackets, commas, names, comments or two
 * entries, an entry with a problem, a matrix with problems — returns null and goes the
 * ordinary way; the result is then the same, only slower (the equivalence is a property test
 * in test/syntax/incremental.test.ts).
 */
import { evaluateEntry } from './evaluate';
import { singleEdit } from './incrementalParse';
import type { Constant, EntryValue, ExtractedFile, MatrixEntry, MatrixLiteral, Pragma, Problem, SourceLanguage, Span } from './types';

/** A plain decimal number, optionally negated: the same single token (or minus and token) in Python and TypeScript. */
const PLAIN_NUMBER = /^-?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$/;

/** Edits longer than this are not keystrokes or a pasted number; they go the ordinary way. */
const MAX_EDIT_CHARS = 64;

const EMPTY_SCOPE: ReadonlyMap<string, EntryValue> = new Map();

/**
 * The extraction of `text` from the extraction `prev` of `prevText`, when they differ inside
 * one plain-number entry; null otherwise.
 */
export function extractByEntryEdit(prev: ExtractedFile, prevText: string, text: string, language: SourceLanguage): ExtractedFile | null {
  if (language === 'lti' || prev.language !== language) return null;
  const edit = singleEdit(prevText, text);
  const { startIndex: start, oldEndIndex: oldEnd, newEndIndex: newEnd } = edit;
  if (oldEnd - start > MAX_EDIT_CHARS || newEnd - start > MAX_EDIT_CHARS) return null;
  if (start === oldEnd && start === newEnd) return null;

  // The matrix, then the entry, containing the edit (binary search: matrices are in document order).
  const matrices = prev.matrices;
  let lo = 0;
  let hi = matrices.length - 1;
  let mi = -1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const m = matrices[mid];
    if (oldEnd <= m.span.start) hi = mid - 1;
    else if (start >= m.span.end) lo = mid + 1;
    else {
      mi = mid;
      break;
    }
  }
  if (mi < 0) return null;
  const matrix = matrices[mi];
  let ri = -1;
  let ci = -1;
  for (let r = 0; r < matrix.rows.length && ri < 0; r++) {
    const row = matrix.rows[r];
    for (let c = 0; c < row.length; c++) {
      if (row[c].span.start <= start && oldEnd <= row[c].span.end) {
        ri = r;
        ci = c;
        break;
      }
    }
  }
  if (ri < 0) return null;
  const entry = matrix.rows[ri][ci];
  if (entry.value === null || !PLAIN_NUMBER.test(entry.text) || prevText.slice(entry.span.start, entry.span.end) !== entry.text) return null;
  if (prev.problems.some((p) => p.span.start < matrix.statementSpan.end && p.span.end > matrix.statementSpan.start)) return null;

  const delta = newEnd - oldEnd;
  const entrySpan: Span = { start: entry.span.start, end: entry.span.end + delta };
  const entryText = text.slice(entrySpan.start, entrySpan.end);
  if (!PLAIN_NUMBER.test(entryText)) return null;
  // A digit typed against a neighbouring token would join it ("2" after "x" is "x2"): the entry's
  // neighbours must be what they were.
  const before = text.charCodeAt(entrySpan.start - 1);
  const after = text.charCodeAt(entrySpan.end);
  if (isWordChar(before) || isWordChar(after)) return null;
  const evaluated = evaluateEntry(entryText, EMPTY_SCOPE, language);
  if (!('value' in evaluated)) return null;

  const move = (s: Span): Span => {
    if (s.start === entry.span.start && s.end === entry.span.end) return entrySpan;
    return { start: s.start >= oldEnd ? s.start + delta : s.start, end: s.end >= oldEnd ? s.end + delta : s.end };
  };
  const moveOrNull = (s: Span | null): Span | null => (s === null ? null : move(s));
  const movedPragma = (p: Pragma | null): Pragma | null => (p === null || p.span.end <= start ? p : { ...p, span: move(p.span) });

  const rows: MatrixEntry[][] = matrix.rows.map((row, r) =>
    row.map((e, c) => (r === ri && c === ci ? { span: entrySpan, text: entryText, value: evaluated.value } : delta === 0 || e.span.end <= start ? e : { ...e, span: move(e.span) })),
  );
  const edited: MatrixLiteral = {
    ...matrix,
    span: move(matrix.span),
    statementSpan: move(matrix.statementSpan),
    nameSpan: moveOrNull(matrix.nameSpan),
    rows,
    rowSpans: matrix.rowSpans.map(move),
    exact: rows.every((row) => row.every((e) => e.value !== null && e.value.kind === 'exact')),
  };

  const later = (m: MatrixLiteral): MatrixLiteral =>
    delta === 0
      ? m
      : {
          ...m,
          span: move(m.span),
          statementSpan: move(m.statementSpan),
          nameSpan: moveOrNull(m.nameSpan),
          rows: m.rows.map((row) => row.map((e) => ({ ...e, span: move(e.span) }))),
          rowSpans: m.rowSpans.map(move),
          pragma: movedPragma(m.pragma),
        };
  const movedConstant = (c: Constant): Constant => (delta === 0 || c.span.end <= start ? c : { ...c, span: move(c.span) });
  const movedProblem = (p: Problem): Problem => (delta === 0 || p.span.end <= start ? p : { ...p, span: move(p.span) });

  return {
    language: prev.language,
    matrices: matrices.map((m, i) => (i < mi ? m : i === mi ? edited : later(m))),
    constants: prev.constants.map(movedConstant),
    filePragma: delta === 0 ? prev.filePragma : movedPragma(prev.filePragma),
    problems: prev.problems.map(movedProblem),
    systems: prev.systems,
  };
}

/** Letters, digits, `_`, `.` and `$`: characters that would merge with a number typed next to them. */
function isWordChar(code: number): boolean {
  return (
    (code >= 48 && code <= 57) || (code >= 65 && code <= 90) || (code >= 97 && code <= 122) || code === 95 || code === 46 || code === 36 || code > 127
  );
}
