/**
 * The discrete model shown for a continuous state matrix whose sample period is known:
 * its model's B, C, D are discretized together (exactly where the method allows it).
 */
import { Rational } from '../engine/rational';
import { discretize, type DiscretizationMethod } from '../engine/discretize';
import type { ExtractedFile, MatrixLiteral } from '../syntax/types';
import type { ModelGroup } from '../model/types';
import type { DiscreteModel } from './report';

function matrixOf(lit: MatrixLiteral | undefined, exact: boolean): Rational[][] | number[][] | null {
  if (!lit || lit.rows.some((r) => r.some((e) => e.value === null))) return null;
  if (exact && lit.exact) return lit.rows.map((r) => r.map((e) => (e.value as { kind: 'exact'; value: Rational }).value));
  return lit.rows.map((r) => r.map((e) => (e.value!.kind === 'exact' ? e.value!.value.toNumber() : (e.value!.value as number))));
}

export function discreteModelFor(
  file: ExtractedFile,
  model: ModelGroup | null,
  exactA: Rational[][] | null,
  floatA: number[][],
  period: number,
  method: DiscretizationMethod,
): DiscreteModel | null {
  const at = (idx: number | null | undefined) => (idx === null || idx === undefined ? undefined : file.matrices[idx]);
  const parts = [at(model?.input), at(model?.output), at(model?.feedthrough)];
  const exact = exactA !== null && parts.every((p) => p === undefined || p.exact);
  const T = exact && model?.periodExact ? Rational.parse(model.periodExact) ?? period : period;
  const result = discretize(
    {
      A: exact ? exactA! : floatA,
      B: matrixOf(parts[0], exact),
      C: matrixOf(parts[1], exact),
      D: matrixOf(parts[2], exact),
    },
    T,
    method,
  );
  if (!result.ok) throw new Error(result.error);
  return {
    method: result.method,
    period: result.period,
    Ad: result.Ad,
    Bd: result.Bd,
    Cd: result.Cd,
    Dd: result.Dd,
    exact: result.exact,
  };
}
