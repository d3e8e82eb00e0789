/**
 * Safe evaluation of one matrix entry or constant: a whitelisted arithmetic expression.
 *
 * Method: a hand-written tokenizer and Pratt (top-down operator precedence) parser,
 * after V. R. Pratt, "Top Down Operator Precedence", POPL 1973, followed by a tree walk.
 * Written here rather than using mathjs `parse` because the three source languages
 * disagree with mathjs and with each other: `**` is power in Python/TS but not in mathjs,
 * `^` is power only in .lti files (in Python and TS it is bitwise XOR, which we refuse
 * rather than compute), mathjs silently accepts implicit multiplication (`2x`) and units,
 * and we want the exact source range of every sub-expression for error reporting.
 * User text is never executed (no eval, no Function).
 *
 * Exactness: number literals are parsed exactly (0.1 → 1/10, 1e-3 → 1/1000); + − × ÷ and
 * integer powers of exact values stay exact. Named constants (pi, e) and the functions
 * sqrt, exp, log, sin, cos, tan, atan, atan2 make the value a float; abs of an exact value
 * stays exact. Results must be finite real numbers.
 *
 * Invariants: the text is length-checked and scanned for suspicious characters and nesting
 * depth before any parsing, so no input can exhaust the stack; evaluateEntry never throws.
 *
 * Error codes (stable): entry-too-long, nesting-too-deep, suspicious-character,
 * unexpected-character, syntax-error, empty-entry, xor-operator, unsupported-operator,
 * implicit-multiplication, assignment, string-entry, boolean-entry, not-a-number,
 * complex-entry, unknown-name, unknown-function, property-access, index-access,
 * non-finite, division-by-zero, bad-argument-count.
 */
import { Rational } from '../engine/rational';
import type { EntryValue, SourceLanguage } from './types';

export interface EvaluationError {
  code: string;
  message: string;
  /** Offsets relative to the evaluated text. */
  start: number;
  end: number;
}

export type EvaluationResult = { value: EntryValue } | { error: EvaluationError };

/** Longest entry text we parse; a real entry is a few dozen characters. */
export const MAX_ENTRY_LENGTH = 2000;
/** Deepest bracket nesting we accept; real entries nest a handful of levels. */
export const MAX_NESTING = 100;
/** Largest |exponent| kept exact in a power; beyond it the value is computed as a float. */
export const MAX_EXACT_EXPONENT = 64;
/** Largest exact result (decimal digits of numerator + denominator) before falling back to float. */
export const MAX_EXACT_DIGITS = 400;

/** Thrown inside the evaluator only; not an Error subclass so that no stack trace is captured (hot path). */
class EvalFailure {
  constructor(
    readonly code: string,
    readonly message: string,
    readonly start: number,
    readonly end: number,
  ) {}
}

// ---------------------------------------------------------------------------------------
// Character screening (before tokenizing)

/** Bidi controls, zero-width characters and other invisible format characters. */
const FORMAT_CHAR = /[\p{Cf}]/u;
/** Digits, minus signs and dashes that look like ASCII but are not. */
const LOOKALIKE_CHAR = /[\p{Nd}\p{Pd}\u2212\u2796\uFE63\uFF0B\uFF0D\u00B7\u2217\u2044\u2215\uFF0F]/u;
const NON_ASCII_SPACE = /[\p{Zs}\u2028\u2029\u0085]/u;

function describeChar(ch: string): string {
  const cp = ch.codePointAt(0) ?? 0;
  return `U+${cp.toString(16).toUpperCase().padStart(4, '0')}`;
}

