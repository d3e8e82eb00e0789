/** Plain text edits and line helpers shared by the code actions (offsets are UTF-16 units). */
import type { Span } from '../syntax/types';

export interface TextEdit {
  span: Span;
  newText: string;
}

export function lineStart(text: string, offset: number): number {
  return text.lastIndexOf('\n', offset - 1) + 1;
}

export function lineEnd(text: string, offset: number): number {
  const end = text.indexOf('\n', offset);
  return end < 0 ? text.length : end;
}

export function indentationAt(text: string, offset: number): string {
  const start = lineStart(text, offset);
  return /^[ \t]*/.exec(text.slice(start))?.[0] ?? '';
}

/** The line ending the document mostly uses, so inserted code matches it. */
export function eol(text: string): string {
  return text.includes('\r\n') ? '\r\n' : '\n';
}
