/**
 * Code generation: the discrete-time model of a continuous state matrix (and of its model's
 * B, C, D, plus Qd when a noise covariance Q is given) written as firmware-ready constants
 * in the file's own language, and as C array initializers.
 *
 * Methods: zero-order hold, first-order hold, Tustin (α = ½), forward and backward Euler,
 * computed by engine/discretize.ts (Van Loan 1978 block exponential for the holds; the
 * generalized bilinear family otherwise) and engine/vanLoan.ts for Qd (Van Loan, "Computing
 * integrals involving the matrix exponential", IEEE Trans. Automatic Control AC-23(3), 1978).
 *
 * Output:
 *  - Python: `Ad = np.array([...], dtype=float)` when the file imports numpy (its alias is
 *    kept), nested lists otherwise; TypeScript `const Ad: number[][] = [...]`, JavaScript
 *    `const Ad = [...]`; model files a new `system NAME_d discrete period=T` block.
 *  - C: `static const double Ad[2][2] = {{...}, {...}};` (or float), one per matrix.
 *
 * Numbers (the choice, documented for users):
 *  - An entry the method kept exact is written as the fraction `p/q` (or the integer) when
 *    |p| and q are at most 2^53: both are then exact doubles and IEEE division rounds the
 *    quotient correctly, so Python and JavaScript read `1/3` as the double nearest to 1/3,
 *    and the model-file reader reads it exactly. Larger fractions fall back to decimals.
 *  - Other entries: with precision 17 (the default) JavaScript's shortest round-trip text,
 *    which Python and C parse to the same double; with a lower precision that many
 *    significant digits, trailing zeros trimmed. C float initializers use at most 9 digits,
 *    enough to round-trip float32. C never gets fractions (`1/3` is integer division there).
 *
 * Names: A → Ad, Bd, Cd, Dd, Qd; A_cl → A_cl_d, B_cl_d …; a clash with a name used
 * elsewhere in the file moves to A_d2, B_d2 … (still role names our reader groups).
 * The block sits between marker comments naming the source matrix; re-running any insert
 * action for that matrix replaces the block instead of adding another. The generated
 * state matrix carries our pragma (discrete, period) so the analysis reads it correctly.
 *
 * Invariants: never throws; a failure is `{ ok: false, error }` with a plain sentence.
 */
import type { DocumentReport, MatrixReport, ModelReport } from '../analysis/report';
import { Rational } from '../engine/rational';
import { discretize, type AnyMatrix, type DiscretizationMethod, type DiscretizeSuccess } from '../engine/discretize';
import { processNoise } from '../engine/vanLoan';
import type { SourceLanguage } from '../syntax/types';
import { eol, lineEnd, lineStart, type TextEdit } from './edits';

export const CODE_METHODS: readonly DiscretizationMethod[] = ['zoh', 'tustin', 'euler', 'backward-euler', 'foh'];

/** Short method names for titles and comments. */
export const METHOD_LABEL: Record<DiscretizationMethod, string> = {
  zoh: 'ZOH',
  foh: 'first-order hold',
  tustin: 'Tustin',
  euler: 'forward Euler',
  'backward-euler': 'backward Euler',
};

/** ASCII statement of each convention, for comments in generated code (C compilers and firmware editors may not like Unicode). */
const CONVENTION_ASCII: Record<DiscretizationMethod, string[]> = {
  zoh: ['zero-order hold: Ad = expm(A*T), Bd = integral over [0, T] of expm(A*s) ds * B,', 'Cd = C, Dd = D (input held constant between samples).'],
  foh: [
    'first-order (triangle) hold: Ad = expm(A*T), Bd = G1 + (Ad - I)*G2, Cd = C, Dd = D + C*G2,',
    'G1 = integral over [0, T] of expm(A*s) ds * B, G2 = (1/T) integral over [0, T] of expm(A*(T-s))*s ds * B;',
    'the discrete state is x - G2*u, not x.',
  ],
  tustin: [
    'Tustin (bilinear, generalized bilinear with alpha = 1/2): W = (I - A*T/2)^-1,',
    'Ad = W*(I + A*T/2), Bd = W*B*T, Cd = C*W, Dd = D + C*Bd/2 (Cd and Dd differ from C and D).',
  ],
  euler: ['forward Euler (alpha = 0): Ad = I + A*T, Bd = B*T, Cd = C, Dd = D.'],
  'backward-euler': ['backward Euler (alpha = 1): W = (I - A*T)^-1, Ad = W, Bd = W*B*T, Cd = C*W, Dd = D + C*Bd', '(Cd and Dd differ from C and D).'],
};

