/**
 * The entry evaluator against CPython: every reference value in fixtures/evaluate-reference.json
 * was computed by CPython 3 with fractions.Fraction literals (general-purpose reference
 * library; precedence from The Python Language Reference §6.5 and §6.17) — see
 * fixtures/make_evaluate_reference.py. The hostile-input corpus checks refusals.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { Rational } from '../../server/src/engine/rational';
import { closeTo } from '../../server/src/engine/tolerance';
import { evaluateEntry, MAX_ENTRY_LENGTH } from '../../server/src/syntax/evaluate';
import type { EntryValue, SourceLanguage } from '../../server/src/syntax/types';

const reference = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'evaluate-reference.json'), 'utf8')) as {
  scope: Record<string, string>;
  cases: { text: string; kind: 'exact' | 'float'; value: string }[];
};

const scope = new Map<string, EntryValue>(
  Object.entries(reference.scope).map(([k, v]) => [k, { kind: 'exact', value: Rational.parse(v)! }]),
);

function ok(text: string, lang: SourceLanguage = 'python', s: ReadonlyMap<string, EntryValue> = scope): EntryValue {
  const r = evaluateEntry(text, s, lang);
  if ('error' in r) throw new Error(`${text}: ${r.error.code} ${r.error.message}`);
  return r.value;
}

function err(text: string, lang: SourceLanguage = 'python') {
  const r = evaluateEntry(text, scope, lang);
  if (!('error' in r)) throw new Error(`${text} evaluated to ${JSON.stringify(r.value, (_k, v) => (v instanceof Rational ? v.toString() : v))}`);
  return { ...r.error, slice: text.slice(r.error.start, r.error.end) };
}

describe('evaluateEntry agrees with CPython Fraction arithmetic', () => {
  for (const c of reference.cases) {
    it(`${c.text} → ${c.kind} ${c.value}`, () => {
      // Python's `math.` names map to the same functions in every language mode we read.
      const v = ok(c.text);
      expect(v.kind).toBe(c.kind);
      if (v.kind === 'exact') expect(v.value.toString()).toBe(c.value);
      else expect(closeTo(v.value, Number(c.value)), `${v.value} vs ${c.value}`).toBe(true);
    });
  }
});

describe('language differences', () => {
  // ECMAScript 2016+ `**` and `Math.PI` (ECMA-262 §6.1.6.1.3, §21.3.1.6); from memory.
  it('TypeScript ** and Math names', () => {
    expect(ok('2 ** 10', 'typescript')).toEqual({ kind: 'exact', value: Rational.of(1024) });
    expect(ok('Math.PI', 'typescript')).toEqual({ kind: 'float', value: Math.PI });
    expect(ok('Math.sqrt(2)', 'typescript')).toEqual({ kind: 'float', value: Math.SQRT2 });
  });
  it('^ is a power only in .lti files; in Python and TS it is XOR and refused', () => {
    expect(ok('2^10', 'lti')).toEqual({ kind: 'exact', value: Rational.of(1024) });
    for (const lang of ['python', 'typescript'] as const) {
      const e = err('m^2', lang);
      expect(e.code).toBe('xor-operator');
      expect(e.slice).toBe('^');
      expect(e.message).toMatch(/\*\*/);
    }
  });
  it('numpy / math aliases', () => {
    for (const t of ['np.pi', 'numpy.pi', 'math.pi', 'pi']) expect(ok(t)).toEqual({ kind: 'float', value: Math.PI });
    for (const t of ['np.sqrt(4)', 'numpy.sqrt(4)', 'sqrt(4)']) expect(ok(t)).toEqual({ kind: 'float', value: 2 });
  });
  it('a scope name shadows the built-in constant e', () => {
    expect(ok('e', 'python', new Map([['e', { kind: 'exact', value: Rational.of(1, 2) }]]))).toEqual({ kind: 'exact', value: Rational.of(1, 2) });
  });
});

describe('exactness caps', () => {
  it('large integer powers stay exact up to the cap, then become floats', () => {
    const big = ok('10**60');
    expect(big.kind).toBe('exact');
    // 2**1000 = 1.0715086071862673e301 (CPython float(2**1000)).
    const huge = ok('2**1000');
    expect(huge.kind).toBe('float');
    expect(closeTo(huge.value as number, 1.0715086071862673e301)).toBe(true);
  });
  it('overflow to infinity is an error, not a number', () => {
    expect(err('10.0**400').code).toBe('non-finite');
    expect(err('2**100000').code).toBe('non-finite');
  });
});