function screenCharacters(text: string): void {
  if (text.length > MAX_ENTRY_LENGTH) {
    throw new EvalFailure(
      'entry-too-long',
      `Entry is ${text.length} characters long; at most ${MAX_ENTRY_LENGTH} are evaluated.`,
      0,
      text.length,
    );
  }
  let depth = 0;
  for (let i = 0; i < text.length; i++) {
    const code = text.charCodeAt(i);
    if (code === 0x28 || code === 0x5b || code === 0x7b) {
      depth++;
      if (depth > MAX_NESTING) {
        throw new EvalFailure('nesting-too-deep', `Brackets nest more than ${MAX_NESTING} levels deep.`, i, i + 1);
      }
    } else if (code === 0x29 || code === 0x5d || code === 0x7d) {
      depth = Math.max(0, depth - 1);
    } else if (code > 0x7e || (code < 0x20 && code !== 0x09 && code !== 0x0a && code !== 0x0d)) {
      const cp = text.codePointAt(i) ?? code;
      const ch = String.fromCodePoint(cp);
      const width = cp > 0xffff ? 2 : 1;
      if (FORMAT_CHAR.test(ch) || LOOKALIKE_CHAR.test(ch) || NON_ASCII_SPACE.test(ch) || code < 0x20) {
        throw new EvalFailure(
          'suspicious-character',
          `Suspicious character ${describeChar(ch)}: an invisible, bidirectional or look-alike character where a plain ASCII digit, sign or space is expected.`,
          i,
          i + width,
        );
      }
      if (!/\p{L}/u.test(ch)) {
        throw new EvalFailure('unexpected-character', `Unexpected character ${describeChar(ch)} in an entry.`, i, i + width);
      }
      if (width === 2) i++;
    }
  }
}

// ---------------------------------------------------------------------------------------
// Tokens

type TokenKind = 'number' | 'name' | 'op' | 'string' | 'end';

interface Token {
  kind: TokenKind;
  text: string;
  start: number;
  end: number;
}

const IDENT_START = /[A-Za-z_$\p{L}]/u;
const IDENT_PART = /[A-Za-z0-9_$\p{L}]/u;

/** Operators longest first, so `**` wins over `*`. */
const OPERATORS = ['**=', '//=', '>>=', '<<=', '===', '!==', '**', '//', '<<', '>>', '==', '!=', '<=', '>=', '+=', '-=', '*=', '/=', '&&', '||', '=>', ':=', '?.', '??',
  '+', '-', '*', '/', '^', '%', '(', ')', '[', ']', '{', '}', ',', '.', '=', '<', '>', '&', '|', '~', '!', '?', ':', ';', '@', '\\', '#', '`'];

