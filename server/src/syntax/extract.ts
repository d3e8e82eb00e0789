/**
 * Entry point of the syntax layer: `initParsers` once, then `extract` per document.
 * `extract` is synchronous and never throws: any internal failure becomes a Problem.
 */
import type { Parser, Tree } from 'web-tree-sitter';
import { extractByEntryEdit } from './entryEdit';
import { ParseCache } from './incrementalParse';
import { LiteralMemo } from './literalMemo';
import { extractLti } from './lti';
import { extractPython, pythonSteps } from './python';
import { compileNamePatterns } from './roles';
import { loadedParsers, loadParsers, newParserFor } from './treeSitter';
import { extractTypeScript, typeScriptSteps } from './typescript';
import type { ExtractedFile, MatrixLiteral, SourceLanguage } from './types';

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

/** Drops every cached tree, extraction, memoised literal and unfinished sliced extraction (frees their memory; results do not change). */
export function clearExtractCaches(): void {
  parseCache.clear();
  literalMemo.clear();
  extracted.length = 0;
  for (const job of jobs.splice(0)) endJob(job);
}

/**
 * Keeps the trees, extractions and memoised literals of these texts only (the open documents
 * whose analysis is kept): the rest is dropped to free memory. Results do not change; a text
 * dropped here is parsed and read again when next extracted. Unfinished sliced extractions are
 * left alone (their owners decide).
 */
