/**
 * One document in, one DocumentReport out: extract literals, group models, then analyse
 * each state matrix (spectrum, stability, modes, closed form, discretization) and turn
 * what was found into findings with our stable codes.
 *
 * Matrix analyses are cached by a content hash of everything that can change the result
 * (entries, domain, period, the settings that matter), so an edit elsewhere in the file
 * never recomputes an unchanged matrix.
 */
import { createHash } from 'node:crypto';
import { Rational } from '../engine/rational';
import type { Domain, Mode, Spectrum, Stability } from '../engine/types';
import { exactSpectrum } from '../engine/spectrumExact';
import { floatSpectrum } from '../engine/spectrumFloat';
import { eigenvalueSteps } from '../engine/eigenFloat';
import { stabilityOf } from '../engine/stability';
import { modesOf } from '../engine/modes';
import { ClosedFormSlot, ClosedFormStore } from './closedFormSlot';
import { DetailBox, type MatrixDetail } from './packedDetail';
import { extract, initParsers } from '../syntax/extract';
import { onLiteralMoved } from '../syntax/literalMemo';
import { groupModels } from '../model/group';
import type { ExtractedFile, MatrixLiteral, SourceLanguage, EntryValue, Span } from '../syntax/types';
import type { ModelGroup } from '../model/types';
import type { AnalysisSettings } from './settings';
import type { DiscreteModel, DocumentReport, Finding, MatrixReport, ModelReport } from './report';
import { discreteModelFor } from './discrete';
import { findingsForMatrix, NOT_YET_PREFIX } from './findings';
import { lineColumnAt } from './position';
import { groupedInteger } from './numberText';
import { analyseModel } from './modelAnalysis';

export { DEFAULT_SETTINGS } from './settings';
export { abandonExtractions, extractSlice, needsSlicedExtraction, retainExtractionsOf, type ExtractionProgress } from '../syntax/extract';

/** Largest |entry| analysed: leaves about 150 decades of headroom for products and exponentials. */
export const MAX_ENTRY_MAGNITUDE = 1e150;
/** The share of a pass's time budget spent analysing matrices; the rest is for their findings, checks and models. */
const LOOP_SHARE = 0.6;
/** The share of the budget by which the closed-form checks stop. */
const CHECK_SHARE = 0.85;
/** State matrices from this size on have their float eigenvalues computed in steps in a stepped pass (about 10 ms of work at n = 48). */
export const STEPPED_SPECTRUM_N = 48;
/**
 * From this size on a pass in one go with deferLargeSpectra leaves the spectrum to the stepped
 * passes (about 60 ms of work at n = 120, cold, and growing as n³); smaller ones it computes.
 */
export const DEFERRED_SPECTRUM_N = 120;

const BUDGET_SKIP = NOT_YET_PREFIX;

export async function initAnalysis(opts?: { wasmDir?: string }): Promise<void> {
  await initParsers(opts);
}

/** The part of a MatrixReport that depends only on the matrix content and its context. */
/**
 * One matrix analysis as the cache keeps it. The bulky part (spectrum, modes, stability
 * reasons, sampled model, the matrix itself) sits in a DetailBox, packed into a compact text
 * while nobody reads it (see packedDetail.ts); the rest is small and stays as it is.
 */
export class MatrixCore {
  stability: Stability | null = null;
  /** The closed form, built on first use (null over the size cap or without a spectrum). */
  closedForm: ClosedFormSlot | null = null;
  skipped: string[] = [];
  notes: string[] = [];
  /** The findings last built from this analysis, spans relative to the literal (see cachedFindings). */
  findingsMemo?: { key: string; findings: Finding[] };
  #box: DetailBox | null = null;

  /** Called once, when the analysis has its spectrum. */
  setDetail(detail: MatrixDetail): void {
    this.#box = new DetailBox(detail);
  }
  /** Whether there is a spectrum, without unpacking it. */
  get hasSpectrum(): boolean {
    return this.#box !== null;
  }
  get detail(): MatrixDetail | null {
    return this.#box?.get() ?? null;
  }
  get spectrum(): Spectrum | null {
    return this.#box?.get().spectrum ?? null;
  }
  get stabilityReasons(): string[] {
    return this.#box?.get().stabilityReasons ?? [];
  }
  get modes(): Mode[] {
    return this.#box?.get().modes ?? [];
  }
  get discrete(): DiscreteModel | null {
    return this.#box?.get().discrete ?? null;
  }
}

type ModelRole = 'state' | 'input' | 'output' | 'feedthrough' | 'noiseInput' | 'noiseCovariance';

/** A model analysis as cached: its findings are kept relative to the literal they sit on. */
interface ModelOutcome {
  report: ModelReport;
  findings: { role: ModelRole; start: number; end: number; finding: Finding }[];
}