function tokenize(text: string, lang: SourceLanguage): Token[] {
  const tokens: Token[] = [];
  let i = 0;
  const n = text.length;
  while (i < n) {
    const ch = text[i];
    if (ch === ' ' || ch === '\t' || ch === '\n' || ch === '\r') {
      i++;
      continue;
    }
    // Comments inside a multi-line entry are whitespace.
    if ((lang === 'python' || lang === 'lti') && ch === '#') {
      while (i < n && text[i] !== '\n') i++;
      continue;
    }
    if ((lang === 'typescript' || lang === 'javascript') && text.startsWith('//', i)) {
      while (i < n && text[i] !== '\n') i++;
      continue;
    }
    if ((lang === 'typescript' || lang === 'javascript') && text.startsWith('/*', i)) {
      const close = text.indexOf('*/', i + 2);
      i = close < 0 ? n : close + 2;
      continue;
    }
    if (lang === 'python' && ch === '\\' && (text[i + 1] === '\n' || text.startsWith('\r\n', i + 1))) {
      i += text[i + 1] === '\n' ? 2 : 3;
      continue;
    }
    const start = i;
    if (/[0-9]/.test(ch) || (ch === '.' && /[0-9]/.test(text[i + 1] ?? ''))) {
      // A number, plus any letters/digits glued to it so that `2x`, `1j`, `0x1F` are seen whole.
      while (i < n && /[0-9A-Za-z_.]/.test(text[i])) {
        if ((text[i] === 'e' || text[i] === 'E') && (text[i + 1] === '+' || text[i + 1] === '-') && /^[0-9._]*$/.test(text.slice(start, i)) && !/^0[xXbBoO]/.test(text.slice(start, i))) {
          i += 2;
          continue;
        }
        i++;
      }
      tokens.push({ kind: 'number', text: text.slice(start, i), start, end: i });
      continue;
    }
    const cp = text.codePointAt(i) ?? 0;
    const cpStr = String.fromCodePoint(cp);
    if (IDENT_START.test(cpStr)) {
      i += cpStr.length;
      while (i < n) {
        const c = String.fromCodePoint(text.codePointAt(i) ?? 0);
        if (!IDENT_PART.test(c)) break;
        i += c.length;
      }
      // Python string prefixes (r"", f"", b"") belong to the string that follows.
      if (lang === 'python' && /^[rRbBfFuU]{1,2}$/.test(text.slice(start, i)) && (text[i] === '"' || text[i] === "'")) {
        tokens.push(readString(text, i, start));
        i = tokens[tokens.length - 1].end;
        continue;
      }
      tokens.push({ kind: 'name', text: text.slice(start, i), start, end: i });
      continue;
    }
    if (ch === '"' || ch === "'" || ch === '`') {
      const tok = readString(text, i, start);
      tokens.push(tok);
      i = tok.end;
      continue;
    }
    const op = OPERATORS.find((o) => text.startsWith(o, i));
    if (op) {
      tokens.push({ kind: 'op', text: op, start, end: i + op.length });
      i += op.length;
      continue;
    }
    throw new EvalFailure('unexpected-character', `Unexpected character '${ch}' in an entry.`, i, i + 1);
  }
  tokens.push({ kind: 'end', text: '', start: n, end: n });
  return tokens;
}

function readString(text: string, quoteAt: number, start: number): Token {
  const quote = text[quoteAt];
  let i = quoteAt + 1;
  while (i < text.length && text[i] !== quote) i += text[i] === '\\' ? 2 : 1;
  const end = Math.min(text.length, i + 1);
  return { kind: 'string', text: text.slice(start, end), start, end };
}

// ---------------------------------------------------------------------------------------
// Syntax tree

type Expr =
  | { type: 'num'; text: string; start: number; end: number }
  | { type: 'name'; name: string; start: number; end: number }
  | { type: 'neg' | 'pos'; arg: Expr; start: number; end: number }
  | { type: 'bin'; op: '+' | '-' | '*' | '/' | 'pow'; left: Expr; right: Expr; start: number; end: number }
  | { type: 'call'; callee: string; calleeStart: number; calleeEnd: number; args: Expr[]; start: number; end: number };

/** Binding powers: higher binds tighter. Power is right-associative and binds tighter than unary minus on its left. */
const INFIX_POWER: Record<string, number> = { '+': 10, '-': 10, '*': 20, '/': 20, '**': 40, '^': 40 };
const UNARY_POWER = 30;

const REFUSED_OPERATORS: Record<string, string> = {
  '%': 'the remainder operator',
  '//': 'floor division',
  '@': 'matrix multiplication',
  '&': 'bitwise and',
  '|': 'bitwise or',
  '~': 'bitwise not',
  '<<': 'a shift',
  '>>': 'a shift',
  '&&': 'a logical operator',
  '||': 'a logical operator',
  '!': 'a logical operator',
  '??': 'a nullish operator',
  '?': 'a conditional',
  '<': 'a comparison',
  '>': 'a comparison',
  '<=': 'a comparison',
  '>=': 'a comparison',
  '==': 'a comparison',
  '!=': 'a comparison',
  '===': 'a comparison',
  '!==': 'a comparison',
  '=>': 'a function definition',
};

const ASSIGNMENTS = new Set(['=', '+=', '-=', '*=', '/=', '**=', '//=', ':=', '>>=', '<<=']);

class Parser {
  private pos = 0;
  private depth = 0;

