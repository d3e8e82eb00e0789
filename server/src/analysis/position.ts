/**
 * 1-based line and column (UTF-16 units) of an offset, as the CLI and SARIF print them.
 * Line starts are computed once per text and searched by bisection: a document with hundreds
 * of matrices asks for hundreds of positions, and rescanning from the top made that quadratic.
 */
let lastText: string | null = null;
let lastStarts: Int32Array = new Int32Array([0]);

function lineStarts(text: string): Int32Array {
  if (text === lastText) return lastStarts;
  const starts: number[] = [0];
  for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) starts.push(i + 1);
  lastText = text;
  lastStarts = Int32Array.from(starts);
  return lastStarts;
}

export function lineColumnAt(text: string, offset: number): { line: number; column: number } {
  const end = Math.max(0, Math.min(offset, text.length));
  const starts = lineStarts(text);
  let lo = 0;
  let hi = starts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (starts[mid] <= end) lo = mid;
    else hi = mid - 1;
  }
  return { line: lo + 1, column: end - starts[lo] + 1 };
}