export interface DiscreteCodeOptions {
  period: number;
  method: DiscretizationMethod;
  /** Significant digits for inexact entries, 2..17; 17 = shortest round-trip text. */
  precision: number;
}

export interface GeneratedMatrix {
  /** Letter of the role: A, B, C, D, Q. */
  letter: 'A' | 'B' | 'C' | 'D' | 'Q';
  name: string;
  values: number[][];
  /** Exact text entries (engine output) or null. */
  exact: string[][] | null;
}

export interface DiscreteCode {
  ok: true;
  method: DiscretizationMethod;
  period: number;
  /** Names of the continuous matrices used, in order (A, B, C, D, G, Q). */
  sourceNames: string[];
  matrices: GeneratedMatrix[];
  /** The engine's result, for callers that want more than the text. */
  result: DiscretizeSuccess;
  caveats: string[];
}

export type DiscreteCodeResult = DiscreteCode | { ok: false; error: string };

const TWO_53 = 2n ** 53n;

function label(matrix: MatrixReport): string {
  return matrix.name ?? `the matrix at line ${matrix.line}`;
}

export function modelOf(report: DocumentReport, matrix: MatrixReport): ModelReport | null {
  return report.models.find((m) => m.id === matrix.modelId) ?? null;
}

function byIndex(report: DocumentReport, index: number | null | undefined): MatrixReport | null {
  if (index === null || index === undefined) return null;
  return report.matrices.find((m) => m.index === index) ?? null;
}

function memberOf(report: DocumentReport, model: ModelReport | null, role: MatrixReport['role']): MatrixReport | null {
  if (!model) return null;
  return report.matrices.find((m) => m.modelId === model.id && m.role === role) ?? null;
}

/** Entries as exact rationals (when every one is exact and `exact` is asked) or doubles; null if one failed. */
function valuesOf(m: MatrixReport, exact: boolean): AnyMatrix | null {
  if (m.values.some((row) => row.some((v) => v === null))) return null;
  if (exact) return m.values.map((row) => row.map((v) => (v as { kind: 'exact'; value: Rational }).value));
  return m.values.map((row) => row.map((v) => (v!.kind === 'exact' ? v!.value.toNumber() : v!.value)));
}

const allExact = (m: MatrixReport | null) => m === null || m.values.every((row) => row.every((v) => v !== null && v.kind === 'exact'));

/**
 * Discretizes the model of a continuous state matrix at the given period and method, and
 * names the results. Partners whose shapes do not fit the state matrix are left out (the
 * shape-mismatch diagnostic already says why).
 */
