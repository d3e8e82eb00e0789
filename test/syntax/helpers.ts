import { expect } from 'vitest';
import type { ExtractedFile, MatrixLiteral, Problem } from '../../server/src/syntax/types';

export function matrixNamed(file: ExtractedFile, name: string, nth = 0): MatrixLiteral {
  const found = file.matrices.filter((m) => m.name === name);
  if (!found[nth]) throw new Error(`no matrix ${name} (#${nth}); have ${file.matrices.map((m) => m.name).join(', ')}`);
  return found[nth];
}

/** Entry texts as the document spells them, read back through each entry's span. */
export function entrySlices(text: string, m: MatrixLiteral): string[][] {
  return m.rows.map((row) => row.map((e) => text.slice(e.span.start, e.span.end)));
}

/** Exact values as strings ("1/10"), floats as numbers, unevaluated entries as null. */
export function entryValues(m: MatrixLiteral): (string | number | null)[][] {
  return m.rows.map((row) => row.map((e) => (e.value === null ? null : e.value.kind === 'exact' ? e.value.value.toString() : e.value.value)));
}

export function problemsWith(file: ExtractedFile, code: string): Problem[] {
  return file.problems.filter((p) => p.code === code);
}

export function expectProblem(text: string, file: ExtractedFile, code: string, slice: string): Problem {
  const p = file.problems.find((q) => q.code === code && text.slice(q.span.start, q.span.end) === slice);
  expect(p, `expected ${code} at ${JSON.stringify(slice)}; got ${JSON.stringify(file.problems.map((q) => [q.code, text.slice(q.span.start, q.span.end)]))}`).toBeDefined();
  return p!;
}
