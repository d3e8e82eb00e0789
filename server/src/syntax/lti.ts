/**
 * Reader for `.lti` model files, our own small line-oriented language (grammar below and
 * in syntaxes/LTI.md). Hand-written line scanner plus the shared entry evaluator: the
 * language has no nesting beyond `system … end`, so a parser generator would add nothing.
 *
 * Grammar (one construct per line; `#` starts a comment anywhere):
 *
 *   file       := { blank | comment | param | system }
 *   param      := "param" NAME "=" EXPR
 *   system     := "system" NAME [ "continuous" | "discrete" ] [ "period" "=" EXPR ]
 *                 { blank | comment | param | decl | block }
 *                 "end"
 *   decl       := ("states" | "inputs" | "outputs") NAME { NAME }
 *               | "period" ["="] EXPR
 *   block      := LABEL ":" [ row ]  { row | blank | comment }      LABEL ∈ A B C D F G H Q
 *   row        := entry { [","] entry }
 *   entry      := an expression without spaces (`-m*g/l`, `sqrt(2)`, `1e-3`)
 *               | a parenthesised expression, which may contain spaces (`(m * g)`)
 *
 * A block ends at the next label, keyword or `end`. A line inside a block that starts with a
 * bare word which is not a parameter (e.g. `frobnicate 3`) is an unknown keyword, not a row. `^` and `**` are powers; names are
 * earlier params. Blocks take their role from the label; the system name is the group key.
 *
 * Invariants: never throws; every problem carries the exact range of the word, entry, row
 * or block concerned. Problem codes: unknown-keyword, ragged-rows, shape-mismatch,
 * duplicate-block, missing-end, unexpected-end, syntax-error, plus the evaluator's codes.
 */
import { evaluateEntry } from './evaluate';
import { LineIndex, PragmaAttacher } from './literal';
import { roleFromName } from './roles';
import type {
  Constant,
  EntryValue,
  ExtractedFile,
  LtiSystemInfo,
  MatrixEntry,
  MatrixLiteral,
  Problem,
  Span,
} from './types';

const BLOCK_LABELS = new Set(['A', 'B', 'C', 'D', 'F', 'G', 'H', 'Q']);
const KEYWORDS = new Set(['param', 'system', 'end', 'states', 'inputs', 'outputs', 'period']);

interface Word {
  text: string;
  start: number;
  end: number;
}

/** Splits the code part of a line (comment removed) into entries, keeping parenthesised groups whole. */
function splitEntries(line: string, offset: number, problems: Problem[]): Word[] {
  const words: Word[] = [];
  let i = 0;
  while (i < line.length) {
    const ch = line[i];
    if (ch === ' ' || ch === '\t' || ch === ',' || ch === '\r') {
      i++;
      continue;
    }
    const start = i;
    let depth = 0;
    while (i < line.length) {
      const c = line[i];
      if (c === '(') depth++;
      else if (c === ')') depth = Math.max(0, depth - 1);
      else if (depth === 0 && (c === ' ' || c === '\t' || c === ',' || c === '\r')) break;
      i++;
    }
    if (depth > 0) {
      problems.push({
        span: { start: offset + start, end: offset + i },
        severity: 'error',
        code: 'syntax-error',
        message: "Missing ')' in this entry.",
      });
    }
    words.push({ text: line.slice(start, i), start: offset + start, end: offset + i });
  }
  return words;
}

/** Whitespace-separated words of a line's code part. */
function splitWords(line: string, offset: number): Word[] {
  const words: Word[] = [];
  const re = /\S+/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(line))) words.push({ text: m[0], start: offset + m.index, end: offset + m.index + m[0].length });
  return words;
}

interface OpenSystem {
  info: LtiSystemInfo;
  headerSpan: Span;
  statesSpan: Span | null;
  inputsSpan: Span | null;
  outputsSpan: Span | null;
  blocks: Map<string, number>;
}

interface OpenBlock {
  label: Word;
  rows: { span: Span; entries: Word[] }[];
  system: OpenSystem | null;
}

