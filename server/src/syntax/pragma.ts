/**
 * Pragma comments of our own wording: `# eigenlens: discrete period=0.01` (Python, .lti),
 * `// eigenlens: continuous role=state` (TypeScript/JavaScript; `/* … *\/` also works).
 *
 * Keys: `continuous` | `discrete`, `period=<expr>` (seconds, > 0), `role=<role>`
 * (state|input|output|feedthrough|noise-input|noise-covariance), `model=<name>`, `ignore`.
 * `key = value` with spaces around `=` is accepted. Unknown keys and bad values give a
 * `bad-pragma` warning at the key or value; the rest of the pragma still applies.
 *
 * Attachment (done by the extractors with `pragmaFor`): a pragma on the line(s) directly
 * above a matrix statement, or at the end of its first line, applies to that matrix; a
 * pragma before any code applies to the whole file; any other pragma is `stray-pragma`.
 */
import { evaluateEntry } from './evaluate';
import type { EntryValue, MatrixRole, Pragma, Problem, SourceLanguage } from './types';

const PRAGMA_HEAD = /^(?:#|\/\/|\/\*)\s*eigenlens\s*:/;
const ROLES: MatrixRole[] = ['state', 'input', 'output', 'feedthrough', 'noise-input', 'noise-covariance'];

export interface ParsedPragma {
  pragma: Pragma;
  problems: Problem[];
}

/** True when a comment's text is one of our pragmas. */
export function isPragmaComment(commentText: string): boolean {
  return PRAGMA_HEAD.test(commentText);
}

/** Parses a pragma comment found at `start` in the document. Returns null for an ordinary comment. */
export function parsePragma(
  commentText: string,
  start: number,
  scope: ReadonlyMap<string, EntryValue>,
  lang: SourceLanguage,
): ParsedPragma | null {
  const head = PRAGMA_HEAD.exec(commentText);
  if (!head) return null;
  let body = commentText.slice(head[0].length);
  if (commentText.startsWith('/*')) body = body.replace(/\*\/\s*$/, '');
  const bodyStart = start + head[0].length;
  const pragma: Pragma = { span: { start, end: start + commentText.length } };
  const problems: Problem[] = [];
  const warn = (s: number, e: number, message: string) =>
    problems.push({ span: { start: bodyStart + s, end: bodyStart + e }, severity: 'warning', code: 'bad-pragma', message });

  const item = /([^\s=,]+)(?:\s*=\s*([^\s,]*))?/g;
  let m: RegExpExecArray | null;
  while ((m = item.exec(body))) {
    const key = m[1];
    const keyStart = m.index;
    const keyEnd = keyStart + key.length;
    const value = m[2];
    const valueStart = value === undefined ? keyEnd : m.index + m[0].length - value.length;
    switch (key) {
      case 'continuous':
      case 'discrete':
        if (pragma.domain && pragma.domain !== key) warn(keyStart, keyEnd, `'${key}' contradicts '${pragma.domain}' earlier in this pragma.`);
        pragma.domain = key;
        break;
      case 'ignore':
        pragma.ignore = true;
        break;
      case 'period': {
        if (!value) {
          warn(keyStart, keyEnd, "'period' needs a value, e.g. period=0.01 (seconds).");
          break;
        }
        const r = evaluateEntry(value, scope, lang);
        if ('error' in r) {
          warn(valueStart + r.error.start, valueStart + Math.max(r.error.end, r.error.start + 1), `Bad period: ${r.error.message}`);
        } else if ((r.value.kind === 'exact' ? r.value.value.sign() : Math.sign(r.value.value)) <= 0) {
          warn(valueStart, valueStart + value.length, 'The sample period must be positive.');
        } else {
          pragma.period = r.value;
        }
        break;
      }
      case 'role':
        if (value && (ROLES as string[]).includes(value)) pragma.role = value as MatrixRole;
        else warn(valueStart, valueStart + Math.max(1, value?.length ?? 0), `Unknown role '${value ?? ''}'; use one of ${ROLES.join(', ')}.`);
        break;
      case 'model':
        if (value && /^[A-Za-z_][A-Za-z0-9_.-]*$/.test(value)) pragma.model = value;
        else warn(valueStart, valueStart + Math.max(1, value?.length ?? 0), "'model' needs a name, e.g. model=motor.");
        break;
      default:
        warn(keyStart, keyEnd, `Unknown pragma key '${key}'; known keys are continuous, discrete, period=, role=, model=, ignore.`);
    }
  }
  return { pragma, problems };
}

/** Combines pragmas on consecutive lines; later keys override earlier ones. */
export function mergePragmas(pragmas: Pragma[]): Pragma | null {
  if (pragmas.length === 0) return null;
  const merged: Pragma = { span: { start: pragmas[0].span.start, end: pragmas[pragmas.length - 1].span.end } };
  for (const p of pragmas) {
    if (p.domain) merged.domain = p.domain;
    if (p.period) merged.period = p.period;
    if (p.role) merged.role = p.role;
    if (p.model) merged.model = p.model;
    if (p.ignore) merged.ignore = true;
  }
  return merged;
}
