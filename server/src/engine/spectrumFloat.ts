/**
 * Spectrum of a float matrix with numerically decided multiplicities.
 *
 * Method:
 *  1. Eigenvalues by balanced Hessenberg QR (./eigenFloat).
 *  2. Clustering. A backward-stable solver returns eigenvalues of A + E, ‖E‖ ≈ η‖A‖. A
 *     semisimple m-fold eigenvalue moves by O(η‖A‖); a Jordan block of size m splits into m
 *     points on a circle of radius ≈ ‖A‖·η^{1/m} (Lidskii perturbation theory; Moro, Burke &
 *     Overton, SIAM J. Matrix Anal. Appl. 18(4), 1997 — from memory). So one fixed distance
 *     cannot work: a group of m eigenvalues is accepted as one m-fold eigenvalue when it lies
 *     within clusterRadius(m) = ‖A‖_F·η^{1/m} of its mean (η = SPECTRUM_BACKWARD_ERROR).
 *     (A test of the regular-polygon shape was tried and dropped: perturbations of the
 *     lower characteristic coefficients distort the circle as much as they shrink it.)
 *     Spread-out groups ("rings") are limited to 4 members: a Jordan block of size ≥ 5 is
 *     not resolvable in double precision (η^{1/5} ≈ 6e-3 relative) and is reported as
 *     separate nearly repeated eigenvalues.
 *  3. Verification and structure: for each multiple cluster with mean μ, the numerical
 *     nullities ν_j of (A − μI)^j (SVD, singular values ≤ RANK_REL·‖A‖^j count as zero)
 *     give the geometric multiplicity ν_1 and the Jordan blocks (blocks of size ≥ j =
 *     ν_j − ν_{j−1}). A cluster whose mean is not an eigenvalue to that tolerance
 *     (ν_1 = 0) is split back into simple eigenvalues.
 * Conjugate symmetry is kept by construction: clustering runs on the closed upper half
 * plane; a cluster touching the real axis is completed with its conjugates and becomes a
 * real eigenvalue; any other cluster is reported together with its mirror image.
 *
 * Text format for numeric eigenvalues (one format everywhere on the float path): "≈ " then
 * the real part and, for complex values, "+j" or "-j" and |Im|, each with 6 significant
 * digits and trailing zeros removed, e.g. "≈ -0.5+j1.22474", "≈ 2.5", "≈ 1e-07". This
 * matches the "a+jb" order used for exact eigenvalues ("-1+j√3").
 *
 * Invariants: algebraic multiplicities sum to n; blocks are descending with sum =
 * algebraic and length = geometric; eigenvalues are sorted by descending real part, then
 * descending imaginary part; the input is not mutated.
 */
import { SingularValueDecomposition } from 'ml-matrix';
import type { Eigenvalue, Spectrum } from './types';
import { eigenFloat, type Complex } from './eigenFloat';
import { RANK_REL, SPECTRUM_BACKWARD_ERROR, clusterRadius, frobeniusNorm, nearlyRepeated } from './tolerance';

export interface FloatSpectrumOptions {
  /** Largest n accepted (the design caps the numeric spectrum at 200). */
  maxSize?: number;
}

const DEFAULT_MAX_SIZE = 200;
const MAX_RING = 4;

/** 6 significant digits, trailing zeros dropped, "1e-07" style exponents kept short. */
function sig6(x: number): string {
  if (x === 0) return '0';
  let s = x.toPrecision(6);
  if (s.includes('e')) {
    const [mant, exp] = s.split('e');
    const m = mant.includes('.') ? mant.replace(/0+$/, '').replace(/\.$/, '') : mant;
    const e = Number(exp);
    s = `${m}e${e < 0 ? '-' : '+'}${String(Math.abs(e)).padStart(2, '0')}`;
  } else if (s.includes('.')) {
    s = s.replace(/0+$/, '').replace(/\.$/, '');
  }
  return s === '-0' ? '0' : s;
}

/** The float-path eigenvalue text, e.g. "≈ -0.5+j1.22474". */
export function numericEigenText(re: number, im: number): string {
  if (im === 0) return `≈ ${sig6(re)}`;
  return `≈ ${sig6(re)}${im < 0 ? '-' : '+'}j${sig6(Math.abs(im))}`;
}

