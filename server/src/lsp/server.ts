/**
 * The language server's wiring: connection, documents, settings, the analysis cache and the
 * handlers. Each handler converts LSP input to our plain terms, calls one ide/ function and
 * converts the answer back; nothing here computes anything about matrices.
 *
 * - Documents sync incrementally; each change restarts a per-document debounce, after which
 *   diagnostics are published for that version only (a newer edit drops the older result).
 * - Hovers, lenses and actions never wait for the debounce: they analyse on demand, through
 *   the same per-version report cache, and matrix analyses are shared by content hash.
 * - Settings are pulled per resource (workspace/configuration) and cached per document until
 *   workspace/didChangeConfiguration.
 * - Every handler is guarded: an exception becomes one log line and an empty answer.
 */
import {
  type CodeAction,
  type CodeLens,
  CodeActionKind,
  type Range,
  ErrorCodes,
  ResponseError,
  type WorkspaceEdit,
  type Connection,
  createConnection,
  type Diagnostic,
  DidChangeConfigurationNotification,
  ProposedFeatures,
  TextDocuments,
  TextDocumentSyncKind,
  type CancellationToken,
} from 'vscode-languageserver/node';
import { TextDocument } from 'vscode-languageserver-textdocument';
import { detailStats } from '../analysis/packedDetail';
import { abandonExtractions, AnalysisCache, reportHasSpectrum, analyzeDocument, analyzeDocumentSteps, stateMatrixOutline, extractSlice, initAnalysis, needsSlicedExtraction, retainExtractionsOf } from '../analysis/analyze';
import { NOT_YET_PREFIX } from '../analysis/findings';
import type { DocumentReport } from '../analysis/report';
import type { SourceLanguage } from '../syntax/types';
import {
  CCodeRequestMethod,
  Commands,
  DiscretizeRequestMethod,
  ReportRequestMethod,
  SERVER_COMMANDS,
  SETTINGS_SECTION,
  type CCodeRequestParams,
  type CCodeRequestResult,
  type DiscretizeRequestParams,
  type ReportRequestParams,
  type ReportRequestResult,
  StatsRequestMethod,
  type StatsRequestResult,
  TransitionTextRequestMethod,
  type TransitionTextRequestParams,
  type TransitionTextRequestResult,
} from '../shared/protocol';
import { asciiMinus, transitionText, transitionTitle } from '../ide/format';
import { CODE_METHODS, cInitializerText, discreteCodeFor, discreteInsertEdit } from '../ide/discreteCode';
import type { DiscretizationMethod } from '../engine/discretize';
import { DEFAULT_IDE_SETTINGS, settingsFromUser, type IdeSettings } from '../ide/settings';
import { hoverAt } from '../ide/hover';
import { COMPACT_LENSES_ABOVE, lensesOf, unresolvedLens, verdictLens, type PlainLens } from '../ide/lens';
import { capDiagnostics, diagnosticsOf } from '../ide/diagnostics';
import { ACTION_KINDS, codeActionsAt } from '../ide/actions';
import { domainEdit } from '../ide/pragmaEdit';
import { reportMarkdown } from '../ide/report';
import { getHeapSpaceStatistics } from 'node:v8';
import { boundHeapGrowth, IdleCollector } from './idleCollect';
import { OPENING_MIN_CHARS, openingCut, openingDiagnostics, READING_HOVER_NOTE, readingHoverMarkdown, settledEnd, type ReadingProgress } from '../ide/opening';
import { lensData, toCodeAction, toDiagnostic, toHover, toLens, toSpan, toWorkspaceEdit } from './convert';

/** Diagnostics wait this long after the last keystroke (common practice for linters: 100–300 ms). */
export const DIAGNOSTIC_DEBOUNCE_MS = 150;

/** Analysis time per diagnostics pass; a larger document is finished by further passes. */
export const DIAGNOSTIC_SLICE_MS = 250;

/**
 * Continuation passes over a large document (OPENING_MIN_CHARS and up) are shorter, so that a
 * request arriving during one waits little; they publish at most every CONTINUATION_PUBLISH_MS
 * (converting and sending thousands of diagnostics each pass would cost more than the pass).
 */
export const CONTINUATION_SLICE_MS = 80;
export const CONTINUATION_PUBLISH_MS = 1000;

const TRACE = process.env.EIGENLENS_TRACE === '1';

/**
 * Analysis time a hover, lens or action may spend when no report of the document's version
 * exists yet (a large document being analysed, or an edit not yet through its debounce): it
 * answers from what is finished plus the matrix under the cursor, within the editor's patience.
 */
export const REQUEST_SLICE_MS = 120;

/** Analysis time of the opening pass over a large document's first lines (see ide/opening.ts). */
export const OPENING_SLICE_MS = 60;

/**
 * Parsing and reading time per slice when a large document is read for the first time
 * (syntax/extract.ts `extractSlice`); requests are answered between slices.
 */
export const READ_SLICE_MS = 40;

/**
 * A diagnostics pass is suspended after this much work to answer waiting requests, then
 * resumed (analysis/analyze.ts `analyzeDocumentSteps`): about what a reading slice takes.
 */
export const PASS_STEP_MS = 40;
/**
 * Event-loop turns a pass gives up before it starts. The JSON-RPC layer moves a message
 * through several immediates (read, queue, handler, write), and a pass started from a timer
 * runs before the next of them: requests arriving while passes ran back to back waited one
 * pass per step (measured: a lens request 200 ms to start, its answer another pass to leave).
 * Each turn lets every message in flight take one step; an idle loop turns in microseconds.
 */
const YIELD_TURNS = 5;

/**
 * How long a pass waits for a large answer to leave. A pipe takes about 64 KB per event-loop
 * turn, so a 1.7 MB list of lenses (10,000 matrices) written just before a pass otherwise
 * trickled out over many passes while the editor waited.
 */
const DRAIN_WAIT_MS = 100;

