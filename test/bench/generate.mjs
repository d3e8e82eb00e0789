// Seeded generators of invented benchmark inputs: matrices (random and constructed as
// S·J·S⁻¹ from a chosen real Jordan form) and long Python / TypeScript source files.
// Everything here is invented test data for timing; none of it models a real machine.
//
// Constructed matrices: S is unimodular (a product of integer elementary row operations),
// so S⁻¹ is an integer matrix too and A = S·J·S⁻¹ has exactly the spectrum and Jordan
// structure of J, with rational entries whenever J's are rational.

/** mulberry32: a small, fast 32-bit seeded PRNG (public-domain, common practice for tests). */
export function makeRng(seed) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return {
    next,
    int: (lo, hi) => lo + Math.floor(next() * (hi - lo + 1)),
    pick: (arr) => arr[Math.floor(next() * arr.length)],
    normal: () => {
      // Box–Muller transform.
      const u = Math.max(next(), 1e-300);
      const v = next();
      return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
    },
  };
}

// Exact entries are kept as [num, den] pairs of BigInt, den > 0, in lowest terms.
const bgcd = (a, b) => {
  a = a < 0n ? -a : a;
  b = b < 0n ? -b : b;
  while (b) [a, b] = [b, a % b];
  return a;
};
export function frac(num, den = 1n) {
  num = BigInt(num);
  den = BigInt(den);
  if (den < 0n) [num, den] = [-num, -den];
  const g = bgcd(num, den) || 1n;
  return [num / g, den / g];
}
const fadd = (x, y) => frac(x[0] * y[1] + y[0] * x[1], x[1] * y[1]);
const fmul = (x, y) => frac(x[0] * y[0], x[1] * y[1]);

function matMulFrac(a, b) {
  const n = a.length;
  const out = [];
  for (let i = 0; i < n; i++) {
    const row = [];
    for (let j = 0; j < n; j++) {
      let s = frac(0n);
      for (let k = 0; k < n; k++) if (a[i][k][0] !== 0n && b[k][j][0] !== 0n) s = fadd(s, fmul(a[i][k], b[k][j]));
      row.push(s);
    }
    out.push(row);
  }
  return out;
}
const identityFrac = (n) => Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => frac(i === j ? 1n : 0n)));

/** Random integer matrix, entries in [-9, 9]: generic, usually an irreducible characteristic polynomial. */
export function randomIntegerMatrix(rng, n) {
  return Array.from({ length: n }, () => Array.from({ length: n }, () => frac(rng.int(-9, 9))));
}

/** Random rational matrix p/q with |p| ≤ 9 and q ∈ {1, 2, 3, 4, 5, 8, 10}. */
export function randomRationalMatrix(rng, n) {
  const dens = [1, 2, 3, 4, 5, 8, 10];
  return Array.from({ length: n }, () => Array.from({ length: n }, () => frac(rng.int(-9, 9), rng.pick(dens))));
}

/**
 * A real Jordan form J of size n with repeated real eigenvalues (some with blocks of size 2–3),
 * complex pairs σ ± jω as [[σ, ω], [−ω, σ]] and, when room allows, a repeated complex pair
 * with a Jordan block. `unstable` forces one eigenvalue with positive real part.
 */
