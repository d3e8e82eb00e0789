/**
 * Edits that set a matrix's time domain. Python and TypeScript get our pragma comment on the
 * line above the matrix statement (rewriting an existing pragma's domain word in place);
 * .lti files rewrite the domain word of the enclosing `system` header, which is where a model
 * file declares it. The pragma grammar is the syntax layer's (`# eigenlens: discrete period=…`).
 */
import type { MatrixReport } from '../analysis/report';
import type { SourceLanguage } from '../syntax/types';
import { eol, indentationAt, lineEnd, lineStart, type TextEdit } from './edits';

const PRAGMA_LINE = /^([ \t]*)(#|\/\/)\s*eigenlens\s*:(.*)$/;

function commentLeader(language: SourceLanguage): string {
  return language === 'python' || language === 'lti' ? '#' : '//';
}

/** The edit that makes `matrix` read in `domain`, or null when nothing needs to change. */
export function domainEdit(text: string, language: SourceLanguage, matrix: MatrixReport, domain: 'continuous' | 'discrete'): TextEdit | null {
  if (language === 'lti') return ltiSystemDomainEdit(text, matrix, domain);
  const stmtLine = lineStart(text, matrix.statementSpan.start);
  // 1. A pragma at the end of the statement's first line.
  const firstLineEnd = lineEnd(text, stmtLine);
  const firstLine = text.slice(stmtLine, firstLineEnd);
  const trailing = /(#|\/\/)\s*eigenlens\s*:.*$/.exec(firstLine);
  if (trailing) return rewritePragma(stmtLine + trailing.index, trailing[0], domain);
  // 2. Pragma lines directly above the statement.
  let cursor = stmtLine;
  while (cursor > 0) {
    const prevStart = lineStart(text, cursor - 1);
    const prevLine = text.slice(prevStart, cursor - 1).replace(/\r$/, '');
    const m = PRAGMA_LINE.exec(prevLine);
    if (!m) break;
    if (/\b(continuous|discrete)\b/.test(m[3])) return rewritePragma(prevStart + m[1].length, prevLine.slice(m[1].length), domain);
    cursor = prevStart;
  }
  const indent = indentationAt(text, stmtLine);
  return { span: { start: stmtLine, end: stmtLine }, newText: `${indent}${commentLeader(language)} eigenlens: ${domain}${eol(text)}` };
}

function rewritePragma(start: number, comment: string, domain: string): TextEdit | null {
  const word = /\b(continuous|discrete)\b/.exec(comment);
  if (word) {
    if (word[1] === domain) return null;
    return { span: { start: start + word.index, end: start + word.index + word[1].length }, newText: domain };
  }
  const colon = comment.indexOf(':');
  return { span: { start: start + colon + 1, end: start + colon + 1 }, newText: ` ${domain}` };
}

function ltiSystemDomainEdit(text: string, matrix: MatrixReport, domain: string): TextEdit | null {
  const header = /^[ \t]*system[ \t]+([A-Za-z_][\w]*)([^\n#]*)/gm;
  let last: RegExpExecArray | null = null;
  let m: RegExpExecArray | null;
  while ((m = header.exec(text)) && m.index <= matrix.span.start) last = m;
  if (!last) return null;
  const restStart = last.index + last[0].length - last[2].length;
  const word = /\b(continuous|discrete)\b/.exec(last[2]);
  if (word) {
    if (word[1] === domain) return null;
    return { span: { start: restStart + word.index, end: restStart + word.index + word[1].length }, newText: domain };
  }
  const nameEnd = last.index + last[0].length - last[2].length;
  return { span: { start: nameEnd, end: nameEnd }, newText: ` ${domain}` };
}