/** A bounded cache of matrix analyses keyed by content hash (least recently used evicted). */
export class AnalysisCache {
  private readonly models = new Map<string, ModelOutcome>();
  getModel(key: string): ModelOutcome | undefined {
    const v = this.models.get(key);
    if (v) {
      this.models.delete(key);
      this.models.set(key, v);
    }
    return v;
  }
  setModel(key: string, v: ModelOutcome): void {
    this.models.set(key, v);
    if (this.models.size > this.capacity) this.models.delete(this.models.keys().next().value as string);
  }
  private readonly map = new Map<string, MatrixCore>();
  /** Full closed forms, bounded by their terms; matrix cores keep only the summaries. */
  readonly closedForms: ClosedFormStore;
  hits = 0;
  misses = 0;
  /**
   * Capacity: more analyses than the open documents of a heavy session hold (ten 300-matrix
   * files, or one file of 10,000 one-line matrices). A smaller cache than the open documents
   * need thrashes: every pass over one document evicts another's and recomputes it. The
   * analyses of open documents are referenced by their reports anyway, so this costs little.
   */
  constructor(
    private readonly capacity = 12_000,
    closedFormTerms?: number,
  ) {
    this.closedForms = new ClosedFormStore(closedFormTerms);
  }
  /** The analysis under this key, if any, without counting a hit or refreshing it. */
  peek(key: string): MatrixCore | undefined {
    return this.map.get(key);
  }
  get(key: string): MatrixCore | undefined {
    const v = this.map.get(key);
    if (v) {
      this.map.delete(key);
      this.map.set(key, v);
      this.hits++;
    }
    return v;
  }
  set(key: string, v: MatrixCore): void {
    this.misses++;
    this.map.set(key, v);
    if (this.map.size > this.capacity) this.map.delete(this.map.keys().next().value as string);
  }
  get size(): number {
    return this.map.size;
  }
  /**
   * Keeps only the analyses of these matrix hashes (with their model analyses and closed
   * forms): the matrices of the documents whose analysis is kept. The rest is dropped to free
   * memory; a matrix dropped here is analysed again when next needed.
   */
  retain(hashes: ReadonlySet<string>): void {
    for (const key of [...this.map.keys()]) if (!hashes.has(key)) this.map.delete(key);
    // Model keys start with the state matrix's hash (cachedModelAnalysis).
    for (const key of [...this.models.keys()]) if (!hashes.has(key.slice(0, key.indexOf('|')))) this.models.delete(key);
    this.closedForms.retain(hashes);
  }
}

export interface AnalyzeOptions {
  cache?: AnalysisCache;
  /** Called between matrices; return true to abandon the analysis (stale version). */
  isCancelled?: () => boolean;
  /**
   * Leave the closed-form checks of matrices not yet checked for a later pass (the report is
   * then incomplete, without a note): after an edit, the verdicts go out first and the check
   * of the edited matrix follows in the next pass.
   */
  deferChecks?: boolean;
  /**
   * An offset the user is looking at (a hover): the matrix whose statement contains it is
   * analysed and checked whatever the budget says.
   */
  focus?: number;
  /**
   * Report only the matrix at `focus` and the other matrices of its model (a request's answer
   * in a large document: it costs what those cost, not a pass over every matrix). The report
   * is marked `partial` and is not one a later pass can take over.
   */
  focusOnly?: boolean;
  /**
   * In a pass run in one go (step length 0): leave a state matrix whose float spectrum takes
   * long (DEFERRED_SPECTRUM_N and up) for a stepped pass, even at the focus, rather than hold
   * the thread for it (a request's answer then says a later pass analyses it).
   */
  deferLargeSpectra?: boolean;
  /**
   * The report of an earlier pass over the same text (a document analysed in slices, a hover
   * between passes): every matrix it settled is taken over as it stands instead of being built
   * again, so a pass costs what is new in it (see PassMemo). Ignored unless it was made from the
   * same extraction, settings and cache.
   */
  previous?: DocumentReport;
}

/**
 * What a pass leaves for the next pass over the same text. A model is settled once its state
 * matrix was analysed (not left for later by the budget): its analysis and the findings it
 * adds to its matrices are then final. A matrix report is settled when its own findings are
 * final too — a state matrix once its closed form, if any, was checked; a model's other
 * matrices (whose findings all come from the model) once the model is settled; any other
 * matrix at once. Settled reports and models are reused as they are in later passes of the
 * same extraction and settings; everything else is rebuilt, and a settled model adds its
 * findings only to the reports rebuilt, so each is added once.
 */
interface PassMemo {
  file: ExtractedFile;
  settingsKey: string;
  cache: AnalysisCache | undefined;
  grouping: ReturnType<typeof groupModels>;
  /** The model of each matrix index (from the grouping). */
  modelOf: Map<number, ModelGroup>;
  /** By matrix index: the settled report, else undefined. */
  settled: (MatrixReport | undefined)[];
  /** By state matrix index: the settled model's report and the findings it adds. */
  models: Map<number, { report: ModelReport; findings: ModelOutcome['findings'] }>;
  /**
   * By matrix index: the report of a state matrix the budget left for later, and how many of
   * its findings are its own (the rest came from its model in that pass). A later pass that
   * runs out of budget before it takes this report over instead of building it again, so a
   * pass over a document with thousands of matrices still to do costs what it analyses.
   */
  pending: ({ report: MatrixReport; own: number } | undefined)[];
}
const passMemos = new WeakMap<DocumentReport, PassMemo>();

/** Everything in the settings but the time budget (which only decides how far a pass gets). */
function passSettingsKey(s: AnalysisSettings): string {
  return JSON.stringify({ ...s, timeBudgetMs: 0 });
}

export function analyzeDocument(
  text: string,
  language: SourceLanguage,
  settings: AnalysisSettings,
  options: AnalyzeOptions = {},
): DocumentReport {
  const steps = analyzeDocumentSteps(text, language, settings, options, 0);
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
  }
}

/**
 * Own working time of a pass that may be suspended: the time budget counts only the time the
 * pass itself ran, not the time it was suspended while the server answered requests.
 */
