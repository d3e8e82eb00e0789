// Fuzz targets shared by the short seeded run (fuzz.test.ts, through the TypeScript sources)
// and the long run (long.mjs, through the dist/fuzz-entry.js bundle). Each target takes an
// `api` object with the functions it drives and a seeded random source, runs one case and
// returns null (fine) or a failure description. Plain JavaScript so both runners load it.
//
// The acceptance rule for numbers: a result is either within its stated accuracy or flagged.
// For the closed form that means check.passed ⇒ the closed form agrees with an independent
// scaling-and-squaring e^{At} (or repeated products for A^k) at a fresh sample point, to
// CHECK_TOLERANCE relative to max(1, ‖reference‖). Engine calls may refuse input with a clear
// Error (a RangeError for a cap, an Error with a message); any other exception is a failure.

/** Accepted closed-form disagreement at a fresh sample: the engine's own cap on accepted check
 *  residuals (CHECK_RESIDUAL_CAP = 1e-6 in closedForm.ts), times 10 for the conditioning
 *  growth between the engine's samples and ours. */
export const CHECK_TOLERANCE = 1e-5;

/** The analysis layer's cancellation warning threshold (server/src/analysis/findings.ts). */
export const CANCELLATION_FLAG = 1e6;

/** mulberry32, a small seeded generator (common practice for reproducible fuzzing). */
export function seededRandom(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const pick = (rnd, xs) => xs[Math.floor(rnd() * xs.length)];
const int = (rnd, lo, hi) => lo + Math.floor(rnd() * (hi - lo + 1));

const BRACKETS = ['[', ']', '(', ')', '{', '}', ',', '\n', ' ', ':', '=', '-', '*', '**', '^', '/', 'e', '1e308', '\u202E', '\u200B', '\u2212', '"', "'", '#', '//'];

/** Byte flips, deletions, duplications and bracket insertions applied to a source text. */
export function mutate(rnd, text) {
  let out = text;
  const edits = int(rnd, 1, 8);
  for (let i = 0; i < edits; i++) {
    const at = int(rnd, 0, out.length);
    const kind = int(rnd, 0, 4);
    if (kind === 0 && out.length > 0) {
      const c = out.charCodeAt(Math.min(at, out.length - 1)) ^ (1 << int(rnd, 0, 6));
      out = out.slice(0, at) + String.fromCharCode(c) + out.slice(at + 1);
    } else if (kind === 1) {
      out = out.slice(0, at) + out.slice(at + int(rnd, 1, 20));
    } else if (kind === 2) {
      const len = int(rnd, 1, 60);
      out = out.slice(0, at) + out.slice(at, at + len) + out.slice(at);
    } else if (kind === 3) {
      out = out.slice(0, at) + pick(rnd, BRACKETS) + out.slice(at);
    } else {
      out = out.slice(0, at) + pick(rnd, BRACKETS).repeat(int(rnd, 1, 200)) + out.slice(at);
    }
  }
  return out;
}

/** Source target: analyzeDocument must never throw, every span must lie inside the text, and
 *  no internal-error finding may appear. */
export function sourceCase(api, rnd, seeds) {
  const seed = pick(rnd, seeds);
  const text = mutate(rnd, seed.text);
  let report;
  try {
    report = api.analyzeDocument(text, seed.language, api.DEFAULT_SETTINGS, {});
  } catch (err) {
    return { target: 'source', detail: `threw ${err && err.stack ? err.stack.split('\n').slice(0, 3).join(' | ') : err}`, input: text };
  }
  const findings = [...report.findings, ...report.matrices.flatMap((m) => m.findings)];
  for (const f of findings) {
    if (!(f.span.start >= 0 && f.span.end <= text.length && f.span.start <= f.span.end)) return { target: 'source', detail: `span outside text: ${JSON.stringify(f)}`, input: text };
    if (f.code === 'internal-error' || /unhandled|TypeError|undefined is not/i.test(f.message)) return { target: 'source', detail: `internal failure surfaced: ${f.code}: ${f.message}`, input: text };
  }
  for (const m of report.matrices) {
    for (const row of m.values) for (const v of row) if (v && v.kind === 'float' && !Number.isFinite(v.value)) return { target: 'source', detail: `non-finite entry ${v.value}`, input: text };
  }
  return null;
}

// ----------------------------------------------------------------------------- engine target

function randomEntry(rnd, R, scale) {
  // Mixed scales: integers, small fractions, huge and tiny magnitudes (as exact rationals).
  const kind = int(rnd, 0, 5);
  const sign = rnd() < 0.5 ? -1n : 1n;
  if (kind === 0) return R.of(0n);
  if (kind === 1) return R.of(sign * BigInt(int(rnd, 1, 9)));
  if (kind === 2) return R.of(sign * BigInt(int(rnd, 1, 99)), BigInt(int(rnd, 1, 40)));
  if (kind === 3) return R.of(sign * BigInt(int(rnd, 1, 9)) * 10n ** BigInt(scale), 1n);
  if (kind === 4) return R.of(sign * BigInt(int(rnd, 1, 9)), 10n ** BigInt(scale));
  return R.of(sign * BigInt(int(rnd, 1, 1000)), 1000n);
}

function identity(R, n) {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? R.ONE : R.ZERO)));
}