export function discreteCodeFor(report: DocumentReport, matrix: MatrixReport, documentText: string, options: DiscreteCodeOptions): DiscreteCodeResult {
  if (matrix.role !== 'state') return { ok: false, error: `${label(matrix)} is not a state matrix.` };
  if (matrix.domain !== 'continuous') return { ok: false, error: `${label(matrix)} is read as discrete-time already.` };
  if (matrix.rows !== matrix.cols || matrix.rows === 0) return { ok: false, error: `${label(matrix)} is not square.` };
  if (!(Number.isFinite(options.period) && options.period > 0)) return { ok: false, error: `The sample period must be a positive number of seconds (got ${String(options.period)}).` };
  if (!CODE_METHODS.includes(options.method)) return { ok: false, error: `Unknown discretization method ${String(options.method)}.` };
  const n = matrix.rows;
  const model = modelOf(report, matrix);
  let B = byIndex(report, model?.input);
  let C = byIndex(report, model?.output);
  let D = byIndex(report, model?.feedthrough);
  const G = memberOf(report, model, 'noise-input');
  const Q = memberOf(report, model, 'noise-covariance');
  if (B && B.rows !== n) B = null;
  if (C && C.cols !== n) C = null;
  if (D && (!B || !C || D.rows !== C.rows || D.cols !== B.cols)) D = null;
  const exact = [matrix, B, C, D].every(allExact);
  const A = valuesOf(matrix, exact);
  if (!A) return { ok: false, error: `An entry of ${label(matrix)} could not be evaluated.` };
  const Bv = B ? valuesOf(B, exact) : null;
  const Cv = C ? valuesOf(C, exact) : null;
  const Dv = D ? valuesOf(D, exact) : null;
  const result = discretize({ A, B: Bv, C: Cv, D: Dv }, options.period, options.method);
  if (!result.ok) return { ok: false, error: result.error };
  const all = [result.Ad, result.Bd, result.Cd, result.Dd].filter((m): m is number[][] => m !== null);
  if (all.some((m) => m.some((row) => row.some((x) => !Number.isFinite(x))))) {
    return { ok: false, error: `The ${METHOD_LABEL[options.method]} model at T = ${options.period} s has entries that overflow a double.` };
  }
  const names = discreteNames(matrix, documentText);
  const matrices: GeneratedMatrix[] = [{ letter: 'A', name: names.A, values: result.Ad, exact: result.exact?.Ad ?? null }];
  if (result.Bd) matrices.push({ letter: 'B', name: names.B, values: result.Bd, exact: result.exact?.Bd ?? null });
  if (result.Cd) matrices.push({ letter: 'C', name: names.C, values: result.Cd, exact: result.exact?.Cd ?? null });
  if (result.Dd) matrices.push({ letter: 'D', name: names.D, values: result.Dd, exact: result.exact?.Dd ?? null });
  const caveats = [...result.caveats];
  const sourceNames = [label(matrix), ...[B, C, D].filter((m): m is MatrixReport => m !== null).map(label)];
  if (Q && Q.rows === Q.cols && (!G || (G.rows === n && G.cols === Q.rows)) && (G || Q.rows === n)) {
    // Exact when A, G and Q are (Van Loan's blocks then stay in the rationals for nilpotent A).
    const noiseExact = [matrix, G, Q].every(allExact);
    const Qc = valuesOf(Q, noiseExact);
    const Gv = G ? valuesOf(G, noiseExact) : null;
    const Af = valuesOf(matrix, noiseExact);
    if (Qc && Af && (!G || Gv)) {
      const pn = processNoise(Af, Qc, options.period, Gv);
      if (pn.ok) {
        matrices.push({ letter: 'Q', name: names.Q, values: pn.Qd, exact: pn.exact?.Qd ?? null });
        if (G) sourceNames.push(label(G));
        sourceNames.push(label(Q));
      } else caveats.push(`Qd not written: ${pn.error}`);
    }
  }
  return { ok: true, method: options.method, period: options.period, sourceNames, matrices, result, caveats };
}

/** Text of the document outside our earlier generated blocks for this matrix (names there may be reused). */
function textOutsideBlock(documentText: string, matrix: MatrixReport): string {
  let text = documentText;
  for (const what of ['discrete model', 'C initializers'] as const) {
    for (const leader of ['#', '//']) {
      const block = existingBlock(text, leader, sourceKey(matrix), what);
      if (block) text = text.slice(0, block.start) + text.slice(block.end);
    }
  }
  return text;
}

function discreteNames(matrix: MatrixReport, documentText: string) {
  const base = matrix.name ?? 'A';
  const rest = /^[A-Za-z]$/.test(base) ? '' : base.slice(1).replace(/^_/, '').replace(/[^A-Za-z0-9_]/g, '_');
  const outside = textOutsideBlock(documentText, matrix);
  // A name is taken when something outside our own blocks defines it (an assignment, a def,
  // a function, a class, an import alias); a mention in a comment or docstring does not count.
  const used = (name: string) =>
    new RegExp(
      `(^|\\n)[ \\t]*(?:(?:export\\s+)?(?:const|let|var)\\s+|self\\.)?${name}\\s*(?::[^=\\n]*)?=(?!=)|\\b(?:def|function|class)\\s+${name}\\b|\\bimport\\s+.*\\bas\\s+${name}\\b|\\b${name}\\s*,[^\\n=]*=`,
    ).test(outside);
  const make = (letter: string, k: number) => (rest === '' ? (k === 1 ? `${letter}d` : `${letter}_d${k}`) : `${letter}_${rest}_d${k === 1 ? '' : k}`);
  const stateLetter = /^[AF]/.test(base) ? base[0] : 'A';
  for (let k = 1; ; k++) {
    const names = { A: make(stateLetter, k), B: make('B', k), C: make('C', k), D: make('D', k), Q: make('Q', k) };
    if (!Object.values(names).some(used) || k > 50) return names;
  }
}

