/**
 * Code generation: the closed-form transition matrix of one state matrix as a function in the
 * file's own language — Python with numpy (`def phi_A(t)` / `def powers_A(k)`) or
 * TypeScript/JavaScript with Math.exp/Math.cos returning number[][]. Model files get none.
 *
 * The function fills a preallocated matrix entry by entry instead of returning a nested list
 * literal, so the generated code is never itself read back as a matrix literal. The block is
 * wrapped between marker comments naming the function; re-running the action replaces the
 * block between the markers instead of adding a second copy.
 *
 * Numbers are written in JavaScript's shortest round-trip form, which both Python and
 * JavaScript parse to the same double.
 */
import type { MatrixReport } from '../analysis/report';
import type { ContinuousTerm, DiscreteTerm, TransitionTerm } from '../engine/types';
import type { SourceLanguage } from '../syntax/types';
import { eol, indentationAt, lineEnd, lineStart, type TextEdit } from './edits';
import { formatNumber } from './format';

export type CodeLanguage = 'python' | 'typescript' | 'javascript';

export function supportsPhiCode(language: SourceLanguage): language is CodeLanguage {
  return language === 'python' || language === 'typescript' || language === 'javascript';
}

export function phiFunctionName(matrix: MatrixReport): string {
  const base = (matrix.name ?? `matrix_line${matrix.line}`).replace(/[^A-Za-z0-9_]/g, '_');
  return `${matrix.domain === 'discrete' ? 'powers' : 'phi'}_${base}`;
}

/** A generated block for this matrix is already in the document (so an action regenerates it). */
export function phiBlockExists(matrix: MatrixReport, language: CodeLanguage, documentText: string): boolean {
  const fn = phiFunctionName(matrix);
  const leader = language === 'python' ? '#' : '//';
  const beginAt = documentText.indexOf(beginMarker(leader, fn));
  return beginAt >= 0 && documentText.indexOf(endMarker(leader, fn), beginAt) >= 0;
}

const num = (x: number): string => (Object.is(x, -0) ? '0' : String(x));

interface Syntax {
  exp: string;
  cos: string;
  sin: string;
  pow: (base: string, exponent: string) => string;
  at: (j: number, value: string) => string;
}

function syntaxFor(language: CodeLanguage, np: string): Syntax {
  if (language === 'python') {
    return {
      exp: `${np}.exp`,
      cos: `${np}.cos`,
      sin: `${np}.sin`,
      pow: (b, e) => `${b}**${e}`,
      at: (j, v) => `(${v} if k == ${j} else 0.0)`,
    };
  }
  return {
    exp: 'Math.exp',
    cos: 'Math.cos',
    sin: 'Math.sin',
    pow: (b, e) => `${b} ** ${e}`,
    at: (j, v) => `(k === ${j} ? ${v} : 0)`,
  };
}

function continuousFactors(term: ContinuousTerm, s: Syntax): string[] | null {
  if (term.freq === 0 && term.wave === 'sin') return null;
  const f: string[] = [];
  if (term.power === 1) f.push('t');
  else if (term.power > 1) f.push(s.pow('t', String(term.power)));
  if (term.rate !== 0) f.push(`${s.exp}(${num(term.rate)} * t)`);
  if (term.freq !== 0) f.push(`${term.wave === 'cos' ? s.cos : s.sin}(${num(term.freq)} * t)`);
  return f;
}

function discreteFactors(term: Exclude<DiscreteTerm, { at: number }>, s: Syntax): string[] | null {
  if (term.angle === 0 && term.wave === 'sin') return null;
  const f: string[] = [];
  if (term.power === 1) f.push('k');
  else if (term.power > 1) f.push(s.pow('k', String(term.power)));
  if (term.radius !== 1) f.push(s.pow(term.radius < 0 ? `(${num(term.radius)})` : num(term.radius), 'k'));
  if (term.angle !== 0) f.push(`${term.wave === 'cos' ? s.cos : s.sin}(${num(term.angle)} * k)`);
  return f;
}

/** One entry as an expression in `t` or `k`. */
export function entryExpression(terms: TransitionTerm[], s: Syntax, zero: string): string {
  const parts: { negative: boolean; text: string }[] = [];
  for (const term of terms) {
    if (term.coef === 0) continue;
    const magnitude = num(Math.abs(term.coef));
    if ('at' in term) {
      parts.push({ negative: term.coef < 0, text: s.at(term.at, magnitude) });
      continue;
    }
    const factors = 'rate' in term ? continuousFactors(term, s) : discreteFactors(term, s);
    if (factors === null) continue;
    const text = factors.length === 0 ? magnitude : Math.abs(term.coef) === 1 ? factors.join(' * ') : `${magnitude} * ${factors.join(' * ')}`;
    parts.push({ negative: term.coef < 0, text });
  }
  if (parts.length === 0) return zero;
  return parts.map((p, i) => (i === 0 ? (p.negative ? `-${p.text}` : p.text) : `${p.negative ? '-' : '+'} ${p.text}`)).join(' ');
}

function beginMarker(leader: string, fn: string): string {
  return `${leader} --- eigenlens generated ${fn}: begin (re-running the action replaces this block) ---`;
}

function endMarker(leader: string, fn: string): string {
  return `${leader} --- eigenlens generated ${fn}: end ---`;
}

