// Engine timings, in process: the exact pipeline (spectrum with Jordan structure, stability,
// modes, closed-form e^{At} with its built-in numeric residual check) for n = 2…12 on
// seeded random and constructed rational matrices, and the float spectrum + stability for
// n = 20, 60, 200. Every closed form is also compared (untimed) with the engine's numeric
// e^{At}, so a fast but wrong result cannot pass unnoticed.
import { performance } from 'node:perf_hooks';
import { constructedMatrix, makeRng, randomFloatMatrix, randomIntegerMatrix, randomRationalMatrix } from './generate.mjs';
import { summary } from './stats.mjs';

export const EXACT_KINDS = ['integer', 'rational', 'constructed'];

function exactMatrix(kind, rng, n) {
  if (kind === 'integer') return randomIntegerMatrix(rng, n);
  if (kind === 'rational') return randomRationalMatrix(rng, n);
  return constructedMatrix(rng, n, { rational: rng.next() < 0.5, unstable: rng.next() < 0.3 });
}

/** Repeats fn until `budgetMs` is spent (at least minRuns, at most maxRuns) after warm-up runs. */
export function timeRepeated(fn, { budgetMs, minRuns, maxRuns, warmup = 1 }) {
  for (let i = 0; i < warmup; i++) fn();
  const times = [];
  const start = performance.now();
  while (times.length < minRuns || (times.length < maxRuns && performance.now() - start < budgetMs)) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
  }
  return times;
}

/** ‖X − R‖_max / max(1, ‖R‖_max): the engine's own residual convention (types.ts). */
function relativeToNorm(X, R) {
  let diff = 0;
  let ref = 0;
  for (let i = 0; i < R.length; i++) {
    for (let j = 0; j < R.length; j++) {
      diff = Math.max(diff, Math.abs(X[i][j] - R[i][j]));
      ref = Math.max(ref, Math.abs(R[i][j]));
    }
  }
  return diff / Math.max(1, ref);
}

export function fullExactAnalysis(E, A) {
  const spectrum = E.exactSpectrum(A, { nearRepeatThreshold: E.DEFAULT_SETTINGS.nearRepeatThreshold });
  const stability = E.stabilityOf(spectrum.eigenvalues, 'continuous');
  const modes = E.modesOf(spectrum, 'continuous', null);
  const transition = E.transitionClosedForm(A, spectrum, 'continuous', { maxN: 12 });
  return { spectrum, stability, modes, transition };
}

export function runEngineBench(E, { matricesPerCase = 4, log = () => {} } = {}) {
  const exact = [];
  for (let n = 2; n <= 12; n++) {
    const perKind = {};
    const pooled = [];
    let worstBuiltInResidual = 0;
    let worstIndependentResidual = 0;
    let failures = 0;
    let defective = 0;
    let complexPairs = 0;
    const errors = [];
    for (const [kindIdx, kind] of EXACT_KINDS.entries()) {
      const kindTimes = [];
      for (let s = 0; s < matricesPerCase; s++) {
        const rng = makeRng(100_000 + 1000 * n + 100 * kindIdx + s);
        const pairs = exactMatrix(kind, rng, n);
        const A = pairs.map((r) => r.map(([p, q]) => E.Rational.of(p, q)));
        const floatA = A.map((r) => r.map((x) => x.toNumber()));
        let result;
        try {
          result = fullExactAnalysis(E, A);
        } catch (err) {
          failures++;
          errors.push(`${kind} seed ${s}: ${err.message}`);
          continue;
        }
        worstBuiltInResidual = Math.max(worstBuiltInResidual, result.transition.check.residual);
        worstIndependentResidual = Math.max(worstIndependentResidual, relativeToNorm(E.evaluateTransition(result.transition, 0.5), E.expmTimes(floatA, 0.5)));
        if (result.spectrum.defective) defective++;
        complexPairs += result.spectrum.eigenvalues.filter((e) => e.im > 0).length;
        const budgetMs = n >= 10 ? 300 : 150;
        const times = timeRepeated(() => fullExactAnalysis(E, A), { budgetMs, minRuns: 3, maxRuns: 300 });
        kindTimes.push(...times);
      }
      perKind[kind] = summary(kindTimes);
      pooled.push(...kindTimes);
    }
    const row = { n, ...summary(pooled), perKind, matrices: matricesPerCase * EXACT_KINDS.length, failures, errors, defective, complexPairs, worstBuiltInResidual, worstIndependentResidual };
    exact.push(row);
    log(`engine exact n=${n}: median ${row.median.toFixed(3)} ms, p95 ${row.p95.toFixed(3)} ms (${row.runs} runs, ${failures} failures)`);
  }

  const float = [];
  for (const n of [20, 60, 200]) {
    const times = [];
    let failures = 0;
    const errors = [];
    const count = n === 200 ? 3 : 5;
    for (let s = 0; s < count; s++) {
      const A = randomFloatMatrix(makeRng(200_000 + 1000 * n + s), n);
      const analyse = () => {
        const spectrum = E.floatSpectrum(A, { nearRepeatThreshold: E.DEFAULT_SETTINGS.nearRepeatThreshold });
        return E.stabilityOf(spectrum.eigenvalues, 'continuous');
      };
      try {
        analyse();
      } catch (err) {
        failures++;
        errors.push(err.message);
        continue;
      }
      times.push(...timeRepeated(analyse, { budgetMs: n === 200 ? 1000 : 300, minRuns: 3, maxRuns: 200 }));
    }
    const row = { n, ...summary(times), matrices: count, failures, errors };
    float.push(row);
    log(`engine float n=${n}: median ${row.median.toFixed(3)} ms, p95 ${row.p95.toFixed(3)} ms (${row.runs} runs)`);
  }
  return { exact, float };
}
