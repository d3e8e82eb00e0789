/**
 * Tokenizes a sample .lti file with the TextMate engine used by VS Code (vscode-textmate +
 * vscode-oniguruma, general-purpose libraries) and checks the scopes our grammar assigns.
 * Scope names follow the TextMate naming conventions (TextMate manual, "Language Grammars",
 * naming conventions section; from memory).
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import * as oniguruma from 'vscode-oniguruma';
import * as textmate from 'vscode-textmate';

const require = createRequire(__filename);
const root = join(__dirname, '..', '..');

async function loadGrammar(): Promise<textmate.IGrammar> {
  const wasm = readFileSync(join(require.resolve('vscode-oniguruma'), '..', 'onig.wasm')).buffer;
  await oniguruma.loadWASM(wasm);
  const registry = new textmate.Registry({
    onigLib: Promise.resolve({
      createOnigScanner: (patterns: string[]) => new oniguruma.OnigScanner(patterns),
      createOnigString: (s: string) => new oniguruma.OnigString(s),
    }),
    loadGrammar: async (scopeName: string) => {
      if (scopeName !== 'source.lti') return null;
      const path = join(root, 'syntaxes', 'lti.tmLanguage.json');
      return textmate.parseRawGrammar(readFileSync(path, 'utf8'), path);
    },
  });
  const g = await registry.loadGrammar('source.lti');
  if (!g) throw new Error('grammar not loaded');
  return g;
}

const grammar = await loadGrammar();

function scopesOf(lines: string[]): Map<string, string[]> {
  const out = new Map<string, string[]>();
  let state = textmate.INITIAL;
  for (const line of lines) {
    const r = grammar.tokenizeLine(line, state);
    for (const t of r.tokens) {
      const text = line.slice(t.startIndex, t.endIndex).trim();
      if (text && !out.has(text)) out.set(text, t.scopes);
    }
    state = r.ruleStack;
  }
  return out;
}

describe('lti TextMate grammar', () => {
  const sample = [
    '# invented example',
    'param g = 9.81e-0  # m/s^2',
    'system pend continuous',
    '  states theta omega',
    '  period 0.01',
    '  A:',
    '    0 1',
    '    -g*sqrt(2) 3.5E+2',
    'end',
    '# eigenlens: discrete',
  ];
  const scopes = scopesOf(sample);
  const has = (text: string, scope: string) => expect(scopes.get(text), `${text}: ${scopes.get(text)}`).toContain(scope);
  it('assigns the expected scopes', () => {
    has('invented example', 'comment.line.number-sign.lti');
    has('#', 'punctuation.definition.comment.lti');
    has('param', 'keyword.other.param.lti');
    has('g', 'variable.other.constant.lti');
    has('9.81e-0', 'constant.numeric.lti');
    has('system', 'keyword.other.system.lti');
    has('pend', 'entity.name.type.system.lti');
    has('continuous', 'constant.language.domain.lti');
    has('states', 'keyword.other.declaration.lti');
    has('period', 'keyword.other.period.lti');
    has('A', 'entity.name.tag.block.lti');
    has('3.5E+2', 'constant.numeric.lti');
    has('sqrt', 'support.function.math.lti');
    has('*', 'keyword.operator.arithmetic.lti');
    has('end', 'keyword.other.end.lti');
    has('eigenlens', 'keyword.other.pragma.lti');
  });
  it('the language configuration is valid JSON with # comments', () => {
    const conf = JSON.parse(readFileSync(join(root, 'syntaxes', 'lti.language-configuration.json'), 'utf8'));
    expect(conf.comments.lineComment).toBe('#');
    expect(conf.brackets).toEqual([['(', ')']]);
  });
});
