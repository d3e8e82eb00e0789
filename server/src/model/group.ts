/**
 * Groups the matrices of one file into models: each state matrix (A or F) with the input,
 * output, feedthrough, noise-input and noise-covariance matrices of the same group key
 * (name suffix, pragma `model=`, or .lti system), then checks their dimensions.
 *
 * Partner choice: a partner goes to the state matrix of its key that precedes it most
 * closely (else the first one after it), so a file that redefines A and B per scenario
 * pairs each A with its own B. A `Qc`/`Qd` with no state matrix of key c/d joins the plain
 * model (key ''), because Qc conventionally means "continuous-time Q", not a model named c.
 *
 * Domain precedence: the state matrix's own pragma > .lti system > name suffix (`_d`, `Ad`
 * → discrete; `_c` → continuous) > file pragma > setting. Per-matrix cues beat file-wide
 * defaults. Period: own pragma > system > file pragma > setting.
 *
 * Dimension checks (n = rows of a square A, m = cols of B, p = rows of C): B is n×m, C is
 * p×n, D is p×m, G has n rows, Q is square — q×q with q = cols of G, else n×n. A mismatched
 * partner is left out of the model and reported as `shape-mismatch` at its literal.
 */
import { domainFromGroupKey } from '../syntax/roles';
import type { EntryValue, ExtractedFile, MatrixLiteral, MatrixRole, Problem } from '../syntax/types';
import type { ModelGroup } from './types';

export interface GroupSettings {
  defaultDomain: 'continuous' | 'discrete';
  defaultPeriod: number | null;
}

type PartnerRole = Exclude<MatrixRole, 'state' | 'unknown'>;
const PARTNER_ROLES: PartnerRole[] = ['input', 'output', 'feedthrough', 'noise-input', 'noise-covariance'];

function periodValue(v: EntryValue | null | undefined): { period: number; exact: string | null } | null {
  if (!v) return null;
  return v.kind === 'exact' ? { period: v.value.toNumber(), exact: v.value.toString() } : { period: v.value, exact: null };
}

export function groupModels(file: ExtractedFile, settings: GroupSettings): { models: ModelGroup[]; problems: Problem[] } {
  const problems: Problem[] = [];
  const ms = file.matrices;
  const stateIdx = ms.map((m, i) => (m.role === 'state' ? i : -1)).filter((i) => i >= 0);
  const stateKeys = new Set(stateIdx.map((i) => ms[i].groupKey));
  const already = new Set(file.problems.map((p) => `${p.code}:${p.span.start}:${p.span.end}`));
  const report = (m: MatrixLiteral, code: string, message: string) => {
    const key = `${code}:${m.span.start}:${m.span.end}`;
    if (already.has(key)) return;
    already.add(key);
    problems.push({ span: { ...m.span }, severity: 'error', code, message });
  };

  // partners[stateIndex][role] = matrix index
  const partners = new Map<number, Partial<Record<PartnerRole, number>>>();
  for (const i of stateIdx) partners.set(i, {});
  ms.forEach((m, i) => {
    if (m.role === 'state' || m.role === 'unknown') return;
    let key = m.groupKey;
    if (m.role === 'noise-covariance' && !stateKeys.has(key) && (key === 'c' || key === 'd') && stateKeys.has('')) key = '';
    const candidates = stateIdx.filter((s) => ms[s].groupKey === key);
    if (candidates.length === 0) return;
    const before = candidates.filter((s) => ms[s].span.start <= m.span.start);
    const owner = before.length > 0 ? before[before.length - 1] : candidates[0];
    const slot = partners.get(owner)!;
    const role = m.role as PartnerRole;
    // First one wins; a second B for the same A is most likely a redefinition for the next A.
    if (slot[role] === undefined) slot[role] = i;
  });

  const systemByName = new Map(file.systems.map((s) => [s.name, s]));
  const usedIds = new Map<string, number>();
  const models: ModelGroup[] = [];
  for (const s of stateIdx) {
    const A = ms[s];
    const slot = partners.get(s)!;
    const system = file.language === 'lti' ? systemByName.get(A.groupKey) ?? null : null;

    let domain: 'continuous' | 'discrete' = settings.defaultDomain;
    let domainSource: ModelGroup['domainSource'] = 'setting';
    const nameDomain = domainFromGroupKey(A.groupKey);
    if (A.pragma?.domain) [domain, domainSource] = [A.pragma.domain, 'pragma'];
    else if (system?.domain) [domain, domainSource] = [system.domain, 'system'];
    else if (nameDomain) [domain, domainSource] = [nameDomain, 'name'];
    else if (file.filePragma?.domain) [domain, domainSource] = [file.filePragma.domain, 'pragma'];

    const period =
      periodValue(A.pragma?.period) ?? periodValue(system?.period) ?? periodValue(file.filePragma?.period) ??
      (settings.defaultPeriod !== null ? { period: settings.defaultPeriod, exact: null } : null);

    const baseId = file.language === 'lti' ? A.groupKey : A.groupKey || A.name || 'model';
    const count = (usedIds.get(baseId) ?? 0) + 1;
    usedIds.set(baseId, count);
    const model: ModelGroup = {
      id: count === 1 ? baseId : `${baseId}#${count}`,
      state: s,
      input: slot.input ?? null,
      output: slot.output ?? null,
      feedthrough: slot.feedthrough ?? null,
      noiseInput: slot['noise-input'] ?? null,
      noiseCovariance: slot['noise-covariance'] ?? null,
      domain,
      domainSource,
      period: period?.period ?? null,
      periodExact: period?.exact ?? null,
      stateNames: system && system.states.length > 0 ? [...system.states] : null,
      inputNames: system && system.inputs.length > 0 ? [...system.inputs] : null,
      outputNames: system && system.outputs.length > 0 ? [...system.outputs] : null,
    };

    if (A.nRows !== A.nCols) {
      report(A, 'non-square-state', `The state matrix ${A.name ?? ''} is ${A.nRows}×${A.nCols}; a state matrix must be square.`.replace('  ', ' '));
    } else {
      checkShapes(ms, model, A.nRows, report);
    }
    models.push(model);
  }
  return { models, problems };
}

