/**
 * Short verdict wording shared by the code lens, the hover and the full report: which modes
 * grow, which mode dominates, and one sentence per mode. Our own wording throughout.
 * Dominant mode: continuous — the largest real part of s; discrete — the largest |z|
 * (the slowest to die out, or the fastest to grow).
 */
import { NOT_YET_PREFIX } from '../analysis/findings';
import type { Eigenvalue, Mode } from '../engine/types';
import type { MatrixReport } from '../analysis/report';
import { polynomialGrowth } from '../analysis/numberText';
import { eigenvalueDecimal, eigenvalueText, formatDuration, formatNumber, needsDecimal, lambdaIs } from './format';

export const GROWING: ReadonlySet<Mode['behaviour']> = new Set(['grows', 'growing-oscillation', 'polynomial-growth']);

export function eigenvalueOf(report: MatrixReport, mode: Mode): Eigenvalue | null {
  return report.spectrum?.eigenvalues[mode.eigenvalueIndex] ?? null;
}

function growthRate(report: MatrixReport, mode: Mode): number {
  const ev = eigenvalueOf(report, mode);
  if (!ev) return -Infinity;
  const block = Math.max(1, ...ev.blocks);
  // A Jordan block on the boundary grows polynomially: rank it just above a plain boundary mode.
  const polynomialBonus = block > 1 ? 1e-12 * block : 0;
  if (report.domain === 'discrete') return Math.hypot(ev.re, ev.im) + polynomialBonus;
  return ev.re + polynomialBonus;
}

export function dominantMode(report: MatrixReport): Mode | null {
  let best: Mode | null = null;
  for (const mode of report.modes) if (best === null || growthRate(report, mode) > growthRate(report, best)) best = mode;
  return best;
}

export function growingModes(report: MatrixReport): Mode[] {
  return report.modes.filter((m) => GROWING.has(m.behaviour));
}

const plural = (count: number, one: string, many: string) => `${count} ${count === 1 ? one : many}`;

/** "**Unstable** — 1 growing mode" style headline (Markdown). */
export function verdictHeadline(report: MatrixReport): string {
  switch (report.stability) {
    case 'asymptotically-stable':
      return '**Asymptotically stable** — every mode dies out';
    case 'marginally-stable': {
      const persistent = report.modes.filter((m) => m.behaviour === 'constant' || m.behaviour === 'oscillates').length;
      return `**Marginally stable** — nothing grows, but ${plural(persistent, 'mode persists', 'modes persist')} without decaying`;
    }
    case 'unstable':
      return `**Unstable** — ${plural(growingModes(report).length, 'growing mode', 'growing modes')}`;
    default:
      return '**Not analysed**';
  }
}

function timeOrSteps(report: MatrixReport, value: number, precision: number): string {
  if (report.domain === 'discrete' && report.period === null) return `${formatNumber(value, 3)} steps`;
  return formatDuration(value, precision);
}

/** Lens-sized eigenvalue: long surd texts become a 3-digit decimal. */
function shortLambda(ev: Eigenvalue, precision: number): string {
  const exact = eigenvalueText(ev, precision, true);
  return needsDecimal(ev) && exact.length > 8 ? `λ ≈ ${eigenvalueDecimal(ev, 3, true)}` : lambdaIs(exact);
}

/** The code-lens title: verdict and the dominant mode in a few words. */
export function lensTitle(report: MatrixReport, precision: number): string {
  const mode = dominantMode(report);
  const ev = mode ? eigenvalueOf(report, mode) : null;
  const lambda = ev ? shortLambda(ev, precision) : '';
  if (report.stability === null || !mode || !ev) {
    if (report.skipped.some((s) => s.startsWith(NOT_YET_PREFIX))) return 'eigenlens: analysing…';
    return report.skipped.length > 0 ? `eigenlens: not analysed (${report.skipped[0].replace(/\.$/, '')})` : 'eigenlens: not analysed';
  }
  const block = Math.max(...ev.blocks);
  if (report.stability === 'unstable') {
    const worst = growingModes(report).sort((a, b) => growthRate(report, b) - growthRate(report, a))[0] ?? mode;
    const wev = eigenvalueOf(report, worst) ?? ev;
    const wl = shortLambda(wev, precision);
    if (worst.behaviour === 'polynomial-growth') {
      return `⚠ unstable: ${wl} repeated on the ${report.domain === 'continuous' ? 'imaginary axis' : 'unit circle'} grows ${polynomialGrowth(report.domain === 'continuous' ? 't' : 'k', Math.max(...wev.blocks))}`;
    }
    if (worst.doublingTime !== null) return `⚠ unstable: ${wl} doubles every ${timeOrSteps(report, worst.doublingTime, precision)}`;
    return `⚠ unstable: ${wl} grows`;
  }
  if (report.stability === 'marginally-stable') {
    const persistent = report.modes.find((m) => m.behaviour === 'oscillates' || m.behaviour === 'constant') ?? mode;
    const pev = eigenvalueOf(report, persistent) ?? ev;
    const pl = shortLambda(pev, precision);
    if (persistent.behaviour === 'oscillates' && persistent.period !== null) {
      return `marginally stable · ${pl} oscillates, period ${timeOrSteps(report, persistent.period, precision)}`;
    }
    return `marginally stable · ${pl} persists`;
  }
  const slowest = report.modes
    .filter((m) => m.timeConstant !== null)
    .sort((a, b) => (b.timeConstant ?? 0) - (a.timeConstant ?? 0))[0];
  if (slowest && slowest.timeConstant !== null) return `stable · slowest τ = ${timeOrSteps(report, slowest.timeConstant, precision)} (${lambda})`;
  if (mode.behaviour === 'deadbeat') return `stable · deadbeat: every mode vanishes within ${block} steps`;
  if (mode.perStep) return `stable · slowest |z| = ${formatNumber(mode.perStep.radius, precision)}`;
  return `stable · ${lambda}`;
}