interface Cluster {
  /** Members as the complex numbers they stand for (conjugates included for real clusters). */
  points: Complex[];
  /** True when centred on the real axis (a real eigenvalue). */
  real: boolean;
}

function mean(points: Complex[]): Complex {
  let re = 0;
  let im = 0;
  for (const p of points) {
    re += p.re;
    im += p.im;
  }
  return { re: re / points.length, im: im / points.length };
}

function radius(points: Complex[], mu: Complex): number {
  let r = 0;
  for (const p of points) r = Math.max(r, Math.hypot(p.re - mu.re, p.im - mu.im));
  return r;
}

function withConjugates(points: Complex[]): Complex[] {
  const out: Complex[] = [];
  for (const p of points) {
    out.push(p);
    if (p.im !== 0) out.push({ re: p.re, im: -p.im });
  }
  return out;
}

/**
 * Reads a group of simple upper-half-plane eigenvalues as one multiple eigenvalue, either
 * centred on the real axis (completed by conjugates) or off it; null when neither fits.
 */
function ringReading(members: Complex[], normA: number): Cluster | null {
  const readings: Cluster[] = [{ points: withConjugates(members), real: true }];
  if (members.length > 1 && members.every((p) => p.im > 0)) readings.push({ points: members, real: false });
  for (const c of readings) {
    const m = c.points.length;
    if (m < 2 || m > MAX_RING) continue;
    const mu = mean(c.points);
    if (c.real) mu.im = 0;
    const r = radius(c.points, mu);
    if (r <= clusterRadius(m, normA)) return c;
  }
  return null;
}

/** Groups the closed upper half-plane eigenvalues into clusters (see step 2 above). */
function clusterEigenvalues(upper: Complex[], normA: number): Cluster[] {
  const tight = clusterRadius(1, normA);
  // Stage A: single linkage at the semisimple level.
  const parent = upper.map((_, i) => i);
  const find = (i: number): number => (parent[i] === i ? i : (parent[i] = find(parent[i])));
  for (let i = 0; i < upper.length; i++) {
    for (let j = i + 1; j < upper.length; j++) {
      if (Math.hypot(upper[i].re - upper[j].re, upper[i].im - upper[j].im) <= tight) parent[find(i)] = find(j);
    }
  }
  const groups = new Map<number, Complex[]>();
  upper.forEach((p, i) => {
    const root = find(i);
    if (!groups.has(root)) groups.set(root, []);
    groups.get(root)!.push(p);
  });
  const asCluster = (members: Complex[]): Cluster => {
    const touchesAxis = members.some((p) => p.im <= tight);
    return touchesAxis ? { points: withConjugates(members), real: true } : { points: members, real: false };
  };

  const result: Cluster[] = [];
  const singles: Complex[] = [];
  for (const members of groups.values()) {
    if (members.length > 1) result.push(asCluster(members));
    else singles.push(members[0]);
  }

  // Stage B: rings of up to MAX_RING points among the simple eigenvalues.
  singles.sort((a, b) => b.re - a.re || b.im - a.im);
  const used = new Array<boolean>(singles.length).fill(false);
  for (let s = 0; s < singles.length; s++) {
    if (used[s]) continue;
    const seed = singles[s];
    const near = singles
      .map((p, i) => ({ i, d: Math.hypot(p.re - seed.re, p.im - seed.im) }))
      .filter(({ i }) => i !== s && !used[i])
      .sort((a, b) => a.d - b.d)
      .slice(0, MAX_RING - 1);
    let accepted: { idx: number[]; cluster: Cluster } | null = null;
    for (let extra = near.length; extra >= 1 && !accepted; extra--) {
      const idx = [s, ...near.slice(0, extra).map((x) => x.i)];
      const cluster = ringReading(idx.map((i) => singles[i]), normA);
      if (cluster) accepted = { idx, cluster };
    }
    // A lone complex point near the axis may be half of a split real double eigenvalue.
    if (!accepted && seed.im > 0) {
      const pair = ringReading([seed], normA);
      if (pair) accepted = { idx: [s], cluster: pair };
    }
    if (!accepted) accepted = { idx: [s], cluster: { points: [seed], real: seed.im === 0 } };
    for (const i of accepted.idx) used[i] = true;
    result.push(accepted.cluster);
  }
  return result;
}