function describe(matrix: MatrixReport): string[] {
  const t = matrix.transition!;
  const name = matrix.name ?? 'the matrix';
  const n = matrix.rows;
  const lines: string[] = [];
  lines.push(
    t.variable === 't'
      ? `Transition matrix Phi(t) = expm(${name} * t) of the ${n}x${n} state matrix ${name}, in closed form.`
      : `Matrix powers Phi(k) = ${name}**k of the ${n}x${n} state matrix ${name}, in closed form (integer k >= 0).`,
  );
  lines.push('');
  lines.push(`Generated by eigenlens from the matrix ${name} above; regenerate it after editing ${name}.`);
  lines.push(
    t.exactCoefficients
      ? 'Coefficients come from the exact eigenvalues and are written here rounded to double precision.'
      : 'Coefficients are floating-point: the eigenvalues were computed numerically.',
  );
  lines.push(
    t.variable === 't'
      ? 'Method: spectral decomposition f(A) = sum_i sum_j f^(j)(lambda_i)/j! Z_ij with constant component matrices Z_ij.'
      : 'Method: spectral decomposition of A^k with constant component matrices; terms marked k == j exist only at that step.',
  );
  lines.push(
    `Checked against ${t.variable === 't' ? 'a numeric matrix exponential' : 'repeated multiplication'}: largest relative difference ${formatNumber(t.check.residual, 2).replace('−', '-')}${t.check.passed ? '' : ' (CHECK FAILED: do not rely on this function)'}.`,
  );
  return lines;
}

/** The generated block (markers included), without a trailing newline. */
export function phiFunctionText(matrix: MatrixReport, language: CodeLanguage, documentText: string, indent = ''): string | null {
  const t = matrix.transition;
  if (!t || t.entries.length === 0) return null;
  const fn = phiFunctionName(matrix);
  const v = t.variable;
  const n = t.entries.length;
  const m = t.entries[0].length;
  const lines: string[] = [];
  if (language === 'python') {
    const npAlias = /^\s*import\s+numpy\s+as\s+np\s*$/m.test(documentText) ? null : 'np';
    const s = syntaxFor(language, 'np');
    lines.push(beginMarker('#', fn));
    lines.push(`def ${fn}(${v}):`);
    lines.push('    """' + describe(matrix)[0]);
    for (const line of describe(matrix).slice(1)) lines.push(line === '' ? '' : `    ${line}`);
    lines.push('    """');
    if (npAlias) lines.push('    import numpy as np');
    if (v === 'k') {
      lines.push('    if int(k) != k or k < 0:');
      lines.push(`        raise ValueError("${fn} needs an integer k >= 0")`);
      lines.push('    k = int(k)');
    }
    lines.push(`    phi = np.zeros((${n}, ${m}))`);
    t.entries.forEach((row, r) =>
      row.forEach((terms, c) => {
        const expr = entryExpression(terms, s, '0.0');
        if (expr !== '0.0') lines.push(`    phi[${r}, ${c}] = ${expr}`);
      }),
    );
    lines.push('    return phi');
    lines.push(endMarker('#', fn));
  } else {
    const typed = language === 'typescript';
    const s = syntaxFor(language, '');
    lines.push(beginMarker('//', fn));
    lines.push('/**');
    for (const line of describe(matrix)) lines.push(line === '' ? ' *' : ` * ${line}`);
    lines.push(' */');
    lines.push(typed ? `function ${fn}(${v}: number): number[][] {` : `function ${fn}(${v}) {`);
    if (v === 'k') {
      lines.push(`  if (!Number.isInteger(k) || k < 0) throw new RangeError('${fn} needs an integer k >= 0');`);
    }
    lines.push(
      typed
        ? `  const phi: number[][] = Array.from({ length: ${n} }, () => new Array<number>(${m}).fill(0));`
        : `  const phi = Array.from({ length: ${n} }, () => new Array(${m}).fill(0));`,
    );
    t.entries.forEach((row, r) =>
      row.forEach((terms, c) => {
        const expr = entryExpression(terms, s, '0');
        if (expr !== '0') lines.push(`  phi[${r}][${c}] = ${expr};`);
      }),
    );
    lines.push('  return phi;');
    lines.push('}');
    lines.push(endMarker('//', fn));
  }
  const newline = eol(documentText);
  return lines.map((line) => (line === '' ? '' : indent + line)).join(newline);
}

/** Where the block goes: replacing an earlier generated block of the same name, else after the statement. */
export function phiInsertEdit(matrix: MatrixReport, language: CodeLanguage, documentText: string): TextEdit | null {
  const fn = phiFunctionName(matrix);
  const leader = language === 'python' ? '#' : '//';
  const begin = beginMarker(leader, fn);
  const end = endMarker(leader, fn);
  const beginAt = documentText.indexOf(begin);
  if (beginAt >= 0) {
    const endAt = documentText.indexOf(end, beginAt);
    if (endAt >= 0) {
      const blockStart = lineStart(documentText, beginAt);
      const indent = documentText.slice(blockStart, beginAt);
      const newText = phiFunctionText(matrix, language, documentText, indent);
      if (newText === null) return null;
      return { span: { start: blockStart, end: endAt + end.length }, newText };
    }
  }
  const indent = indentationAt(documentText, matrix.statementSpan.start);
  const block = phiFunctionText(matrix, language, documentText, indent);
  if (block === null) return null;
  const insertAt = lineEnd(documentText, matrix.statementSpan.end);
  const newline = eol(documentText);
  return { span: { start: insertAt, end: insertAt }, newText: `${newline}${newline}${block}${insertAt === documentText.length ? newline : ''}` };
}