  constructor(
    private readonly tokens: Token[],
    private readonly lang: SourceLanguage,
  ) {}

  private peek(): Token {
    return this.tokens[this.pos];
  }

  private next(): Token {
    return this.tokens[this.pos++];
  }

  parseAll(): Expr {
    if (this.peek().kind === 'end') throw new EvalFailure('empty-entry', 'Empty entry.', 0, 0);
    const expr = this.parseExpr(0);
    const tok = this.peek();
    if (tok.kind !== 'end') this.failAfterOperand(tok, expr);
    return expr;
  }

  /** Explains why a token cannot follow a complete operand. */
  private failAfterOperand(tok: Token, left: Expr): never {
    if (tok.kind === 'number' || tok.kind === 'name' || (tok.kind === 'op' && tok.text === '(')) {
      throw new EvalFailure(
        'implicit-multiplication',
        `Missing operator between '${tok.text}' and what precedes it; write '*' for multiplication.`,
        left.start,
        tok.end,
      );
    }
    if (tok.kind === 'op') this.failOperator(tok);
    throw new EvalFailure('syntax-error', `Unexpected '${tok.text}'.`, tok.start, tok.end);
  }

  private failOperator(tok: Token): never {
    if (tok.text === '^') {
      throw new EvalFailure(
        'xor-operator',
        `'^' is bitwise XOR in ${this.lang === 'python' ? 'Python' : 'TypeScript/JavaScript'}, not a power; write '**' for a power.`,
        tok.start,
        tok.end,
      );
    }
    if (ASSIGNMENTS.has(tok.text)) {
      throw new EvalFailure('assignment', 'Assignments are not allowed inside an entry.', tok.start, tok.end);
    }
    if (tok.text === '[') throw new EvalFailure('index-access', 'Indexing is not supported in an entry.', tok.start, tok.end);
    if (tok.text === '.' || tok.text === '?.') {
      throw new EvalFailure('property-access', 'Property access is not supported in an entry.', tok.start, tok.end);
    }
    const what = REFUSED_OPERATORS[tok.text];
    if (what) throw new EvalFailure('unsupported-operator', `'${tok.text}' (${what}) is not supported in an entry; use + - * / and **.`, tok.start, tok.end);
    throw new EvalFailure('syntax-error', `Unexpected '${tok.text}'.`, tok.start, tok.end);
  }

  private parseExpr(minPower: number): Expr {
    if (++this.depth > MAX_NESTING * 2) {
      const tok = this.peek();
      throw new EvalFailure('nesting-too-deep', `Expression nests more than ${MAX_NESTING * 2} levels deep.`, tok.start, tok.end);
    }
    let left = this.parsePrefix();
    for (;;) {
      const tok = this.peek();
      if (tok.kind === 'end') break;
      if (tok.kind !== 'op') this.failAfterOperand(tok, left);
      if (tok.text === ')' || tok.text === ',') break;
      const power = INFIX_POWER[tok.text];
      if (tok.text === '^' && this.lang !== 'lti') this.failOperator(tok);
      if (power === undefined) {
        if (tok.text === '(') this.failAfterOperand(tok, left);
        this.failOperator(tok);
      }
      if (power < minPower || (power === minPower && power !== 40)) break;
      this.next();
      const isPow = tok.text === '**' || tok.text === '^';
      // Right-associative power: parse the right side at the same power.
      const right = isPow ? this.parseExpr(power) : this.parseExpr(power + 1);
      const op = isPow ? 'pow' : (tok.text as '+' | '-' | '*' | '/');
      left = { type: 'bin', op, left, right, start: left.start, end: right.end };
    }
    this.depth--;
    return left;
  }