/** Real 2n×2n form [[R, −I], [I, R]] of the complex matrix (A − μI)^power. */
function shiftedPowerEmbedding(A: number[][], mu: Complex, power: number): number[][] {
  const n = A.length;
  // Complex matrix as separate real and imaginary parts.
  const baseRe = A.map((row, i) => row.map((x, j) => (i === j ? x - mu.re : x)));
  const baseIm = A.map((row, i) => row.map((_, j) => (i === j ? -mu.im : 0)));
  let pRe = baseRe;
  let pIm = baseIm;
  for (let k = 1; k < power; k++) {
    const nRe: number[][] = [];
    const nIm: number[][] = [];
    for (let i = 0; i < n; i++) {
      const rr = new Array<number>(n).fill(0);
      const ri = new Array<number>(n).fill(0);
      for (let l = 0; l < n; l++) {
        const ar = pRe[i][l];
        const ai = pIm[i][l];
        if (ar === 0 && ai === 0) continue;
        for (let j = 0; j < n; j++) {
          rr[j] += ar * baseRe[l][j] - ai * baseIm[l][j];
          ri[j] += ar * baseIm[l][j] + ai * baseRe[l][j];
        }
      }
      nRe.push(rr);
      nIm.push(ri);
    }
    pRe = nRe;
    pIm = nIm;
  }
  if (mu.im === 0) return pRe;
  const out: number[][] = [];
  for (let i = 0; i < n; i++) out.push([...pRe[i], ...pIm[i].map((x) => -x)]);
  for (let i = 0; i < n; i++) out.push([...pIm[i], ...pRe[i]]);
  return out;
}

/** Numerical nullity of (A − μI)^power over C. */
function nullity(A: number[][], mu: Complex, power: number, normA: number): number {
  const M = shiftedPowerEmbedding(A, mu, power);
  const sv = new SingularValueDecomposition(M, {
    computeLeftSingularVectors: false,
    computeRightSingularVectors: false,
    autoTranspose: true,
  }).diagonal;
  const cut = RANK_REL * normA ** power;
  const small = sv.filter((s) => s <= cut).length;
  // The real embedding doubles every complex singular value.
  return mu.im === 0 ? small : Math.floor(small / 2);
}

/** Geometric multiplicity and Jordan blocks from nullities of powers (step 3 above). */
function jordanStructure(A: number[][], mu: Complex, algebraic: number, normA: number): { geometric: number; blocks: number[] } | null {
  const nul: number[] = [0];
  for (let j = 1; j <= algebraic; j++) {
    let v = Math.min(algebraic, nullity(A, mu, j, normA));
    v = Math.max(v, nul[j - 1]);
    nul.push(v);
    if (v === algebraic) break;
  }
  if (nul[1] === 0) return null;
  // Force the last step to reach the full multiplicity (the highest power's round-off is worst).
  while (nul[nul.length - 1] < algebraic) nul.push(algebraic);
  // atLeast[j] = number of blocks of size ≥ j; must not increase with j.
  const atLeast: number[] = [];
  for (let j = 1; j < nul.length; j++) {
    const count = nul[j] - nul[j - 1];
    atLeast.push(j === 1 ? count : Math.min(count, atLeast[j - 2]));
  }
  const total = atLeast.reduce((s, x) => s + x, 0);
  // Clipping can lose members; give them to the largest block so the sum stays `algebraic`.
  const blocks: number[] = [];
  for (let j = 1; j <= atLeast.length; j++) {
    const exactly = atLeast[j - 1] - (atLeast[j] ?? 0);
    for (let k = 0; k < exactly; k++) blocks.push(j);
  }
  blocks.sort((a, b) => b - a);
  if (total < algebraic) blocks[0] += algebraic - total;
  return { geometric: blocks.length, blocks };
}

function emptySpectrum(n: number, notes: string[]): Spectrum {
  return {
    n,
    exact: false,
    charPoly: { coeffs: [1], exactCoeffs: null },
    minimalPoly: null,
    factors: null,
    eigenvalues: [],
    defective: false,
    clusterTolerance: null,
    nearRepeated: [],
    notes,
  };
}

