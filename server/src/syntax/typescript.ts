/**
 * TypeScript / JavaScript extractor (the tree-sitter TypeScript grammar parses both).
 * Walks statements in document order, resolving scalar constants (`const k = 40;`, `let`,
 * `var`, `export const`, `this.m = …`) and collecting matrix literals: `const A = [[…]]`,
 * `let A: number[][] = …`, `… as const`, `… satisfies …`, `math.matrix([…])`, class fields
 * `A = [[…]]`, `this.A = …`, and object properties `{ A: [[…]], B: […] }` (name = key,
 * grouped by the variable holding the object).
 *
 * Invariants: as in the Python extractor — statements only, explicit stack, constants apply
 * only after their declaration, a failed re-assignment forgets the old value.
 */
import type { Node, Tree } from 'web-tree-sitter';
import { evaluateEntry } from './evaluate';
import { buildMatrixSteps, literalRowsSteps, PragmaAttacher, STEPPED_LITERAL_CHARS, type LiteralInput, type LiteralNode } from './literal';
import type { LiteralMemo } from './literalMemo';
import { runToEnd, stepsOrValue } from '../engine/steps';
import { roleFromName } from './roles';
import type { Constant, EntryValue, ExtractedFile, MatrixLiteral, Problem, Span } from './types';

const CONTAINERS = new Set([
  'program', 'statement_block', 'export_statement', 'function_declaration', 'generator_function_declaration',
  'class_declaration', 'class', 'class_body', 'method_definition', 'if_statement', 'else_clause', 'for_statement',
  'for_in_statement', 'while_statement', 'do_statement', 'try_statement', 'catch_clause', 'finally_clause',
  'labeled_statement', 'switch_statement', 'switch_body', 'switch_case', 'switch_default', 'module', 'internal_module',
  'namespace_declaration', 'abstract_class_declaration',
]);

const MATRIX_FUNCTIONS = new Set(['math.matrix', 'mathjs.matrix', 'matrix', 'math.bignumber']);

const NON_NUMERIC_LEAVES = new Set([
  'string', 'template_string', 'true', 'false', 'null', 'undefined', 'object', 'arrow_function', 'function_expression',
  'spread_element', 'regex', 'new_expression', 'class',
]);

const SCALAR_KINDS = new Set([
  'number', 'unary_expression', 'binary_expression', 'parenthesized_expression', 'identifier', 'member_expression', 'call_expression',
]);

function spanOf(n: Node): Span {
  return { start: n.startIndex, end: n.endIndex };
}

/** Named children without comments; `namedChildren` marshals all children in one call (much cheaper than namedChild(i)). */
function namedKids(n: Node): Node[] {
  const out: Node[] = [];
  for (const c of n.namedChildren) if (c && c.type !== 'comment') out.push(c);
  return out;
}

/** Strips `as const`, `satisfies T`, `!` and parentheses around a value. */
function unwrap(n: Node): Node {
  let cur = n;
  for (let i = 0; i < 50; i++) {
    if (cur.type === 'as_expression' || cur.type === 'satisfies_expression' || cur.type === 'non_null_expression' || cur.type === 'parenthesized_expression') {
      const inner = namedKids(cur)[0];
      if (!inner) break;
      cur = inner;
    } else break;
  }
  return cur;
}

/** Arrays deeper than a matrix (depth > 2) are kept as empty lists: the builder reports them, and recursion stays bounded. */
function toLiteralNode(n: Node, depth = 0): LiteralNode {
  const u = unwrap(n);
  if (u.type === 'array') return { span: spanOf(n), items: depth >= 2 ? [] : namedKids(u).map((c) => toLiteralNode(c, depth + 1)) };
  return { span: spanOf(n), items: null, obviouslyNonNumeric: NON_NUMERIC_LEAVES.has(u.type), syntaxError: n.type === 'ERROR' || n.hasError };
}

