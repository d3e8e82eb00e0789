/**
 * Matrix roles from variable names: A/F state, B input, C/H output, D feedthrough,
 * G noise input, Q noise covariance (common practice in state-space notation).
 *
 * Rule (documented for users): a name has a role when it is a role letter followed by
 *   - nothing                      A, B, Q
 *   - an underscore and anything    A_cl, B_plant, A_1, Q_c
 *   - digits (then optionally `_…`) A1, B12, A2_fast
 *   - one of our short suffixes    Ad, Acl, Aplant, Qc, Abar, Ahat …  (see NAME_SUFFIXES)
 * Anything else is not a role name: `Data`, `Bad`, `Gain`, `Query`, `Ab` are ordinary
 * words or ambiguous, so we do not guess. The group key is the suffix without the
 * underscore, lower-cased ('' for a plain letter): A_cl and Acl both give "cl".
 */
import type { MatrixRole } from './types';

const ROLE_BY_LETTER: Record<string, MatrixRole> = {
  A: 'state',
  F: 'state',
  B: 'input',
  C: 'output',
  H: 'output',
  D: 'feedthrough',
  G: 'noise-input',
  Q: 'noise-covariance',
};

/** Suffixes glued directly to the role letter that we recognise (lower case). */
export const NAME_SUFFIXES = [
  'c', 'd', 'k', 'e', 'p', 'm', 's', 'z', 'w', 'x', 'cl', 'ol', 'dt', 'ct', 'aug', 'bar', 'hat', 'tilde',
  'plant', 'ctrl', 'cont', 'disc', 'est', 'obs', 'sys', 'red', 'full', 'lin', 'nom', 'new', 'old', 'ref', 'true', 'model',
];
const SUFFIX_SET = new Set(NAME_SUFFIXES);

export interface NameRole {
  role: MatrixRole;
  groupKey: string;
}

const ROLE_NAME = /^([ABCDFGHQ])(?:(_[A-Za-z0-9_]*)|([0-9]+(?:_[A-Za-z0-9_]*)?)|([a-z]+))?$/;

/** Compiles user-supplied extra state-matrix patterns; invalid ones are dropped (see extract). */
export function compileNamePatterns(patterns: readonly string[] | undefined): RegExp[] {
  const out: RegExp[] = [];
  for (const p of patterns ?? []) {
    try {
      out.push(new RegExp(`^(?:${p})$`));
    } catch {
      // An invalid user pattern is ignored rather than failing the whole file.
    }
  }
  return out;
}

/**
 * Role and group key of a variable name, or null when the name carries no role.
 * Extra state patterns match the whole name; their first capture group, if any, is the group key.
 */
export function roleFromName(name: string, extraStatePatterns: readonly RegExp[] = []): NameRole | null {
  for (const re of extraStatePatterns) {
    const m = re.exec(name);
    if (m) return { role: 'state', groupKey: (m[1] ?? '').replace(/^_+/, '').toLowerCase() };
  }
  const m = ROLE_NAME.exec(name);
  if (!m) return null;
  const role = ROLE_BY_LETTER[m[1]];
  if (m[4] !== undefined && !SUFFIX_SET.has(m[4])) return null;
  const suffix = (m[2] ?? m[3] ?? m[4] ?? '').replace(/^_+/, '').replace(/_+$/, '').toLowerCase();
  return { role, groupKey: suffix };
}

/** Domain implied by a group key: `d`/`dt`/`disc` discrete, `c`/`ct`/`cont` continuous. */
export function domainFromGroupKey(groupKey: string): 'continuous' | 'discrete' | null {
  const last = groupKey.split('_').pop() ?? '';
  if (last === 'd' || last === 'dt' || last === 'disc') return 'discrete';
  if (last === 'c' || last === 'ct' || last === 'cont') return 'continuous';
  return null;
}