  private parsePrefix(): Expr {
    const tok = this.next();
    if (tok.kind === 'number') return { type: 'num', text: tok.text, start: tok.start, end: tok.end };
    if (tok.kind === 'string') throw new EvalFailure('string-entry', 'A string is not a number.', tok.start, tok.end);
    if (tok.kind === 'end') throw new EvalFailure('syntax-error', 'The entry ends where a number or name was expected.', tok.start, tok.end);
    if (tok.kind === 'name') return this.parseNameOrCall(tok);
    if (tok.text === '-' || tok.text === '+') {
      // Unary minus binds looser than power: -2**2 = -4, as in Python and mathematics.
      const arg = this.parseExpr(UNARY_POWER);
      return { type: tok.text === '-' ? 'neg' : 'pos', arg, start: tok.start, end: arg.end };
    }
    if (tok.text === '(') {
      const inner = this.parseExpr(0);
      const close = this.next();
      if (close.text !== ')') {
        if (close.text === ',') throw new EvalFailure('syntax-error', 'A tuple is not a number.', close.start, close.end);
        throw new EvalFailure('syntax-error', `Missing ')' to close the '(' here.`, tok.start, tok.end);
      }
      // Widen to include the parentheses so error ranges cover what the user wrote.
      return { ...inner, start: tok.start, end: close.end } as Expr;
    }
    if (tok.text === '[' || tok.text === '{') {
      throw new EvalFailure('syntax-error', `A nested ${tok.text === '[' ? 'list' : 'object'} is not a number.`, tok.start, tok.end);
    }
    this.failOperator(tok);
  }

  private parseNameOrCall(first: Token): Expr {
    let name = first.text;
    let end = first.end;
    // Dotted names: np.pi, Math.sqrt, self.m.
    while (this.peek().text === '.' && this.tokens[this.pos + 1]?.kind === 'name') {
      this.next();
      const part = this.next();
      name += '.' + part.text;
      end = part.end;
    }
    if (this.peek().text === '.' || this.peek().text === '?.') this.failOperator(this.peek());
    if (this.peek().text === '(') {
      // Refuse a call to anything unlisted before looking at its arguments.
      const bare = stripModule(name);
      const fn = bare !== null ? FUNCTIONS[bare] : undefined;
      if (!fn || (name.startsWith('Math.') && bare!.startsWith('arc'))) {
        throw new EvalFailure(
          'unknown-function',
          `'${name}' is not an allowed function; entries may use sqrt, exp, log, sin, cos, tan, atan, atan2 and abs.`,
          first.start,
          end,
        );
      }
      const open = this.next();
      const args: Expr[] = [];
      if (this.peek().text !== ')') {
        for (;;) {
          const argTok = this.peek();
          if (argTok.kind === 'name' && this.tokens[this.pos + 1]?.text === '=') {
            throw new EvalFailure('syntax-error', 'Keyword arguments are not supported in an entry.', argTok.start, this.tokens[this.pos + 1].end);
          }
          args.push(this.parseExpr(0));
          if (this.peek().text === ',') {
            this.next();
            if (this.peek().text === ')') break;
            continue;
          }
          break;
        }
      }
      const close = this.next();
      if (close.text !== ')') {
        if (close.kind === 'end') throw new EvalFailure('syntax-error', `Missing ')' to close the call here.`, open.start, open.end);
        this.failAfterOperand(close, args[args.length - 1] ?? { type: 'num', text: '', start: open.start, end: open.end });
      }
      return { type: 'call', callee: name, calleeStart: first.start, calleeEnd: end, args, start: first.start, end: close.end };
    }
    if (this.peek().text === '[') this.failOperator(this.peek());
    return { type: 'name', name, start: first.start, end };
  }
}

// ---------------------------------------------------------------------------------------
// Evaluation

const MODULE_PREFIXES = ['', 'np.', 'numpy.', 'math.', 'Math.', 'jnp.', 'cmath.'];

function stripModule(name: string): string | null {
  for (const p of MODULE_PREFIXES) {
    if (p !== '' && name.startsWith(p)) return name.slice(p.length);
  }
  return name.includes('.') ? null : name;
}