export function extractLti(text: string, extraStatePatterns: RegExp[]): ExtractedFile {
  const problems: Problem[] = [];
  const matrices: MatrixLiteral[] = [];
  const constants: Constant[] = [];
  const systems: LtiSystemInfo[] = [];
  const scope = new Map<string, EntryValue>();
  const lines = new LineIndex(text);
  const error = (span: Span, code: string, message: string) => problems.push({ span, severity: 'error', code, message });

  // First code line, for the file pragma; comments are whole-line or trailing `#`.
  let firstCode = text.length;
  for (let l = 0; l < lines.starts.length; l++) {
    const t = lines.lineText(l);
    const code = t.replace(/#.*$/, '').trim();
    if (code !== '') {
      firstCode = lines.starts[l] + t.indexOf(code[0]);
      break;
    }
  }
  const attacher = new PragmaAttacher(
    text,
    'lti',
    (offset) => {
      const l = lines.lineOf(offset);
      const t = lines.lineText(l);
      const hash = t.indexOf('#');
      if (hash < 0 || lines.starts[l] + hash > offset) return null;
      return { start: lines.starts[l] + hash, end: lines.starts[l] + t.length };
    },
    firstCode,
    problems,
  );

  const evaluate = (w: Word): EntryValue | null => {
    const r = evaluateEntry(w.text, scope, 'lti');
    if ('error' in r) {
      let message = r.error.message;
      if (r.error.code === 'syntax-error' && /^[*/^+]|[-+*/^]$/.test(w.text)) {
        message += ' In .lti rows, spaces separate entries: write the expression without spaces or in parentheses.';
      }
      error({ start: w.start + r.error.start, end: Math.max(w.start + r.error.end, w.start + r.error.start) }, r.error.code, message);
      return null;
    }
    return r.value;
  };

  let system: OpenSystem | null = null;
  let block: OpenBlock | null = null;

  const closeBlock = () => {
    if (!block) return;
    const b = block;
    block = null;
    const sys = b.system;
    if (b.rows.length === 0) {
      error({ start: b.label.start, end: b.label.end + 1 }, 'syntax-error', `Block ${b.label.text}: has no rows.`);
      return;
    }
    const nCols = b.rows[0].entries.length;
    let ragged = false;
    b.rows.forEach((row, r) => {
      if (row.entries.length !== nCols) {
        ragged = true;
        error(row.span, 'ragged-rows', `Row ${r + 1} of ${b.label.text} has ${row.entries.length} entries but row 1 has ${nCols}.`);
      }
    });
    if (sys) {
      if (sys.blocks.has(b.label.text)) {
        error({ start: b.label.start, end: b.label.end }, 'duplicate-block', `${b.label.text} is already given in system ${sys.info.name}; this one is ignored.`);
        return;
      }
      sys.blocks.set(b.label.text, matrices.length);
    }
    if (ragged) return;
    let exact = true;
    const rows: MatrixEntry[][] = b.rows.map((row) =>
      row.entries.map((w) => {
        const value = evaluate(w);
        if (!value || value.kind !== 'exact') exact = false;
        return { span: { start: w.start, end: w.end }, text: w.text, value };
      }),
    );
    const last = b.rows[b.rows.length - 1].span;
    const span = { start: b.label.start, end: last.end };
    const nameRole = roleFromName(b.label.text, extraStatePatterns);
    const pragma = attacher.attach(b.label.start, scope);
    if (pragma?.ignore) return;
    matrices.push({
      name: b.label.text,
      nameSpan: { start: b.label.start, end: b.label.end },
      span,
      statementSpan: span,
      rows,
      rowSpans: b.rows.map((r) => r.span),
      nRows: rows.length,
      nCols,
      exact,
      role: pragma?.role ?? nameRole?.role ?? 'unknown',
      groupKey: pragma?.model ?? (sys ? sys.info.name : ''),
      pragma,
    });
    if (sys) checkDeclaredShape(matrices[matrices.length - 1], sys, error);
  };

  const closeSystem = (endSpan: Span | null) => {
    closeBlock();
    if (!system) return;
    const s = system;
    system = null;
    if (endSpan) s.info.span = { start: s.info.span.start, end: endSpan.end };
    else error(s.info.nameSpan, 'missing-end', `System ${s.info.name} has no 'end' line.`);
    systems.push(s.info);
  };

  for (let l = 0; l < lines.starts.length; l++) {
    const lineStart = lines.starts[l];
    const raw = lines.lineText(l);
    const hash = raw.indexOf('#');
    const code = hash >= 0 ? raw.slice(0, hash) : raw;
    if (code.trim() === '') continue;
    const words = splitWords(code, lineStart);
    const first = words[0];
    const labelMatch = /^\s*([A-Za-z][A-Za-z0-9_]*)\s*:/.exec(code);

    if (labelMatch && !KEYWORDS.has(labelMatch[1])) {
      closeBlock();
      const labelStart = lineStart + code.indexOf(labelMatch[1]);
      const label: Word = { text: labelMatch[1], start: labelStart, end: labelStart + labelMatch[1].length };
      if (!BLOCK_LABELS.has(label.text) && !roleFromName(label.text, extraStatePatterns)) {
        error(
          { start: label.start, end: label.end },
          'unknown-keyword',
          `Unknown block '${label.text}:'; blocks are A: B: C: D: G: Q: (also F: H:).`,
        );
        continue;
      }
      if (!system) error({ start: label.start, end: label.end }, 'syntax-error', `Block ${label.text}: must be inside 'system … end'.`);
      block = { label, rows: [], system };
      const restOffset = labelMatch[0].length;
      const rest = code.slice(restOffset);
      const entries = splitEntries(rest, lineStart + restOffset, problems);
      if (entries.length > 0) {
        block.rows.push({ span: { start: entries[0].start, end: entries[entries.length - 1].end }, entries });
      }
      continue;
    }

    switch (first.text) {
      case 'param': {
        closeBlock();
        const m = /^(\s*param\s+)([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(.*?)\s*$/.exec(code);
        if (!m || m[3] === '') {
          error({ start: first.start, end: lineStart + code.trimEnd().length }, 'syntax-error', "Write a parameter as 'param name = value'.");
          continue;
        }
        const nameStart = lineStart + m[1].length;
        const exprStart = lineStart + code.indexOf(m[3], m[1].length + m[2].length);
        const value = evaluate({ text: m[3], start: exprStart, end: exprStart + m[3].length });
        if (value) {
          scope.set(m[2], value);
          constants.push({ name: m[2], span: { start: nameStart, end: nameStart + m[2].length }, value });
        } else scope.delete(m[2]);
        continue;
      }
      case 'system': {
        if (system) closeSystem(null);
        const name = words[1];
        if (!name || !/^[A-Za-z_][A-Za-z0-9_]*$/.test(name.text)) {
          error({ start: first.start, end: (name ?? first).end }, 'syntax-error', "Write 'system name continuous|discrete [period=T]'.");
        }
        const info: LtiSystemInfo = {
          name: name?.text ?? '',
          nameSpan: name ? { start: name.start, end: name.end } : { start: first.start, end: first.end },
          span: { start: first.start, end: lineStart + raw.length },
          domain: null,
          period: null,
          states: [],
          inputs: [],
          outputs: [],
        };
        system = { info, headerSpan: { start: first.start, end: lineStart + code.trimEnd().length }, statesSpan: null, inputsSpan: null, outputsSpan: null, blocks: new Map() };
        // Header options: the domain word and period=T (or `period = T`, `period T`).
        const options = code.slice(name ? name.end - lineStart : first.end - lineStart);
        const optOffset = name ? name.end : first.end;
        const re = /(period)\s*=?\s*(\S+)|(\S+)/g;
        let o: RegExpExecArray | null;
        while ((o = re.exec(options))) {
          const at = optOffset + o.index;
          if (o[1]) {
            const valueStart = optOffset + o.index + o[0].length - o[2].length;
            const v = evaluate({ text: o[2], start: valueStart, end: valueStart + o[2].length });
            if (v) info.period = positivePeriod(v, { start: valueStart, end: valueStart + o[2].length }, error);
          } else if (o[3] === 'continuous' || o[3] === 'discrete') {
            info.domain = o[3];
          } else {
            error({ start: at, end: at + o[3].length }, 'unknown-keyword', `Unknown word '${o[3]}' after the system name; expected continuous, discrete or period=T.`);
          }
        }
        continue;
      }
      case 'end': {
        if (!system) {
          closeBlock();
          error({ start: first.start, end: first.end }, 'unexpected-end', "'end' without a 'system' line.");
          continue;
        }
        if (words.length > 1) error({ start: words[1].start, end: words[words.length - 1].end }, 'syntax-error', "Nothing may follow 'end'.");
        closeSystem({ start: first.start, end: first.end });
        continue;
      }
      case 'states':
      case 'inputs':
      case 'outputs': {
        closeBlock();
        if (!system) {
          error({ start: first.start, end: first.end }, 'syntax-error', `'${first.text}' must be inside 'system … end'.`);
          continue;
        }
        const names = words.slice(1);
        for (const w of names) {
          if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(w.text)) error({ start: w.start, end: w.end }, 'syntax-error', `'${w.text}' is not a name.`);
        }
        const list = names.map((w) => w.text);
        const span = { start: first.start, end: (names[names.length - 1] ?? first).end };
        if (first.text === 'states') {
          system.info.states = list;
          system.statesSpan = span;
        } else if (first.text === 'inputs') {
          system.info.inputs = list;
          system.inputsSpan = span;
        } else {
          system.info.outputs = list;
          system.outputsSpan = span;
        }
        continue;
      }
      case 'period': {
        closeBlock();
        if (!system) {
          error({ start: first.start, end: first.end }, 'syntax-error', "'period' must be inside 'system … end'.");
          continue;
        }
        const m = /^(\s*period\s*=?\s*)(.*?)\s*$/.exec(code)!;
        const valueStart = lineStart + m[1].length;
        if (m[2] === '') {
          error({ start: first.start, end: first.end }, 'syntax-error', "'period' needs a value in seconds.");
          continue;
        }
        const v = evaluate({ text: m[2], start: valueStart, end: valueStart + m[2].length });
        if (v) system.info.period = positivePeriod(v, { start: valueStart, end: valueStart + m[2].length }, error);
        continue;
      }
    }

    // A bare word that is no parameter and no known constant reads as a misspelt keyword,
    // not as a row (rows start with numbers, signs, parentheses or parameter names).
    const bareWord = /^[A-Za-z_][A-Za-z0-9_]*$/.test(first.text) && !scope.has(first.text) && !['pi', 'e'].includes(first.text);
    if (block && !bareWord) {
      const entries = splitEntries(code, lineStart, problems);
      if (entries.length > 0) block.rows.push({ span: { start: entries[0].start, end: entries[entries.length - 1].end }, entries });
      continue;
    }
    closeBlock();
    error(
      { start: first.start, end: first.end },
      'unknown-keyword',
      `Unknown keyword '${first.text}'; expected param, system, states, inputs, outputs, period, a block label such as A:, or end.`,
    );
  }
  closeSystem(null);
  closeBlock();
  const filePragma = attacher.finish();
  return { language: 'lti', matrices, constants, filePragma, problems, systems };
}

function positivePeriod(v: EntryValue, span: Span, error: (s: Span, c: string, m: string) => void): EntryValue | null {
  const sign = v.kind === 'exact' ? v.value.sign() : Math.sign(v.value);
  if (sign <= 0) {
    error(span, 'bad-period', 'The sample period must be positive (seconds).');
    return null;
  }
  return v;
}

/** Checks a block against the declared states/inputs/outputs of its system. */
function checkDeclaredShape(m: MatrixLiteral, sys: OpenSystem, error: (s: Span, c: string, msg: string) => void): void {
  const n = sys.info.states.length || null;
  const mIn = sys.info.inputs.length || null;
  const p = sys.info.outputs.length || null;
  const expect: { rows: number | null; cols: number | null; why: string } | null =
    m.role === 'state'
      ? { rows: n, cols: n, why: `${n} states` }
      : m.role === 'input'
        ? { rows: n, cols: mIn, why: `${n ?? '?'} states × ${mIn ?? '?'} inputs` }
        : m.role === 'output'
          ? { rows: p, cols: n, why: `${p ?? '?'} outputs × ${n ?? '?'} states` }
          : m.role === 'feedthrough'
            ? { rows: p, cols: mIn, why: `${p ?? '?'} outputs × ${mIn ?? '?'} inputs` }
            : m.role === 'noise-input'
              ? { rows: n, cols: null, why: `${n ?? '?'} states` }
              : null;
  if (!expect) return;
  const badRows = expect.rows !== null && expect.rows !== m.nRows;
  const badCols = expect.cols !== null && expect.cols !== m.nCols;
  if (badRows || badCols) {
    const want = `${expect.rows ?? 'any'}×${expect.cols ?? 'any'}`;
    error(m.span, 'shape-mismatch', `${m.name} is ${m.nRows}×${m.nCols} but system ${sys.info.name} declares ${expect.why}, so it should be ${want}.`);
  }
}
