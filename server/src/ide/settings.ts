/**
 * The one place where the editor's `eigenlens.*` settings become AnalysisSettings (plus the
 * few settings only the editor features use). Values of the wrong type or out of range are
 * ignored in favour of the defaults, so a typo in settings.json never breaks analysis.
 */
import { DEFAULT_SETTINGS, type AnalysisSettings } from '../analysis/settings';
import type { EigenlensUserSettings } from '../shared/protocol';

export interface IdeSettings {
  analysis: AnalysisSettings;
  codeLensEnabled: boolean;
  /** Significant digits of inexact entries in generated code; 17 = shortest round-trip text of a double. */
  codePrecision: number;
  /** Open documents whose analysis stays in memory, the most recently used; the others keep their diagnostics only. */
  documentsKept: number;
  /** Diagnostics published per document at most (see capDiagnostics). */
  maxDiagnostics: number;
}

/** A thousand: more than anyone reads in one file, and about 350 KB of JSON per publish. */
export const DEFAULT_MAX_DIAGNOSTICS = 1000;

/** Three: a document and the two beside it in a split editor; more open files cost memory (see README, Performance). */
export const DEFAULT_DOCUMENTS_KEPT = 3;

/** 17 significant digits always round-trip a double (IEEE 754-2008, §5.12.2), so that is the default for generated code. */
export const DEFAULT_CODE_PRECISION = 17;

export const DEFAULT_IDE_SETTINGS: IdeSettings = { analysis: DEFAULT_SETTINGS, codeLensEnabled: true, codePrecision: DEFAULT_CODE_PRECISION, documentsKept: DEFAULT_DOCUMENTS_KEPT, maxDiagnostics: DEFAULT_MAX_DIAGNOSTICS };

const DISCRETIZE_METHODS = ['zoh', 'tustin', 'euler', 'backward-euler', 'foh'] as const;

function positiveNumber(x: unknown): number | undefined {
  return typeof x === 'number' && Number.isFinite(x) && x > 0 ? x : undefined;
}

function integerIn(x: unknown, lo: number, hi: number): number | undefined {
  return typeof x === 'number' && Number.isInteger(x) && x >= lo && x <= hi ? x : undefined;
}

/** Maps the raw configuration object (any shape) onto our settings. */
export function settingsFromUser(raw: unknown): IdeSettings {
  const user = (raw && typeof raw === 'object' ? raw : {}) as EigenlensUserSettings & Record<string, unknown>;
  const analysis: AnalysisSettings = { ...DEFAULT_SETTINGS };
  if (user.defaultDomain === 'continuous' || user.defaultDomain === 'discrete') analysis.defaultDomain = user.defaultDomain;
  if (user.defaultPeriod === null) analysis.defaultPeriod = null;
  else if (positiveNumber(user.defaultPeriod) !== undefined) analysis.defaultPeriod = user.defaultPeriod as number;
  const precision = integerIn(user.precision, 2, 17);
  if (precision !== undefined) analysis.precision = precision;
  // The design caps closed forms at n = 12 (every request stays bounded); users may lower it.
  const closedFormMaxN = integerIn(user.closedFormMaxN, 1, 12);
  if (closedFormMaxN !== undefined) analysis.closedFormMaxN = closedFormMaxN;
  const threshold = user.lightDampingThreshold;
  if (typeof threshold === 'number' && Number.isFinite(threshold) && threshold >= 0 && threshold <= 1) {
    analysis.lightDampingThreshold = threshold;
  }
  if (Array.isArray(user.stateMatrixNames)) {
    analysis.stateMatrixNames = user.stateMatrixNames.filter((s): s is string => typeof s === 'string' && isValidRegex(s));
  }
  if (user.discretizeMethod === null) analysis.discretizeMethod = null;
  else if ((DISCRETIZE_METHODS as readonly unknown[]).includes(user.discretizeMethod)) {
    analysis.discretizeMethod = user.discretizeMethod as AnalysisSettings['discretizeMethod'];
  }
  // Bounds (every request stays bounded: the caps can be lowered, never raised past the design's).
  const bound = (key: string, lo: number, hi: number): number | undefined => integerIn(user[key], lo, hi);
  analysis.exactMaxN = bound('exactMaxN', 1, 12) ?? analysis.exactMaxN;
  analysis.numericMaxN = bound('numericMaxN', 1, 200) ?? analysis.numericMaxN;
  analysis.exactMaxDigits = bound('exactMaxDigits', 10, 4000) ?? analysis.exactMaxDigits;
  analysis.maxFileChars = bound('maxFileChars', 1000, 50_000_000) ?? analysis.maxFileChars;
  analysis.timeBudgetMs = bound('timeBudgetMs', 50, 60_000) ?? analysis.timeBudgetMs;
  analysis.periodMinSamplesPerOscillation = bound('periodMinSamplesPerOscillation', 2, 1000) ?? analysis.periodMinSamplesPerOscillation;
  const fraction = (key: string, lo: number, hi: number): number | undefined => {
    const x = user[key];
    return typeof x === 'number' && Number.isFinite(x) && x > lo && x <= hi ? x : undefined;
  };
  analysis.nearRepeatThreshold = fraction('nearRepeatThreshold', 0, 0.1) ?? analysis.nearRepeatThreshold;
  analysis.quantizationThreshold = fraction('quantizationThreshold', 0, 1) ?? analysis.quantizationThreshold;
  analysis.periodTimeConstantDivisor = fraction('periodTimeConstantDivisor', 0, 1000) ?? analysis.periodTimeConstantDivisor;
  const fixed = typeof user.fixedPoint === 'string' ? /^Q(\d{1,2})\.(\d{1,2})$/.exec(user.fixedPoint.trim()) : null;
  if (fixed && Number(fixed[1]) + Number(fixed[2]) <= 63) analysis.fixedPoint = { integerBits: Number(fixed[1]), fractionalBits: Number(fixed[2]) };

  // Both `{ codeLens: { enabled } }` and a flat `"codeLens.enabled"` key are accepted:
  // editors differ in whether they expand dotted keys.
  let codeLensEnabled = true;
  const nested = user.codeLens?.enabled;
  const flat = user['codeLens.enabled'];
  if (typeof nested === 'boolean') codeLensEnabled = nested;
  else if (typeof flat === 'boolean') codeLensEnabled = flat;
  const codePrecision = integerIn(user.codePrecision, 2, 17) ?? DEFAULT_CODE_PRECISION;
  const documentsKept = integerIn(user.documentsKept, 1, 1000) ?? DEFAULT_DOCUMENTS_KEPT;
  const maxDiagnostics = integerIn(user.maxDiagnostics, 10, 100_000) ?? DEFAULT_MAX_DIAGNOSTICS;
  return { analysis, codeLensEnabled, codePrecision, documentsKept, maxDiagnostics };
}

function isValidRegex(source: string): boolean {
  try {
    new RegExp(source);
    return true;
  } catch {
    return false;
  }
}