/** The top array as the builders take it: converted row by row (in steps) when the literal is long. */
function topOf(n: Node): LiteralNode | Generator<number, LiteralNode, void> {
  const u = unwrap(n);
  const stepped = n.endIndex - n.startIndex >= STEPPED_LITERAL_CHARS && u.type === 'array';
  return stepped ? literalRowsSteps(spanOf(n), namedKids(u), (c) => toLiteralNode(c, 1), (c) => c.endIndex) : toLiteralNode(n);
}

function literalOf(value: Node): { top: Node; arrayCall: boolean } | null {
  const v = unwrap(value);
  if (v.type === 'array') return { top: v, arrayCall: false };
  if (v.type === 'call_expression') {
    const fn = v.childForFieldName('function');
    const args = v.childForFieldName('arguments');
    if (!fn || !args || !MATRIX_FUNCTIONS.has(fn.text)) return null;
    const first = namedKids(args)[0];
    if (first && unwrap(first).type === 'array') return { top: unwrap(first), arrayCall: true };
  }
  return null;
}

function propertyName(key: Node): { name: string; span: Span } | null {
  if (key.type === 'property_identifier' || key.type === 'identifier') return { name: key.text, span: spanOf(key) };
  if (key.type === 'string') {
    const frag = namedKids(key).find((k) => k.type === 'string_fragment');
    return frag ? { name: frag.text, span: spanOf(frag) } : null;
  }
  return null;
}

/** `memo`, when given, reuses matrices built by earlier extractions (see literalMemo.ts); the result is the same. */
export function extractTypeScript(text: string, tree: Tree, extraStatePatterns: RegExp[], memo?: LiteralMemo | null): ExtractedFile {
  return runToEnd(typeScriptSteps(text, tree, extraStatePatterns, memo));
}

/**
 * The same extraction one top-level statement at a time: each step yields the offset where
 * the statement just read ends, and the generator returns the extraction. The tree must stay
 * alive (not deleted) until the generator has finished.
 */