/** Π (x − λ_k) over the computed eigenvalues; imaginary parts cancel for a real matrix. */
function polynomialFromRoots(roots: Complex[]): number[] {
  let re = [1];
  let im = [0];
  for (const r of roots) {
    const nre = new Array<number>(re.length + 1).fill(0);
    const nim = new Array<number>(re.length + 1).fill(0);
    for (let i = 0; i < re.length; i++) {
      nre[i + 1] += re[i];
      nim[i + 1] += im[i];
      nre[i] -= r.re * re[i] - r.im * im[i];
      nim[i] -= r.re * im[i] + r.im * re[i];
    }
    re = nre;
    im = nim;
  }
  return re;
}

export function floatSpectrum(A: number[][], opts: FloatSpectrumOptions = {}): Spectrum {
  const maxSize = opts.maxSize ?? DEFAULT_MAX_SIZE;
  const n = A.length;
  if (n > maxSize) return emptySpectrum(n, [`numeric spectrum skipped: ${n}×${n} is larger than the ${maxSize}×${maxSize} cap`]);
  const { values } = eigenFloat(A);
  const normA = frobeniusNorm(A);
  const notes = [
    'floating-point spectrum: multiplicities and Jordan blocks are numerical (clustered within a tolerance), not exact',
  ];
  if (n === 0) return emptySpectrum(0, notes);

  let clusters: Cluster[];
  if (normA === 0) {
    clusters = [{ points: values, real: true }];
  } else {
    const upper = values.filter((v) => v.im >= 0);
    clusters = clusterEigenvalues(upper, normA);
  }

  const eigenvalues: Eigenvalue[] = [];
  const pushEigen = (mu: Complex, algebraic: number, geometric: number, blocks: number[]) => {
    eigenvalues.push({ re: mu.re, im: mu.im, exact: null, text: numericEigenText(mu.re, mu.im), algebraic, geometric, blocks });
    if (mu.im !== 0) {
      eigenvalues.push({ re: mu.re, im: -mu.im, exact: null, text: numericEigenText(mu.re, -mu.im), algebraic, geometric, blocks: blocks.slice() });
    }
  };
  let split = false;
  for (const c of clusters) {
    const m = c.points.length;
    const centre = mean(c.points);
    const mu = c.real ? { re: centre.re, im: 0 } : centre;
    if (m === 1) {
      pushEigen(mu, 1, 1, [1]);
      continue;
    }
    const structure = normA === 0 ? { geometric: n, blocks: new Array<number>(n).fill(1) } : jordanStructure(A, mu, m, normA);
    if (structure) {
      pushEigen(mu, m, structure.geometric, structure.blocks);
    } else {
      split = true;
      // Not a multiple eigenvalue after all: report the members separately.
      for (const p of c.real ? c.points.filter((q) => q.im >= 0) : c.points) pushEigen(p, 1, 1, [1]);
    }
  }
  if (split) notes.push('some close eigenvalues were tested as a multiple eigenvalue and found distinct');

  eigenvalues.sort((a, b) => b.re - a.re || b.im - a.im);

  const nearRepeated: Spectrum['nearRepeated'] = [];
  for (let a = 0; a < eigenvalues.length; a++) {
    for (let b = a + 1; b < eigenvalues.length; b++) {
      if (nearlyRepeated(eigenvalues[a], eigenvalues[b])) {
        nearRepeated.push({ a, b, separation: Math.hypot(eigenvalues[a].re - eigenvalues[b].re, eigenvalues[a].im - eigenvalues[b].im) });
      }
    }
  }

  return {
    n,
    exact: false,
    charPoly: { coeffs: polynomialFromRoots(values), exactCoeffs: null },
    minimalPoly: null,
    factors: null,
    eigenvalues,
    defective: eigenvalues.some((e) => e.geometric < e.algebraic),
    // The tolerance for a pair; a group of m uses ‖A‖_F·η^{1/m} (see the header).
    clusterTolerance: clusterRadius(2, normA === 0 ? 1 : normA),
    nearRepeated,
    notes: notes.concat(
      `cluster tolerance for m coincident eigenvalues: ‖A‖_F·${SPECTRUM_BACKWARD_ERROR}^(1/m) (‖A‖_F = ${sig6(normA)})`,
    ),
  };
}