/** One number as source text for Python/TypeScript/JavaScript/model files. */
export function codeNumber(x: number, exactText: string | null, precision: number): string {
  if (exactText !== null) {
    const q = Rational.parse(exactText);
    if (q && (q.num < 0n ? -q.num : q.num) <= TWO_53 && q.den <= TWO_53) return q.toString();
  }
  if (x === 0) return '0';
  return precision >= 17 ? String(x) : String(Number(x.toPrecision(Math.max(1, precision))));
}

/** One number as a C literal of the given type (decimal only; `1/3` would be integer division in C). */
export function cNumber(x: number, precision: number, type: 'double' | 'float'): string {
  const digits = type === 'float' ? Math.min(precision, 9) : precision;
  let s = x === 0 ? '0' : digits >= 17 ? String(x) : String(Number(x.toPrecision(Math.max(1, digits))));
  if (!/[.eE]/.test(s)) s += '.0';
  return type === 'float' ? `${s}f` : s;
}

/** What the markers name: the matrix, plus its system in model files (every system there has an A). */
function sourceKey(matrix: MatrixReport): string {
  const name = matrix.name ?? `matrix at line ${matrix.line}`;
  return matrix.modelId !== null && matrix.nameSpan !== null && matrix.modelId !== name && /^[AF]$/.test(name) ? `${name} of ${matrix.modelId}` : name;
}

type BlockKind = 'discrete model' | 'C initializers';

function beginMarker(leader: string, key: string, what: BlockKind = 'discrete model'): string {
  return `${leader} --- eigenlens generated ${what} of ${key}: begin (re-running an insert action replaces this block) ---`;
}

function endMarker(leader: string, key: string, what: BlockKind = 'discrete model'): string {
  return `${leader} --- eigenlens generated ${what} of ${key}: end ---`;
}

/** The span of an earlier generated block of this kind, with its indentation. */
function existingBlock(documentText: string, leader: string, key: string, what: BlockKind): { start: number; end: number; indent: string } | null {
  const begin = beginMarker(leader, key, what);
  const end = endMarker(leader, key, what);
  const beginAt = documentText.indexOf(begin);
  if (beginAt < 0) return null;
  const endAt = documentText.indexOf(end, beginAt);
  if (endAt < 0) return null;
  const start = lineStart(documentText, beginAt);
  return { start, end: endAt + end.length, indent: documentText.slice(start, beginAt) };
}

function periodText(T: number): string {
  return String(T);
}

function headerLines(code: DiscreteCode, target: string): string[] {
  const lines = [
    `Discrete-time model of ${code.sourceNames.join(', ')} at sample period T = ${periodText(code.period)} s, by ${METHOD_LABEL[code.method]}.`,
    `Generated by eigenlens from the continuous model above; regenerate it after editing that model.`,
    ...CONVENTION_ASCII[code.method].map((l, i) => (i === 0 ? `Method: ${l}` : `  ${l}`)),
  ];
  if (code.matrices.some((m) => m.letter === 'Q')) lines.push('Qd: discrete process-noise covariance from Q (and G, else the identity) by the Van Loan block exponential.');
  lines.push(
    target === 'c'
      ? 'Entries are decimal literals that round-trip the computed values at the chosen precision.'
      : code.result.exact
        ? target === 'lti'
          ? 'Fractions are exact (the method stayed in the rationals) and are read back exactly.'
          : 'Fractions are exact (the method stayed in the rationals); Python and JavaScript read them as the nearest double.'
        : 'Entries are floating point, written with enough digits to round-trip a double unless a lower precision is set.',
  );
  for (const caveat of code.caveats) lines.push(`Caveat: ${asciiText(caveat)}`);
  return lines;
}

