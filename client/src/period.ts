/**
 * Reads the sample period typed into the "Discretize at Period…" input box.
 *
 * Accepted: a positive decimal or scientific-notation number ("0.01", "1e-3", ".5") or a
 * ratio of two such numbers ("1/100"), optionally followed by "s". Anything else gets a
 * reason the input box shows while the user types. No expression evaluation: the input is
 * matched against a fixed pattern, never run.
 */
export type PeriodParse = { ok: true; period: number } | { ok: false; reason: string };

const NUMBER = String.raw`(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?`;
const PERIOD = new RegExp(String.raw`^(${NUMBER})(?:\s*/\s*(${NUMBER}))?\s*s?$`);

export function parsePeriod(input: string): PeriodParse {
  const text = input.trim();
  if (text === '') return { ok: false, reason: 'Type a sample period in seconds, for example 0.01.' };
  const match = PERIOD.exec(text);
  if (!match) return { ok: false, reason: `"${text}" is not a number of seconds (examples: 0.01, 1e-3, 1/100).` };
  const numerator = Number(match[1]);
  const denominator = match[2] === undefined ? 1 : Number(match[2]);
  const period = numerator / denominator;
  if (!Number.isFinite(period)) return { ok: false, reason: 'The sample period must be a finite number.' };
  if (!(period > 0)) return { ok: false, reason: 'The sample period must be greater than zero.' };
  return { ok: true, period };
}
