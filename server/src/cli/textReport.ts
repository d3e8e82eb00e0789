/**
 * The command line's report for people: per matrix, the verdict first, then the modes in
 * sentences, the closed-form transition matrix entry by entry, its numeric check, and the
 * findings with file:line:column.
 */
import type { DocumentReport, MatrixReport } from '../analysis/report';
import type { Mode, Spectrum } from '../engine/types';
import { entryText } from '../analysis/termText';
import { eigenvalueLabel, formatNumber, formatSeconds } from '../analysis/numberText';
import { jordanText } from '../analysis/findings';
import { lineColumnAt } from '../analysis/position';

const VERDICT: Record<string, string> = {
  'asymptotically-stable': 'STABLE (asymptotically): every mode decays',
  'marginally-stable': 'MARGINALLY STABLE: bounded, but some mode never decays',
  unstable: 'UNSTABLE',
};

export function modeSentence(mode: Mode, spec: Spectrum, domain: 'continuous' | 'discrete', period: number | null, digits: number): string {
  const e = spec.eigenvalues[mode.eigenvalueIndex];
  const pair = e.im !== 0;
  const mult =
    e.algebraic === 1
      ? 'simple'
      : `algebraic ${e.algebraic}, geometric ${e.geometric}${e.blocks.some((b) => b > 1) ? `, ${jordanText(e.blocks)}` : ''}`;
  const time = (x: number | null) => (x === null ? '' : domain === 'continuous' || period !== null ? formatSeconds(x) : `${formatNumber(x, 3)} steps`);
  const bits: string[] = [];
  switch (mode.behaviour) {
    case 'decays':
      bits.push(`decays with time constant ${time(mode.timeConstant)}`);
      break;
    case 'grows':
      bits.push(`grows, doubling every ${time(mode.doublingTime)}`);
      break;
    case 'constant':
      bits.push('stays constant (an integrator or a pure memory)');
      break;
    case 'oscillates':
      bits.push(`oscillates without decay, period ${time(mode.period)}`);
      break;
    case 'decaying-oscillation':
      bits.push(`oscillates and decays: period ${time(mode.period)}, time constant ${time(mode.timeConstant)}`);
      break;
    case 'growing-oscillation':
      bits.push(`oscillates and grows: period ${time(mode.period)}, doubling every ${time(mode.doublingTime)}`);
      break;
    case 'polynomial-growth':
      bits.push(`sits on the stability boundary with a Jordan block of size ${Math.max(...e.blocks)}, so it grows polynomially`);
      break;
    case 'deadbeat':
      bits.push(`is deadbeat: it vanishes after ${Math.max(...e.blocks)} step${Math.max(...e.blocks) > 1 ? 's' : ''}`);
      break;
  }
  if (mode.dampingRatio !== null && pair) bits.push(`ζ = ${formatNumber(mode.dampingRatio, 4)}`);
  if (mode.naturalFrequency !== null && pair) bits.push(`ω_n = ${formatNumber(mode.naturalFrequency, digits)} rad/s`);
  if (mode.settlingTime2pct !== null && (mode.behaviour === 'decays' || mode.behaviour === 'decaying-oscillation')) bits.push(`2 % settling ${time(mode.settlingTime2pct)}`);
  if (domain === 'discrete' && mode.s) bits.push(`continuous equivalent s = ${formatNumber(mode.s.re, 4)}${mode.s.im ? ` ± ${formatNumber(Math.abs(mode.s.im), 4)}j` : ''} rad/s`);
  if (domain === 'discrete' && !mode.s && mode.perStep) bits.push(`|z| = ${formatNumber(mode.perStep.radius, 4)} per step`);
  return `${eigenvalueLabel(e)} (${mult}) ${bits.join('; ')}.`;
}