export function* typeScriptSteps(text: string, tree: Tree, extraStatePatterns: RegExp[], memo?: LiteralMemo | null): Generator<number, ExtractedFile, void> {
  const problems: Problem[] = [];
  const matrices: MatrixLiteral[] = [];
  const constants: Constant[] = [];
  const scope = new Map<string, EntryValue>();
  const root = tree.rootNode;
  const firstCode = namedKids(root)[0];
  const attacher = new PragmaAttacher(
    text,
    'typescript',
    (offset) => {
      const n = root.descendantForIndex(offset);
      return n && n.type === 'comment' ? spanOf(n) : null;
    },
    firstCode ? firstCode.startIndex : text.length,
    problems,
  );

  /** buildMatrix, through the memo when there is one (the top list is then converted only on a miss). */
  const build = function* (top: Node, fields: Omit<LiteralInput, 'top'>): Generator<number, MatrixLiteral | null, void> {
    return memo
      ? yield* memo.buildSteps(text, 'typescript', scope, { ...fields, topSpan: spanOf(top), topHasError: top.hasError, top: () => topOf(top) }, problems)
      : yield* buildMatrixSteps(text, 'typescript', scope, { ...fields, top: yield* stepsOrValue(topOf(top)) }, problems);
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
    const m = yield* build(literal.top, {
      name,
      qualifiedName,
      nameSpan,
      span: spanOf(whole),
      statementSpan: spanOf(statement),
      nameRole: roleFromName(name, extraStatePatterns),
      pragma,
      arrayCall: literal.arrayCall,
      groupKeyOverride,
    });
    if (m) matrices.push(m);
  };

  /** A binding `target = value` found in a declaration, field or assignment. */
  const bind = function* (statement: Node, target: Node, nameNode: Node, value: Node | null): Generator<number, void, void> {
    const qualifiedName = target.text;
    if (!value) {
      scope.delete(qualifiedName);
      return;
    }
    const literal = literalOf(value);
    if (literal) {
      scope.delete(qualifiedName);
      yield* addMatrix(statement, nameNode.text, qualifiedName, spanOf(nameNode), literal, unwrap(value));
      return;
    }
    const v = unwrap(value);
    if (v.type === 'object') {
      scope.delete(qualifiedName);
      for (const pair of namedKids(v)) {
        if (pair.type !== 'pair') continue;
        const key = pair.childForFieldName('key');
        const val = pair.childForFieldName('value');
        const prop = key ? propertyName(key) : null;
        const lit = val ? literalOf(val) : null;
        if (!prop || !val || !lit || !roleFromName(prop.name, extraStatePatterns)) continue;
        const pm = { top: lit.top, arrayCall: lit.arrayCall };
        const pragma = attacher.attach(pair.startIndex, scope);
        const m = yield* build(pm.top, {
          name: prop.name,
          qualifiedName: `${qualifiedName}.${prop.name}`,
          nameSpan: prop.span,
          span: spanOf(unwrap(val)),
          statementSpan: spanOf(statement),
          nameRole: roleFromName(prop.name, extraStatePatterns),
          pragma,
          arrayCall: pm.arrayCall,
          groupKeyOverride: nameNode.text,
        });
        if (m) matrices.push(m);
      }
      return;
    }
    if (SCALAR_KINDS.has(v.type)) {
      const r = evaluateEntry(v.text, scope, 'typescript');
      if ('value' in r) {
        scope.set(qualifiedName, r.value);
        constants.push({ name: qualifiedName, span: spanOf(target), value: r.value });
        return;
      }
    }
    scope.delete(qualifiedName);
  };

  const handleDeclaration = function* (decl: Node, statement: Node): Generator<number, void, void> {
    for (const d of namedKids(decl)) {
      if (d.type !== 'variable_declarator') continue;
      const name = d.childForFieldName('name');
      if (!name) continue;
      if (name.type !== 'identifier') continue; // destructuring patterns bind nothing we track
      yield* bind(statement, name, name, d.childForFieldName('value'));
    }
  };

  // `effects` counts declarations and assignments seen, so that a top-level statement whose walk
  // found none can be remembered as inert and skipped unvisited next time (see literalMemo.ts).
  let effects = 0;
  const walkFrom = function* (start: Node): Generator<number, void, void> {
    const stack: Array<{ node: Node; statement: Node | null }> = [{ node: start, statement: null }];
    while (stack.length > 0) {
      const { node, statement } = stack.pop()!;
      const outer = statement ?? node;
      switch (node.type) {
        case 'lexical_declaration':
        case 'variable_declaration':
          effects++;
          yield* handleDeclaration(node, outer);
          continue;
        case 'public_field_definition': {
          effects++;
          const name = node.childForFieldName('name');
          if (name && name.type === 'property_identifier') yield* bind(node, name, name, node.childForFieldName('value'));
          continue;
        }
        case 'expression_statement': {
          const e = namedKids(node)[0];
          if (e && e.type === 'assignment_expression') {
            effects++;
            const left = e.childForFieldName('left');
            const right = e.childForFieldName('right');
            if (left && (left.type === 'identifier' || left.type === 'member_expression')) {
              const nameNode = left.type === 'member_expression' ? left.childForFieldName('property') : left;
              if (nameNode) yield* bind(node, left, nameNode, right);
            }
          } else if (e && e.type === 'augmented_assignment_expression') {
            effects++;
            const left = e.childForFieldName('left');
            if (left) scope.delete(left.text);
          }
          continue;
        }
      }
      if (!CONTAINERS.has(node.type)) continue;
      const kids = namedKids(node);
      // An `export const …` keeps the export statement as the statement span.
      const childStatement = node.type === 'export_statement' ? outer : null;
      for (let i = kids.length - 1; i >= 0; i--) stack.push({ node: kids[i], statement: childStatement });
    }
  };
  const inert = memo ? memo.inert : null;
  for (const statement of namedKids(root)) {
    const key =
      inert && CONTAINERS.has(statement.type) && !statement.hasError ? `ts\u0000${text.slice(statement.startIndex, statement.endIndex)}` : null;
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
  return { language: 'typescript', matrices, constants, filePragma, problems, systems: [] };
}
