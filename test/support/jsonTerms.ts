// Evaluates the term encoding of the JSON report (README, "JSON report") straight from its
// definition, independently of the engine's own evaluator, so CLI tests check the contract.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

type Term = Record<string, number | string>;

export function evalTerm(term: Term, x: number): number {
  const c = term.coef as number;
  if ('at' in term) return x === term.at ? c : 0;
  if ('rate' in term) {
    const w = term.wave === 'sin' ? Math.sin((term.freq as number) * x) : Math.cos((term.freq as number) * x);
    return c * x ** (term.power as number) * Math.exp((term.rate as number) * x) * w;
  }
  const w = term.wave === 'sin' ? Math.sin((term.angle as number) * x) : Math.cos((term.angle as number) * x);
  return c * x ** (term.power as number) * (term.radius as number) ** x * w;
}

export function evalEntries(entries: Term[][][], x: number): number[][] {
  return entries.map((row) => row.map((terms) => terms.reduce((s, t) => s + evalTerm(t, x), 0)));
}

/** Writes `source` to a temporary file with the given extension and runs `eigenlens check --format json` on it. */
export function cliJson(source: string, ext: string, extraArgs: string[] = []): any {
  const dir = mkdtempSync(join(tmpdir(), 'eigenlens-cli-'));
  const file = join(dir, `model${ext}`);
  writeFileSync(file, source);
  const out = execFileSync(process.execPath, ['bin/eigenlens.js', 'check', file, '--format', 'json', ...extraArgs], { encoding: 'utf8' });
  return JSON.parse(out);
}

/** max |a − b| / max(1, max |b|): the norm-relative error used for matrix comparisons here. */
export function normRelError(a: number[][], b: number[][]): number {
  let num = 0;
  let den = 1;
  for (let i = 0; i < b.length; i++)
    for (let j = 0; j < b[i].length; j++) {
      num = Math.max(num, Math.abs(a[i][j] - b[i][j]));
      den = Math.max(den, Math.abs(b[i][j]));
    }
  return num / den;
}