function mulQ(a, b) {
  const n = a.length;
  const m = b[0].length;
  return a.map((row) => Array.from({ length: m }, (_, j) => row.reduce((acc, x, k) => acc.add(x.mul(b[k][j])), row[0].sub(row[0]))));
}

/** Unit lower times unit upper triangular integer matrices: determinant 1, exact inverse by substitution not needed (we build S⁻¹ the same way). */
function unimodularPair(rnd, R, n) {
  const L = identity(R, n);
  const Linv = identity(R, n);
  for (let i = 1; i < n; i++) for (let j = 0; j < i; j++) L[i][j] = R.of(BigInt(int(rnd, -2, 2)));
  // Inverse of unit lower triangular by forward substitution (exact).
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      let s = R.ZERO;
      for (let k = j; k < i; k++) s = s.add(L[i][k].mul(Linv[k][j]));
      Linv[i][j] = s.neg();
    }
  }
  return { S: L, Sinv: Linv };
}

/** A matrix family: random mixed-scale, near-singular, near-defective, or S·J·S⁻¹ (+ perturbation). */
export function randomMatrix(rnd, R) {
  const family = int(rnd, 0, 3);
  const n = int(rnd, 1, 5);
  const scale = pick(rnd, [1, 3, 6, 12, 15]);
  if (family === 0) return { family: 'mixed-scale', A: Array.from({ length: n }, () => Array.from({ length: n }, () => randomEntry(rnd, R, scale))) };
  if (family === 1) {
    // Near-singular: rows nearly dependent (last row = first row + 10^-scale).
    const A = Array.from({ length: n }, () => Array.from({ length: n }, () => R.of(BigInt(int(rnd, -5, 5)))));
    if (n > 1) A[n - 1] = A[0].map((x, j) => (j === 0 ? x.add(R.of(1n, 10n ** BigInt(scale))) : x));
    return { family: 'near-singular', A };
  }
  // Jordan structure: blocks of random sizes on a few eigenvalues.
  const J = identity(R, n).map((row) => row.map(() => R.ZERO));
  let i = 0;
  while (i < n) {
    const size = int(rnd, 1, n - i);
    const lambda = R.of(BigInt(int(rnd, -4, 4)), BigInt(int(rnd, 1, 3)));
    for (let k = 0; k < size; k++) {
      J[i + k][i + k] = lambda;
      if (k > 0) J[i + k - 1][i + k] = R.ONE;
    }
    i += size;
  }
  const { S, Sinv } = unimodularPair(rnd, R, n);
  let A = mulQ(mulQ(S, J), Sinv);
  let family2 = 'similar-to-jordan';
  if (family === 3) {
    // Near-defective: perturb one entry by 10^-scale (splits a Jordan block into close eigenvalues).
    const r = int(rnd, 0, n - 1);
    const c = int(rnd, 0, n - 1);
    A = A.map((row, ri) => row.map((x, ci) => (ri === r && ci === c ? x.add(R.of(1n, 10n ** BigInt(scale))) : x)));
    family2 = 'near-defective';
  }
  return { family: family2, A };
}

function isClearRefusal(err) {
  return err instanceof Error && !(err instanceof TypeError) && !(err instanceof ReferenceError) && typeof err.message === 'string' && err.message.length > 0 && !/undefined|null|is not a function/.test(err.message);
}

function maxAbsDiff(a, b) {
  let d = 0;
  let norm = 0;
  for (let i = 0; i < a.length; i++) {
    for (let j = 0; j < a.length; j++) {
      d = Math.max(d, Math.abs(a[i][j] - b[i][j]));
      norm = Math.max(norm, Math.abs(b[i][j]));
    }
  }
  return { diff: d, norm };
}

function matPow(A, k) {
  const n = A.length;
  let P = A.map((_, i) => A.map((__, j) => (i === j ? 1 : 0)));
  for (let s = 0; s < k; s++) P = P.map((row) => A[0].map((_, j) => row.reduce((acc, x, m) => acc + x * A[m][j], 0)));
  return P;
}