/** Multiplicity wording: "simple" or "algebraic 2, geometric 1 (Jordan block of size 2)". */
export function multiplicityText(ev: Eigenvalue): string {
  if (ev.algebraic === 1) return 'simple';
  const blocks = ev.blocks;
  let detail: string;
  if (blocks.every((b) => b === 1)) detail = `${blocks.length} independent eigenvectors, no Jordan block`;
  else if (blocks.length === 1) detail = `Jordan block of size ${blocks[0]}`;
  else detail = `Jordan blocks of sizes ${blocks.join(', ')}`;
  return `algebraic ${ev.algebraic}, geometric ${ev.geometric} (${detail})`;
}

/** What one mode does, as a plain sentence fragment (no eigenvalue). */
export function behaviourText(report: MatrixReport, mode: Mode, precision: number): string {
  const ev = eigenvalueOf(report, mode);
  const t = (x: number) => timeOrSteps(report, x, precision);
  const n = (x: number) => formatNumber(x, Math.min(precision, 4));
  const damping = () => {
    const parts: string[] = [];
    if (mode.dampingRatio !== null) parts.push(`ζ = ${n(mode.dampingRatio)}`);
    if (mode.naturalFrequency !== null) parts.push(`ω_n = ${n(mode.naturalFrequency)} rad/s`);
    return parts.length ? ` (${parts.join(', ')})` : '';
  };
  const perStep = () =>
    mode.perStep && mode.s === null
      ? `; per step |z| = ${n(mode.perStep.radius)}${mode.perStep.angle !== 0 ? `, angle ${n(mode.perStep.angle)} rad/sample` : ''}${mode.perStep.samplesTo2pct !== null ? `, within 2 % after ${n(mode.perStep.samplesTo2pct)} samples` : ''}`
      : '';
  switch (mode.behaviour) {
    case 'decays': {
      const tau = mode.timeConstant !== null ? ` with time constant τ = ${t(mode.timeConstant)}` : '';
      const settle = mode.settlingTime2pct !== null ? `, within 2 % after ${t(mode.settlingTime2pct)}` : '';
      return `decays${tau}${settle}${perStep()}`;
    }
    case 'grows': {
      const dbl = mode.doublingTime !== null ? `, doubling every ${t(mode.doublingTime)}` : '';
      return `grows${dbl}${perStep()}`;
    }
    case 'constant':
      return `stays constant: it neither decays nor grows${perStep()}`;
    case 'oscillates':
      return `oscillates without decaying${mode.period !== null ? `, period ${t(mode.period)}` : ''}${damping()}${perStep()}`;
    case 'decaying-oscillation': {
      const period = mode.period !== null ? ` with period ${t(mode.period)}` : '';
      const tau = mode.timeConstant !== null ? `, envelope τ = ${t(mode.timeConstant)}` : '';
      return `oscillates and decays${period}${tau}${damping()}${perStep()}`;
    }
    case 'growing-oscillation': {
      const period = mode.period !== null ? ` with period ${t(mode.period)}` : '';
      const dbl = mode.doublingTime !== null ? `, envelope doubling every ${t(mode.doublingTime)}` : '';
      return `oscillates and grows${period}${dbl}${damping()}${perStep()}`;
    }
    case 'polynomial-growth': {
      const b = ev ? Math.max(...ev.blocks) : 2;
      const v = report.domain === 'continuous' ? 't' : 'k';
      return `grows ${polynomialGrowth(v, b)}: a Jordan block of size ${b} on the ${report.domain === 'continuous' ? 'imaginary axis' : 'unit circle'}${mode.period !== null ? `, oscillating with period ${t(mode.period)}` : ''}`;
    }
    case 'deadbeat': {
      const b = ev ? Math.max(...ev.blocks) : 1;
      return `vanishes exactly after ${b} ${b === 1 ? 'step' : 'steps'} (deadbeat)`;
    }
    default:
      return String(mode.behaviour);
  }
}
