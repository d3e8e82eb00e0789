/**
 * Small SVG line plots of modal responses for the hover: one curve per mode,
 * y(t) = t^(b−1)·e^{σt}·cos(ωt) (continuous, b = largest Jordan block of the eigenvalue) or
 * y(k) = k^(b−1)·r^k·cos(θk) (discrete), each scaled so its largest magnitude on the horizon
 * is 1 — the plot shows shapes and time scales, not relative sizes.
 * Horizon (common practice): five of the slowest time constants, at least two periods of the
 * slowest oscillation, capped at 200 of the fastest time scales so fast modes stay visible.
 * Invariant: output is a self-contained SVG no larger than PLOT_WIDTH × PLOT_HEIGHT px.
 */
import type { Domain, Mode, Spectrum } from '../engine/types';
import { eigenvalueText, formatDuration, lambdaIs } from './format';

export const PLOT_WIDTH = 640;
export const PLOT_HEIGHT = 180;
const MAX_CURVES = 6;
const SAMPLES = 240;
// Our own palette: colour-blind-distinguishable hues chosen for dark and light themes alike.
const PALETTE = ['#3d8bfd', '#e8833a', '#2bb673', '#d0457a', '#9a7bd8', '#b8a032'];

interface Curve {
  label: string;
  ys: number[];
}

function modeScales(mode: Mode, domain: Domain): { slow: number | null; fast: number | null } {
  if (domain === 'discrete' && mode.perStep && mode.s === null) {
    const r = mode.perStep.radius;
    const scales: number[] = [];
    if (r > 0 && r !== 1) scales.push(1 / Math.abs(Math.log(r)));
    if (mode.perStep.angle !== 0) scales.push((2 * Math.PI) / Math.abs(mode.perStep.angle));
    return { slow: scales.length ? Math.max(...scales) : null, fast: scales.length ? Math.min(...scales) : null };
  }
  const scales: number[] = [];
  if (mode.timeConstant !== null && Number.isFinite(mode.timeConstant)) scales.push(mode.timeConstant);
  if (mode.doublingTime !== null && Number.isFinite(mode.doublingTime)) scales.push(mode.doublingTime / Math.LN2);
  if (mode.period !== null && Number.isFinite(mode.period)) scales.push(mode.period / 2.5);
  return { slow: scales.length ? Math.max(...scales) : null, fast: scales.length ? Math.min(...scales) : null };
}

/** Horizon in seconds (continuous) or samples (discrete without period). */
export function plotHorizon(modes: Mode[], domain: Domain): number {
  const slow: number[] = [];
  const fast: number[] = [];
  for (const mode of modes) {
    const s = modeScales(mode, domain);
    if (s.slow !== null && s.slow > 0) slow.push(s.slow);
    if (s.fast !== null && s.fast > 0) fast.push(s.fast);
  }
  const perSample = domain === 'discrete' && modes.every((m) => m.s === null);
  if (slow.length === 0) return perSample ? 20 : 5;
  let horizon = 5 * Math.max(...slow);
  horizon = Math.min(horizon, 200 * Math.min(...fast));
  if (perSample) horizon = Math.max(10, Math.min(200, Math.ceil(horizon)));
  return horizon;
}

function curveFor(mode: Mode, spectrum: Spectrum, domain: Domain, horizon: number, perSample: boolean, period: number | null): number[] {
  const ev = spectrum.eigenvalues[mode.eigenvalueIndex];
  const block = Math.max(1, ...(ev?.blocks ?? [1]));
  const ys: number[] = [];
  if (perSample) {
    const r = Math.hypot(ev.re, ev.im);
    const theta = Math.atan2(ev.im, ev.re);
    for (let k = 0; k <= horizon; k++) ys.push(k ** (block - 1) * r ** k * Math.cos(theta * k));
    return ys;
  }
  const s = domain === 'discrete' ? mode.s : { re: ev.re, im: ev.im };
  const sigma = s?.re ?? 0;
  const omega = Math.abs(s?.im ?? 0);
  const step = domain === 'discrete' && period !== null ? period : horizon / (SAMPLES - 1);
  const count = domain === 'discrete' && period !== null ? Math.min(SAMPLES, Math.floor(horizon / step) + 1) : SAMPLES;
  for (let i = 0; i < count; i++) {
    const t = i * step;
    ys.push(t ** (block - 1) * Math.exp(sigma * t) * Math.cos(omega * t));
  }
  return ys;
}