function asciiText(s: string): string {
  return s
    .replace(/−/g, '-')
    .replace(/·/g, '*')
    .replace(/λ/g, 'lambda')
    .replace(/[^\x20-\x7e]/g, '?');
}

type Language = SourceLanguage;

function numpyAlias(documentText: string): string | null {
  const as = /^\s*import\s+numpy\s+as\s+([A-Za-z_][A-Za-z0-9_]*)\s*$/m.exec(documentText);
  if (as) return as[1];
  if (/^\s*import\s+numpy\s*$/m.test(documentText)) return 'numpy';
  return null;
}

function rowsText(m: GeneratedMatrix, precision: number): string[] {
  return m.values.map((row, r) => `[${row.map((x, c) => codeNumber(x, m.exact?.[r]?.[c] ?? null, precision)).join(', ')}]`);
}

/** The generated block (markers included), without a trailing newline, lines joined by `newline`. */
export function discreteBlockText(code: DiscreteCode, matrix: MatrixReport, language: Language, documentText: string, precision: number, indent = ''): string {
  const key = sourceKey(matrix);
  const lines: string[] = [];
  if (language === 'lti') {
    const systemName = `${(matrix.modelId ?? 'model').replace(/[^A-Za-z0-9_]/g, '_') || 'model'}_d`;
    lines.push(beginMarker('#', key));
    for (const l of headerLines(code, language)) lines.push(`# ${l}`);
    lines.push(`system ${uniqueSystemName(systemName, textOutsideBlock(documentText, matrix))} discrete period=${periodText(code.period)}`);
    for (const m of code.matrices) {
      lines.push(`  ${m.letter}:`);
      for (const row of m.values.map((vals, r) => vals.map((x, c) => codeNumber(x, m.exact?.[r]?.[c] ?? null, precision)))) lines.push(`    ${row.join('  ')}`);
    }
    lines.push('end');
    lines.push(endMarker('#', key));
  } else if (language === 'python') {
    const np = numpyAlias(documentText);
    lines.push(beginMarker('#', key));
    for (const l of headerLines(code, language)) lines.push(`# ${l}`);
    code.matrices.forEach((m, i) => {
      if (i === 0) lines.push(`# eigenlens: discrete period=${periodText(code.period)}`);
      const rows = rowsText(m, precision);
      const body = rows.length === 1 ? `[${rows[0]}]` : `[\n${rows.map((r) => `    ${r},`).join('\n')}\n]`;
      lines.push(...(np ? `${m.name} = ${np}.array(${body}, dtype=float)` : `${m.name} = ${body}`).split('\n'));
    });
    lines.push(endMarker('#', key));
  } else {
    const typed = language === 'typescript';
    lines.push(beginMarker('//', key));
    for (const l of headerLines(code, language)) lines.push(`// ${l}`);
    code.matrices.forEach((m, i) => {
      if (i === 0) lines.push(`// eigenlens: discrete period=${periodText(code.period)}`);
      const rows = rowsText(m, precision);
      const body = rows.length === 1 ? `[${rows[0]}]` : `[\n${rows.map((r) => `  ${r},`).join('\n')}\n]`;
      lines.push(...`const ${m.name}${typed ? ': number[][]' : ''} = ${body};`.split('\n'));
    });
    lines.push(endMarker('//', key));
  }
  const newline = eol(documentText);
  return lines.map((line) => (line === '' ? '' : indent + line)).join(newline);
}

function uniqueSystemName(name: string, text: string): string {
  const taken = (n: string) => new RegExp(`^\\s*system\\s+${n}\\b`, 'm').test(text);
  if (!taken(name)) return name;
  for (let k = 2; ; k++) if (!taken(`${name}${k}`) || k > 50) return `${name}${k}`;
}

export interface DiscreteInsert {
  edit: TextEdit;
  /** An earlier generated block is replaced. */
  replacing: boolean;
  code: DiscreteCode;
}