class PassClock {
  private worked = 0;
  private since = performance.now();
  constructor(private readonly stepMs: number) {}
  /** Milliseconds of work so far. */
  get elapsed(): number {
    return this.worked + (performance.now() - this.since);
  }
  /** The current step has run its length (never, with a step length of 0). */
  get due(): boolean {
    return this.stepMs > 0 && performance.now() - this.since >= this.stepMs;
  }
  pause(): void {
    this.worked += performance.now() - this.since;
  }
  resume(): void {
    this.since = performance.now();
  }
}

/**
 * analyzeDocument in steps of about `stepMs` of work (0: one step): the generator yields
 * between matrices and models once a step has run that long, so that a caller can answer
 * requests in between and then resume it (or drop it, when the text changed). The report it
 * returns is the one analyzeDocument would; the time budget counts working time only.
 * While it is suspended nothing it built is visible: the earlier report stands until it ends.
 */
export function* analyzeDocumentSteps(
  text: string,
  language: SourceLanguage,
  settings: AnalysisSettings,
  options: AnalyzeOptions = {},
  stepMs = 0,
): Generator<void, DocumentReport, void> {
  const clock = new PassClock(stepMs);
  const findings: Finding[] = [];
  if (text.length > settings.maxFileChars) {
    findings.push({
      span: { start: 0, end: 0 },
      severity: 'information',
      code: 'file-too-large',
      message: `eigenlens skipped this file: ${groupedInteger(text.length)} characters is over the limit of ${groupedInteger(settings.maxFileChars)} (setting eigenlens.maxFileChars).`,
    });
    return { language, matrices: [], models: [], findings };
  }
  const file: ExtractedFile = extract(text, language, { stateMatrixNames: settings.stateMatrixNames });
  findings.push(...file.problems);
  const passKey = passSettingsKey(settings);
  const prior = options.previous ? passMemos.get(options.previous) : undefined;
  const reuse = prior && prior.file === file && prior.settingsKey === passKey && prior.cache === options.cache ? prior : null;
  const grouping = reuse ? reuse.grouping : groupingOf(file, settings);
  findings.push(...grouping.problems);

  const modelOf = reuse ? reuse.modelOf : new Map<number, ModelGroup>();
  if (!reuse) {
    for (const m of grouping.models) {
      for (const idx of [m.state, m.input, m.output, m.feedthrough, m.noiseInput, m.noiseCovariance]) {
        if (idx !== null && idx !== undefined) modelOf.set(idx, m);
      }
    }
  }

  // One budget for the whole document: the engine is synchronous and each matrix is bounded
  // by the size caps, so the check between matrices keeps a document within budget plus one matrix.
  // The matrices analysed still need their findings and model analyses after the loop (about a
  // third of a pass over many small models): the loop stops early enough to leave room for them.
  // In whole milliseconds of work, as the wall clock these replaced counted: a budget of 0 still
  // lets a pass analyse what it gets through before the millisecond turns over.
  const budgetFrom = Math.floor(clock.elapsed);
  const loopUntil = budgetFrom + settings.timeBudgetMs * LOOP_SHARE;
  const checkUntil = budgetFrom + settings.timeBudgetMs * CHECK_SHARE;
  const notYetNote = notYetMessage();
  let overBudget = 0;
  const only = options.focusOnly && options.focus !== undefined ? focusedMatrices(file, options.focus, modelOf) : null;
  const matrices: MatrixReport[] = [];
  const built: { report: MatrixReport; core: MatrixCore; lit: MatrixLiteral }[] = [];
  const pending: PassMemo['pending'] = new Array(file.matrices.length);
  for (let index = 0; index < file.matrices.length; index++) {
    if (clock.due) {
      clock.pause();
      yield;
      clock.resume();
    }
    if (options.isCancelled?.()) break;
    if (only && !only.has(index)) continue;
    const lit = file.matrices[index];
    if (lit.pragma?.ignore) continue;
    const kept = reuse?.settled[index];
    if (kept) {
      matrices.push(kept);
      continue;
    }
    const model = modelOf.get(index) ?? null;
    const focused = options.focus !== undefined && lit.statementSpan.start <= options.focus && options.focus <= lit.statementSpan.end;
    const lateByClock = !focused && Math.floor(clock.elapsed) > loopUntil;
    const toStep = (stepMs > 0 || options.deferLargeSpectra) && !lateByClock ? spectrumToStep(file, lit, index, model, settings, options.cache, stepMs > 0 ? STEPPED_SPECTRUM_N : DEFERRED_SPECTRUM_N) : null;
    const late = lateByClock || (toStep !== null && stepMs === 0);
    const waiting = late ? reuse?.pending[index] : undefined;
    // Still not reached, and the earlier report says so with this budget: take it over, without
    // the findings its model added in that pass (the model is analysed again below).
    if (waiting && waiting.report.skipped.length === 1 && waiting.report.skipped[0] === notYetNote && options.cache?.peek(waiting.report.hash) === undefined) {
      // A copy: the earlier report is still the one requests read (and another pass may take
      // it over too) while this pass is suspended.
      const own = waiting.report.findings.slice(0, waiting.own);
      const taken = reportWithFindings(waiting.report, own);
      matrices.push(taken);
      pending[index] = { report: taken, own: waiting.own };
      overBudget++;
      continue;
    }
    if (toStep && !late) {
      const steps = eigenvalueSteps(toStep);
      try {
        while (!steps.next().done) {
          if (clock.due) {
            clock.pause();
            yield;
            clock.resume();
          }
          if (options.isCancelled?.()) break;
        }
      } catch {
        // analyseStateMatrix meets the same failure and reports it.
      }
      if (options.isCancelled?.()) break;
    }
    const { report, core } = reportForMatrix(text, file, lit, index, model, settings, options.cache, late);
    // Only matrices actually left unanalysed count (cached ones are always filled in), so a pass
    // over a fully cached document is complete however long building the reports took.
    if (report.skipped.some((s) => s.startsWith(BUDGET_SKIP))) overBudget++;
    matrices.push(report);
    built.push({ report, core, lit });
  }
  // Verification: every closed form is built once and checked against an independent
  // numeric reference, after all verdicts (so that those come first); only the check's
  // summary stays with the matrix, the closed form itself goes to the bounded store.
  let unchecked = 0;
  let deferred = 0;
  for (const { core, lit } of built) {
    if (!core.closedForm || core.closedForm.settled) continue;
    if (clock.due) {
      clock.pause();
      yield;
      clock.resume();
    }
    const focused = options.focus !== undefined && lit.statementSpan.start <= options.focus && options.focus <= lit.statementSpan.end;
    if (focused) core.closedForm.get();
    else if (options.deferChecks) deferred++;
    else if (options.isCancelled?.() || Math.floor(clock.elapsed) > checkUntil) unchecked++;
    else core.closedForm.get();
  }
  for (let i = 0; i < built.length; i++) {
    if ((i & 255) === 255 && clock.due) {
      clock.pause();
      yield;
      clock.resume();
    }
    const { report, core, lit } = built[i];
    if (report.role === 'state') report.findings = cachedFindings(report, core, lit, settings);
  }
  for (const { report } of built) if (report.skipped.length === 1 && report.skipped[0] === notYetNote) pending[report.index] = { report, own: report.findings.length };
  if (overBudget > 0 || unchecked > 0) {
    const parts = [
      overBudget > 0 ? `${overBudget} matri${overBudget === 1 ? 'x was' : 'ces were'} not analysed` : '',
      unchecked > 0 ? `${unchecked} closed form${unchecked === 1 ? ' was' : 's were'} not yet checked` : '',
    ].filter(Boolean);
    findings.push({
      span: { start: 0, end: 0 },
      severity: 'information',
      code: 'analysis-limit',
      message: `The time budget of ${settings.timeBudgetMs} ms (setting eigenlens.timeBudgetMs) ran out: ${parts.join(' and ')} in this pass.`,
    });
  }

  const byIndex = new Map<number, MatrixReport>(matrices.map((m) => [m.index, m]));
  const models: ModelReport[] = [];
  const outcomes = new Map<number, ModelOutcome>();
  let cancelled = false;
  for (const m of grouping.models) {
    if (clock.due) {
      clock.pause();
      yield;
      clock.resume();
    }
    if (options.isCancelled?.()) {
      cancelled = true;
      break;
    }
    if (only && !only.has(m.state)) continue;
    const done = reuse?.models.get(m.state);
    if (done) {
      // Its findings go to the reports rebuilt in this pass (the settled ones have them).
      for (const { role, start, end, finding } of done.findings) {
        const idx = m[role] as number;
        const target = reuse!.settled[idx] ? null : byIndex.get(idx) ?? (reuse!.settled[m.state] ? null : byIndex.get(m.state));
        const lit = file.matrices[idx];
        if (target) target.findings.push({ ...finding, span: { start: lit.span.start + start, end: lit.span.start + end } });
      }
      models.push(done.report);
      continue;
    }
    const { report, outcome } = cachedModelAnalysis(file, m, byIndex, settings, options.cache);
    models.push(report);
    if (outcome) outcomes.set(m.state, outcome);
  }
  const result: DocumentReport = { language, matrices, models, findings, incomplete: overBudget > 0 || unchecked > 0 || deferred > 0 };
  if (only) {
    result.partial = true;
    return result;
  }
  if (!cancelled && matrices.length > 0) passMemos.set(result, settledParts(file, passKey, options.cache, grouping, modelOf, byIndex, built, models, outcomes, reuse, pending));
  return result;
}