const FLOAT_CONSTANTS: Record<string, number> = { pi: Math.PI, PI: Math.PI, e: Math.E, E: Math.E };

const FUNCTIONS: Record<string, { arity: number; fn: (...x: number[]) => number }> = {
  sqrt: { arity: 1, fn: Math.sqrt },
  exp: { arity: 1, fn: Math.exp },
  log: { arity: 1, fn: Math.log },
  sin: { arity: 1, fn: Math.sin },
  cos: { arity: 1, fn: Math.cos },
  tan: { arity: 1, fn: Math.tan },
  atan: { arity: 1, fn: Math.atan },
  arctan: { arity: 1, fn: Math.atan },
  atan2: { arity: 2, fn: Math.atan2 },
  arctan2: { arity: 2, fn: Math.atan2 },
  abs: { arity: 1, fn: Math.abs },
};

const BOOLEAN_NAMES = new Set(['True', 'False', 'true', 'false']);
const NON_FINITE_NAMES = new Set(['NaN', 'nan', 'Infinity', 'inf', 'Inf', 'NAN', 'NINF', 'PINF', 'infty']);
const NOTHING_NAMES = new Set(['None', 'null', 'undefined', 'void']);

function toFloat(v: EntryValue): number {
  return v.kind === 'exact' ? v.value.toNumber() : v.value;
}

function finiteFloat(x: number, node: { start: number; end: number }): EntryValue {
  if (!Number.isFinite(x)) {
    throw new EvalFailure('non-finite', 'The value is not a finite real number (overflow, NaN or outside the function\'s domain).', node.start, node.end);
  }
  return { kind: 'float', value: x === 0 ? 0 : x };
}

/** Keeps an exact result unless it has grown beyond the digit cap; then falls back to float. */
function exactOrFloat(r: Rational, node: { start: number; end: number }): EntryValue {
  if (r.digits() > MAX_EXACT_DIGITS) return finiteFloat(r.toNumber(), node);
  return { kind: 'exact', value: r };
}

function parseNumberLiteral(text: string, lang: SourceLanguage, node: { start: number; end: number }): EntryValue {
  let s = text;
  if (lang === 'python' && /[jJ]$/.test(s) && /^[0-9._]*(?:[eE][+-]?[0-9_]+)?[jJ]$/.test(s)) {
    throw new EvalFailure('complex-entry', 'Complex literals are not supported; state-space entries must be real.', node.start, node.end);
  }
  if ((lang === 'typescript' || lang === 'javascript') && /^[0-9_]+n$/.test(s)) s = s.slice(0, -1);
  const radix = /^0([xXoObB])([0-9A-Fa-f_]+)$/.exec(s);
  if (radix) {
    const base = { x: 16, o: 8, b: 2 }[radix[1].toLowerCase() as 'x' | 'o' | 'b'];
    const digits = radix[2].replace(/_/g, '');
    const valid = base === 16 ? /^[0-9A-Fa-f]+$/ : base === 8 ? /^[0-7]+$/ : /^[01]+$/;
    if (digits !== '' && valid.test(digits)) {
      return exactOrFloat(Rational.fromInt(BigInt('0' + radix[1].toLowerCase() + digits)), node);
    }
  }
  // Underscore digit separators are legal only between digits.
  if (/_/.test(s) && (lang === 'lti' || /(^_|_$|__|_\.|\._|_[eE]|[eE]_)/.test(s))) {
    throw new EvalFailure('syntax-error', `'${text}' is not a valid number.`, node.start, node.end);
  }
  const m = /^([0-9_]*\.?[0-9_]*)(?:[eE]([+-]?[0-9_]+))?$/.exec(s);
  if (!m || !/[0-9]/.test(m[1])) {
    const glued = /^([0-9._]+(?:[eE][+-]?[0-9]+)?)([A-Za-z_].*)$/.exec(s);
    if (glued) {
      throw new EvalFailure(
        'implicit-multiplication',
        `'${text}' reads as a number followed by a name; write '*' for multiplication.`,
        node.start,
        node.end,
      );
    }
    throw new EvalFailure('syntax-error', `'${text}' is not a valid number.`, node.start, node.end);
  }
  const exponent = m[2] ? Number(m[2].replace(/_/g, '')) : 0;
  if (Math.abs(exponent) > 400) {
    // Beyond the double range (1e400 is Infinity, 1e-400 underflows): refuse rather than round.
    throw new EvalFailure('non-finite', `'${text}' is outside the range of finite double-precision numbers.`, node.start, node.end);
  }
  const r = Rational.parse(s);
  if (!r) throw new EvalFailure('syntax-error', `'${text}' is not a valid number.`, node.start, node.end);
  if (!Number.isFinite(r.toNumber())) {
    throw new EvalFailure('non-finite', `'${text}' is outside the range of finite double-precision numbers.`, node.start, node.end);
  }
  return { kind: 'exact', value: r };
}

