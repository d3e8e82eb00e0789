// Long fuzz run over the built bundle (dist/fuzz-entry.js, bundled here first): mutated
// demo sources through analyzeDocument and random matrices through the engine, seeded.
// Prints cases tried and failures per target; exits 1 on any failure.
//   node test/fuzz/long.mjs [--cases N] [--seed S]     (default 100000 cases, seed 1)
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { bundleFuzzEntry } from './bundle.mjs';
import { engineCase, seededRandom, sourceCase } from './targets.mjs';

const root = process.cwd();
const argv = process.argv.slice(2);
const arg = (name, fallback) => {
  const i = argv.indexOf(name);
  return i >= 0 ? Number(argv[i + 1]) : fallback;
};
const totalCases = arg('--cases', 100_000);
const seed = arg('--seed', 1);

const api = createRequire(import.meta.url)(await bundleFuzzEntry(root));
await api.initAnalysis({ wasmDir: join(root, 'dist') });

const LANG = { py: 'python', ts: 'typescript', lti: 'lti' };
const demoDir = join(root, 'test', 'demo');
const seeds = readdirSync(demoDir)
  .filter((f) => LANG[f.split('.').pop()])
  .map((f) => ({ language: LANG[f.split('.').pop()], text: readFileSync(join(demoDir, f), 'utf8') }));

const rnd = seededRandom(seed);
const counts = { source: { tried: 0, failed: 0, known: 0 }, engine: { tried: 0, failed: 0, known: 0 } };
const failures = [];
const started = performance.now();
let slowest = { ms: 0, target: '' };
for (let i = 0; i < totalCases; i++) {
  // Sources are cheaper than exact spectra of 5×5 mixed-scale matrices; split ~3:1.
  const target = i % 4 === 3 ? 'engine' : 'source';
  const t0 = performance.now();
  const failure = target === 'engine' ? engineCase(api, rnd) : sourceCase(api, rnd, seeds);
  const ms = performance.now() - t0;
  if (ms > slowest.ms) slowest = { ms, target };
  counts[target].tried++;
  if (failure) {
    counts[target].failed++;
    if (failure.known) counts[target].known++;
    if (failures.length < 50) failures.push({ case: i, ...failure, input: String(failure.input).slice(0, 4000) });
  }
  if ((i + 1) % 10_000 === 0) console.log(`  ${i + 1} cases, ${((performance.now() - started) / 1000).toFixed(1)} s, failures ${counts.source.failed + counts.engine.failed} (known ${counts.source.known + counts.engine.known})`);
}
const wall = (performance.now() - started) / 1000;
console.log(`fuzz seed ${seed}: ${totalCases} cases in ${wall.toFixed(1)} s`);
for (const [name, c] of Object.entries(counts)) console.log(`  ${name.padEnd(7)} tried ${c.tried}  failed ${c.failed} (of which known FIXME ${c.known})`);
console.log(`  slowest single case: ${slowest.ms.toFixed(0)} ms (${slowest.target})`);
if (failures.length > 0) {
  writeFileSync(join(root, 'dist', 'fuzz-failures.json'), JSON.stringify(failures, null, 2));
  for (const f of failures.slice(0, 10)) console.log(`FAIL${f.known ? ' (known FIXME)' : ''} #${f.case} ${f.target} ${f.family ?? ''}: ${f.detail}\n     input: ${JSON.stringify(f.input.slice(0, 300))}`);
  console.log('all failures: dist/fuzz-failures.json');
  process.exit(1);
}