/** Model grouping of an extraction, remembered per extraction object and default domain and period. */
const groupings = new WeakMap<ExtractedFile, { key: string; grouping: ReturnType<typeof groupModels> }>();
function groupingOf(file: ExtractedFile, settings: AnalysisSettings): ReturnType<typeof groupModels> {
  const key = `${settings.defaultDomain}|${settings.defaultPeriod}`;
  const known = groupings.get(file);
  if (known && known.key === key) return known.grouping;
  const grouping = groupModels(file, { defaultDomain: settings.defaultDomain, defaultPeriod: settings.defaultPeriod });
  groupings.set(file, { key, grouping });
  return grouping;
}

/**
 * Where the state matrices of a text are (index and the name's or literal's span), from its
 * extraction and model grouping alone, with no analysis: what unresolved lenses need.
 */
export function stateMatrixOutline(text: string, language: SourceLanguage, settings: AnalysisSettings): { index: number; span: Span }[] {
  if (text.length > settings.maxFileChars) return [];
  const file = extract(text, language, { stateMatrixNames: settings.stateMatrixNames });
  const grouping = groupingOf(file, settings);
  const states = new Set(grouping.models.map((m) => m.state));
  const out: { index: number; span: Span }[] = [];
  for (let index = 0; index < file.matrices.length; index++) {
    const lit = file.matrices[index];
    if (lit.pragma?.ignore || (lit.role !== 'state' && !states.has(index))) continue;
    out.push({ index, span: lit.nameSpan ?? lit.span });
  }
  return out;
}

