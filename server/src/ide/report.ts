/**
 * The full analysis as one Markdown document (custom request `eigenlens/report`): for each
 * state matrix the hover's content, then the characteristic and minimal polynomials, the
 * discrete-time model when one was computed, the complete model section (every transfer
 * function entry, sampled ranks, every period rule, rounding), every finding of the
 * matrix and of its partners, and the full caution.
 */
import type { DocumentReport, MatrixReport } from '../analysis/report';
import { SAFETY_CAUTION } from '../analysis/caution';
import { formatNumber } from './format';
import { hoverAt } from './hover';
import { modelLines } from './modelText';

function polynomialText(coeffs: (string | number)[], precision: number): string {
  const terms: string[] = [];
  for (let i = coeffs.length - 1; i >= 0; i--) {
    const raw = coeffs[i];
    const text = typeof raw === 'number' ? formatNumber(raw, precision) : raw.replace(/-/g, '−');
    if (text === '0') continue;
    const negative = text.startsWith('−');
    const magnitude = negative ? text.slice(1) : text;
    const power = i === 0 ? '' : i === 1 ? 'λ' : `λ^${i}`;
    const body = power === '' ? magnitude : magnitude === '1' ? power : `${/[+−\s/]/.test(magnitude) ? `(${magnitude})` : magnitude}·${power}`;
    terms.push(terms.length === 0 ? `${negative ? '−' : ''}${body}` : `${negative ? '−' : '+'} ${body}`);
  }
  return terms.length ? terms.join(' ') : '0';
}

function matrixSection(doc: DocumentReport, matrix: MatrixReport, precision: number): string {
  const out: string[] = [];
  out.push(`## ${matrix.name ?? 'Matrix'} (line ${matrix.line})`);
  out.push('');
  const hover = hoverAt(doc, '', (matrix.nameSpan ?? matrix.span).start, { precision }, { model: 'none' });
  // The hover ends with its short caution; the report carries the full one once at the end.
  const body = hover?.markdown.split('\n').filter((line) => !/^_.*not proof of safety.*_$/.test(line)) ?? [];
  out.push(...body);
  const spectrum = matrix.spectrum;
  if (spectrum) {
    out.push('');
    out.push(`Characteristic polynomial: ${polynomialText(spectrum.charPoly.exactCoeffs ?? spectrum.charPoly.coeffs, precision)}`);
    if (spectrum.minimalPoly) out.push(`Minimal polynomial: ${polynomialText(spectrum.minimalPoly.exactCoeffs, precision)}`);
  }
  const discrete = matrix.discrete;
  if (discrete) {
    out.push('');
    out.push(`Discrete-time model (${discrete.method}, period ${formatNumber(discrete.period, precision)} s):`);
    const block = (name: string, m: number[][] | null | undefined) => {
      if (!m) return;
      out.push('', '```', `${name} =`, ...m.map((row) => `  [ ${row.map((x) => formatNumber(x, precision)).join(', ')} ]`), '```');
    };
    block('Ad', discrete.Ad);
    block('Bd', discrete.Bd);
    block('Cd', discrete.Cd);
    block('Dd', discrete.Dd);
    block('Qd', discrete.Qd);
  }
  const model = modelLines(doc, matrix, precision, true);
  if (model.length) out.push('', ...model);
  // Findings on the model's other matrices (B: uncontrollable, C: unobservable) belong here too.
  const partners = doc.matrices.filter((m) => m.index !== matrix.index && m.modelId !== null && m.modelId === matrix.modelId && m.findings.length);
  if (matrix.findings.length || partners.length) {
    out.push('', 'Findings:');
    for (const p of partners) for (const f of p.findings) out.push(`- \`${f.code}\` (${f.severity}, on ${p.name ?? 'a partner matrix'}): ${f.message}`);
    for (const f of matrix.findings) out.push(`- \`${f.code}\` (${f.severity}): ${f.message}`);
  }
  return out.join('\n');
}

export function reportMarkdown(doc: DocumentReport, documentName: string, matrixIndex: number | undefined, precision: number): { title: string; markdown: string } {
  const chosen = doc.matrices.filter((m) => m.role === 'state' && (matrixIndex === undefined || m.index === matrixIndex));
  const title = chosen.length === 1 ? `eigenlens: ${chosen[0].name ?? 'matrix'} in ${documentName}` : `eigenlens: ${documentName}`;
  const out: string[] = [`# ${title}`, ''];
  if (chosen.length === 0) out.push('No state matrix found here.');
  for (const matrix of chosen) out.push(matrixSection(doc, matrix, precision), '');
  if (matrixIndex === undefined && doc.findings.length) {
    out.push('## Other findings', '');
    for (const f of doc.findings) out.push(`- \`${f.code}\` (${f.severity}): ${f.message}`);
    out.push('');
  }
  out.push('---', '', SAFETY_CAUTION);
  return { title, markdown: out.join('\n') };
}
