// Published closed forms, checked end to end through `eigenlens check --format json`:
// the matrix is written in a source file, the CLI analyses it, and the JSON term encoding is
// evaluated from its definition (test/support/jsonTerms.ts) and compared with the source's values.
import { describe, expect, it } from 'vitest';
import { cliJson, evalEntries, normRelError } from '../support/jsonTerms';

function stateMatrix(json: any, name = 'A'): any {
  const m = json.files[0].matrices.find((x: any) => x.name === name);
  expect(m, `matrix ${name} in the report`).toBeTruthy();
  return m;
}

const py = (rows: string) => `A = ${rows}\n`;

describe('closed-form e^{At} through the CLI (published values)', () => {
  it('two real modes that defeat a Taylor series', () => {
    // Moler & Van Loan, "Nineteen Dubious Ways to Compute the Exponential of a Matrix",
    // SIAM Review 20(4), 1978, Taylor-series section (from memory); SciPy expm tests test_burkardt_4.
    const m = stateMatrix(cliJson(py('[[-49, 24], [-64, 31]]'), '.py'));
    expect(m.exact).toBe(true);
    expect(m.eigenvalues.map((e: any) => e.text).sort()).toEqual(['-1', '-17']);
    const phi1 = evalEntries(m.transition.entries, 1);
    const ref = [
      [-0.73575875814475308, 0.5518190996580977],
      [-1.4715175990882605, 1.1036382407155726],
    ];
    expect(normRelError(phi1, ref)).toBeLessThan(1e-14);
    expect(m.stability).toBe('asymptotically-stable');
  });

  it('companion form with widely separated modes', () => {
    // SciPy expm tests, test_burkardt_3 (attributed to Laub).
    const m = stateMatrix(cliJson(py('[[0, 1], [-39, -40]]'), '.py'));
    const ref = [
      [0.37756047909700659, 0.0096810379255642713],
      [-0.37756047909700658, -0.0096810379255642598],
    ];
    expect(normRelError(evalEntries(m.transition.entries, 1), ref)).toBeLessThan(1e-14);
  });

  it('rotation with decay, written in TypeScript', () => {
    // Standard identity e^{[[σ,ω],[−ω,σ]]t} = e^{σt}[[cos ωt, sin ωt],[−sin ωt, cos ωt]].
    const m = stateMatrix(cliJson('const A = [[-1, 2], [-2, -1]];\n', '.ts'));
    const ref = [
      [0.32770991402245983, 0.51037795154457281],
      [-0.51037795154457281, 0.32770991402245983],
    ];
    expect(normRelError(evalEntries(m.transition.entries, 0.5), ref)).toBeLessThan(1e-14);
    const t = 0.5;
    const term = m.transition.entries[0][0];
    expect(term).toHaveLength(1);
    expect(term[0]).toMatchObject({ power: 0, rate: -1, freq: 2, wave: 'cos' });
    expect(Math.exp(-t) * Math.cos(2 * t)).toBeCloseTo(ref[0][0], 15);
  });

  it('defective 3×3 with a t·e^{16t} term', () => {
    // SciPy expm tests, test_burkardt_8: eigenvalue 4 simple, 16 with algebraic 2, geometric 1.
    const m = stateMatrix(cliJson(py('[[21, 17, 6], [-5, -1, -6], [4, 4, 16]]'), '.py'));
    const e16 = m.eigenvalues.find((e: any) => e.text === '16');
    expect(e16).toMatchObject({ algebraic: 2, geometric: 1, blocks: [2] });
    expect(m.diagnostics.map((d: any) => d.code)).toContain('defective-matrix');
    for (const t of [0.1, 0.3]) {
      const E4 = Math.exp(4 * t);
      const E16 = Math.exp(16 * t);
      const ref = [
        [((5 + 8 * t) * E16 - E4) / 4, ((5 + 8 * t) * E16 - 5 * E4) / 4, (E16 - E4) / 2],
        [(E4 - (1 + 8 * t) * E16) / 4, (5 * E4 - (1 + 8 * t) * E16) / 4, (E4 - E16) / 2],
        [4 * t * E16, 4 * t * E16, E16],
      ];
      expect(normRelError(evalEntries(m.transition.entries, t), ref)).toBeLessThan(1e-13);
    }
    // Entry (3,1) is exactly 4t·e^{16t}: one term with exact coefficient 4.
    expect(m.transition.entries[2][0]).toEqual([expect.objectContaining({ coef: 4, exact: '4', power: 1, rate: 16, freq: 0 })]);
  });

  it('defective, non-derogatory 3×3', () => {
    // Ward, "Numerical computation of the matrix exponential with accuracy estimate",
    // SIAM J. Numer. Anal. 14(4), 1977, example 1 (from memory); SciPy test_burkardt_10.
    const m = stateMatrix(cliJson(py('[[4, 2, 0], [1, 4, 1], [1, 1, 4]]'), '.py'));
    const row1 = evalEntries(m.transition.entries, 1)[0];
    const ref = [147.86662244637015, 183.76513864636843, 71.797032399996545];
    for (let j = 0; j < 3; j++) expect(Math.abs(row1[j] - ref[j]) / 183.8).toBeLessThan(1e-14);
  });

  it('critically damped pair from a constant', () => {
    // Standard result: A = [[0,1],[−ω²,−2ω]] ⇒ e^{At} = e^{−ωt}[[1+ωt, t],[−ω²t, 1−ωt]].
    const m = stateMatrix(cliJson('w = 2\nA = [[0, 1], [-w**2, -2*w]]\n', '.py'));
    const ref = [
      [0.73575888234288464, 0.18393972058572116],
      [-0.73575888234288464, 0],
    ];
    expect(normRelError(evalEntries(m.transition.entries, 0.5), ref)).toBeLessThan(1e-14);
  });

  it('nilpotent 4×4 gives a polynomial', () => {
    // Moler & Van Loan 1978 (from memory); SciPy test_burkardt_5.
    const m = stateMatrix(cliJson(py('[[0, 6, 0, 0], [0, 0, 6, 0], [0, 0, 0, 6], [0, 0, 0, 0]]'), '.py'));
    expect(m.eigenvalues).toEqual([expect.objectContaining({ text: '0', algebraic: 4, geometric: 1, blocks: [4] })]);
    const t = 0.7;
    const ref = [
      [1, 6 * t, 18 * t * t, 36 * t ** 3],
      [0, 1, 6 * t, 18 * t * t],
      [0, 0, 1, 6 * t],
      [0, 0, 0, 1],
    ];
    expect(normRelError(evalEntries(m.transition.entries, t), ref)).toBeLessThan(1e-15);
    expect(m.stability).toBe('unstable');
  });

  it('repeated but not defective: I₂ has no t·e^t term', () => {
    const m = stateMatrix(cliJson(py('[[1, 0], [0, 1]]'), '.py'));
    expect(m.eigenvalues).toEqual([expect.objectContaining({ text: '1', algebraic: 2, geometric: 2, blocks: [1, 1] })]);
    const allTerms = m.transition.entries.flat(2);
    expect(allTerms.every((t: any) => t.power === 0)).toBe(true);
    expect(m.diagnostics.map((d: any) => d.code)).not.toContain('defective-matrix');
  });

  it('near-defective matrix is flagged instead of printed as fine', () => {
    // Moler & Van Loan 1978 (from memory); SciPy test_burkardt_7: ε = 2^-52, the eigenvector
    // matrix has condition ~4.5e15 and an eigen-based form is 26 % wrong in entry (1,2).
    const eps = '2.220446049250313080847263336181640625e-16';
    const m = stateMatrix(cliJson(py(`[[1 + ${eps}, 1], [0, 1 - ${eps}]]`), '.py'));
    expect(m.exact).toBe(true);
    expect(m.transition.check.passed).toBe(false);
    expect(m.diagnostics.map((d: any) => d.code)).toContain('near-repeated-eigenvalues');
  });

  it('overscaling case keeps its accuracy', () => {
    // Al-Mohy & Higham, SIAM J. Matrix Anal. Appl. 31(3), 2009, §1 (from memory): e^A = [[e, b·sinh 1],[0, e^{-1}]].
    const m = stateMatrix(cliJson(py('[[1, 1e8], [0, -1]]'), '.py'));
    const phi = evalEntries(m.transition.entries, 1);
    expect(Math.abs(phi[0][1] - 117520119.36438015) / 117520119.36438015).toBeLessThan(1e-13);
    expect(m.transition.check.passed).toBe(true);
  });
});