/** Indices of the matrix whose statement contains `offset` and of the other matrices of its model. */
function focusedMatrices(file: ExtractedFile, offset: number, modelOf: Map<number, ModelGroup>): Set<number> {
  const only = new Set<number>();
  // The innermost statement, as a hover picks the innermost literal.
  let at = -1;
  for (let i = 0; i < file.matrices.length; i++) {
    const st = file.matrices[i].statementSpan;
    if (st.start <= offset && offset <= st.end && (at < 0 || st.end - st.start < file.matrices[at].statementSpan.end - file.matrices[at].statementSpan.start)) at = i;
  }
  if (at < 0) return only;
  only.add(at);
  const model = modelOf.get(at);
  if (model) for (const role of MODEL_ROLES) if (model[role] !== null && model[role] !== undefined) only.add(model[role] as number);
  return only;
}

/** The PassMemo of a finished pass (see there). */
function settledParts(
  file: ExtractedFile,
  settingsKey: string,
  cache: AnalysisCache | undefined,
  grouping: PassMemo['grouping'],
  modelOf: PassMemo['modelOf'],
  byIndex: Map<number, MatrixReport>,
  built: { report: MatrixReport; core: MatrixCore }[],
  models: ModelReport[],
  outcomes: Map<number, ModelOutcome>,
  reuse: PassMemo | null,
  pending: PassMemo['pending'],
): PassMemo {
  const settled: (MatrixReport | undefined)[] = new Array(file.matrices.length);
  if (reuse) for (let i = 0; i < reuse.settled.length; i++) settled[i] = reuse.settled[i];
  const analysed = new Set<number>();
  for (const { report, core } of built) {
    if (report.skipped.some((s) => s.startsWith(BUDGET_SKIP))) continue;
    analysed.add(report.index);
    if (core.closedForm === null || core.closedForm.settled) settled[report.index] = report;
  }
  const settledModels = new Map<number, { report: ModelReport; findings: ModelOutcome['findings'] }>(reuse?.models ?? []);
  const modelReports = new Map(models.map((m) => [m.state, m]));
  for (const m of grouping.models) {
    const members = [m.input, m.output, m.feedthrough, m.noiseInput, m.noiseCovariance].filter((i): i is number => i !== null && i !== undefined);
    if (settledModels.has(m.state)) {
      for (const i of members) settled[i] ??= byIndex.get(i);
      continue;
    }
    const report = modelReports.get(m.state);
    const outcome = outcomes.get(m.state);
    if (report && outcome && analysed.has(m.state)) {
      settledModels.set(m.state, { report, findings: outcome.findings });
      for (const i of members) settled[i] = byIndex.get(i);
    } else {
      settled[m.state] = undefined;
      for (const i of members) settled[i] = undefined;
    }
  }
  return { file, settingsKey, cache, grouping, modelOf, settled, models: settledModels, pending };
}

/**
 * findingsForMatrix, remembered on the analysis: its messages depend only on the analysis,
 * the matrix's name, whether its closed form was checked yet and three settings, and its
 * spans are the literal's, so a pass over unchanged matrices only moves the spans.
 */
function cachedFindings(report: MatrixReport, core: MatrixCore, lit: MatrixLiteral, settings: AnalysisSettings): Finding[] {
  const key = [lit.name ?? '', core.closedForm?.settled ?? '-', core.skipped.length, settings.precision, settings.lightDampingThreshold].join('|');
  const memo = core.findingsMemo;
  const base = lit.span.start;
  if (memo && memo.key === key && memo.findings.every((f) => f.span.end - f.span.start === lit.span.end - lit.span.start)) {
    return memo.findings.map((f) => ({ ...f, span: { start: f.span.start + base, end: f.span.end + base } }));
  }
  const findings = findingsForMatrix(report, core, lit, settings);
  core.findingsMemo = { key, findings: findings.map((f) => ({ ...f, span: { start: f.span.start - base, end: f.span.end - base } })) };
  return findings;
}

const modelSettingsKeys = new WeakMap<AnalysisSettings, string>();

const MODEL_ROLES: ModelRole[] = ['state', 'input', 'output', 'feedthrough', 'noiseInput', 'noiseCovariance'];

/**
 * Model analyses (controllability, transfer function, period advice, rounding) cached by the
 * state matrix's hash — which already covers the model's other matrices, domain and period —
 * plus the names used in messages and the settings that only model analysis reads.
 */