/**
 * The edit that inserts (or replaces) the generated block for this matrix. Python/TS/JS:
 * after the last statement of the model (the partner matrices usually follow A); model
 * files: after the `end` of the source system, at top level.
 */
export function discreteInsertEdit(
  report: DocumentReport,
  matrix: MatrixReport,
  language: Language,
  documentText: string,
  options: DiscreteCodeOptions,
): DiscreteInsert | { ok: false; error: string } {
  const code = discreteCodeFor(report, matrix, documentText, options);
  if (!code.ok) return code;
  return placeBlock(report, matrix, language, documentText, 'discrete model', code, (indent) =>
    discreteBlockText(code, matrix, language, documentText, options.precision, indent),
  );
}

/**
 * The C initializers as a comment block in the source file (line comments, so the C
 * comment inside stays intact), for editors that cannot run our clipboard request.
 */
export function cCommentInsertEdit(
  report: DocumentReport,
  matrix: MatrixReport,
  language: Language,
  documentText: string,
  options: DiscreteCodeOptions & { type?: 'double' | 'float' },
): DiscreteInsert | { ok: false; error: string } {
  const code = discreteCodeFor(report, matrix, documentText, options);
  if (!code.ok) return code;
  const leader = language === 'python' || language === 'lti' ? '#' : '//';
  const key = sourceKey(matrix);
  const newline = eol(documentText);
  return placeBlock(report, matrix, language, documentText, 'C initializers', code, (indent) =>
    [
      beginMarker(leader, key, 'C initializers'),
      ...cInitializerText(code, options.precision, options.type ?? 'double').split('\n').map((l) => `${leader} ${l}`),
      endMarker(leader, key, 'C initializers'),
    ]
      .map((l) => indent + l)
      .join(newline),
  );
}

function placeBlock(
  report: DocumentReport,
  matrix: MatrixReport,
  language: Language,
  documentText: string,
  what: BlockKind,
  code: DiscreteCode,
  render: (indent: string) => string,
): DiscreteInsert {
  const leader = language === 'python' || language === 'lti' ? '#' : '//';
  const earlier = existingBlock(documentText, leader, sourceKey(matrix), what);
  if (earlier) return { edit: { span: { start: earlier.start, end: earlier.end }, newText: render(earlier.indent) }, replacing: true, code };
  const model = modelOf(report, matrix);
  const members = report.matrices.filter((m) => m.index === matrix.index || (model !== null && m.modelId === model.id));
  let after = Math.max(...members.map((m) => m.statementSpan.end));
  // A C block goes after the discrete model block when there is one.
  if (what === 'C initializers') {
    const model = existingBlock(documentText, leader, sourceKey(matrix), 'discrete model');
    if (model) after = Math.max(after, model.end);
  }
  if (language === 'lti') {
    const hit = /^[ \t]*end[ \t]*(#.*)?$/m.exec(documentText.slice(after));
    if (hit) after += hit.index + hit[0].length;
  }
  const insertAt = lineEnd(documentText, after);
  const indent = language === 'lti' ? '' : /^[ \t]*/.exec(documentText.slice(lineStart(documentText, matrix.statementSpan.start)))?.[0] ?? '';
  const newline = eol(documentText);
  return {
    edit: { span: { start: insertAt, end: insertAt }, newText: `${newline}${newline}${render(indent)}${insertAt === documentText.length ? newline : ''}` },
    replacing: false,
    code,
  };
}

/** C initializers for every generated matrix, under a comment block. */
export function cInitializerText(code: DiscreteCode, precision: number, type: 'double' | 'float'): string {
  const lines: string[] = ['/*'];
  for (const l of headerLines(code, 'c')) lines.push(` * ${l}`);
  lines.push(' */');
  for (const m of code.matrices) {
    const rows = m.values.map((row) => `{${row.map((x) => cNumber(x, precision, type)).join(', ')}}`);
    lines.push(`static const ${type} ${m.name}[${m.values.length}][${m.values[0]?.length ?? 0}] = {${rows.join(', ')}};`);
  }
  return lines.join('\n');
}
