// ide/ features on hand-built reports (no engine): entry hovers, settings mapping, lenses.
// Matrices and closed forms are the published ones named in reportFixtures.ts.
import { describe, expect, it } from 'vitest';
import { hoverAt } from '../../server/src/ide/hover';
import { lensesOf } from '../../server/src/ide/lens';
import { settingsFromUser } from '../../server/src/ide/settings';
import { DEFAULT_SETTINGS } from '../../server/src/analysis/settings';
import { Rational } from '../../server/src/engine/rational';
import { MOLER_A, documentOf, matrixReport, molerVanLoanExtras } from './reportFixtures';

const text = 'A = [[-49, 24], [-64, 31]]  # Moler & Van Loan 1978 two-mode example\n';

function report() {
  const m = matrixReport('A', MOLER_A, { start: 0, end: 26 }, { start: 4, end: 26 }, molerVanLoanExtras());
  m.entrySpans = [[{ start: 6, end: 9 }, { start: 11, end: 13 }], [{ start: 17, end: 20 }, { start: 22, end: 24 }]];
  return documentOf(m);
}

describe('entry hover', () => {
  it('shows the exact value of an integer entry', () => {
    const hover = hoverAt(report(), text, 7, { precision: 6 })!;
    expect(hover.span).toEqual({ start: 6, end: 9 });
    expect(hover.markdown).toBe('**A**[1, 1] = −49 (exact)');
  });

  it('shows exact and decimal forms of a fraction, and says when an entry is a float', () => {
    const doc = report();
    doc.matrices[0].values[0][1] = { kind: 'exact', value: Rational.of(1, 3) };
    doc.matrices[0].values[1][1] = { kind: 'float', value: Math.PI };
    expect(hoverAt(doc, text, 12, { precision: 4 })!.markdown).toBe('**A**[1, 2] = 1/3 (exact) ≈ 0.3333');
    expect(hoverAt(doc, text, 23, { precision: 4 })!.markdown).toMatch(/^\*\*A\*\*\[2, 2\] ≈ 3\.142 \(floating point/);
  });

  it('on the name, the matrix hover leads with the verdict, then the caution (above the fold)', () => {
    const hover = hoverAt(report(), text, 0, { precision: 6 })!;
    expect(hover.span).toEqual({ start: 0, end: 1 });
    const lines = hover.markdown.split('\n');
    expect(lines[2]).toBe('**Asymptotically stable** — every mode dies out');
    expect(lines[4]).toMatch(/not proof of safety/);
  });

  it('no hover past the statement', () => {
    expect(hoverAt(report(), text, 40, { precision: 6 })).toBeNull();
  });
});

describe('lenses', () => {
  it('slowest time constant of λ = −1 is 1 s (τ = 1/|λ|, Moler & Van Loan eigenvalues)', () => {
    const lenses = lensesOf(report(), 6);
    expect(lenses[0].title).toBe('stable · slowest τ = 1 s (λ = −1)');
    // The copy lens names the matrix; its text is fetched on click (eigenlens/transitionText).
    expect(lenses[1]).toMatchObject({ title: 'copy Φ(t)', args: [0], needsUri: true });
  });
});

describe('settings mapping', () => {
  it('maps every eigenlens.* key and ignores values of the wrong type', () => {
    const s = settingsFromUser({
      defaultDomain: 'discrete',
      defaultPeriod: 0.01,
      precision: 4,
      closedFormMaxN: 6,
      lightDampingThreshold: 0.2,
      codeLens: { enabled: false },
      stateMatrixNames: ['^Aplant$', '(unclosed'],
      discretizeMethod: 'tustin',
    });
    expect(s.codeLensEnabled).toBe(false);
    expect(s.analysis).toEqual({ ...DEFAULT_SETTINGS, defaultDomain: 'discrete', defaultPeriod: 0.01, precision: 4, closedFormMaxN: 6, lightDampingThreshold: 0.2, stateMatrixNames: ['^Aplant$'], discretizeMethod: 'tustin' });
    const bad = settingsFromUser({ defaultDomain: 'sideways', defaultPeriod: -1, precision: 99, closedFormMaxN: 500, lightDampingThreshold: 'low', 'codeLens.enabled': false });
    expect(bad.analysis).toEqual(DEFAULT_SETTINGS);
    expect(bad.codeLensEnabled).toBe(false);
    expect(settingsFromUser(null).analysis).toEqual(DEFAULT_SETTINGS);
  });
});