function cachedModelAnalysis(
  file: ExtractedFile,
  model: ModelGroup,
  reports: Map<number, MatrixReport>,
  settings: AnalysisSettings,
  cache: AnalysisCache | undefined,
): { report: ModelReport; outcome: ModelOutcome | null } {
  const state = reports.get(model.state);
  // A state matrix a pass has not reached yet has no analysis: its model is analysed (to
  // nothing) but not remembered, or the empty outcome would stand in for the real one later.
  const notYet = state?.skipped.some((s) => s.startsWith(BUDGET_SKIP)) ?? false;
  if (!cache || !state || notYet) return { report: analyseModel(file, model, reports, settings), outcome: null };
  const names = MODEL_ROLES.map((r) => (model[r] === null || model[r] === undefined ? '-' : file.matrices[model[r] as number].name ?? '?'));
  let modelSettings = modelSettingsKeys.get(settings);
  if (modelSettings === undefined) {
    modelSettings = [settings.quantizationThreshold, JSON.stringify(settings.fixedPoint), settings.periodTimeConstantDivisor, settings.periodMinSamplesPerOscillation].join('|');
    modelSettingsKeys.set(settings, modelSettings);
  }
  const key = `${state.hash}|${names.join(',')}|${model.id}|${modelSettings}`;
  let outcome = cache.getModel(key);
  if (!outcome) {
    // Run on shadow reports so that the findings it adds can be recorded per role.
    const shadow = new Map<number, MatrixReport>();
    for (const role of MODEL_ROLES) {
      const idx = model[role];
      const r = idx === null || idx === undefined ? undefined : reports.get(idx as number);
      if (r) shadow.set(idx as number, reportWithFindings(r, []));
    }
    const report = analyseModel(file, model, shadow, settings);
    const findings: ModelOutcome['findings'] = [];
    for (const role of MODEL_ROLES) {
      const idx = model[role];
      if (idx === null || idx === undefined) continue;
      const lit = file.matrices[idx as number];
      for (const f of shadow.get(idx as number)?.findings ?? []) findings.push({ role, start: f.span.start - lit.span.start, end: f.span.end - lit.span.start, finding: f });
    }
    outcome = { report, findings };
    cache.setModel(key, outcome);
  }
  for (const { role, start, end, finding } of outcome.findings) {
    const idx = model[role] as number;
    const lit = file.matrices[idx];
    const target = reports.get(idx) ?? state;
    target.findings.push({ ...finding, span: { start: lit.span.start + start, end: lit.span.start + end } });
  }
  // Indices can move when matrices are added above; the cached report carries the current ones.
  return { report: { ...outcome.report, state: model.state, input: model.input, output: model.output, feedthrough: model.feedthrough }, outcome };
}

function entryValues(lit: MatrixLiteral): (EntryValue | null)[][] {
  return lit.rows.map((row) => row.map((e) => e.value));
}

function valueKey(v: EntryValue | null): string {
  if (!v) return '?';
  return v.kind === 'exact' ? `q${v.value.toString()}` : `f${v.value}`;
}

/**
 * The entries of a literal as a key string, computed once per literal object: unchanged
 * literals are the same objects from one extraction to the next (see literalMemo.ts), so a
 * pass after a one-character edit formats only the edited matrix's entries.
 */
const literalKeys = new WeakMap<MatrixLiteral, string>();
const literalHashes = new WeakMap<MatrixLiteral, { context: string; hash: string }>();
function literalKey(lit: MatrixLiteral): string {
  let key = literalKeys.get(lit);
  if (key === undefined) {
    key = lit.rows.map((r) => r.map((e) => valueKey(e.value)).join(',')).join(';');
    literalKeys.set(lit, key);
  }
  return key;
}

/** What a matrix's analysis depends on besides its entries, and the cache key of all of it. */
function matrixIdentity(
  file: ExtractedFile,
  lit: MatrixLiteral,
  index: number,
  model: ModelGroup | null,
  settings: AnalysisSettings,
): { isState: boolean; domain: Domain; period: number | null; hash: string } {
  const isState = lit.role === 'state' || (model !== null && model.state === index);
  const domain: Domain = model?.domain ?? lit.pragma?.domain ?? settings.defaultDomain;
  const period = model?.period ?? periodOf(lit.pragma?.period) ?? settings.defaultPeriod;
  const context = [
    isState ? 'S' : 'O',
    domain,
    String(period),
    settingsKey(settings),
    modelKey(file, model),
  ].join('|');
  // Hashing every matrix of a 10,000-matrix file on every pass showed in profiles: the hash is
  // remembered on the literal object (stable while it is unchanged) with the context it had.
  let hash: string;
  const known = literalHashes.get(lit);
  if (known && known.context === context) hash = known.hash;
  else {
    hash = createHash('sha1').update(`${literalKey(lit)}|${context}`).digest('hex').slice(0, 16);
    literalHashes.set(lit, { context, hash });
  }
  return { isState, domain, period, hash };
}

/**
 * The float entries whose eigenvalues analyseStateMatrix will compute in floating point, for a
 * state matrix of at least STEPPED_SPECTRUM_N rows not yet analysed; otherwise null. A pass in
 * steps computes them first in steps of its own (eigenvalueSteps), so that one large matrix
 * does not hold the thread for the few hundred milliseconds its spectrum takes.
 */
function spectrumToStep(file: ExtractedFile, lit: MatrixLiteral, index: number, model: ModelGroup | null, settings: AnalysisSettings, cache: AnalysisCache | undefined, minN: number): number[][] | null {
  const n = lit.nRows;
  if (n < minN || lit.nCols !== n || n > settings.numericMaxN) return null;
  const { isState, hash } = matrixIdentity(file, lit, index, model, settings);
  if (!isState || cache?.peek(hash) !== undefined) return null;
  const { values } = literalArrays(lit);
  if (values.some((r) => r.length !== n || r.some((v) => v === null))) return null;
  if (lit.exact && n <= settings.exactMaxN) return null;
  const floatA = values.map((r) => r.map((v) => (v!.kind === 'exact' ? v!.value.toNumber() : v!.value)));
  return floatA.some((r) => r.some((x) => !Number.isFinite(x) || Math.abs(x) > MAX_ENTRY_MAGNITUDE)) ? null : floatA;
}