function power(base: EntryValue, exponent: EntryValue, node: Expr): EntryValue {
  if (base.kind === 'exact' && exponent.kind === 'exact' && exponent.value.isInteger()) {
    const k = exponent.value.num;
    if (base.value.isZero() && k < 0n) throw new EvalFailure('division-by-zero', 'Zero raised to a negative power.', node.start, node.end);
    const absBase = base.value.abs();
    if (absBase.isOne() || base.value.isZero()) {
      return { kind: 'exact', value: base.value.pow(k % 2n === 0n && !base.value.isZero() ? 2 : k === 0n ? 0 : 1) };
    }
    const kAbs = k < 0n ? -k : k;
    if (kAbs <= BigInt(MAX_EXACT_EXPONENT)) {
      // Estimate the result size before computing it, so a huge power never allocates.
      const estimate = Number(kAbs) * absBase.digits();
      if (estimate <= MAX_EXACT_DIGITS * 2) return exactOrFloat(base.value.pow(Number(k)), node);
    }
  }
  const b = toFloat(base);
  const e = toFloat(exponent);
  if (b < 0 && !Number.isInteger(e)) {
    throw new EvalFailure('complex-entry', 'A negative number raised to a fractional power is complex.', node.start, node.end);
  }
  if (b === 0 && e < 0) throw new EvalFailure('division-by-zero', 'Zero raised to a negative power.', node.start, node.end);
  return finiteFloat(Math.pow(b, e), node);
}

