/**
 * Python extractor: walks the tree-sitter-python syntax tree in document order, resolving
 * scalar constants (`m = 1.5`, `self.k = m*g`) and collecting matrix literals assigned to
 * names: `A = [[…]]`, `A = np.array([[…]], dtype=float)` (numpy/np/jnp array, asarray,
 * matrix), `A: np.ndarray = …`, `self.A = …`, and dictionary values `sys = {"A": [[…]]}`
 * (name = key, grouped by the dictionary's name).
 *
 * Invariants: only statements are visited (not expressions), so the walk is linear in the
 * number of statements; constants apply only to statements after them (a failed
 * re-assignment forgets the old value, so no stale value is used). Strings and comments
 * are never matrices because they are separate node kinds in the tree.
 */
import type { Node, Tree } from 'web-tree-sitter';
import { buildMatrixSteps, literalRowsSteps, PragmaAttacher, STEPPED_LITERAL_CHARS, type LiteralNode } from './literal';
import { evaluateEntry } from './evaluate';
import type { LiteralMemo } from './literalMemo';
import { runToEnd, stepsOrValue } from '../engine/steps';
import { roleFromName } from './roles';
import type { Constant, EntryValue, ExtractedFile, MatrixLiteral, Problem, Span } from './types';

const CONTAINERS = new Set([
  'module', 'block', 'if_statement', 'elif_clause', 'else_clause', 'for_statement', 'while_statement', 'try_statement',
  'except_clause', 'except_group_clause', 'finally_clause', 'with_statement', 'function_definition', 'class_definition',
  'decorated_definition', 'match_statement', 'case_clause',
]);

const ARRAY_FUNCTIONS = new Set([
  'np.array', 'numpy.array', 'np.asarray', 'numpy.asarray', 'jnp.array', 'jnp.asarray', 'np.matrix', 'numpy.matrix',
  'np.asmatrix', 'numpy.asmatrix', 'array', 'asarray', 'matrix',
]);

const NON_NUMERIC_LEAVES = new Set([
  'string', 'concatenated_string', 'true', 'false', 'none', 'dictionary', 'set', 'lambda', 'list_comprehension',
  'dictionary_comprehension', 'set_comprehension', 'generator_expression', 'list_splat', 'ellipsis', 'await',
]);

const SCALAR_KINDS = new Set(['integer', 'float', 'unary_operator', 'binary_operator', 'parenthesized_expression', 'identifier', 'attribute', 'call']);

function spanOf(n: Node): Span {
  return { start: n.startIndex, end: n.endIndex };
}

/** Named children without comments; `namedChildren` marshals all children in one call (much cheaper than namedChild(i)). */
function namedKids(n: Node): Node[] {
  const out: Node[] = [];
  for (const c of n.namedChildren) if (c && c.type !== 'comment') out.push(c);
  return out;
}

/** Lists deeper than a matrix (depth > 2) are kept as empty lists: the builder reports them, and recursion stays bounded. */
function toLiteralNode(n: Node, depth = 0): LiteralNode {
  if (n.type === 'list' || n.type === 'tuple') return { span: spanOf(n), items: depth >= 2 ? [] : namedKids(n).map((c) => toLiteralNode(c, depth + 1)) };
  return { span: spanOf(n), items: null, obviouslyNonNumeric: NON_NUMERIC_LEAVES.has(n.type), syntaxError: n.type === 'ERROR' || n.hasError };
}

/** The top list as the builders take it: converted row by row (in steps) when the literal is long. */
function topOf(n: Node): LiteralNode | Generator<number, LiteralNode, void> {
  const stepped = n.endIndex - n.startIndex >= STEPPED_LITERAL_CHARS && (n.type === 'list' || n.type === 'tuple');
  return stepped ? literalRowsSteps(spanOf(n), namedKids(n), (c) => toLiteralNode(c, 1), (c) => c.endIndex) : toLiteralNode(n);
}

/** The list inside `np.array([...], dtype=float)`, or the list itself. */
function literalOf(right: Node): { top: Node; arrayCall: boolean } | null {
  if (right.type === 'list') return { top: right, arrayCall: false };
  if (right.type === 'call') {
    const fn = right.childForFieldName('function');
    const args = right.childForFieldName('arguments');
    if (!fn || !args || !ARRAY_FUNCTIONS.has(fn.text)) return null;
    const first = namedKids(args).find((a) => a.type !== 'keyword_argument');
    if (first && (first.type === 'list' || first.type === 'tuple')) return { top: first, arrayCall: true };
  }
  return null;
}

/** `memo`, when given, reuses matrices built by earlier extractions (see literalMemo.ts); the result is the same. */
export function extractPython(text: string, tree: Tree, extraStatePatterns: RegExp[], memo?: LiteralMemo | null): ExtractedFile {
  return runToEnd(pythonSteps(text, tree, extraStatePatterns, memo));
}

/**
 * The same extraction one top-level statement at a time: each step yields the offset where
 * the statement just read ends, and the generator returns the extraction. The tree must stay
 * alive (not deleted) until the generator has finished.
 */