export function jordanForm(rng, n, { rational = false, unstable = false } = {}) {
  const J = Array.from({ length: n }, () => Array.from({ length: n }, () => frac(0n)));
  const realEigs = rational ? [frac(-1), frac(-2), frac(-1, 2), frac(-3, 4), frac(0), frac(-5, 3)] : [frac(-1), frac(-2), frac(-3), frac(0), frac(-4)];
  const pairs = rational ? [[frac(-1, 2), frac(3, 2)], [frac(-1), frac(2)], [frac(0), frac(1, 2)]] : [[frac(-1), frac(2)], [frac(-2), frac(1)], [frac(0), frac(3)]];
  let pos = 0;
  let first = true;
  const used = [];
  while (pos < n) {
    const room = n - pos;
    const choice = rng.next();
    if (room >= 4 && choice < 0.15) {
      // Repeated complex pair with one Jordan block: [[C, I], [0, C]].
      const [s, w] = rng.pick(pairs);
      for (const off of [0, 2]) {
        J[pos + off][pos + off] = s; J[pos + off][pos + off + 1] = w;
        J[pos + off + 1][pos + off] = frac(-w[0], w[1]); J[pos + off + 1][pos + off + 1] = s;
      }
      J[pos][pos + 2] = frac(1); J[pos + 1][pos + 3] = frac(1);
      pos += 4;
    } else if (room >= 2 && choice < 0.5) {
      let [s, w] = rng.pick(pairs);
      if (unstable && first) s = frac(1, 4);
      J[pos][pos] = s; J[pos][pos + 1] = w; J[pos + 1][pos] = frac(-w[0], w[1]); J[pos + 1][pos + 1] = s;
      pos += 2;
    } else {
      // Real eigenvalue, sometimes repeating an earlier one (derogatory), block size 1–3.
      let lam = used.length && rng.next() < 0.4 ? rng.pick(used) : rng.pick(realEigs);
      if (unstable && first) lam = frac(1, 2);
      used.push(lam);
      const size = Math.min(room, rng.pick([1, 1, 2, 3]));
      for (let k = 0; k < size; k++) {
        J[pos + k][pos + k] = lam;
        if (k > 0) J[pos + k - 1][pos + k] = frac(1);
      }
      pos += size;
    }
    first = false;
  }
  return J;
}

/** A = S·J·S⁻¹ with S unimodular from `ops` random elementary row operations (small multipliers). */
export function constructedMatrix(rng, n, opts = {}) {
  const J = jordanForm(rng, n, opts);
  let S = identityFrac(n);
  let Sinv = identityFrac(n);
  const ops = opts.ops ?? 2 * n + 2;
  for (let k = 0; k < ops; k++) {
    const i = rng.int(0, n - 1);
    let j = rng.int(0, n - 1);
    if (j === i) j = (i + 1) % n;
    const c = BigInt(rng.pick([-1, 1, 1, 2]));
    // E = I + c·e_i e_jᵀ: S ← E·S (row i += c·row j); S⁻¹ ← S⁻¹·E⁻¹ (column j −= c·column i).
    S = S.map((row, r) => (r === i ? row.map((x, col) => fadd(x, fmul(frac(c), S[j][col]))) : row));
    Sinv = Sinv.map((row) => row.map((x, col) => (col === j ? fadd(x, fmul(frac(-c), row[i])) : x)));
  }
  return matMulFrac(matMulFrac(S, J), Sinv);
}

/** Random float matrix with N(0, 1/n) entries (spectrum of radius about 1). */
export function randomFloatMatrix(rng, n) {
  const s = 1 / Math.sqrt(n);
  return Array.from({ length: n }, () => Array.from({ length: n }, () => rng.normal() * s));
}

export const fracText = ([num, den]) => (den === 1n ? `${num}` : `${num}/${den}`);

// ---------------------------------------------------------------------------------------
// Source files. Each matrix is a state matrix named A<k> (a role name: letter + digits).

const FLOAT_ENTRIES_PY = ['np.sqrt(2)', '-np.pi', 'np.pi/4', '-2*np.sqrt(3)', '0.5*np.pi', '-np.sqrt(5)/2', '1.5', '-0.25'];
const FLOAT_ENTRIES_TS = ['Math.sqrt(2)', '-Math.PI', 'Math.PI / 4', '-2 * Math.sqrt(3)', '0.5 * Math.PI', '-Math.sqrt(5) / 2', '1.5', '-0.25'];

