/**
 * Hostile entries, end to end through analyzeDocument: each one sits inside a matrix literal
 * in Python, TypeScript and a .lti model. Every one must give a finding with one of our
 * stable codes whose range lies inside the written entry (text.slice of the span is part of
 * the entry), evaluate nothing, and never throw. The expected codes are the evaluator's
 * documented list (server/src/syntax/evaluate.ts header); which inputs must be refused is
 * common practice for safe expression evaluation (no calls, names, accessors, strings or
 * assignments; finite reals only). Invisible and bidi characters: Boucher & Anderson,
 * "Trojan Source: Invisible Vulnerabilities", USENIX Security 2023.
 * Times are measured and printed (never asserted): see the table in the test output.
 */
import { describe, expect, it, afterAll } from 'vitest';
import { analyzeDocument, initAnalysis, DEFAULT_SETTINGS } from '../../server/src/analysis/analyze';
import type { Finding } from '../../server/src/analysis/report';
import type { SourceLanguage } from '../../server/src/syntax/types';

await initAnalysis();

/** Codes that mean "this entry was refused" (evaluator and literal builder). */
const REFUSAL_CODES = new Set([
  'entry-too-long', 'nesting-too-deep', 'suspicious-character', 'unexpected-character', 'syntax-error', 'empty-entry',
  'xor-operator', 'unsupported-operator', 'implicit-multiplication', 'assignment', 'string-entry', 'boolean-entry',
  'not-a-number', 'complex-entry', 'unknown-name', 'unknown-function', 'property-access', 'index-access', 'non-finite',
  'division-by-zero', 'bad-argument-count',
]);

interface Hostile {
  label: string;
  entry: string;
  /** Languages where the entry splits into several .lti words (white space separates entries there). */
  ltiSplits?: boolean;
  /** In .lti a leading word is read as a keyword (`NaN`, `x = 1`, `lambda:`); the finding is then `unknown-keyword`. */
  ltiKeyword?: boolean;
}

const HOSTILE: Hostile[] = [
  { label: 'import call', entry: "import('os')" },
  { label: '__import__', entry: "__import__('os')" },
  { label: 'eval', entry: "eval('1+1')" },
  { label: 'evaluate', entry: "evaluate('1+1')" },
  { label: 'parse', entry: "parse('1')" },
  { label: 'createUnit', entry: "createUnit('foo')" },
  { label: 'exec', entry: "exec('x=1')" },
  { label: 'function definition', entry: 'function(){return 1}', ltiSplits: true },
  { label: 'arrow function', entry: '() => 1', ltiSplits: true },
  { label: 'lambda', entry: 'lambda: 1', ltiKeyword: true },
  { label: 'assignment', entry: 'x = 1', ltiKeyword: true },
  { label: 'walrus', entry: '(x := 3)' },
  { label: 'property access', entry: 'a.b' },
  { label: 'index access', entry: 'a[0]' },
  { label: 'os.system', entry: "os.system('ls')" },
  { label: 'string', entry: "'abc'" },
  { label: 'implicit multiplication 2x', entry: '2x' },
  { label: 'implicit multiplication 2 pi', entry: '2 pi', ltiSplits: true },
  { label: 'tower of powers', entry: '10**10**10' },
  { label: 'factorial', entry: 'factorial(1e6)' },
  { label: '100,000 nested parentheses', entry: '('.repeat(100_000) + '1' + ')'.repeat(100_000) },
  { label: '1 MB number literal', entry: '7'.repeat(1_000_000) },
  { label: 'NaN', entry: 'NaN', ltiKeyword: true },
  { label: 'Infinity', entry: 'Infinity', ltiKeyword: true },
  { label: 'inf', entry: 'inf', ltiKeyword: true },
  { label: 'float nan', entry: "float('nan')" },
  { label: '1e400', entry: '1e400' },
  { label: '-1e400', entry: '-1e400' },
  { label: 'full-width digit', entry: '\uFF11' },
  { label: 'Arabic-Indic digit', entry: '\u0663' },
  { label: 'minus sign U+2212', entry: '\u22121' },
  { label: 'hyphen U+2010', entry: '\u20101' },
  { label: 'right-to-left override U+202E', entry: '1\u202E' },
  { label: 'left-to-right isolate U+2066', entry: '1\u2066' },
  { label: 'zero-width space', entry: '1\u200B' },
  { label: 'zero-width joiner', entry: '2\u200D5' },
  { label: 'byte-order mark', entry: '\uFEFF3' },
];

function documentFor(lang: SourceLanguage, entry: string): string {
  if (lang === 'python') return `# invented example\nimport numpy as np\nA = np.array([[${entry}, 1], [0, -1]])\n`;
  if (lang === 'typescript') return `// invented example\nexport const A: number[][] = [[${entry}, 1], [0, -1]];\n`;
  return `# invented example\nsystem hostile continuous\n  states a b\n  A:\n    ${entry} 1\n    0 -1\nend\n`;
}