export function* pythonSteps(text: string, tree: Tree, extraStatePatterns: RegExp[], memo?: LiteralMemo | null): Generator<number, ExtractedFile, void> {
  const problems: Problem[] = [];
  const matrices: MatrixLiteral[] = [];
  const constants: Constant[] = [];
  const scope = new Map<string, EntryValue>();
  const root = tree.rootNode;
  const firstCode = namedKids(root)[0];
  const attacher = new PragmaAttacher(
    text,
    'python',
    (offset) => {
      const n = root.descendantForIndex(offset);
      return n && n.type === 'comment' ? spanOf(n) : null;
    },
    firstCode ? firstCode.startIndex : text.length,
    problems,
  );

  const forget = (target: Node) => {
    if (target.type === 'identifier' || target.type === 'attribute') scope.delete(target.text);
    else for (const c of namedKids(target)) forget(c);
  };

  const addMatrix = function* (
    statement: Node,
    name: string,
    qualifiedName: string,
    nameSpan: Span,
    literal: { top: Node; arrayCall: boolean },
    whole: Node,
    groupKeyOverride?: string,
  ): Generator<number, void, void> {
    const pragma = attacher.attach(statement.startIndex, scope);
    const fields = {
      name,
      qualifiedName,
      nameSpan,
      span: spanOf(whole),
      statementSpan: spanOf(statement),
      nameRole: roleFromName(name, extraStatePatterns),
      pragma,
      arrayCall: literal.arrayCall,
      groupKeyOverride,
    };
    const top = literal.top;
    const m = memo
      ? yield* memo.buildSteps(text, 'python', scope, { ...fields, topSpan: spanOf(top), topHasError: top.hasError, top: () => topOf(top) }, problems)
      : yield* buildMatrixSteps(text, 'python', scope, { ...fields, top: yield* stepsOrValue(topOf(top)) }, problems);
    if (m) matrices.push(m);
  };

  const handleAssignment = function* (a: Node, statement: Node): Generator<number, void, void> {
    const left = a.childForFieldName('left');
    const right = a.childForFieldName('right');
    if (!left || !right) return;
    if (right.type === 'assignment') {
      yield* handleAssignment(right, statement);
      forget(left);
      return;
    }
    if (left.type !== 'identifier' && left.type !== 'attribute') {
      forget(left);
      return;
    }
    const qualifiedName = left.text;
    const nameNode = left.type === 'attribute' ? left.childForFieldName('attribute') : left;
    if (!nameNode) return;
    const literal = literalOf(right);
    if (literal) {
      scope.delete(qualifiedName);
      yield* addMatrix(statement, nameNode.text, qualifiedName, spanOf(nameNode), literal, right);
      return;
    }
    if (right.type === 'dictionary') {
      scope.delete(qualifiedName);
      for (const pair of namedKids(right)) {
        if (pair.type !== 'pair') continue;
        const key = pair.childForFieldName('key');
        const value = pair.childForFieldName('value');
        if (!key || !value || key.type !== 'string') continue;
        const content = namedKids(key).find((k) => k.type === 'string_content');
        const lit = literalOf(value);
        if (!content || !lit || !roleFromName(content.text, extraStatePatterns)) continue;
        yield* addMatrix(statement, content.text, `${qualifiedName}[${key.text}]`, spanOf(content), lit, value, nameNode.text);
      }
      return;
    }
    if (SCALAR_KINDS.has(right.type)) {
      const r = evaluateEntry(right.text, scope, 'python');
      if ('value' in r) {
        scope.set(qualifiedName, r.value);
        constants.push({ name: qualifiedName, span: spanOf(left), value: r.value });
        return;
      }
    }
    scope.delete(qualifiedName);
  };

  // Document-order walk over statements with an explicit stack (deeply nested code cannot overflow).
  // `effects` counts assignments seen, so that a top-level statement whose walk found none can be
  // remembered as inert and skipped unvisited next time (see literalMemo.ts).
  let effects = 0;
  const walkFrom = function* (start: Node): Generator<number, void, void> {
    const stack: Node[] = [start];
    while (stack.length > 0) {
      const node = stack.pop()!;
      if (node.type === 'expression_statement') {
        for (const c of namedKids(node)) {
          if (c.type === 'assignment') {
            effects++;
            yield* handleAssignment(c, node);
          } else if (c.type === 'augmented_assignment') {
            effects++;
            const target = c.childForFieldName('left');
            if (target) forget(target);
          }
        }
        continue;
      }
      // Only statement containers are entered; expressions are never walked.
      if (!CONTAINERS.has(node.type)) continue;
      const kids = namedKids(node);
      for (let i = kids.length - 1; i >= 0; i--) stack.push(kids[i]);
    }
  };
  const inert = memo ? memo.inert : null;
  for (const statement of namedKids(root)) {
    const key =
      inert && statement.type !== 'expression_statement' && CONTAINERS.has(statement.type) && !statement.hasError
        ? `py\u0000${text.slice(statement.startIndex, statement.endIndex)}`
        : null;
    if (key !== null && inert!.has(key)) {
      memo!.stats.skippedStatements++;
      yield statement.endIndex;
      continue;
    }
    const before = effects;
    yield* walkFrom(statement);
    if (key !== null && effects === before) inert!.add(key);
    yield statement.endIndex;
  }

  const filePragma = attacher.finish();
  return { language: 'python', matrices, constants, filePragma, problems, systems: [] };
}
