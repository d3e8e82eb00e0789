// Side by side with a general-purpose computer-algebra reference: SymPy's exact e^{At}
// (Matrix.exp of A*t, symbol t, no simplify) for a few constructed 4×4, 5×5 and 6×6 matrices,
// timed in its own process with a per-case timeout, against our exact spectrum + closed form
// on the same matrices. The two closed forms must agree at three times to 1e-10 relative to
// the largest entry (the agreement bound of this benchmark; both are exact up to the final
// float evaluation, so any real disagreement is far larger).
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { constructedMatrix, fracText, makeRng } from './generate.mjs';
import { timeRepeated } from './engineBench.mjs';
import { summary } from './stats.mjs';

export const AGREEMENT_BOUND = 1e-10;
const TIMES = ['1/4', '1', '2'];
const CASE_TIMEOUT_MS = 90_000;

/** The first interpreter that imports sympy: Debian's /usr/bin/python3, then python3 on PATH. */
export function findSympyPython() {
  for (const exe of ['/usr/bin/python3', 'python3']) {
    const r = spawnSync(exe, ['-c', 'import sympy; print(sympy.__version__)'], { encoding: 'utf8', timeout: 30_000 });
    if (r.status === 0) return { exe, version: r.stdout.trim() };
  }
  return null;
}

export function sympyCases() {
  const cases = [];
  // One case per size: SymPy takes seconds to a minute each, and the whole bench must stay
  // under five minutes. Constructed so SymPy finds the eigenvalues exactly (integer and
  // complex-pair spectra with Jordan blocks).
  for (const n of [4, 5, 6]) {
    const seed = 300_000 + 10 * n;
    cases.push({ n, seed, entries: constructedMatrix(makeRng(seed), n) });
  }
  return cases;
}

export function runSympyBench(E, root, { log = () => {} } = {}) {
  const python = findSympyPython();
  if (!python) {
    log('SymPy comparison skipped: neither /usr/bin/python3 nor python3 imports sympy (apt-get install python3-sympy).');
    return { skipped: 'no Python interpreter with sympy found', cases: [] };
  }
  const script = join(root, 'test', 'bench', 'sympy_exp.py');
  const cases = [];
  for (const c of sympyCases()) {
    const A = c.entries.map((r) => r.map(([p, q]) => E.Rational.of(p, q)));
    const closedForm = () => {
      const spectrum = E.exactSpectrum(A, { nearRepeatThreshold: E.DEFAULT_SETTINGS.nearRepeatThreshold });
      return E.transitionClosedForm(A, spectrum, 'continuous', { maxN: 12 });
    };
    const ours = summary(timeRepeated(closedForm, { budgetMs: 200, minRuns: 10, maxRuns: 500 }));
    const cf = closedForm();
    const input = JSON.stringify({ entries: c.entries.map((r) => r.map(fracText)), times: TIMES, digits: 30 });
    const r = spawnSync(python.exe, [script], { input, encoding: 'utf8', timeout: CASE_TIMEOUT_MS, maxBuffer: 1 << 26 });
    const row = { n: c.n, seed: c.seed, oursMedianMs: ours.median, sympySeconds: null, ratio: null, maxRelativeDifference: null, agrees: null, note: null };
    if (r.error || r.status !== 0) {
      row.note = r.error?.code === 'ETIMEDOUT' || r.signal ? `SymPy did not finish within ${CASE_TIMEOUT_MS / 1000} s` : `SymPy failed: ${(r.stderr || '').trim().split('\n').pop()}`;
    } else {
      const ref = JSON.parse(r.stdout);
      row.sympySeconds = ref.seconds;
      row.ratio = (ref.seconds * 1000) / ours.median;
      let worst = 0;
      TIMES.forEach((tv, k) => {
        const [p, q] = tv.split('/').map(Number);
        const t = q ? p / q : p;
        const mine = E.evaluateTransition(cf, t);
        const theirs = ref.values[k].map((row) => row.map(Number));
        let diff = 0;
        let scale = 0;
        for (let i = 0; i < c.n; i++) {
          for (let j = 0; j < c.n; j++) {
            diff = Math.max(diff, Math.abs(mine[i][j] - theirs[i][j]));
            scale = Math.max(scale, Math.abs(theirs[i][j]));
          }
        }
        worst = Math.max(worst, diff / scale);
      });
      row.maxRelativeDifference = worst;
      row.agrees = worst <= AGREEMENT_BOUND;
      row.sympyMaxImag = ref.maxImag;
    }
    log(`sympy n=${c.n} seed ${c.seed}: ours ${ours.median.toFixed(3)} ms, SymPy ${row.sympySeconds?.toFixed(2) ?? '—'} s, ratio ${row.ratio?.toFixed(0) ?? '—'}, agreement ${row.maxRelativeDifference?.toExponential(1) ?? row.note}`);
    cases.push(row);
  }
  return { python: python.exe, sympyVersion: python.version, agreementBound: AGREEMENT_BOUND, times: TIMES, cases };
}