function evaluateExpr(node: Expr, scope: ReadonlyMap<string, EntryValue>, lang: SourceLanguage): EntryValue {
  switch (node.type) {
    case 'num':
      return parseNumberLiteral(node.text, lang, node);
    case 'name': {
      const known = scope.get(node.name);
      if (known) return known;
      const bare = stripModule(node.name);
      const constant = node.name.startsWith('Math.') ? (bare === 'PI' || bare === 'E' ? bare : null) : bare === 'pi' || bare === 'e' ? bare : null;
      if (constant !== null) return { kind: 'float', value: FLOAT_CONSTANTS[constant] };
      if (BOOLEAN_NAMES.has(node.name)) {
        throw new EvalFailure('boolean-entry', `'${node.name}' is a boolean, not a number.`, node.start, node.end);
      }
      if (bare !== null && NON_FINITE_NAMES.has(bare)) {
        throw new EvalFailure('non-finite', `'${node.name}' is not a finite number.`, node.start, node.end);
      }
      if (NOTHING_NAMES.has(node.name)) {
        throw new EvalFailure('not-a-number', `'${node.name}' is not a number.`, node.start, node.end);
      }
      if (node.name.includes('.')) {
        throw new EvalFailure(
          'unknown-name',
          `Unknown name '${node.name}'; only constants assigned earlier in the file and pi/e are known.`,
          node.start,
          node.end,
        );
      }
      throw new EvalFailure(
        'unknown-name',
        `Unknown name '${node.name}'; assign it a number earlier in the file${lang === 'lti' ? " with 'param'" : ''}.`,
        node.start,
        node.end,
      );
    }
    case 'neg': {
      const v = evaluateExpr(node.arg, scope, lang);
      return v.kind === 'exact' ? { kind: 'exact', value: v.value.neg() } : { kind: 'float', value: -v.value };
    }
    case 'pos':
      return evaluateExpr(node.arg, scope, lang);
    case 'bin': {
      const a = evaluateExpr(node.left, scope, lang);
      const b = evaluateExpr(node.right, scope, lang);
      if (node.op === 'pow') return power(a, b, node);
      if (node.op === '/' && ((b.kind === 'exact' && b.value.isZero()) || (b.kind === 'float' && b.value === 0))) {
        throw new EvalFailure('division-by-zero', 'Division by zero.', node.start, node.end);
      }
      if (a.kind === 'exact' && b.kind === 'exact') {
        const x = a.value;
        const y = b.value;
        const r = node.op === '+' ? x.add(y) : node.op === '-' ? x.sub(y) : node.op === '*' ? x.mul(y) : x.div(y);
        return exactOrFloat(r, node);
      }
      const x = toFloat(a);
      const y = toFloat(b);
      const r = node.op === '+' ? x + y : node.op === '-' ? x - y : node.op === '*' ? x * y : x / y;
      return finiteFloat(r, node);
    }
    case 'call': {
      const bare = stripModule(node.callee);
      const fn = bare !== null ? FUNCTIONS[bare] : undefined;
      if (!fn || (node.callee.startsWith('Math.') && bare!.startsWith('arc'))) {
        throw new EvalFailure(
          'unknown-function',
          `'${node.callee}' is not an allowed function; entries may use sqrt, exp, log, sin, cos, tan, atan, atan2 and abs.`,
          node.calleeStart,
          node.calleeEnd,
        );
      }
      if (node.args.length !== fn.arity) {
        throw new EvalFailure(
          'bad-argument-count',
          `'${node.callee}' takes ${fn.arity} argument${fn.arity === 1 ? '' : 's'}, not ${node.args.length}.`,
          node.start,
          node.end,
        );
      }
      const args = node.args.map((a) => evaluateExpr(a, scope, lang));
      if (bare === 'abs' && args[0].kind === 'exact') return { kind: 'exact', value: args[0].value.abs() };
      return finiteFloat(fn.fn(...args.map(toFloat)), node);
    }
  }
}

/**
 * Evaluates one entry or constant expression. Never throws: every failure comes back as an
 * error with a stable code and a range relative to `text`.
 */
/** Plain decimal literals, the common case, skip the parser (same result as the full path). */
const PLAIN_NUMBER = /^-?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]{1,3})?$/;

export function evaluateEntry(text: string, scope: ReadonlyMap<string, EntryValue>, lang: SourceLanguage): EvaluationResult {
  if (PLAIN_NUMBER.test(text)) {
    const r = Rational.parse(text);
    if (r && Number.isFinite(r.toNumber()) && Math.abs(Number(/[eE]([+-]?[0-9]+)$/.exec(text)?.[1] ?? 0)) <= 400) {
      return { value: { kind: 'exact', value: r } };
    }
  }
  try {
    screenCharacters(text);
    const tokens = tokenize(text, lang);
    const tree = new Parser(tokens, lang).parseAll();
    return { value: evaluateExpr(tree, scope, lang) };
  } catch (err) {
    if (err instanceof EvalFailure) {
      return { error: { code: err.code, message: err.message, start: err.start, end: err.end } };
    }
    // Anything else is our own bug; report it at the whole entry rather than crash.
    return {
      error: { code: 'syntax-error', message: `Could not evaluate this entry (${String((err as Error)?.message ?? err)}).`, start: 0, end: text.length },
    };
  }
}