function normalise(ys: number[]): number[] {
  const peak = Math.max(...ys.map((y) => (Number.isFinite(y) ? Math.abs(y) : 0)));
  return ys.map((y) => (peak > 0 && Number.isFinite(y) ? y / peak : 0));
}

/** The SVG text, or null when there is nothing to draw. */
export function modalResponseSvg(spectrum: Spectrum, modes: Mode[], domain: Domain, period: number | null, precision: number): string | null {
  if (modes.length === 0) return null;
  const shown = modes.slice(0, MAX_CURVES);
  const perSample = domain === 'discrete' && shown.every((m) => m.s === null);
  const horizon = plotHorizon(shown, domain);
  const curves: Curve[] = shown.map((mode) => ({
    label: lambdaIs(eigenvalueText(spectrum.eigenvalues[mode.eigenvalueIndex], 3, true)),
    ys: normalise(curveFor(mode, spectrum, domain, horizon, perSample, period)),
  }));
  const left = 36;
  const right = PLOT_WIDTH - 170;
  const top = 14;
  const bottom = PLOT_HEIGHT - 26;
  const x = (i: number, count: number) => left + ((right - left) * i) / Math.max(1, count - 1);
  const y = (v: number) => top + ((bottom - top) * (1 - v)) / 2;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${PLOT_WIDTH}" height="${PLOT_HEIGHT}" viewBox="0 0 ${PLOT_WIDTH} ${PLOT_HEIGHT}" font-family="sans-serif" font-size="11">`);
  parts.push(`<rect x="0" y="0" width="${PLOT_WIDTH}" height="${PLOT_HEIGHT}" fill="#ffffff" fill-opacity="0.04"/>`);
  parts.push(`<line x1="${left}" y1="${y(0)}" x2="${right}" y2="${y(0)}" stroke="#888" stroke-width="0.6"/>`);
  parts.push(`<line x1="${left}" y1="${top}" x2="${left}" y2="${bottom}" stroke="#888" stroke-width="0.6"/>`);
  parts.push(`<text x="${left - 4}" y="${y(1) + 4}" text-anchor="end" fill="#888">1</text>`);
  parts.push(`<text x="${left - 4}" y="${y(-1) + 4}" text-anchor="end" fill="#888">−1</text>`);
  const horizonLabel = perSample ? `k = ${horizon}` : `t = ${formatDuration(horizon, precision)}`;
  parts.push(`<text x="${right}" y="${PLOT_HEIGHT - 8}" text-anchor="end" fill="#888">${escapeXml(horizonLabel)}</text>`);
  parts.push(`<text x="${left}" y="${PLOT_HEIGHT - 8}" fill="#888">0</text>`);
  curves.forEach((curve, idx) => {
    const colour = PALETTE[idx % PALETTE.length];
    const points = curve.ys.map((v, i) => `${x(i, curve.ys.length).toFixed(1)},${y(v).toFixed(1)}`).join(' ');
    parts.push(`<polyline fill="none" stroke="${colour}" stroke-width="1.6" points="${points}"/>`);
    const ly = top + 6 + idx * 16;
    parts.push(`<line x1="${right + 12}" y1="${ly}" x2="${right + 30}" y2="${ly}" stroke="${colour}" stroke-width="2"/>`);
    parts.push(`<text x="${right + 36}" y="${ly + 4}" fill="${colour}">${escapeXml(curve.label)}</text>`);
  });
  if (modes.length > MAX_CURVES) {
    parts.push(`<text x="${right + 12}" y="${top + 6 + MAX_CURVES * 16}" fill="#888">+${modes.length - MAX_CURVES} more</text>`);
  }
  parts.push('</svg>');
  return parts.join('');
}

export function svgDataUri(svg: string): string {
  return `data:image/svg+xml;base64,${Buffer.from(svg, 'utf8').toString('base64')}`;
}

function escapeXml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}