function matrixBlock(path: string, text: string, m: MatrixReport, digits: number): string[] {
  const out: string[] = [];
  const where = `${path}:${m.line}:${m.column}`;
  const kind = [`${m.rows}×${m.cols}`, m.role, m.domain + (m.period !== null ? ` (T = ${formatNumber(m.period, 6)} s)` : ''), m.exact ? 'exact entries' : 'floating-point entries'];
  out.push(`${where}  ${m.name ?? '(unnamed)'}  ·  ${kind.join('  ·  ')}`);
  if (m.role !== 'state') {
    out.push(`  ${m.modelId !== null ? `belongs to model "${m.modelId || 'default'}"` : 'not grouped with a state matrix'}`);
    return out;
  }
  const spec = m.spectrum;
  if (!spec) {
    for (const s of m.skipped) out.push(`  ${s}`);
    return out;
  }
  const growing = m.modes.filter((x) => ['grows', 'growing-oscillation', 'polynomial-growth'].includes(x.behaviour)).length;
  out.push(`  Verdict: ${VERDICT[m.stability ?? ''] ?? 'unknown'}${m.stability === 'unstable' ? ` (${growing} growing mode${growing === 1 ? '' : 's'})` : ''}`);
  out.push(`  Multiplicities: ${spec.exact ? 'exact (decided over the rationals)' : `numerical (eigenvalues within ${formatNumber(spec.clusterTolerance ?? 0, 2)} clustered)`}${spec.defective ? '; the matrix is DEFECTIVE' : ''}`);
  out.push('  Modes:');
  for (const mode of m.modes) out.push(`    • ${modeSentence(mode, spec, m.domain, m.period, digits)}`);
  const cf = m.transition;
  if (cf) {
    const v = cf.variable;
    out.push(v === 't' ? '  Transition matrix Φ(t) = e^(At):' : '  Transition matrix Φ(k) = A^k, k ≥ 0:');
    cf.entries.forEach((row, i) => row.forEach((terms, j) => out.push(`    Φ[${i + 1},${j + 1}] = ${entryText(terms, v, digits)}`)));
    const samples = cf.check.samples.map((s) => formatNumber(s, 3)).join(', ');
    out.push(
      `  Check: closed form vs numeric ${v === 't' ? 'e^(At)' : 'A^k (repeated products)'} at ${v} = ${samples}: residual ${formatNumber(cf.check.residual, 2)} — ${cf.check.passed ? 'agrees' : 'DOES NOT AGREE, do not use these numbers'}.`,
    );
  }
  for (const s of m.skipped) out.push(`  Skipped: ${s}`);
  if (m.discrete) {
    const d = m.discrete;
    out.push(`  Discretized (${d.method}, T = ${formatNumber(d.period, 6)} s):`);
    const show = (label: string, M: number[][] | null | undefined) => {
      if (!M) return;
      out.push(`    ${label} = [${M.map((r) => r.map((x) => formatNumber(x, digits)).join(', ')).join('; ')}]`);
    };
    show('Ad', d.Ad);
    show('Bd', d.Bd);
    show('Cd', d.Cd);
    show('Dd', d.Dd);
    show('Qd', d.Qd);
  }
  if (m.findings.length) {
    out.push('  Findings:');
    for (const f of m.findings) {
      const p = lineColumnAt(text, f.span.start);
      out.push(`    ${path}:${p.line}:${p.column}: ${f.severity} [${f.code}] ${f.message}`);
    }
  }
  return out;
}

function modelBlock(report: DocumentReport, m: MatrixReport, digits: number): string[] {
  const model = report.models.find((x) => x.state === m.index);
  if (!model) return [];
  const out: string[] = [];
  const rank = (label: string, r: { rank: number; n: number; controllable: boolean; uncontrollableEigenvalues: { text: string }[] } | null, word: string, miss: string) => {
    if (!r) return;
    out.push(`  ${label}: ${r.controllable ? word : `NOT ${word}`} (rank ${r.rank} of ${r.n})${r.controllable ? '' : `; ${miss} ${r.uncontrollableEigenvalues.map((e) => `λ = ${e.text}`).join(', ')}`}.`);
  };
  rank('(A, B)', model.controllability, 'controllable', 'the input cannot move');
  rank('(A, C)', model.observability, 'observable', 'the outputs do not see');
  if (model.transferFunction) {
    const tf = model.transferFunction;
    for (const row of tf.entries) for (const e of row) out.push(`  ${tf.variable === 's' ? 'G(s)' : 'H(z)'}[${e.output + 1},${e.input + 1}] = ${e.text}`);
  }
  const ce = model.continuousEquivalent;
  if (ce) {
    if (ce.ok) {
      out.push(`  Continuous model whose zero-order hold this is (T = ${formatNumber(ce.period, 6)} s):`);
      out.push(`    A = [${ce.A.map((r) => r.map((x) => formatNumber(x, digits)).join(', ')).join('; ')}]`);
      if (ce.B) out.push(`    B = [${ce.B.map((r) => r.map((x) => formatNumber(x, digits)).join(', ')).join('; ')}]`);
    } else out.push(`  No continuous model has this as its zero-order hold: ${ce.reason}`);
  }
  return out;
}

export function textReport(path: string, text: string, report: DocumentReport, digits = 6): string {
  const out: string[] = [];
  out.push(`━━ ${path} (${report.language}): ${report.matrices.length} matri${report.matrices.length === 1 ? 'x' : 'ces'}, ${report.models.length} model${report.models.length === 1 ? '' : 's'}`);
  for (const f of report.findings) {
    const p = lineColumnAt(text, f.span.start);
    out.push(`${path}:${p.line}:${p.column}: ${f.severity} [${f.code}] ${f.message}`);
  }
  for (const m of report.matrices) {
    out.push('');
    out.push(...matrixBlock(path, text, m, digits));
    if (m.role === 'state' && m.spectrum) out.push(...modelBlock(report, m, digits));
  }
  return out.join('\n');
}
