/**
 * First diagnostics for a large document, before the whole of it has been read.
 *
 * Reading a 5,000-line file (a full tree-sitter parse and walk, in a process whose code is
 * not yet optimised) takes longer than a user waits for the first squiggle. So the first
 * pass of a large document analyses a prefix of it, cut at a top-level line, and publishes
 * what that prefix settles: the findings of matrices that end before the last matrix of the
 * prefix (which the cut may have truncated). Everything else — document-wide problems, model
 * findings of matrices whose partners lie below the cut — waits for the full passes that
 * follow at once. A prefix can only lack findings, never change one: every matrix kept is
 * complete in the prefix, with the constants and pragmas above it.
 */
import type { DocumentReport } from '../analysis/report';
import { diagnosticsOf, type PlainDiagnostic } from './diagnostics';
import { DIAGNOSTIC_SOURCE } from '../shared/protocol';
import { groupedInteger } from '../analysis/numberText';

/** Documents shorter than this are analysed whole from the first pass. */
export const OPENING_MIN_CHARS = 60_000;
/** About this much of a large document is read first (about 300 lines). */
export const OPENING_PREFIX_CHARS = 10_000;

/** Characters that cannot start a top-level statement (they continue an expression). */
const CONTINUES = new Set([' ', '\t', '\r', '\n', ')', ']', '}', ',', '.', '+', '-', '*', '/', '%', '&', '|', '^', '=', '<', '>', ':', '?', '"', "'", '`']);
/** A line ending in one of these goes on to the next line. */
const OPENS = new Set(['(', '[', '{', ',', '\\', '+', '-', '*', '/', '=', ':', '&', '|', '?']);

/**
 * Where to cut: the start of the first line at or after `target` that starts at column 0 with
 * something that can begin a statement, after a line that does not visibly go on. Null when
 * the document is small or no such line exists within twice the target.
 */
export function openingCut(text: string, target = OPENING_PREFIX_CHARS, minChars = OPENING_MIN_CHARS): number | null {
  if (text.length < minChars) return null;
  let at = text.indexOf('\n', target);
  while (at >= 0 && at < 2 * target) {
    const start = at + 1;
    const first = text[start];
    if (first !== undefined && !CONTINUES.has(first)) {
      // The previous line's last visible character.
      let k = at - 1;
      while (k >= 0 && (text[k] === ' ' || text[k] === '\t' || text[k] === '\r')) k--;
      if (k >= 0 && !OPENS.has(text[k])) return start;
    }
    at = text.indexOf('\n', start);
  }
  return null;
}

/**
 * The diagnostics a prefix settles (see the file comment), plus one information diagnostic
 * saying that the rest follows. `lines` counts the prefix's lines for that message.
 */
export function openingDiagnostics(prefix: DocumentReport, prefixText: string, documentLines: number): PlainDiagnostic[] {
  const settled = settledEnd(prefix);
  const kept = diagnosticsOf(prefix).filter((d) => d.matrixIndex !== null && d.span.end <= settled && !d.message.startsWith('Not analysed:'));
  let lines = 1;
  for (let i = 0; i < settled; i++) if (prefixText.charCodeAt(i) === 10) lines++;
  kept.unshift({
    span: { start: 0, end: 0 },
    severity: 'information',
    code: 'analysis-limit',
    message: `eigenlens is still analysing this file (${groupedInteger(documentLines)} lines): the diagnostics so far cover lines 1–${lines}; the rest follow.`,
    source: DIAGNOSTIC_SOURCE,
    matrixIndex: null,
  });
  return kept;
}

/** Where the findings of an opening report are settled: the start of its last matrix (which the cut may have truncated). */
export function settledEnd(prefix: DocumentReport): number {
  const last = prefix.matrices[prefix.matrices.length - 1];
  return last ? last.statementSpan.start : 0;
}

/** How far the reading of a large document has got, as the server reports it. */
export interface ReadingProgress {
  phase: 'waiting' | 'parsing' | 'reading' | 'done';
  fraction: number;
}

/** What a hover says below the lines the opening pass covered, while the file is still being read. */
export function readingHoverMarkdown(progress: ReadingProgress, documentLines: number): string {
  const lines = groupedInteger(documentLines);
  if (progress.phase === 'waiting') return `**eigenlens** will read this file (${lines} lines) once the other large files opened with it are read. Hover again in a moment.`;
  const what = progress.phase === 'parsing' ? 'parsing' : 'reading its statements';
  return `**eigenlens** is still reading this file (${lines} lines; ${what}, ${Math.round(progress.fraction * 100)} %). Hover again in a moment.`;
}

/** Appended to a hover answered from the opening pass: the matrix's own analysis is final, its model findings may not be. */
export const READING_HOVER_NOTE = '\n\n---\n*eigenlens is still reading the rest of this file: findings that involve matrices further down follow.*';