function checkShapes(
  ms: MatrixLiteral[],
  model: ModelGroup,
  n: number,
  report: (m: MatrixLiteral, code: string, message: string) => void,
): void {
  const label = (m: MatrixLiteral) => m.name ?? 'this matrix';
  const mismatch = (m: MatrixLiteral, expected: string, why: string) =>
    report(m, 'shape-mismatch', `${label(m)} is ${m.nRows}×${m.nCols} but should be ${expected} (${why}).`);
  const stateName = ms[model.state].name ?? 'A';

  if (model.input !== null) {
    const B = ms[model.input];
    if (B.nRows !== n) {
      mismatch(B, `${n}×${B.nCols}`, `${stateName} has ${n} states`);
      model.input = null;
    }
  }
  if (model.output !== null) {
    const C = ms[model.output];
    if (C.nCols !== n) {
      mismatch(C, `${C.nRows}×${n}`, `${stateName} has ${n} states`);
      model.output = null;
    }
  }
  if (model.feedthrough !== null) {
    const D = ms[model.feedthrough];
    const p = model.output !== null ? ms[model.output].nRows : null;
    const m = model.input !== null ? ms[model.input].nCols : null;
    if ((p !== null && D.nRows !== p) || (m !== null && D.nCols !== m)) {
      mismatch(D, `${p ?? D.nRows}×${m ?? D.nCols}`, 'outputs × inputs');
      model.feedthrough = null;
    }
  }
  if (model.noiseInput !== null) {
    const G = ms[model.noiseInput];
    if (G.nRows !== n) {
      mismatch(G, `${n}×${G.nCols}`, `${stateName} has ${n} states`);
      model.noiseInput = null;
    }
  }
  if (model.noiseCovariance !== null) {
    const Q = ms[model.noiseCovariance];
    const q = model.noiseInput !== null ? ms[model.noiseInput].nCols : n;
    if (Q.nRows !== q || Q.nCols !== q) {
      mismatch(Q, `${q}×${q}`, model.noiseInput !== null ? `${ms[model.noiseInput].name ?? 'G'} has ${q} noise inputs` : `${stateName} has ${n} states`);
      model.noiseCovariance = null;
    }
  }
}