export function retainExtractionsOf(texts: readonly string[], opts: { forgetInert?: boolean } = {}): void {
  const keep = new Set(texts);
  for (let i = extracted.length - 1; i >= 0; i--) if (!keep.has(extracted[i].text)) extracted.splice(i, 1);
  parseCache.retainTexts(keep);
  const literals = new Set<MatrixLiteral>();
  for (const e of extracted) for (const m of e.file.matrices) literals.add(m);
  literalMemo.retainMatrices(literals, opts.forgetInert !== false);
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

const keyOf = (language: SourceLanguage, opts?: ExtractOptions) => `${language}\u0000${(opts?.stateMatrixNames ?? []).join('\u0000')}`;

/** The remembered extraction of this text, or one made without the parser from a recent text (entryEdit.ts); null otherwise. */
function quickExtract(key: string, text: string, language: SourceLanguage): ExtractedFile | null {
  const i = extracted.findIndex((e) => e.key === key && e.text === text);
  if (i >= 0) {
    const hit = extracted[i];
    extracted.splice(i, 1);
    extracted.push(hit);
    extractedHits++;
    return hit.file;
  }
  // A number typed inside one entry of a recent text: re-read that entry only (entryEdit.ts).
  for (let k = extracted.length - 1; k >= Math.max(0, extracted.length - 4); k--) {
    const recent = extracted[k];
    if (recent.key !== key) continue;
    const file = extractByEntryEdit(recent.file, recent.text, text, language);
    if (file) {
      entryEdits++;
      remember(key, text, file);
      return file;
    }
  }
  return null;
}

function remember(key: string, text: string, file: ExtractedFile): void {
  extracted.push({ key, text, file });
  let chars = 0;
  for (const e of extracted) chars += e.text.length;
  while (extracted.length > 1 && (extracted.length > EXTRACTED_KEEP || chars > EXTRACTED_KEEP_CHARS)) chars -= extracted.shift()!.text.length;
}

export function extract(text: string, language: SourceLanguage, opts?: ExtractOptions): ExtractedFile {
  if (opts?.reuse === false) return extractFresh(text, language, opts);
  const key = keyOf(language, opts);
  const quick = quickExtract(key, text, language);
  if (quick) return quick;
  const file = extractFresh(text, language, opts);
  remember(key, text, file);
  return file;
}

/** The extraction of this text is remembered: `extract` answers it at once. */
export function extractionReady(text: string, language: SourceLanguage, opts?: ExtractOptions): boolean {
  const key = keyOf(language, opts);
  return extracted.some((e) => e.key === key && e.text === text);
}

/*
 * Extraction in slices. A full parse and walk of a large file (about a second for 2 MB) would
 * hold the server's only thread, and with it every request. `extractSlice` does at most about
 * `sliceMs` of that work and returns; called again with the same text it goes on where it
 * stopped: tree-sitter's parser resumes a parse halted by its progress callback (tree-sitter
 * documentation, `Parser.parse` and `Parser.reset`), and the walk is a generator over top-level
 * statements (python.ts, typescript.ts). Each job has a parser and a tree of its own, so other
 * documents' parses in between cannot disturb it; the finished tree goes to the parse cache and
 * the extraction to the memo above, exactly as `extract` would have left them.
 */

/** A full parse of at least this many characters is done in slices (about 25 ms of parsing). */
export const SLICED_EXTRACTION_CHARS = 100_000;
/**
 * Unfinished jobs at once. Each holds a parser and a partial tree in tree-sitter's WASM heap,
 * which never shrinks (about 65 bytes per character, see incrementalParse.ts): ten large
 * files opened together once grew it by 50 MB with four jobs and the rest parsed at once. A job is never dropped to make room for another (round-robin
 * slices over more documents than jobs would then restart every parse and none would finish),
 * so past this many a text waits ('waiting') until a job finishes. A job not stepped for
 * STALE_JOB_MS (its document went away unnoticed) is dropped.
 */
export const MAX_JOBS = 1;
const STALE_JOB_MS = 10_000;
/** Every slice makes at least this much progress, however late it is called. */
const MIN_SLICE_MS = 5;

interface ExtractionJob {
  key: string;
  text: string;
  language: SourceLanguage;
  owner: string | null;
  parser: Parser | null;
  tree: Tree | null;
  steps: Generator<number, ExtractedFile, void> | null;
  /** Characters read by the walk so far. */
  readTo: number;
  /** Slices stepped (for measurements). */
  slices: number;
  /** When it was last stepped (performance.now()). */
  steppedAt: number;
}

const jobs: ExtractionJob[] = [];

export interface ExtractionProgress {
  /** The extraction is remembered: `extract` (and so analyzeDocument) answers at once. */
  done: boolean;
  /** 'parsing' or 'reading' while not done; 'waiting' for other texts' jobs to finish first. */
  phase: 'waiting' | 'parsing' | 'reading' | 'done';
  /** Share of the text the current phase has covered, 0–1. */
  fraction: number;
}

function endJob(job: ExtractionJob): void {
  job.steps = null;
  job.tree?.delete();
  job.tree = null;
  job.parser?.delete();
  job.parser = null;
}

/**
 * `extract` of this text would parse or read it in full at a size `extractSlice` does in
 * slices (no remembered extraction, and no edit inside one entry of a recent text): a caller
 * that must answer quickly should not call it. A reusable tree does not make it quick: the
 * parse is, but reading 10,000 statements again after a line was added took 400 ms.
 */
export function needsSlicedExtraction(text: string, language: SourceLanguage, opts?: ExtractOptions): boolean {
  if (language === 'lti' || text.length < SLICED_EXTRACTION_CHARS || !loadedParsers()) return false;
  return !extractionReady(text, language, opts) && quickExtract(keyOf(language, opts), text, language) === null;
}

/** Drops unfinished sliced extractions started for `owner` (a document that changed or closed). */
export function abandonExtractions(owner: string): void {
  for (let i = jobs.length - 1; i >= 0; i--) {
    if (jobs[i].owner === owner) endJob(jobs.splice(i, 1)[0]);
  }
}

/** Unfinished sliced extractions (for tests and measurements). */
export function pendingExtractions(): number {
  return jobs.length;
}

/**
 * Up to about `sliceMs` of work towards the extraction of `text`, then returns how far it got.
 * Small texts, texts with a reusable tree and LTI files are extracted at once. `owner` (a
 * document URI) lets a newer text of the same document replace an unfinished job of an older one.
 */
export function extractSlice(text: string, language: SourceLanguage, opts: ExtractOptions | undefined, sliceMs: number, owner?: string): ExtractionProgress {
  const key = keyOf(language, opts);
  const index = jobs.findIndex((j) => j.key === key && j.text === text);
  if (index < 0) {
    if (extractionReady(text, language, opts)) return { done: true, phase: 'done', fraction: 1 };
    const parsers = loadedParsers();
    if (owner !== undefined) abandonExtractions(owner);
    const now = performance.now();
    for (let i = jobs.length - 1; i >= 0; i--) if (now - jobs[i].steppedAt > STALE_JOB_MS) endJob(jobs.splice(i, 1)[0]);
    if (opts?.reuse === false || language === 'lti' || !parsers || text.length < SLICED_EXTRACTION_CHARS || quickExtract(key, text, language)) {
      extract(text, language, opts);
      return { done: true, phase: 'done', fraction: 1 };
    }
    if (jobs.length >= MAX_JOBS) return { done: false, phase: 'waiting', fraction: 0 };
    if (parseCache.canReuse(language, text)) {
      // An edit of a large text: the incremental parse is quick and done now; the statements are
      // read in slices from a copy of the tree (the cache may evict its own before the job ends).
      const tree = parseCache.parse(language === 'python' ? parsers.python : parsers.typescript, language, text);
      if (tree) {
        jobs.push({ key, text, language, owner: owner ?? null, parser: null, tree: tree.copy(), steps: null, readTo: 0, slices: 0, steppedAt: now });
      } else {
        extract(text, language, opts);
        return { done: true, phase: 'done', fraction: 1 };
      }
    } else {
      const parser = newParserFor(language === 'python' ? parsers.python : parsers.typescript);
      jobs.push({ key, text, language, owner: owner ?? null, parser, tree: null, steps: null, readTo: 0, slices: 0, steppedAt: now });
    }
  } else {
    jobs.push(jobs.splice(index, 1)[0]);
  }
  const job = jobs[jobs.length - 1];
  job.steppedAt = performance.now();
  const deadline = job.steppedAt + Math.max(sliceMs, MIN_SLICE_MS);
  job.slices++;
  let file: ExtractedFile | null = null;
  try {
    if (!job.tree) {
      let at = 0;
      job.tree = job.parser!.parse(text, null, {
        progressCallback: (state) => {
          at = state.currentOffset;
          return performance.now() > deadline;
        },
      });
      // currentOffset counts bytes of the UTF-16 text tree-sitter reads (two per character).
      if (!job.tree) return { done: false, phase: 'parsing', fraction: Math.min(1, at / (2 * text.length)) };
      job.parser!.delete();
      job.parser = null;
    }
    if (!job.steps) {
      const patterns = compileNamePatterns(opts?.stateMatrixNames);
      job.steps = job.language === 'python' ? pythonSteps(text, job.tree, patterns, literalMemo) : typeScriptSteps(text, job.tree, patterns, literalMemo);
    }
    for (;;) {
      const r = job.steps.next();
      if (r.done) {
        file = r.value;
        if (job.language !== 'python') file.language = job.language;
        break;
      }
      job.readTo = r.value;
      if (performance.now() > deadline) return { done: false, phase: 'reading', fraction: Math.min(1, job.readTo / Math.max(1, text.length)) };
    }
  } catch (err) {
    file = emptyFile(language);
    file.problems.push({
      span: { start: 0, end: 0 },
      severity: 'error',
      code: 'internal-error',
      message: `eigenlens could not read this file: ${String((err as Error)?.message ?? err)}`,
    });
  }
  jobs.splice(jobs.indexOf(job), 1);
  if (job.tree && file.problems.every((p) => p.code !== 'internal-error')) {
    parseCache.adopt(language, text, job.tree);
    job.tree = null;
  }
  endJob(job);
  remember(key, text, file);
  return { done: true, phase: 'done', fraction: 1 };
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
