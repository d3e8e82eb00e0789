/**
 * Entry point of the syntax layer: `initParsers` once, then `extract` per document.
 * `extract` is synchronous and never throws: any internal failure becomes a Problem.
 */
import { extractByEntryEdit } from './entryEdit';
import { ParseCache } from './incrementalParse';
import { LiteralMemo } from './literalMemo';
import { extractLti } from './lti';
import { extractPython } from './python';
import { compileNamePatterns } from './roles';
import { loadedParsers, loadParsers } from './treeSitter';
import { extractTypeScript } from './typescript';
import type { ExtractedFile, SourceLanguage } from './types';

export interface ExtractOptions {
  /** Extra state-matrix names, as regular expressions matched against the whole name. */
  stateMatrixNames?: string[];
  /**
   * Reuse earlier work (default true): the syntax tree of a recent version of the text is
   * re-parsed incrementally, and unchanged matrix literals are not rebuilt. False parses from
   * scratch and neither reads nor fills the caches (the results are the same either way).
   */
  reuse?: boolean;
}

/** Recent syntax trees for incremental re-parsing (one cache for all documents; see incrementalParse.ts). */
const parseCache = new ParseCache();
/** Matrices built by earlier extractions, reused when their literal and the constants it reads are unchanged. */
const literalMemo = new LiteralMemo();

/**
 * Extractions of recent texts, for passes over an unchanged text (a document analysed in
 * slices, hovers between edits): they need neither a syntax tree nor a walk. Keyed by the
 * text itself; the texts are the documents' own strings, so holding them costs nothing extra.
 */
const EXTRACTED_KEEP = 16;
/** And texts of at most this many characters in all (an extraction of a 2 MB file holds ~10,000 matrices); the newest is always kept. */
const EXTRACTED_KEEP_CHARS = 3_000_000;
const extracted: { key: string; text: string; file: ExtractedFile }[] = [];
let extractedHits = 0;
let entryEdits = 0;

/** Drops every cached tree, extraction and memoised literal (frees their memory; results do not change). */
export function clearExtractCaches(): void {
  parseCache.clear();
  literalMemo.clear();
  extracted.length = 0;
}

/** How many parses were served unchanged, incrementally or from scratch since start. */
export function extractCacheStats(): {
  parses: { unchanged: number; incremental: number; full: number; unchangedExtractions: number; entryEdits: number };
  literals: { hits: number; misses: number; unmemoised: number; skippedStatements: number };
} {
  return { parses: { ...parseCache.stats, unchangedExtractions: extractedHits, entryEdits }, literals: { ...literalMemo.stats } };
}

/** Loads the parsers (idempotent). `wasmDir` overrides where the .wasm files are looked for. */
export async function initParsers(opts?: { wasmDir?: string }): Promise<void> {
  await loadParsers(opts?.wasmDir);
}

function emptyFile(language: SourceLanguage): ExtractedFile {
  return { language, matrices: [], constants: [], filePragma: null, problems: [], systems: [] };
}

export function extract(text: string, language: SourceLanguage, opts?: ExtractOptions): ExtractedFile {
  if (opts?.reuse === false) return extractFresh(text, language, opts);
  const key = `${language}\u0000${(opts?.stateMatrixNames ?? []).join('\u0000')}`;
  const i = extracted.findIndex((e) => e.key === key && e.text === text);
  if (i >= 0) {
    const hit = extracted[i];
    extracted.splice(i, 1);
    extracted.push(hit);
    extractedHits++;
    return hit.file;
  }
  // A number typed inside one entry of a recent text: re-read that entry only (entryEdit.ts).
  let file: ExtractedFile | null = null;
  for (let k = extracted.length - 1; k >= Math.max(0, extracted.length - 4) && file === null; k--) {
    const recent = extracted[k];
    if (recent.key !== key) continue;
    file = extractByEntryEdit(recent.file, recent.text, text, language);
    if (file) entryEdits++;
  }
  file ??= extractFresh(text, language, opts);
  extracted.push({ key, text, file });
  let chars = 0;
  for (const e of extracted) chars += e.text.length;
  while (extracted.length > 1 && (extracted.length > EXTRACTED_KEEP || chars > EXTRACTED_KEEP_CHARS)) chars -= extracted.shift()!.text.length;
  return file;
}

function extractFresh(text: string, language: SourceLanguage, opts?: ExtractOptions): ExtractedFile {
  try {
    const patterns = compileNamePatterns(opts?.stateMatrixNames);
    if (language === 'lti') return extractLti(text, patterns);
    const parsers = loadedParsers();
    if (!parsers) {
      const file = emptyFile(language);
      file.problems.push({
        span: { start: 0, end: 0 },
        severity: 'error',
        code: 'parser-not-ready',
        message: 'The source parsers are not loaded yet (initParsers was not awaited).',
      });
      return file;
    }
    const parser = language === 'python' ? parsers.python : parsers.typescript;
    const reuse = opts?.reuse !== false;
    // A cached tree belongs to the cache (deleted on eviction); a one-off tree is deleted here.
    const tree = reuse ? parseCache.parse(parser, language, text) : parser.parse(text);
    if (!tree) {
      const file = emptyFile(language);
      file.problems.push({ span: { start: 0, end: 0 }, severity: 'error', code: 'parse-failed', message: 'The file could not be parsed.' });
      return file;
    }
    try {
      const memo = reuse ? literalMemo : null;
      if (language === 'python') return extractPython(text, tree, patterns, memo);
      const file = extractTypeScript(text, tree, patterns, memo);
      file.language = language;
      return file;
    } finally {
      if (!reuse) tree.delete();
    }
  } catch (err) {
    const file = emptyFile(language);
    file.problems.push({
      span: { start: 0, end: 0 },
      severity: 'error',
      code: 'internal-error',
      message: `eigenlens could not read this file: ${String((err as Error)?.message ?? err)}`,
    });
    return file;
  }
}