describe('closed-form A^k through the CLI (published values)', () => {
  it('2×2 and 3×3 Jordan blocks', () => {
    // Standard identities for powers of a Jordan block.
    const m2 = stateMatrix(cliJson('# eigenlens: discrete\nA = [[0.5, 1], [0, 0.5]]\n', '.py'));
    expect(m2.transition.variable).toBe('k');
    expect(normRelError(evalEntries(m2.transition.entries, 5), [[0.03125, 0.3125], [0, 0.03125]])).toBeLessThan(1e-15);
    const m3 = stateMatrix(cliJson('# eigenlens: discrete\nA = [[0.9, 1, 0], [0, 0.9, 1], [0, 0, 0.9]]\n', '.py'));
    const p = evalEntries(m3.transition.entries, 10);
    expect(p[0][0]).toBeCloseTo(0.3486784401, 12);
    expect(p[0][1]).toBeCloseTo(3.87420489, 11);
    expect(p[0][2]).toBeCloseTo(19.37102445, 10);
    expect(m3.stability).toBe('asymptotically-stable');
  });

  it('Fibonacci matrix', () => {
    // Knuth, The Art of Computer Programming vol. 1, §1.2.8 (from memory).
    const m = stateMatrix(cliJson('// eigenlens: discrete\nconst A = [[1, 1], [1, 0]];\n', '.ts'));
    expect(m.eigenvalues.map((e: any) => e.text).sort()).toEqual(['(1+√5)/2', '(1-√5)/2'].sort());
    expect(evalEntries(m.transition.entries, 10).flat().map((x) => Math.round(x * 1e9) / 1e9)).toEqual([89, 55, 55, 34]);
    expect(m.stability).toBe('unstable');
  });

  it('a zero eigenvalue gives one-step terms', () => {
    // Nilpotent N = [[0,1],[0,0]]: N^0 = I, N^1 = N, N^k = 0 for k ≥ 2 (definition of nilpotency).
    const m = stateMatrix(cliJson('# eigenlens: discrete\nA = [[0, 1], [0, 0]]\n', '.py'));
    expect(evalEntries(m.transition.entries, 0)).toEqual([[1, 0], [0, 1]]);
    expect(evalEntries(m.transition.entries, 1)).toEqual([[0, 1], [0, 0]]);
    expect(evalEntries(m.transition.entries, 2)).toEqual([[0, 0], [0, 0]]);
  });
});

