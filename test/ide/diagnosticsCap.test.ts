// The diagnostics cap (setting eigenlens.maxDiagnostics): which findings are kept and what the
// note says. The ordering rule (file-wide notes, then errors, warnings, information, each in
// file order) is ours; the inputs are invented.
import { describe, expect, it } from 'vitest';
import { capDiagnostics, type PlainDiagnostic } from '../../server/src/ide/diagnostics';
import { settingsFromUser, DEFAULT_MAX_DIAGNOSTICS } from '../../server/src/ide/settings';

const d = (start: number, severity: PlainDiagnostic['severity'], matrixIndex: number | null, code = 'c'): PlainDiagnostic => ({
  span: { start, end: start + 1 },
  severity,
  code,
  message: `${code} at ${start}`,
  source: 'eigenlens',
  matrixIndex,
});

describe('capDiagnostics', () => {
  it('returns a list within the cap unchanged', () => {
    const list = [d(5, 'warning', 0), d(9, 'error', 1)];
    expect(capDiagnostics(list, 2)).toBe(list);
  });

  it('keeps file-wide notes, then errors, then warnings, in file order, and says how many were left out', () => {
    const list = [d(1, 'information', 0, 'light-damping'), d(2, 'warning', 1), d(3, 'error', 2), d(4, 'warning', 3), d(0, 'information', null, 'analysis-limit'), d(6, 'error', 4), d(7, 'warning', 5)];
    const capped = capDiagnostics(list, 5);
    expect(capped).toHaveLength(5);
    expect(capped[0].code).toBe('diagnostics-limit');
    expect(capped[0].span).toEqual({ start: 0, end: 0 });
    expect(capped[0].message).toContain('4 of 7 findings');
    expect(capped[0].message).toContain('3 are left out');
    // Kept: the file-wide note, both errors, the first warning; in the order they came.
    expect(capped.slice(1).map((x) => x.span.start)).toEqual([2, 3, 0, 6]);
  });

  it('is a setting from 10 to 100,000, 1,000 by default', () => {
    expect(settingsFromUser({}).maxDiagnostics).toBe(DEFAULT_MAX_DIAGNOSTICS);
    expect(DEFAULT_MAX_DIAGNOSTICS).toBe(1000);
    expect(settingsFromUser({ maxDiagnostics: 50 }).maxDiagnostics).toBe(50);
    expect(settingsFromUser({ maxDiagnostics: 5 }).maxDiagnostics).toBe(1000);
    expect(settingsFromUser({ maxDiagnostics: 2.5 }).maxDiagnostics).toBe(1000);
  });
});