/** Hostile entries: each must give the named code at the named range and never throw. */
const HOSTILE: { text: string; code: string; slice?: string; lang?: SourceLanguage }[] = [
  { text: '2 x', code: 'implicit-multiplication' },
  { text: '2x', code: 'implicit-multiplication', slice: '2x' },
  { text: '3(4)', code: 'implicit-multiplication' },
  { text: '"1.5"', code: 'string-entry', slice: '"1.5"' },
  { text: "'abc'", code: 'string-entry' },
  { text: 'x = 1', code: 'assignment', slice: '=' },
  { text: 'k := 3', code: 'assignment' },
  { text: 'lambda: 1', code: 'syntax-error' },
  { text: '() => 1', code: 'syntax-error', lang: 'typescript' },
  { text: 'os.system', code: 'unknown-name', slice: 'os.system' },
  { text: 'a[0]', code: 'index-access', slice: '[' },
  { text: 'undefinedName', code: 'unknown-name', slice: 'undefinedName' },
  { text: 'import("fs")', code: 'unknown-function', slice: 'import' },
  { text: '__import__("os")', code: 'unknown-function', slice: '__import__' },
  { text: 'evaluate("1+1")', code: 'unknown-function', slice: 'evaluate' },
  { text: 'parse("1")', code: 'unknown-function', slice: 'parse' },
  { text: 'createUnit("foo")', code: 'unknown-function', slice: 'createUnit' },
  { text: 'eval("2")', code: 'unknown-function' },
  { text: 'True', code: 'boolean-entry' },
  { text: 'false', code: 'boolean-entry', lang: 'typescript' },
  { text: 'NaN', code: 'non-finite' },
  { text: 'Infinity', code: 'non-finite', lang: 'typescript' },
  { text: 'np.inf', code: 'non-finite' },
  { text: 'float("nan")', code: 'unknown-function' },
  { text: '1e400', code: 'non-finite', slice: '1e400' },
  { text: '-1e309', code: 'non-finite' },
  { text: '1/0', code: 'division-by-zero' },
  { text: '0**-1', code: 'division-by-zero' },
  { text: 'math.log(-1)', code: 'non-finite' },
  { text: 'sqrt(-1)', code: 'non-finite' },
  { text: '(-8)**(1/3)', code: 'complex-entry' },
  { text: '2j', code: 'complex-entry' },
  { text: '\u22121', code: 'suspicious-character', slice: '\u2212' }, // U+2212 MINUS SIGN
  { text: '\u0661', code: 'suspicious-character' }, // ARABIC-INDIC DIGIT ONE
  { text: '\uFF11', code: 'suspicious-character' }, // FULLWIDTH DIGIT ONE
  { text: '1\u202E2', code: 'suspicious-character', slice: '\u202E' }, // RIGHT-TO-LEFT OVERRIDE
  { text: '1\u2066', code: 'suspicious-character' }, // LEFT-TO-RIGHT ISOLATE
  { text: '1\u200B', code: 'suspicious-character' }, // ZERO WIDTH SPACE
  { text: '\u20131', code: 'suspicious-character' }, // EN DASH
  { text: '1\u00A0+ 2', code: 'suspicious-character' }, // NO-BREAK SPACE
  { text: '1 % 2', code: 'unsupported-operator', slice: '%' },
  { text: '7 // 2', code: 'unsupported-operator' },
  { text: '1 & 2', code: 'unsupported-operator' },
  { text: '1 < 2', code: 'unsupported-operator' },
  { text: 'a @ b', code: 'unsupported-operator', slice: '@' },
  { text: '', code: 'empty-entry' },
  { text: '   ', code: 'empty-entry' },
  { text: '(1', code: 'syntax-error' },
  { text: '1)', code: 'syntax-error' },
  { text: '1 +', code: 'syntax-error' },
  { text: '(1, 2)', code: 'syntax-error' },
  { text: 'sqrt(1, 2)', code: 'bad-argument-count' },
  { text: 'None', code: 'not-a-number' },
  { text: 'null', code: 'not-a-number', lang: 'typescript' },
  { text: 'x.y.z', code: 'unknown-name' },
  { text: 'Math.random()', code: 'unknown-function', lang: 'typescript' },
  { text: 'f"{1}"', code: 'string-entry' },
  { text: '1__0', code: 'syntax-error' },
  { text: '1.2.3', code: 'syntax-error' },
  { text: '`1`', code: 'string-entry', lang: 'typescript' },
  { text: '{}', code: 'syntax-error' },
  { text: '[1]', code: 'syntax-error' },
];

describe('hostile entries give a clear error at the right range', () => {
  for (const h of HOSTILE) {
    it(`${JSON.stringify(h.text)} → ${h.code}`, () => {
      const e = err(h.text, h.lang ?? 'python');
      expect(e.code).toBe(h.code);
      expect(e.message.length).toBeGreaterThan(5);
      expect(e.start).toBeGreaterThanOrEqual(0);
      expect(e.end).toBeLessThanOrEqual(h.text.length);
      if (h.slice !== undefined) expect(e.slice).toBe(h.slice);
    });
  }
  it('over-long text is refused before parsing', () => {
    expect(err('1+'.repeat(MAX_ENTRY_LENGTH) + '1').code).toBe('entry-too-long');
  });
  it('deep nesting is refused before parsing (no stack overflow)', () => {
    expect(err('('.repeat(150) + '1' + ')'.repeat(150)).code).toBe('nesting-too-deep');
    expect(err('-'.repeat(1500) + '1').code).toBe('nesting-too-deep');
    expect(err('2**'.repeat(600) + '2').code).toBe('nesting-too-deep');
  });
  it('a long unary chain within the cap still evaluates (common practice: sign rules)', () => {
    expect(ok('-'.repeat(10) + '3')).toEqual({ kind: 'exact', value: Rational.of(3) });
  });
});