const timings: { lang: string; label: string; ms: number }[] = [];

afterAll(() => {
  const slow = [...timings].sort((a, b) => b.ms - a.ms).slice(0, 8);
  console.log('hostile entries: slowest analyses (ms)\n' + slow.map((t) => `  ${t.ms.toFixed(1).padStart(8)}  ${t.lang.padEnd(10)} ${t.label}`).join('\n'));
});

function allFindings(report: ReturnType<typeof analyzeDocument>): Finding[] {
  return [...report.findings, ...report.matrices.flatMap((m) => m.findings)];
}

describe.each<SourceLanguage>(['python', 'typescript', 'lti'])('hostile entries in %s', (lang) => {
  it.each(HOSTILE)('$label', ({ label, entry, ltiSplits, ltiKeyword }) => {
    const text = documentFor(lang, entry);
    const entryStart = text.indexOf(entry);
    const entryEnd = entryStart + entry.length;
    const t0 = performance.now();
    let report: ReturnType<typeof analyzeDocument> | undefined;
    expect(() => {
      report = analyzeDocument(text, lang, DEFAULT_SETTINGS, {});
    }).not.toThrow();
    timings.push({ lang, label, ms: performance.now() - t0 });
    const findings = allFindings(report!);

    // Nothing was evaluated: the hostile entry has no value, or no matrix was handed on at all.
    for (const m of report!.matrices) {
      for (const [r, row] of m.values.entries()) {
        for (const [c, v] of row.entries()) {
          if (r === 0 && c === 0) expect(v, `${label}: entry (1,1) must have no value`).toBeNull();
        }
      }
      expect(m.spectrum, `${label}: no spectrum from a refused entry`).toBeNull();
    }

    if (lang === 'lti' && ltiSplits) {
      // White space separates .lti entries, so the row now has the wrong length.
      const ragged = findings.find((f) => f.code === 'ragged-rows');
      expect(ragged, JSON.stringify(findings)).toBeDefined();
      expect(report!.matrices).toEqual([]);
      return;
    }
    const expectedCodes = lang === 'lti' && ltiKeyword ? new Set(['unknown-keyword']) : REFUSAL_CODES;
    const atEntry = findings.filter(
      (f) => f.severity === 'error' && expectedCodes.has(f.code) && f.span.start >= entryStart && f.span.end <= entryEnd && f.span.end > f.span.start,
    );
    expect(atEntry.length, `${label}: findings ${JSON.stringify(findings.map((f) => [f.code, f.span]))}`).toBeGreaterThan(0);
    for (const f of atEntry) {
      expect(entry.includes(text.slice(f.span.start, f.span.end))).toBe(true);
      expect(f.message.length).toBeGreaterThan(10);
      expect(f.message.length).toBeLessThan(400);
    }
  });
});

describe('specific refusals name the fault', () => {
  // The codes the evaluator documents for these inputs (server/src/syntax/evaluate.ts header).
  const cases: [SourceLanguage, string, string, string][] = [
    ['python', '2x', 'implicit-multiplication', '2x'],
    ['python', '2 pi', 'implicit-multiplication', '2 pi'],
    ['typescript', '2 pi', 'implicit-multiplication', '2 pi'],
    ['python', '\u22121', 'suspicious-character', '\u2212'],
    ['python', '1\u202E', 'suspicious-character', '\u202E'],
    ['typescript', '1\u2066', 'suspicious-character', '\u2066'],
    ['python', '1\u200B', 'suspicious-character', '1\u200B'],
    ['typescript', '1\u200B', 'suspicious-character', '1\u200B'],
    ['lti', '1\u200B', 'suspicious-character', '\u200B'],
    ['python', '1e400', 'non-finite', '1e400'],
    ['lti', '10^10^10', 'non-finite', '10^10^10'],
    ['typescript', "eval('1')", 'unknown-function', 'eval'],
    ['python', "__import__('os')", 'unknown-function', '__import__'],
    ['python', 'x = 1', 'assignment', '='],
  ];
  it.each(cases)('%s %j → %s', (lang, entry, code, slice) => {
    const text = documentFor(lang, entry);
    const report = analyzeDocument(text, lang, DEFAULT_SETTINGS, {});
    const hit = allFindings(report).find((f) => f.code === code);
    expect(hit, JSON.stringify(allFindings(report).map((f) => f.code))).toBeDefined();
    expect(text.slice(hit!.span.start, hit!.span.end)).toBe(slice);
  });

  it('Python ^ is refused as XOR, not computed as a power', () => {
    const text = documentFor('python', '10^10^10');
    const hit = allFindings(analyzeDocument(text, 'python', DEFAULT_SETTINGS, {})).find((f) => f.code === 'xor-operator');
    expect(hit).toBeDefined();
    expect(text.slice(hit!.span.start, hit!.span.end)).toBe('^');
  });
});
