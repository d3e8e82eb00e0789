// Measures source extraction: a cold full extract of the generated 5,000-line Python and
// TypeScript benchmark files (invented data, test/bench/generate.mjs), and a one-character
// edit inside one matrix followed by extract. Prints medians; asserts nothing (timings
// depend on the machine's load, which is printed beside them).
// Run from the repository root: node test/syntax/perf-extract.mjs [--runs 15]
import { bundleEntry } from '../support/bundleEntry.mjs';
import { createRequire } from 'node:module';
import { join, dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { loadavg } from 'node:os';
import { generateSourceFile } from '../bench/generate.mjs';

const require = createRequire(import.meta.url);
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const runsArg = process.argv.indexOf('--runs');
const runs = runsArg > 0 ? Number(process.argv[runsArg + 1]) : 15;

const outfile = await bundleEntry(root, `export { extract, initParsers, clearExtractCaches } from './server/src/syntax/extract';`, 'perf-extract.cjs');
const syntax = require(outfile);
await syntax.initParsers();

const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const ms = (t0) => Number(process.hrtime.bigint() - t0) / 1e6;

console.log(`load average ${loadavg().map((x) => x.toFixed(2)).join(' ')}, node ${process.version}, ${runs} runs`);
for (const language of ['python', 'typescript']) {
  const { text, matrices } = generateSourceFile(1, language);
  const lineStarts = [0];
  for (let i = 0; i < text.length; i++) if (text[i] === '\n') lineStarts.push(i + 1);
  // Warm the JIT on an unrelated file so the "cold" figure is about caches, not compilation.
  syntax.extract(generateSourceFile(99, language).text, language);

  const cold = [];
  for (let r = 0; r < runs; r++) {
    syntax.clearExtractCaches?.();
    const t0 = process.hrtime.bigint();
    syntax.extract(text, language);
    cold.push(ms(t0));
  }

  // Edits: replace one digit of an entry in a matrix near the middle by another digit, each run a different entry.
  syntax.clearExtractCaches?.();
  let current = text;
  syntax.extract(current, language);
  const edit = [];
  let count = 0;
  for (let r = 0; r < runs; r++) {
    const m = matrices[(150 + r * 7) % matrices.length];
    const e = m.entries[0][0];
    const at = lineStarts[e.line] + e.character + e.text.search(/\d/);
    const digit = current[at] === '7' ? '3' : '7';
    current = current.slice(0, at) + digit + current.slice(at + 1);
    const t0 = process.hrtime.bigint();
    const file = syntax.extract(current, language);
    edit.push(ms(t0));
    count = file.matrices.length;
  }
  // The same edited text without any reuse (what every extraction cost before the caches).
  const scratch = [];
  for (let r = 0; r < runs; r++) {
    const t0 = process.hrtime.bigint();
    syntax.extract(current, language, { reuse: false });
    scratch.push(ms(t0));
  }
  console.log(
    `${language}: ${text.length} chars, ${count} matrices; cold extract median ${median(cold).toFixed(1)} ms (min ${Math.min(...cold).toFixed(1)}); ` +
      `edit → extract median ${median(edit).toFixed(1)} ms (min ${Math.min(...edit).toFixed(1)}); ` +
      `without reuse median ${median(scratch).toFixed(1)} ms (min ${Math.min(...scratch).toFixed(1)})`,
  );
}