function reportForMatrix(
  text: string,
  file: ExtractedFile,
  lit: MatrixLiteral,
  index: number,
  model: ModelGroup | null,
  settings: AnalysisSettings,
  cache: AnalysisCache | undefined,
  overBudget = false,
): { report: MatrixReport; core: MatrixCore } {
  const { values, entrySpans } = literalArrays(lit);
  const { isState, domain, period, hash } = matrixIdentity(file, lit, index, model, settings);
  const { line, column } = lineColumnAt(text, lit.span.start);

  let core = cache?.get(hash);
  if (!core && overBudget && isState) {
    core = emptyCore();
    core.skipped.push(notYetMessage());
  } else if (!core) {
    core = isState ? analyseStateMatrix(lit, values, domain, period, settings, file, model, hash, cache?.closedForms ?? null) : emptyCore();
    cache?.set(hash, core);
  }

  const report = new MatrixReportObject(
    {
      index,
      name: lit.name,
      line,
      column,
      span: lit.span,
      nameSpan: lit.nameSpan,
      statementSpan: lit.statementSpan,
      rows: lit.nRows,
      cols: lit.nCols,
      role: isState ? 'state' : lit.role,
      modelId: model?.id ?? null,
      domain,
      period,
      exact: lit.exact,
      values,
      entrySpans,
      stability: core.stability,
      closedFormAvailable: core.closedForm !== null && core.closedForm.error === null,
      findings: [],
      skipped: core.skipped,
      hash,
    },
    core,
  );
  return { report, core };
}

/**
 * A matrix report whose closed form is read on demand (hovers, lenses, actions, the CLI's
 * output) through a getter on the prototype: copies of a report and JSON.stringify never
 * build it by accident, and the object keeps one shape for V8.
 */