async function yieldToRequests(): Promise<void> {
  for (let i = 0; i < YIELD_TURNS; i++) await new Promise<void>((resolve) => setImmediate(resolve));
  const until = performance.now() + DRAIN_WAIT_MS;
  while (process.stdout.writableLength > 0 && performance.now() < until) await new Promise<void>((resolve) => setTimeout(resolve, 1));
}

/** A large document waiting for other documents' reading (syntax/extract.ts, MAX_JOBS) asks again after this long. */
const WAITING_READ_MS = 25;

const LANGUAGE_IDS: Record<string, SourceLanguage> = {
  python: 'python',
  typescript: 'typescript',
  typescriptreact: 'typescript',
  javascript: 'javascript',
  javascriptreact: 'javascript',
  lti: 'lti',
};

const EXTENSIONS: [RegExp, SourceLanguage][] = [
  [/\.pyi?$/i, 'python'],
  [/\.(ts|tsx|mts|cts)$/i, 'typescript'],
  [/\.(js|jsx|mjs|cjs)$/i, 'javascript'],
  [/\.lti$/i, 'lti'],
];

export function languageOf(doc: TextDocument): SourceLanguage | null {
  const byId = LANGUAGE_IDS[doc.languageId];
  if (byId) return byId;
  for (const [pattern, language] of EXTENSIONS) if (pattern.test(doc.uri)) return language;
  return null;
}

interface CachedReport {
  version: number;
  settings: IdeSettings;
  report: DocumentReport;
}

/** The opening pass's report of a large document (ide/opening.ts), used while the whole is still being read. */
interface OpeningReport extends CachedReport {
  prefix: string;
  /** Findings of matrices starting before this offset are settled. */
  settledEnd: number;
}

/** A report for a request; `readingUpTo` is set while the document is still being read: the report covers only what lies before it. */
interface ReportAnswer {
  report: DocumentReport;
  settings: IdeSettings;
  readingUpTo?: number;
  reading?: ReadingProgress;
  /** The report has only the matrices at the request's focus (AnalyzeOptions.focusOnly). */
  partial?: boolean;
}