/** Engine target: exact and float spectra, closed form with its check, expm. */
export function engineCase(api, rnd) {
  const R = api.Rational;
  const { family, A } = randomMatrix(rnd, R);
  const domain = rnd() < 0.7 ? 'continuous' : 'discrete';
  const Af = A.map((row) => row.map((x) => x.toNumber()));
  const input = () => JSON.stringify(A.map((row) => row.map((x) => x.toString())));
  const stage = (name, fn) => {
    try {
      return { value: fn() };
    } catch (err) {
      if (isClearRefusal(err)) return { refused: err.message };
      return { failure: { target: 'engine', family, detail: `${name} threw ${err && err.stack ? err.stack.split('\n').slice(0, 3).join(' | ') : err}`, input: input() } };
    }
  };
  const exact = stage('exactSpectrum', () => api.exactSpectrum(A));
  if (exact.failure) return exact.failure;
  const float = stage('floatSpectrum', () => api.floatSpectrum(Af));
  if (float.failure) return float.failure;
  for (const s of [exact.value, float.value]) {
    if (!s) continue;
    const total = s.eigenvalues.reduce((acc, e) => acc + e.algebraic, 0);
    if (total !== A.length) return { target: 'engine', family, detail: `algebraic multiplicities sum to ${total}, n = ${A.length} (${s.exact ? 'exact' : 'float'})`, input: input() };
    for (const e of s.eigenvalues) if (!Number.isFinite(e.re) || !Number.isFinite(e.im)) return { target: 'engine', family, detail: `non-finite eigenvalue ${e.re} ${e.im}`, input: input() };
  }
  if (exact.value && float.value) {
    // Trace identity: Σ algebraic·λ = trace(A), checked on the exact spectrum (relative to the entry scale).
    const trace = Af.reduce((acc, row, i) => acc + row[i], 0);
    const sum = exact.value.eigenvalues.reduce((acc, e) => acc + e.algebraic * e.re, 0);
    const scale = Math.max(1, ...Af.flat().map(Math.abs)) * A.length;
    // Numeric roots of a clustered irreducible factor cannot be accurate in double precision;
    // the contract is that they are then flagged (nearly repeated), never shown as if fine.
    if (Math.abs(sum - trace) > 1e-9 * scale && exact.value.nearRepeated.length === 0) {
      return { target: 'engine', family, detail: `Σλ = ${sum} but trace = ${trace}, and nothing is flagged`, input: input() };
    }
  }
  const spectrum = exact.value ?? float.value;
  if (!spectrum) return null;
  const cf = stage('transitionClosedForm', () => api.transitionClosedForm(A, spectrum, domain));
  if (cf.failure) return cf.failure;
  if (cf.value && cf.value.check.passed) {
    // Fresh sample inside the engine's own sample range (it picks times up to its largest sample).
    const samples = cf.value.check.samples.filter((s) => s > 0);
    if (samples.length > 0) {
      const top = Math.max(...samples);
      const point = domain === 'continuous' ? top * (0.1 + 0.8 * rnd()) : Math.max(1, Math.floor(top * rnd()));
      const ref = stage('reference', () => (domain === 'continuous' ? api.expmTimes(Af, point) : matPow(Af, point)));
      if (ref.failure) return ref.failure;
      if (ref.value && ref.value.flat().every(Number.isFinite)) {
        const got = api.evaluateTransition(cf.value, point);
        const { diff, norm } = maxAbsDiff(got, ref.value);
        const rel = diff / Math.max(1, norm);
        // Only a disagreement the double reference itself can vouch for counts: when the reference is
        // the multiprecision one, ours (double expm) may be the wrong side, so skip those.
        // Flagged results keep the contract: the analysis reports nearly repeated eigenvalues, or a
        // cancellation factor above CANCELLATION_FLAG (the `closed-form-cancellation` warning).
        const flagged = spectrum.nearRepeated.length > 0 || cf.value.conditioning > CANCELLATION_FLAG;
        if (!(rel <= CHECK_TOLERANCE) && cf.value.check.reference !== 'multiprecision' && !flagged) {
          return { target: 'engine', family, detail: `check passed (residual ${cf.value.check.residual}) but at ${domain === 'continuous' ? 't' : 'k'} = ${point} the closed form is off by ${rel.toExponential(2)}`, input: input() };
        }
      }
    }
  }
  const ex = stage('expm', () => api.expm(Af));
  if (ex.failure) return ex.failure;
  if (ex.value) {
    const finite = ex.value.flat().every(Number.isFinite);
    if (finite) {
      // e^{A}·e^{−A} = I where both are representable (identity check, see STYLE.md).
      const inv = stage('expm(-A)', () => api.expm(Af.map((row) => row.map((x) => -x))));
      if (inv.failure) return inv.failure;
      const normA = Math.max(...Af.map((row) => row.reduce((acc, x) => acc + Math.abs(x), 0)));
      if (inv.value && inv.value.flat().every(Number.isFinite) && normA < 1) {
        const prod = ex.value.map((row) => inv.value[0].map((_, j) => row.reduce((acc, x, m) => acc + x * inv.value[m][j], 0)));
        const eye = prod.map((_, i) => prod.map((__, j) => (i === j ? 1 : 0)));
        const { diff } = maxAbsDiff(prod, eye);
        // ‖A‖ < 1 keeps both factors well conditioned: 1e-12 is ~5000 ulps (common practice).
        if (diff > 1e-12) return { target: 'engine', family, detail: `e^A·e^-A differs from I by ${diff}`, input: input() };
      }
    }
  }
  return null;
}