describe('damping through the CLI', () => {
  it('continuous pair −1 ± j√3', () => {
    // CHECKS: A = [[0,1],[−4,−2]] has s = −1 ± j√3, ω_n = 2, ζ = 0.5 (ω_n = |s|, ζ = −σ/|s|, standard definitions).
    const m = stateMatrix(cliJson(py('[[0, 1], [-4, -2]]'), '.py'));
    expect(m.modes).toHaveLength(1);
    expect(m.modes[0].naturalFrequency).toBeCloseTo(2, 14);
    expect(m.modes[0].dampingRatio).toBeCloseTo(0.5, 14);
  });

  it('discrete pair recovers the continuous damping with a period', () => {
    // Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., ch. 4 (from memory):
    // z = e^{sT}; the ZOH of [[0,1],[−4,−2]] at T = 0.1 has z = 0.89129875425536483 ± 0.15594000045150901j.
    const re = 0.89129875425536483;
    const im = 0.15594000045150901;
    const src = `# eigenlens: discrete period=0.1\nA = [[${re}, ${im}], [${-im}, ${re}]]\n`;
    const m = stateMatrix(cliJson(src, '.py'));
    expect(m.modes[0].naturalFrequency).toBeCloseTo(2, 12);
    expect(m.modes[0].dampingRatio).toBeCloseTo(0.5, 12);
  });
});

describe('bad input never crashes the CLI', () => {
  it('reports an unknown name with file:line:column and exits 0 by default', () => {
    const json = cliJson('A = [[0, 1], [-k, -2]]\n', '.py');
    const d = json.files[0].diagnostics.find((x: any) => x.code === 'unknown-name');
    expect(d).toMatchObject({ line: 1, column: 16 });
  });
});
