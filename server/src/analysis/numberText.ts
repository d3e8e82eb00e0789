/**
 * Numbers for people: significant digits without trailing zeros, engineering-friendly
 * exponents, and durations with a unit. Used by the CLI text report and the hover.
 */
export function formatNumber(x: number, digits = 6): string {
  if (Number.isNaN(x)) return 'NaN';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  if (x === 0) return '0';
  const ax = Math.abs(x);
  let s: string;
  if (ax >= 1e-4 && ax < 1e7) {
    s = Number(x.toPrecision(digits)).toString();
    if (s.includes('e')) s = x.toPrecision(digits);
  } else {
    const [m, e] = x.toExponential(digits - 1).split('e');
    s = `${Number(m)}e${Number(e)}`;
  }
  return s.replace(/^-/, '−');
}

/** A time in seconds, scaled to ms/µs or min/h where that reads better. */
export function formatSeconds(sec: number, digits = 3): string {
  if (!Number.isFinite(sec)) return '∞';
  const a = Math.abs(sec);
  if (a === 0) return '0 s';
  if (a < 1e-3) return `${formatNumber(sec * 1e6, digits)} µs`;
  if (a < 1) return `${formatNumber(sec * 1e3, digits)} ms`;
  if (a < 600) return `${formatNumber(sec, digits)} s`;
  if (a < 36000) return `${formatNumber(sec / 60, digits)} min`;
  return `${formatNumber(sec / 3600, digits)} h`;
}

/**
 * "λ = -1 ± j√3", "λ ≈ -4.369 ± j8.7139", "λ = ±j2", "λ = 16": an eigenvalue (the upper member
 * of a conjugate pair stands for the pair) with "=" for exact and "≈" for numeric values.
 */
export function eigenvalueLabel(e: { text: string; im: number }, symbol = 'λ'): string {
  let text = e.text;
  let rel = '=';
  if (text.startsWith('≈')) {
    rel = '≈';
    text = text.slice(1).trim();
  }
  if (e.im > 0) {
    const k = text.lastIndexOf('+j');
    if (k > 0) text = `${text.slice(0, k)} ± j${text.slice(k + 2)}`;
    else if (text.startsWith('j')) text = `±${text}`;
  }
  return `${symbol} ${rel} ${text}`;
}

/** "linearly (like t)", "like t²", "like k³": how a boundary Jordan block of size `block` grows. */
export function polynomialGrowth(variable: 't' | 'k', block: number): string {
  const m = block - 1;
  if (m <= 1) return `linearly (like ${variable})`;
  const sup: Record<string, string> = { '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };
  return `like ${variable}${String(m).split('').map((c) => sup[c]).join('')}`;
}

/**
 * A whole number with commas between groups of three digits (12,345). Written out rather than
 * `toLocaleString('en-US')`, which loads several MB of the runtime's locale data into memory.
 */
export function groupedInteger(n: number): string {
  if (!Number.isSafeInteger(n)) return String(n);
  const digits = String(Math.abs(n));
  let out = '';
  for (let i = 0; i < digits.length; i++) {
    if (i > 0 && (digits.length - i) % 3 === 0) out += ',';
    out += digits[i];
  }
  return n < 0 ? `-${out}` : out;
}