class MatrixReportObject implements MatrixReport {
  index!: number;
  name!: string | null;
  line!: number;
  column!: number;
  span!: MatrixReport['span'];
  nameSpan!: MatrixReport['nameSpan'];
  statementSpan!: MatrixReport['statementSpan'];
  rows!: number;
  cols!: number;
  role!: MatrixReport['role'];
  modelId!: string | null;
  domain!: Domain;
  period!: number | null;
  exact!: boolean;
  entrySpans?: MatrixReport['entrySpans'];
  values!: MatrixReport['values'];
  stability!: MatrixReport['stability'];
  closedFormAvailable!: boolean;
  findings!: Finding[];
  skipped!: string[];
  hash!: string;
  readonly #core: MatrixCore;
  constructor(fields: Omit<MatrixReport, 'transition' | 'spectrum' | 'modes' | 'discrete'>, core: MatrixCore) {
    Object.assign(this, fields);
    this.#core = core;
  }
  /** The same report with other findings (sharing the analysis). */
  withFindings(findings: Finding[]): MatrixReportObject {
    return new MatrixReportObject({ ...this, findings }, this.#core);
  }
  // The analysis's bulky part is read through the cached analysis, which keeps it packed while
  // nobody reads it (packedDetail.ts): a pass over 10,000 cached matrices unpacks none.
  get spectrum(): MatrixReport['spectrum'] {
    return this.#core.spectrum;
  }
  get modes(): MatrixReport['modes'] {
    return this.#core.modes;
  }
  get discrete(): MatrixReport['discrete'] {
    return this.#core.discrete;
  }
  /** Whether the report has a spectrum, without unpacking it. */
  get hasSpectrum(): boolean {
    return this.#core.hasSpectrum;
  }
  get transition(): MatrixReport['transition'] {
    return this.#core.closedForm?.get() ?? null;
  }
  /** JSON.stringify and structured copies see the spectrum, modes and sampled model (never the closed form, which is built on demand). */
  toJSON(): Omit<MatrixReport, 'transition'> {
    return { ...this, spectrum: this.spectrum, modes: this.modes, discrete: this.discrete };
  }
}

/** A copy of a report with other findings: the same analysis, read the same way. */
export function reportWithFindings(report: MatrixReport, findings: Finding[]): MatrixReport {
  return report instanceof MatrixReportObject ? report.withFindings(findings) : { ...report, findings };
}

/** Whether a report has a spectrum, without unpacking a packed analysis. */
export function reportHasSpectrum(report: MatrixReport): boolean {
  return report instanceof MatrixReportObject ? report.hasSpectrum : report.spectrum !== null;
}

/** The settings that change a matrix analysis, as a key (once per settings object). */
const settingsKeys = new WeakMap<AnalysisSettings, string>();
function settingsKey(s: AnalysisSettings): string {
  let key = settingsKeys.get(s);
  if (key === undefined) {
    key = [s.exactMaxN, s.closedFormMaxN, s.numericMaxN, s.exactMaxDigits, s.nearRepeatThreshold, s.discretizeMethod].join('|');
    settingsKeys.set(s, key);
  }
  return key;
}

/** Entry values and spans as the report carries them, built once per literal object. */
const literalArrayCache = new WeakMap<MatrixLiteral, { values: (EntryValue | null)[][]; entrySpans: MatrixReport['entrySpans'] }>();
// A literal moved by an edit has the same content: its key, hash and entry values carry over
// (its entry spans are read again, as they moved).
onLiteralMoved((from, to) => {
  const key = literalKeys.get(from);
  if (key !== undefined) literalKeys.set(to, key);
  const hash = literalHashes.get(from);
  if (hash) literalHashes.set(to, hash);
  const arrays = literalArrayCache.get(from);
  if (arrays) literalArrayCache.set(to, { values: arrays.values, entrySpans: to.rows.map((row) => row.map((e) => e.span)) });
});

function literalArrays(lit: MatrixLiteral): { values: (EntryValue | null)[][]; entrySpans: MatrixReport['entrySpans'] } {
  let arrays = literalArrayCache.get(lit);
  if (!arrays) {
    arrays = { values: entryValues(lit), entrySpans: lit.rows.map((row) => row.map((e) => e.span)) };
    literalArrayCache.set(lit, arrays);
  }
  return arrays;
}

/** The model's other matrices change the discretization, so they are part of the key. */
function modelKey(file: ExtractedFile, model: ModelGroup | null): string {
  if (!model) return '';
  const parts: string[] = [];
  for (const idx of [model.input, model.output, model.feedthrough, model.noiseInput, model.noiseCovariance]) {
    parts.push(idx === null || idx === undefined ? '-' : literalKey(file.matrices[idx]));
  }
  return parts.join('/');
}

/**
 * The note on a state matrix the pass's time budget did not reach. It does not name the pass's
 * budget (passes differ: a hover's, a continuation's), so the report is the same in every
 * pass that leaves the matrix for later and can be taken over (PassMemo.pending).
 */
function notYetMessage(): string {
  return `${BUDGET_SKIP} (setting eigenlens.timeBudgetMs) ran out before this matrix; a later pass analyses it.`;
}

function periodOf(v: EntryValue | undefined): number | null {
  if (!v) return null;
  return v.kind === 'exact' ? v.value.toNumber() : v.value;
}

function emptyCore(): MatrixCore {
  return new MatrixCore();
}

function analyseStateMatrix(
  lit: MatrixLiteral,
  values: (EntryValue | null)[][],
  domain: Domain,
  period: number | null,
  settings: AnalysisSettings,
  file: ExtractedFile,
  model: ModelGroup | null,
  hash: string,
  store: ClosedFormStore | null,
): MatrixCore {
  const core = emptyCore();
  const n = lit.nRows;
  if (n === 0 || lit.nCols !== n || values.some((r) => r.length !== n)) {
    core.skipped.push('The matrix is not square, so it has no eigenvalues.');
    return core;
  }
  if (values.some((r) => r.some((v) => v === null))) {
    core.skipped.push('Some entries could not be evaluated; fix them to see the analysis.');
    return core;
  }
  // Magnitudes near the double range leave no room for e^{At}, balancing or rank decisions
  // (products overflow); such models are refused with a note rather than analysed into noise.
  if (values.some((r) => r.some((v) => Math.abs(v!.kind === 'exact' ? v!.value.toNumber() : v!.value) > MAX_ENTRY_MAGNITUDE))) {
    core.skipped.push(`An entry exceeds ${MAX_ENTRY_MAGNITUDE.toExponential(0)} in magnitude; double precision cannot analyse this matrix meaningfully (rescale the model's units).`);
    return core;
  }
  if (n > settings.numericMaxN) {
    core.skipped.push(`n = ${n} is over the spectrum limit of ${settings.numericMaxN} (setting eigenlens.numericMaxN).`);
    return core;
  }
  const tooManyDigits = values.some((r) => r.some((v) => v!.kind === 'exact' && v!.value.digits() > settings.exactMaxDigits));
  let useExact = lit.exact && n <= settings.exactMaxN && !tooManyDigits;
  if (lit.exact && n > settings.exactMaxN) {
    core.notes.push(`n = ${n} is over the exact-arithmetic limit of ${settings.exactMaxN}; analysed in floating point.`);
  }
  if (lit.exact && tooManyDigits) {
    core.notes.push(`Some entries have more than ${settings.exactMaxDigits} digits; analysed in floating point.`);
  }
  const exactA: Rational[][] | null = useExact ? values.map((r) => r.map((v) => (v as { kind: 'exact'; value: Rational }).value)) : null;
  const floatA: number[][] = values.map((r) => r.map((v) => (v!.kind === 'exact' ? v!.value.toNumber() : v!.value)));

  let spectrum: Spectrum;
  try {
    spectrum = exactA ? exactSpectrum(exactA, { nearRepeatThreshold: settings.nearRepeatThreshold }) : floatSpectrum(floatA);
  } catch (err) {
    if (exactA) {
      core.notes.push(`Exact analysis failed (${(err as Error).message}); analysed in floating point.`);
      useExact = false;
      spectrum = floatSpectrum(floatA);
    } else {
      core.skipped.push(`The spectrum could not be computed: ${(err as Error).message}`);
      return core;
    }
  }
  const st = stabilityOf(spectrum.eigenvalues, domain);
  core.stability = st.verdict;
  const A = exactA ?? floatA;
  const modes = modesOf(spectrum, domain, period);

  if (n <= settings.closedFormMaxN) {
    core.closedForm = new ClosedFormSlot(hash, () => core.detail!, domain, settings.closedFormMaxN, store, (message) => core.skipped.push(message));
  } else {
    core.skipped.push(`n = ${n} is over the closed-form limit of ${settings.closedFormMaxN} (setting eigenlens.closedFormMaxN).`);
  }

  let discrete: DiscreteModel | null = null;
  if (domain === 'continuous' && period !== null && settings.discretizeMethod) {
    try {
      discrete = discreteModelFor(file, model, exactA, floatA, period, settings.discretizeMethod);
    } catch (err) {
      core.skipped.push(`Discretization failed: ${(err as Error).message}`);
    }
  }
  core.setDetail({ spectrum, stabilityReasons: st.reasons, modes, discrete, A });
  return core;
}