/** Entry texts of one matrix of the given kind, in the file's language. */
function matrixEntries(rng, kind, n, language) {
  switch (kind) {
    case 'integer':
      return randomIntegerMatrix(rng, n).map((r) => r.map(fracText));
    case 'rational':
      // Written as decimals and fractions; both are exact.
      return randomRationalMatrix(rng, n).map((r) => r.map(([p, q]) => (q === 2n || q === 4n || q === 5n || q === 8n || q === 10n) && rng.next() < 0.5 ? String(Number(p) / Number(q)) : fracText([p, q])));
    case 'float': {
      const pool = language === 'python' ? FLOAT_ENTRIES_PY : FLOAT_ENTRIES_TS;
      return Array.from({ length: n }, () => Array.from({ length: n }, () => (rng.next() < 0.3 ? rng.pick(pool) : String(rng.int(-5, 5)))));
    }
    case 'defective':
      return constructedMatrix(rng, n, { rational: rng.next() < 0.3 }).map((r) => r.map(fracText));
    case 'unstable':
      return constructedMatrix(rng, n, { unstable: true }).map((r) => r.map(fracText));
    default:
      throw new Error(`unknown kind ${kind}`);
  }
}

export const FILE_KINDS = ['integer', 'rational', 'float', 'defective', 'unstable'];

/**
 * A generated source file of about `lines` lines holding `count` state matrices of sizes
 * 2–10, interleaved with ordinary code. Returns the text and, for each matrix, its name,
 * size, kind, the position of its name, and the position/text of every entry (for edits).
 */
export function generateSourceFile(seed, language, { lines = 5000, count = 300 } = {}) {
  const rng = makeRng(seed);
  const py = language === 'python';
  const out = [];
  const matrices = [];
  const comment = py ? '#' : '//';
  out.push(`${comment} Invented benchmark file (seed ${seed}), generated by test/bench/generate.mjs.`);
  out.push(`${comment} The matrices are random or constructed; they model no real machine.`);
  if (py) out.push('import numpy as np', '');
  else out.push('');
  const fillerNeeded = () => {
    const remaining = count - matrices.length;
    const estimatedMatrixLines = remaining * 8.5;
    return Math.max(0, Math.floor((lines - out.length - estimatedMatrixLines) / Math.max(1, remaining)));
  };
  for (let k = 1; k <= count; k++) {
    const n = rng.int(2, 10);
    const kind = FILE_KINDS[(k - 1) % FILE_KINDS.length];
    const entries = matrixEntries(rng, kind, n, language);
    const name = `A${k}`;
    const nameLine = out.length;
    const entryPos = [];
    if (py) {
      out.push(`${name} = np.array([`);
      for (let i = 0; i < n; i++) {
        let line = '    [';
        const rowPos = [];
        entries[i].forEach((e, j) => {
          if (j > 0) line += ', ';
          rowPos.push({ line: out.length, character: line.length, text: e });
          line += e;
        });
        out.push(line + '],');
        entryPos.push(rowPos);
      }
      out.push("])", "");
    } else {
      out.push(`export const ${name}: number[][] = [`);
      for (let i = 0; i < n; i++) {
        let line = '  [';
        const rowPos = [];
        entries[i].forEach((e, j) => {
          if (j > 0) line += ', ';
          rowPos.push({ line: out.length, character: line.length, text: e });
          line += e;
        });
        out.push(line + '],');
        entryPos.push(rowPos);
      }
      out.push('];');
    }
    matrices.push({ name, n, kind, nameLine, nameCharacter: py ? 0 : 'export const '.length, entries: entryPos });
    const filler = fillerNeeded();
    for (let f = 0; f < filler; f += 4) {
      if (py) out.push(`def helper_${k}_${f}(x, gain=${rng.int(1, 9)}):`, `    ${comment} invented helper; its list is not a matrix`, `    return [gain * xi for xi in x]`, '');
      else out.push(`export function helper_${k}_${f}(x: number[], gain = ${rng.int(1, 9)}): number[] {`, `  ${comment} invented helper; its array is not a matrix`, `  return x.map((xi) => gain * xi);`, '}');
    }
  }
  while (out.length < lines) out.push(py ? `value_${out.length} = ${rng.int(0, 99)}` : `export const value_${out.length} = ${rng.int(0, 99)};`);
  return { text: out.join('\n') + '\n', matrices };
}