export function startServer(connection: Connection = createConnection(ProposedFeatures.all)): void {
  const documents = new TextDocuments(TextDocument);
  const matrixCache = new AnalysisCache();
  const reports = new Map<string, CachedReport>();
  const openings = new Map<string, OpeningReport>();
  /** How far the first reading of each large document has got. */
  const readingProgress = new Map<string, ReadingProgress>();
  const settingsCache = new Map<string, Promise<IdeSettings>>();
  /** Counts configuration changes: a pass suspended across one is stale. */
  let configurationEpoch = 0;
  const timers = new Map<string, NodeJS.Timeout>();
  const idle = new IdleCollector();
  boundHeapGrowth();
  // EIGENLENS_TRACE=1: every stretch of more than 50 ms in which the event loop could not answer a request.
  if (TRACE) {
    let last = performance.now();
    setInterval(() => {
      const now = performance.now();
      if (now - last > 60) process.stderr.write(`@${now.toFixed(0)} blocked for about ${(now - last - 10).toFixed(0)} ms\n`);
      last = now;
    }, 10).unref();
    process.stdin.on('data', (chunk: Buffer) => process.stderr.write(`@${performance.now().toFixed(0)} received ${chunk.length} bytes: ${chunk.toString('utf8', 0, 200).replace(/\s+/g, ' ').replace(/.*"method":"([^"]+)".*/, '$1')}\n`));
  }
  let canPullConfiguration = false;
  let canRegisterConfigurationChange = false;
  /** The client resolves code action edits lazily (codeAction/resolve with `edit`). */
  let canResolveActionEdits = false;
  let canRefreshLenses = false;
  let pushedSettings: IdeSettings = DEFAULT_IDE_SETTINGS;
  let ready: Promise<void> = Promise.resolve();

  const log = (message: string) => {
    try {
      connection.console.error(`eigenlens: ${message}`);
    } catch {
      // The connection itself may be gone; nothing more to do.
    }
  };

  /** Runs a handler; an exception becomes a log line and the fallback answer. */
  function guarded<P extends unknown[], R>(name: string, fallback: R, handler: (...args: P) => R | Promise<R>): (...args: P) => Promise<R> {
    return async (...args: P) => {
      const started = TRACE ? performance.now() : 0;
      if (TRACE && name !== 'diagnostics') process.stderr.write(`@${started.toFixed(0)} ${name}: started\n`);
      try {
        return await handler(...args);
      } catch (err) {
        log(`${name} failed: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`);
        return fallback;
      } finally {
        if (TRACE) process.stderr.write(`@${performance.now().toFixed(0)} ${name}: answered in ${(performance.now() - started).toFixed(1)} ms\n`);
      }
    };
  }

  function settingsFor(uri: string): Promise<IdeSettings> {
    if (!canPullConfiguration) return Promise.resolve(pushedSettings);
    let pending = settingsCache.get(uri);
    if (!pending) {
      pending = connection.workspace
        .getConfiguration({ scopeUri: uri, section: SETTINGS_SECTION })
        .then(settingsFromUser, (err: unknown) => {
          log(`could not read settings for ${uri}: ${String(err)}`);
          return DEFAULT_IDE_SETTINGS;
        });
      settingsCache.set(uri, pending);
    }
    return pending;
  }

  /**
   * The report of the document's current version.
   * - `slice` (diagnostics passes): analyse within DIAGNOSTIC_SLICE_MS, continuing an
   *   incomplete report (the matrix cache keeps everything already finished).
   * - `interactive` (hovers, lenses, actions): the latest report of this version, even an
   *   incomplete one, provided it covers the matrix at `focus`; otherwise a new report within
   *   REQUEST_SLICE_MS that analyses that matrix first.
   * - `command` (the custom requests a user runs: report, discretize, C code): the latest
   *   complete report, or one with the document's whole time budget, in steps.
   * `stepped` (an interactive report for a command about one matrix): in steps, and the
   * matrix is analysed whatever its size (hovers leave large spectra to the passes).
   */
  async function reportFor(
    doc: TextDocument,
    token: CancellationToken | undefined,
    pass: 'slice' | 'interactive' | 'command',
    opts: { deferChecks?: boolean; focus?: number; continuation?: boolean; stepped?: boolean } = {},
  ): Promise<ReportAnswer | null> {
    if (pass !== 'slice') used(doc.uri);
    await ready;
    const language = languageOf(doc);
    if (!language) return null;
    const settings = await settingsFor(doc.uri);
    const current = documents.get(doc.uri);
    if (!current || current.version !== doc.version || token?.isCancellationRequested) return null;
    // A large document not yet read whole: requests answer from its opening pass, commands wait for the reading.
    if (mustRead(doc, language, settings)) {
      if (pass === 'interactive') return openingAnswer(doc, language, settings, opts.focus);
      if (!(await readAll(doc, language, settings, token))) return null;
    }
    const cached = reports.get(doc.uri);
    if (cached && cached.version === doc.version && cached.settings === settings) {
      const r = cached.report;
      if (!r.incomplete) return { report: r, settings };
      if (pass === 'interactive' && (opts.focus === undefined || coversFocus(r, opts.focus))) return { report: r, settings };
    }
    // An interactive request over an unfinished report only needs its focus: the passes finish the rest.
    const unfinishedHere = cached !== undefined && cached.version === doc.version && cached.settings === settings;
    const sliceMs = opts.continuation && doc.getText().length >= OPENING_MIN_CHARS ? CONTINUATION_SLICE_MS : DIAGNOSTIC_SLICE_MS;
    const budget = pass === 'slice' ? sliceMs : pass === 'interactive' ? (unfinishedHere ? 0 : REQUEST_SLICE_MS) : Number.POSITIVE_INFINITY;
    const analysis = { ...settings.analysis, timeBudgetMs: Math.min(settings.analysis.timeBudgetMs, budget) };
    const focusOnly = pass === 'interactive' && opts.focus !== undefined && doc.getText().length >= OPENING_MIN_CHARS;
    const epoch = configurationEpoch;
    const steps = analyzeDocumentSteps(
      doc.getText(),
      language,
      analysis,
      {
        cache: matrixCache,
        isCancelled: () => token?.isCancellationRequested === true,
        deferChecks: opts.deferChecks,
        focus: opts.focus,
        // A request about one place in a large document: that matrix and its model only, not
        // a pass over thousands of matrices (that is the diagnostics passes' work).
        focusOnly,
        // A request's answer never waits for a large matrix's spectrum: the stepped passes compute it.
        deferLargeSpectra: pass === 'interactive' && opts.stepped !== true,
        // Passes over the same version take over what earlier ones settled.
        previous: cached && cached.version === doc.version ? cached.report : undefined,
      },
      // A diagnostics pass or a command gives the event loop back every PASS_STEP_MS of work
      // (requests meanwhile answer from the latest report); requests run in one go.
      pass === 'interactive' && opts.stepped !== true ? 0 : PASS_STEP_MS,
    );
    // Edited, closed or reconfigured meanwhile: this pass is stale, a newer one is scheduled.
    const report = await stepThrough(steps, doc, () => epoch === configurationEpoch && token?.isCancellationRequested !== true);
    if (!report || token?.isCancellationRequested) return null;
    if (report.partial) return { report, settings, partial: true };
    reports.set(doc.uri, { version: doc.version, settings, report });
    // The document is read: its opening report (which only answered while it was being read) can go.
    openings.delete(doc.uri);
    return { report, settings };
  }

  /**
   * Runs a pass in steps, answering waiting requests between them; null when the document
   * changed or closed meanwhile, or `current` says the pass is stale.
   */
  async function stepThrough(steps: Generator<void, DocumentReport, void>, doc: TextDocument, current: () => boolean = () => true): Promise<DocumentReport | null> {
    let step = steps.next();
    while (!step.done) {
      await yieldToRequests();
      const now = documents.get(doc.uri);
      if (!now || now.version !== doc.version || !current()) return null;
      step = steps.next();
    }
    return step.value;
  }

  /** Reading the document would be a full parse of a large text, which is done in slices (see READ_SLICE_MS). */
  function mustRead(doc: TextDocument, language: SourceLanguage, settings: IdeSettings): boolean {
    const text = doc.getText();
    return text.length <= settings.analysis.maxFileChars && needsSlicedExtraction(text, language, { stateMatrixNames: settings.analysis.stateMatrixNames });
  }

  /** One slice of reading the document; true when it is read (or needs no slices). */
  function readSlice(doc: TextDocument, language: SourceLanguage, settings: IdeSettings): boolean {
    const text = doc.getText();
    if (text.length > settings.analysis.maxFileChars) return true;
    const progress = extractSlice(text, language, { stateMatrixNames: settings.analysis.stateMatrixNames }, READ_SLICE_MS, doc.uri);
    readingProgress.set(doc.uri, progress);
    return progress.done;
  }

  /** Reads the document in slices, letting other work run between them; false when it changed or the request was cancelled. */
  async function readAll(doc: TextDocument, language: SourceLanguage, settings: IdeSettings, token?: CancellationToken): Promise<boolean> {
    for (;;) {
      const latest = documents.get(doc.uri);
      if (!latest || latest.version !== doc.version || token?.isCancellationRequested) return false;
      if (readSlice(doc, language, settings)) return true;
      if (readingProgress.get(doc.uri)?.phase === 'waiting') await new Promise<void>((resolve) => setTimeout(resolve, WAITING_READ_MS));
      await yieldToRequests();
    }
  }

  /**
   * The answer for a request while the document is being read: the opening report, with the
   * matrix at `focus` analysed if it lies in the settled part; an empty report before any.
   */
  function openingAnswer(doc: TextDocument, language: SourceLanguage, settings: IdeSettings, focus: number | undefined): ReportAnswer {
    const reading = readingProgress.get(doc.uri) ?? { phase: 'parsing', fraction: 0 };
    const o = openings.get(doc.uri);
    if (!o || o.version !== doc.version || o.settings !== settings) {
      return { report: { language, matrices: [], models: [], findings: [] }, settings, readingUpTo: 0, reading };
    }
    if (focus !== undefined && focus < o.settledEnd && !coversFocus(o.report, focus)) {
      o.report = analyzeDocument(o.prefix, language, { ...settings.analysis, timeBudgetMs: 0 }, { cache: matrixCache, focus });
    }
    return { report: o.report, settings, readingUpTo: o.settledEnd, reading };
  }

  /**
   * A report in which the matrix with this index is analysed: 'interactive' with that matrix
   * as focus when the latest report of the version knows where it is (a large document still
   * being analysed answers at once), else a whole report ('command'; also when no index).
   */
  async function reportForMatrix(doc: TextDocument, matrixIndex: number | undefined) {
    const cached = reports.get(doc.uri);
    const known = matrixIndex === undefined || !cached || cached.version !== doc.version ? undefined : cached.report.matrices.find((m) => m.index === matrixIndex);
    // Commands: the matrix is analysed whatever its size, in steps (other requests answer meanwhile).
    return known ? reportFor(doc, undefined, 'interactive', { focus: known.statementSpan.start, stepped: true }) : reportFor(doc, undefined, 'command');
  }

  /** The report has analysed the state matrix whose statement contains `offset` (or there is none). */
  function coversFocus(report: DocumentReport, offset: number): boolean {
    const m = report.matrices.find((x) => x.statementSpan.start <= offset && offset <= x.statementSpan.end);
    return !m || !m.skipped.some((s) => s.startsWith(NOT_YET_PREFIX)) && (m.role !== 'state' || reportHasSpectrum(m) || m.skipped.length > 0);
  }

  /** When each open document was last opened, edited or asked about (a counter, not a time). */
  const lastUsed = new Map<string, number>();
  let useCount = 0;
  /** A document was opened, changed or closed since releaseUnused last trimmed the caches. */
  let versionsChanged = false;
  /** Open documents whose analysis was released (see releaseUnused); their diagnostics stay as published. */
  const released = new Set<string>();

  /** The document is in use; one whose analysis was released is analysed again, as after an open. */
  function used(uri: string): void {
    lastUsed.set(uri, ++useCount);
    if (released.delete(uri)) {
      // Its lenses say "analysing…" until the passes are done, then the client is asked to refresh them.
      unfinished.add(uri);
      continuing.add(uri);
      scheduleDiagnostics(uri, 0);
    }
  }

  /**
   * With every document analysed, keeps the analyses of the `documentsKept` most recently used
   * open documents and frees the others': their reports, syntax trees, extractions, and the
   * cached matrix analyses and closed forms no kept document uses. Ten open 5,000-line files
   * otherwise hold about 90 MB of analyses. A released document keeps its published
   * diagnostics, and is analysed again when it is next edited or asked about.
   */
  async function releaseUnused(): Promise<void> {
    if (timers.size > 0 || unfinished.size > 0) return;
    const open = documents.all();
    const keep = Math.min(...(await Promise.all(open.map((d) => settingsFor(d.uri)))).map((s) => s.documentsKept), Number.POSITIVE_INFINITY);
    if (timers.size > 0 || unfinished.size > 0) return;
    const byUse = [...open].sort((a, b) => (lastUsed.get(b.uri) ?? 0) - (lastUsed.get(a.uri) ?? 0));
    const newlyReleased = open.length <= keep ? [] : byUse.slice(keep).filter((d) => !released.has(d.uri) && reports.has(d.uri));
    // Also after edits: what only earlier versions used (their extractions and the analyses of
    // matrices since changed) goes, as a 10,000-matrix file otherwise holds two versions' worth.
    if (newlyReleased.length === 0 && !versionsChanged) return;
    versionsChanged = false;
    for (const d of newlyReleased) {
      released.add(d.uri);
      reports.delete(d.uri);
      openings.delete(d.uri);
      readingProgress.delete(d.uri);
      abandonExtractions(d.uri);
    }
    const hashes = new Set<string>();
    const texts: string[] = [];
    for (const d of open) {
      if (released.has(d.uri)) continue;
      texts.push(d.getText());
      for (const m of reports.get(d.uri)?.report.matrices ?? []) hashes.add(m.hash);
    }
    matrixCache.retain(hashes);
    // Statements known to be inert are kept unless a document was released: the next edit of a
    // kept document skips them (reading 10,000 statements again took 400 ms).
    retainExtractionsOf(texts, { forgetInert: newlyReleased.length > 0 });
    if (TRACE) process.stderr.write(`released the analyses of ${newlyReleased.length} documents; kept ${texts.length}\n`);
  }

  /** Documents whose opening pass ran (or was not needed). */
  const opened = new Set<string>();
  /** Documents whose next pass continues an unfinished one (rather than following an edit). */
  const continuing = new Set<string>();
  /** Documents whose last published pass was incomplete. */
  const unfinished = new Set<string>();
  /** When diagnostics were last sent for each document. */
  const lastPublished = new Map<string, number>();
  /** EIGENLENS_TRACE: when each document last changed. */
  const changedAt = new Map<string, number>();

  /**
   * The first pass over a large document reads only its first lines and publishes what they
   * settle (ide/opening.ts); true when it published, so that full passes follow.
   */
  async function publishOpening(doc: TextDocument): Promise<boolean> {
    opened.add(doc.uri);
    const text = doc.getText();
    const cut = openingCut(text);
    if (cut === null) return false;
    const T0 = performance.now();
    await ready;
    const T1 = performance.now();
    const language = languageOf(doc);
    if (!language) return false;
    const settings = await settingsFor(doc.uri);
    const latest = documents.get(doc.uri);
    if (!latest || latest.version !== doc.version || text.length > settings.analysis.maxFileChars) return false;
    const prefix = text.slice(0, cut);
    const budget = Math.min(settings.analysis.timeBudgetMs, OPENING_SLICE_MS);
    // In steps like every pass: on a cold process the opening lines took 170 ms in one block.
    const steps = analyzeDocumentSteps(prefix, language, { ...settings.analysis, timeBudgetMs: budget }, { cache: matrixCache }, PASS_STEP_MS);
    const report = await stepThrough(steps, doc);
    // Changed or closed meanwhile: the full passes (scheduled by the caller) take the newer text.
    if (!report) return true;
    openings.set(doc.uri, { version: doc.version, settings, report, prefix, settledEnd: settledEnd(report) });
    const T2 = performance.now();
    const diagnostics = capDiagnostics(openingDiagnostics(report, prefix, doc.lineCount), settings.maxDiagnostics).map((d) => toDiagnostic(doc, d));
    await connection.sendDiagnostics({ uri: doc.uri, version: doc.version, diagnostics });
    if (TRACE) process.stderr.write(`@${performance.now().toFixed(0)} opening ${doc.uri}: parsers ready after ${(T1 - T0).toFixed(1)} ms, ${cut} characters analysed in ${(T2 - T1).toFixed(1)} ms, ${diagnostics.length} diagnostics sent\n`);
    return true;
  }

  async function publishDiagnostics(uri: string): Promise<void> {
    const doc = documents.get(uri);
    if (!doc) return;
    if (!opened.has(uri) && !reports.has(uri) && (await publishOpening(doc))) {
      continuing.add(uri);
      scheduleDiagnostics(uri, 0);
      return;
    }
    // Every pass is a short slice, so that something shows quickly and requests (which use the
    // latest report) never wait long behind a pass; extraction is incremental, so a pass's fixed
    // cost is small.
    // In a large document, the first pass after an edit leaves the closed-form check of the
    // edited matrix to the next pass, so that its verdict goes out first; continuation passes
    // do everything. (Small documents check at once: nothing to gain, and a check finding
    // would flicker off and on while its matrix is edited.)
    // A large document read for the first time: a slice of parsing and reading, then the next pass.
    const language = languageOf(doc);
    if (language) {
      await ready;
      const settings = await settingsFor(uri);
      const latest = documents.get(uri);
      if (!latest || latest.version !== doc.version) return;
      const R0 = performance.now();
      if (!readSlice(doc, language, settings)) {
        unfinished.add(uri);
        const p = readingProgress.get(uri);
        if (TRACE) process.stderr.write(`@${performance.now().toFixed(0)} read ${uri} v${doc.version}: ${(performance.now() - R0).toFixed(1)} ms, ${p?.phase} ${Math.round((p?.fraction ?? 0) * 100)} %\n`);
        scheduleDiagnostics(uri, p?.phase === 'waiting' ? WAITING_READ_MS : 0);
        return;
      }
    }
    const continuation = continuing.delete(uri);
    const T0 = performance.now();
    const large = doc.getText().length >= OPENING_MIN_CHARS;
    const result = await reportFor(doc, undefined, 'slice', { deferChecks: !continuation && large, continuation });
    const T1 = performance.now();
    const latest = documents.get(uri);
    // A newer version arrived while we waited: its own debounce will publish.
    if (!result || !latest || latest.version !== doc.version) return;
    // An unfinished continuation of a large document publishes only now and then (see CONTINUATION_PUBLISH_MS).
    if (continuation && large && result.report.incomplete && performance.now() - (lastPublished.get(uri) ?? 0) < CONTINUATION_PUBLISH_MS) {
      continuing.add(uri);
      unfinished.add(uri);
      scheduleDiagnostics(uri, 0);
      return;
    }
    lastPublished.set(uri, performance.now());
    const diagnostics: Diagnostic[] = capDiagnostics(diagnosticsOf(result.report), result.settings.maxDiagnostics).map((d) => toDiagnostic(doc, d));
    const T2 = performance.now();
    await connection.sendDiagnostics({ uri, version: doc.version, diagnostics });
    // EIGENLENS_TRACE=1: one line per diagnostics pass on stderr (for profiling; see DEVELOPERS.md).
    if (TRACE) process.stderr.write(`@${performance.now().toFixed(0)} pass ${uri} v${doc.version}${continuation ? ' (continued)' : ''}: ${changedAt.has(uri) ? `${(performance.now() - changedAt.get(uri)!).toFixed(1)} ms after the change, ` : ''}report ${(T1 - T0).toFixed(1)} ms, convert ${(T2 - T1).toFixed(1)} ms, send ${(performance.now() - T2).toFixed(1)} ms, ${diagnostics.length} diagnostics${result.report.incomplete ? ', more to do' : ''}\n`);
    // Big documents are analysed in slices: publish what is known, then continue (the matrix
    // cache keeps every finished matrix, so each pass gets further) until the report is complete.
    if (result.report.incomplete) {
      continuing.add(uri);
      unfinished.add(uri);
      scheduleDiagnostics(uri, 0);
    } else {
      // Lenses asked for while the document was being analysed said "analysing…": ask again.
      if (unfinished.delete(uri) && canRefreshLenses) connection.sendRequest('workspace/codeLens/refresh').catch(() => undefined);
      if (timers.size === 0) {
        await releaseUnused();
        idle.touch();
      }
    }
  }

  function scheduleDiagnostics(uri: string, delay = DIAGNOSTIC_DEBOUNCE_MS): void {
    idle.cancel();
    const previous = timers.get(uri);
    if (previous) clearTimeout(previous);
    timers.set(
      uri,
      setTimeout(() => {
        timers.delete(uri);
        void guarded('diagnostics', undefined, async (u: string) => {
          await yieldToRequests();
          // A newer schedule (an edit while yielding) replaces this pass.
          if (!timers.has(u)) await publishDiagnostics(u);
        })(uri);
      }, delay),
    );
  }

  connection.onInitialize((params) => {
    const workspace = params.capabilities.workspace;
    canPullConfiguration = workspace?.configuration === true;
    canRegisterConfigurationChange = workspace?.didChangeConfiguration?.dynamicRegistration === true;
    canResolveActionEdits = params.capabilities.textDocument?.codeAction?.resolveSupport?.properties?.includes('edit') === true;
    canRefreshLenses = workspace?.codeLens?.refreshSupport === true;
    ready = initAnalysis().catch((err: unknown) => log(`the source parsers did not load: ${String(err)}`));
    return {
      capabilities: {
        textDocumentSync: { openClose: true, change: TextDocumentSyncKind.Incremental },
        hoverProvider: true,
        codeLensProvider: { resolveProvider: true },
        codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix, CodeActionKind.RefactorRewrite, ACTION_KINDS.source], resolveProvider: true },
        executeCommandProvider: { commands: [...SERVER_COMMANDS] },
      },
      serverInfo: { name: 'eigenlens' },
    };
  });

  connection.onInitialized(() => {
    if (canRegisterConfigurationChange) {
      void connection.client.register(DidChangeConfigurationNotification.type, { section: SETTINGS_SECTION }).catch(() => undefined);
    }
  });

  connection.onDidChangeConfiguration(
    guarded('configuration', undefined, (change) => {
      configurationEpoch++;
      settingsCache.clear();
      reports.clear();
      openings.clear();
      const pushed = (change.settings as Record<string, unknown> | null | undefined)?.[SETTINGS_SECTION];
      pushedSettings = pushed !== undefined ? settingsFromUser(pushed) : DEFAULT_IDE_SETTINGS;
      for (const doc of documents.all()) scheduleDiagnostics(doc.uri, 0);
      connection.sendRequest('workspace/codeLens/refresh').catch(() => undefined);
    }),
  );

  // TextDocuments fires onDidChangeContent right after onDidOpen; that first change must not
  // replace the immediate pass of the open with a debounced one.
  const justOpened = new Set<string>();
  documents.onDidOpen((e) => {
    lastUsed.set(e.document.uri, ++useCount);
    justOpened.add(e.document.uri);
    scheduleDiagnostics(e.document.uri, 0);
  });
  documents.onDidChangeContent((e) => {
    if (TRACE) changedAt.set(e.document.uri, performance.now());
    versionsChanged = true;
    if (justOpened.delete(e.document.uri)) return;
    lastUsed.set(e.document.uri, ++useCount);
    released.delete(e.document.uri);
    scheduleDiagnostics(e.document.uri);
  });
  documents.onDidClose(
    guarded('close', undefined, (e) => {
      versionsChanged = true;
      const timer = timers.get(e.document.uri);
      if (timer) clearTimeout(timer);
      timers.delete(e.document.uri);
      reports.delete(e.document.uri);
      openings.delete(e.document.uri);
      readingProgress.delete(e.document.uri);
      lastPublished.delete(e.document.uri);
      lastUsed.delete(e.document.uri);
      released.delete(e.document.uri);
      abandonExtractions(e.document.uri);
      justOpened.delete(e.document.uri);
      opened.delete(e.document.uri);
      continuing.delete(e.document.uri);
      unfinished.delete(e.document.uri);
      if (timers.size === 0) idle.touch();
      settingsCache.delete(e.document.uri);
      const lensKey = lensKeys.get(e.document.uri);
      lensKeys.delete(e.document.uri);
      if (lensKey !== undefined) lensUris.delete(lensKey);
      void connection.sendDiagnostics({ uri: e.document.uri, diagnostics: [] });
    }),
  );

  connection.onHover(
    guarded('hover', null, async (params, token) => {
      const doc = documents.get(params.textDocument.uri);
      if (!doc) return null;
      const offset = doc.offsetAt(params.position);
      const result = await reportFor(doc, token, 'interactive', { focus: offset });
      if (!result) return null;
      if (result.readingUpTo !== undefined && offset >= result.readingUpTo) {
        return { contents: { kind: 'markdown', value: readingHoverMarkdown(result.reading ?? { phase: 'parsing', fraction: 0 }, doc.lineCount) } };
      }
      const hover = hoverAt(result.report, doc.getText(), offset, result.settings.analysis);
      if (hover && result.readingUpTo !== undefined) hover.markdown += READING_HOVER_NOTE;
      return hover ? toHover(doc, hover) : null;
    }),
  );

  /**
   * The lenses of a large document that has no report of its version yet (just edited, or just
   * read), when it has so many state matrices that its lenses are unresolved anyway: from the
   * extraction alone, rather than a pass over every matrix. Null when the usual way applies.
   */
  async function lensesBeforeReport(doc: TextDocument): Promise<PlainLens[] | null> {
    if (doc.getText().length < OPENING_MIN_CHARS || reports.get(doc.uri)?.version === doc.version) return null;
    used(doc.uri);
    await ready;
    const language = languageOf(doc);
    if (!language) return null;
    const settings = await settingsFor(doc.uri);
    const current = documents.get(doc.uri);
    if (!current || current.version !== doc.version || mustRead(doc, language, settings)) return null;
    if (!settings.codeLensEnabled) return [];
    const states = stateMatrixOutline(doc.getText(), language, settings.analysis);
    return states.length > COMPACT_LENSES_ABOVE ? states.map((s) => unresolvedLens(s.index, s.span)) : null;
  }

  /** Small numbers standing for document URIs in unresolved lenses (see LensData). */
  const lensKeys = new Map<string, number>();
  const lensUris = new Map<number, string>();
  // Never reused: a lens of a closed document cannot resolve against another one.
  let nextLensKey = 1;
  const lensKeyOf = (uri: string): number => {
    let key = lensKeys.get(uri);
    if (key === undefined) {
      key = nextLensKey++;
      lensKeys.set(uri, key);
      lensUris.set(key, uri);
    }
    return key;
  };
  /**
   * The LSP lenses last sent for a report whose lenses are all unresolved (more than
   * COMPACT_LENSES_ABOVE state matrices): they depend only on the report's spans and the
   * document version, so repeated codeLens requests over the same report send them again
   * rather than build 10,000 of them each time.
   */
  const unresolvedLensCache = new WeakMap<DocumentReport, { version: number; upTo: number | undefined; lenses: CodeLens[] }>();

  connection.onCodeLens(
    guarded('codeLens', [], async (params, token) => {
      const doc = documents.get(params.textDocument.uri);
      if (!doc) return [];
      const key = lensKeyOf(doc.uri);
      const outline = await lensesBeforeReport(doc);
      if (outline) return outline.map((lens) => toLens(doc, lens, key));
      const result = await reportFor(doc, token, 'interactive');
      if (!result || !result.settings.codeLensEnabled) return [];
      const upTo = result.readingUpTo;
      const known = unresolvedLensCache.get(result.report);
      if (known && known.version === doc.version && known.upTo === upTo) return known.lenses;
      const plain = lensesOf(result.report, result.settings.analysis.precision).filter((lens) => upTo === undefined || lens.span.end <= upTo);
      const lenses = plain.map((lens) => toLens(doc, lens, key));
      if (plain.length > COMPACT_LENSES_ABOVE && plain.every((lens) => lens.unresolved)) unresolvedLensCache.set(result.report, { version: doc.version, upTo, lenses });
      return lenses;
    }),
  );

  connection.onCodeLensResolve(
    guarded('codeLensResolve', null as unknown as CodeLens, async (lens: CodeLens) => {
      const data = lensData(lens.data);
      const uri = data ? lensUris.get(data.key) : undefined;
      const doc = uri !== undefined ? documents.get(uri) : undefined;
      if (!doc || !data) return lens;
      const result = await reportFor(doc, undefined, 'interactive', { focus: doc.offsetAt(lens.range.start) });
      const plain = result ? verdictLens(result.report, data.matrixIndex, result.settings.analysis.precision) : null;
      if (plain) return { ...toLens(doc, plain, data.key), range: lens.range };
      return { ...lens, command: { title: result?.readingUpTo !== undefined ? 'eigenlens: reading…' : 'eigenlens: the document changed', command: '' } };
    }),
  );

  /** Where a deferred code action came from, so that codeAction/resolve can build it again. */
  interface DeferredAction {
    uri: string;
    version: number;
    range: Range;
    only: string[];
    diagnosticCodes: string[];
    title: string;
  }

  async function plainActions(doc: TextDocument, range: Range, only: string[], diagnosticCodes: string[], token?: CancellationToken) {
    const result = await reportFor(doc, token, 'interactive', { focus: doc.offsetAt(range.start) });
    const language = languageOf(doc);
    if (!result || !language) return null;
    // While the document is being read: actions on the settled part only, and none over the whole file.
    if (result.readingUpTo !== undefined && doc.offsetAt(range.start) >= result.readingUpTo) return [];
    // Nor from a report of the matrices at the cursor only: the whole-file actions wait for the passes.
    if (result.readingUpTo !== undefined || result.partial) {
      only = only.length > 0 ? only : ['quickfix', 'refactor'];
      if (only.some((o) => o === 'source' || o.startsWith('source.'))) return [];
    }
    const actions = codeActionsAt(result.report, doc.getText(), language, {
      span: toSpan(doc, range),
      diagnosticCodes,
      only,
      codePrecision: result.settings.codePrecision,
    });
    return actions;
  }

  connection.onCodeAction(
    guarded('codeAction', [], async (params, token) => {
      const doc = documents.get(params.textDocument.uri);
      if (!doc) return [];
      const ours = params.context.diagnostics.filter((d) => d.source === 'eigenlens' && typeof d.code === 'string');
      const only = params.context.only ?? [];
      const codes = ours.map((d) => d.code as string);
      const actions = await plainActions(doc, params.range, only, codes, token);
      if (!actions) return [];
      // Actions that write closed forms are built only when chosen, where the client allows it.
      // A client that cannot defer them builds every closed form of the file for the "every
      // matrix" source action, so it gets that one only when it asks for source actions.
      const eager = !canResolveActionEdits;
      const wantsSource = only.some((o) => o === 'source' || o.startsWith('source.'));
      return actions.filter((a) => !(eager && a.kind === 'source' && !wantsSource)).map((a) => {
        const data: DeferredAction | undefined = canResolveActionEdits ? { uri: doc.uri, version: doc.version, range: params.range, only, diagnosticCodes: codes, title: a.title } : undefined;
        return toCodeAction(doc, a, ours, data);
      });
    }),
  );

  connection.onCodeActionResolve(
    guarded('codeActionResolve', null as unknown as CodeAction, async (action: CodeAction) => {
      const data = action.data as Partial<DeferredAction> | undefined;
      const doc = typeof data?.uri === 'string' ? documents.get(data.uri) : undefined;
      if (!doc || !data || data.version !== doc.version || !data.range) return action;
      const actions = await plainActions(doc, data.range, data.only ?? [], data.diagnosticCodes ?? []);
      const found = actions?.find((a) => a.title === data.title);
      if (!found) return action;
      const resolved = toCodeAction(doc, found, action.diagnostics ?? []);
      return { ...action, edit: resolved.edit };
    }),
  );

  connection.onRequest(
    StatsRequestMethod,
    guarded('stats', null as StatsRequestResult | null, (params?: { collectGarbage?: boolean }): StatsRequestResult => {
      // Only when node runs with --expose-gc (benchmarks): the live size rather than the heap's high-water mark.
      const gc = (globalThis as { gc?: () => void }).gc;
      if (params?.collectGarbage && gc) gc();
      const m = process.memoryUsage();
      const mb = (x: number) => Math.round((x / 2 ** 20) * 10) / 10;
      return {
        memoryMB: { rss: mb(m.rss), heapUsed: mb(m.heapUsed), heapTotal: mb(m.heapTotal), external: mb(m.external) },
        heapSpacesMB: Object.fromEntries(getHeapSpaceStatistics().map((x) => [x.space_name, mb(x.physical_space_size)])),
        documents: documents.all().length,
        released: released.size,
        matrixCache: { size: matrixCache.size, hits: matrixCache.hits, misses: matrixCache.misses },
        closedForms: { held: matrixCache.closedForms.size, terms: matrixCache.closedForms.heldTerms, builds: matrixCache.closedForms.builds },
        details: detailStats(),
        idleCollections: idle.collections,
        idleCollectionsSkipped: idle.skipped,
      };
    }),
  );

  connection.onRequest(
    TransitionTextRequestMethod,
    guarded('transitionText', { text: null, error: 'The request failed; see the server log.' } as TransitionTextRequestResult, async (params: TransitionTextRequestParams): Promise<TransitionTextRequestResult> => {
      const doc = typeof params?.uri === 'string' ? documents.get(params.uri) : undefined;
      if (!doc) return { text: null, error: 'That document is not open.' };
      const result = await reportForMatrix(doc, params.matrixIndex);
      const matrix = result?.report.matrices.find((m) => m.index === params.matrixIndex && m.role === 'state');
      const transition = matrix?.transition;
      if (!result || !matrix || !transition) return { text: null, error: 'No closed-form transition matrix for that matrix.' };
      const text = `${transitionTitle(matrix.name ?? 'A', transition.variable)}\n${transitionText(transition, result.settings.analysis.precision)}\n`;
      return { text: asciiMinus(text), error: null };
    }),
  );

  connection.onExecuteCommand(
    guarded('executeCommand', null, async (params) => {
      if (params.command !== Commands.serverSwitchDomain) return null;
      const [uri, matrixIndex, domain] = (params.arguments ?? []) as [unknown, unknown, unknown];
      if (typeof uri !== 'string' || typeof matrixIndex !== 'number') throw new Error(`${params.command} needs [uri, matrixIndex, domain?]`);
      const doc = documents.get(uri);
      const language = doc ? languageOf(doc) : null;
      if (!doc || !language) return null;
      const result = await reportForMatrix(doc, matrixIndex);
      const matrix = result?.report.matrices.find((m) => m.index === matrixIndex);
      if (!matrix) return null;
      const target = domain === 'continuous' || domain === 'discrete' ? domain : matrix.domain === 'continuous' ? 'discrete' : 'continuous';
      const edit = domainEdit(doc.getText(), language, matrix, target);
      if (!edit) return null;
      const applied = await connection.workspace.applyEdit({ label: `eigenlens: read as ${target}-time`, edit: toWorkspaceEdit(doc, [edit]) });
      return applied.applied;
    }),
  );

  connection.onRequest(
    ReportRequestMethod,
    guarded('report', null as ReportRequestResult | null, async (params: ReportRequestParams) => {
      const doc = documents.get(params.uri);
      if (!doc) return null;
      const result = await reportForMatrix(doc, params.matrixIndex);
      if (!result) return null;
      const name = decodeURIComponent(params.uri.split('/').pop() ?? params.uri);
      return reportMarkdown(result.report, name, params.matrixIndex, result.settings.analysis.precision);
    }),
  );

  /** A method name from a request, the setting's method, or zero-order hold. */
  function methodOf(raw: unknown, settings: IdeSettings): DiscretizationMethod {
    if (raw === undefined || raw === null) return settings.analysis.discretizeMethod ?? 'zoh';
    if (typeof raw === 'string' && (CODE_METHODS as readonly string[]).includes(raw)) return raw as DiscretizationMethod;
    throw new ResponseError(ErrorCodes.InvalidParams, `Unknown discretization method ${JSON.stringify(raw)}; use one of ${CODE_METHODS.join(', ')}.`);
  }

  /** Resolves the document and continuous state matrix of a request, or throws InvalidParams. */
  async function stateMatrixOf(uri: unknown, matrixIndex: unknown) {
    if (typeof uri !== 'string' || typeof matrixIndex !== 'number') throw new ResponseError(ErrorCodes.InvalidParams, 'The request needs { uri, matrixIndex }.');
    const doc = documents.get(uri);
    const language = doc ? languageOf(doc) : null;
    if (!doc || !language) return null;
    const result = await reportForMatrix(doc, matrixIndex);
    const matrix = result?.report.matrices.find((m) => m.index === matrixIndex && m.role === 'state');
    if (!result || !matrix) return null;
    return { doc, language, report: result.report, settings: result.settings, matrix };
  }

  /** Request errors we raise on purpose reach the client; anything else is logged and becomes null. */
  function passingErrors<P, R>(name: string, handler: (params: P) => Promise<R>): (params: P) => Promise<R | null> {
    return async (params: P) => {
      try {
        return await handler(params);
      } catch (err) {
        if (err instanceof ResponseError) throw err;
        log(`${name} failed: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`);
        return null;
      }
    };
  }

  connection.onRequest(
    DiscretizeRequestMethod,
    passingErrors('discretize', async (params: DiscretizeRequestParams): Promise<WorkspaceEdit | null> => {
      const period = params?.period;
      if (typeof period !== 'number' || !Number.isFinite(period) || period <= 0) {
        throw new ResponseError(ErrorCodes.InvalidParams, `The sample period must be a positive number of seconds (got ${JSON.stringify(period)}).`);
      }
      const target = await stateMatrixOf(params.uri, params.matrixIndex);
      if (!target) return null;
      const method = methodOf(params.method, target.settings);
      const insert = discreteInsertEdit(target.report, target.matrix, target.language, target.doc.getText(), { period, method, precision: target.settings.codePrecision });
      if (!('edit' in insert)) throw new ResponseError(ErrorCodes.InvalidParams, insert.error);
      return toWorkspaceEdit(target.doc, [insert.edit]);
    }),
  );

  connection.onRequest(
    CCodeRequestMethod,
    passingErrors('cCode', async (params: CCodeRequestParams): Promise<CCodeRequestResult> => {
      const target = await stateMatrixOf(params?.uri, params?.matrixIndex);
      if (!target) return { text: null, error: 'No state matrix with that index in this document.' };
      const period = params.period ?? target.matrix.period;
      if (period === null || period === undefined) return { text: null, error: 'No sample period: give one (pragma period=…, the model file or the defaultPeriod setting).' };
      const method = methodOf(params.method, target.settings);
      const type = params.type === 'float' ? 'float' : 'double';
      const code = discreteCodeFor(target.report, target.matrix, target.doc.getText(), { period, method, precision: target.settings.codePrecision });
      if (!code.ok) return { text: null, error: code.error };
      return { text: cInitializerText(code, target.settings.codePrecision, type), error: null };
    }),
  );

  documents.listen(connection);
  connection.listen();
}
