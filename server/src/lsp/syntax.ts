// Reading the syntax tree for the editor features: what is under the cursor, and
// where models, subcircuits and parameters are defined (in the file and in the
// files it includes). Syntax facts only: circuit facts come from the analysis.
import {
  parse,
  type AssignField,
  type ElementStatement,
  type Expr,
  type Field,
  type IncludeStatement,
  type LibReferenceStatement,
  type ModelStatement,
  type ParseResult,
  type LineIndex,
  type Range,
  type Span,
  type Statement,
  type SubcktStatement,
} from '@pnlint/grammar';
import type { Position as LspPosition } from 'vscode-languageserver';
import type { FileReader } from '../netlist/circuit.js';
import { spanContains } from './positions.js';

/** The subcircuits around a statement, outermost first. */
export type Scope = readonly SubcktStatement[];

/** Calls `visit` for every statement, nested bodies included, with the subcircuits around it. */
export function forEachStatement(statements: readonly Statement[], visit: (statement: Statement, scope: Scope) => void, scope: Scope = []): void {
  for (const statement of statements) {
    visit(statement, scope);
    switch (statement.kind) {
      case 'subckt':
        forEachStatement(statement.body, visit, [...scope, statement]);
        break;
      case 'libSection':
        forEachStatement(statement.body, visit, scope);
        break;
      case 'if':
        for (const branch of statement.branches) forEachStatement(branch.body, visit, scope);
        break;
      default:
        break;
    }
  }
}

/** What the cursor points at: the statement, the innermost field, and an identifier inside an expression. */
export interface SyntaxTarget {
  statement: Statement;
  scope: Scope;
  /** The innermost field under the cursor, if any. */
  field?: Field;
  /** The field's parent when the field is the key or value of `key=value`. */
  assign?: AssignField;
  /** An identifier (or function name) inside an expression under the cursor. */
  identifier?: { name: string; span: Span };
}

function fieldAt(field: Field, offset: number, parent?: AssignField): { field: Field; assign?: AssignField } | undefined {
  if (!spanContains(field.span, offset)) return undefined;
  if (field.kind === 'assign') {
    return fieldAt(field.key, offset, field) ?? fieldAt(field.value, offset, field) ?? { field, assign: parent };
  }
  if (field.kind === 'group') {
    if (field.name && spanContains(field.name.span, offset)) return { field: field.name };
    for (const item of field.items) {
      const inner = fieldAt(item, offset);
      if (inner) return inner;
    }
  }
  return { field, assign: parent };
}

function identifierAt(expr: Expr | undefined, position: number): { name: string; span: Span } | undefined {
  if (!expr || !spanContains(expr.span, position)) return undefined;
  switch (expr.kind) {
    case 'ident':
      return { name: expr.name, span: expr.span };
    case 'unary':
      return identifierAt(expr.operand, position);
    case 'binary':
      return identifierAt(expr.left, position) ?? identifierAt(expr.right, position);
    case 'ternary':
      return identifierAt(expr.condition, position) ?? identifierAt(expr.whenTrue, position) ?? identifierAt(expr.whenFalse, position);
    case 'call':
      for (const argument of expr.args) {
        const inner = identifierAt(argument, position);
        if (inner) return inner;
      }
      return undefined;
    default:
      return undefined;
  }
}

/** The header fields of a statement (not its nested body), for the cursor search. */
function headerFields(statement: Statement): Field[] {
  switch (statement.kind) {
    case 'element':
      return [statement.name, ...statement.fields];
    case 'model':
      return [statement.name, statement.type, ...statement.params, ...statement.extra];
    case 'subckt':
      return [statement.name, ...statement.ports, ...statement.params];
    case 'param':
      return statement.assigns;
    case 'func':
      return [statement.name, ...statement.args, ...(statement.body ? [statement.body] : [])];
    case 'libReference':
      return [statement.section];
    case 'libSection':
      return [statement.name];
    case 'global':
      return statement.nodes;
    case 'if':
      return statement.branches.flatMap((branch) => (branch.condition ? [branch.condition] : []));
    case 'dot':
      return statement.fields;
    default:
      return [];
  }
}

function isHeaderAt(statement: Statement, lines: LineIndex, position: LspPosition, offset: number): boolean {
  // A block's own line(s) only: its body is searched separately.
  if (statement.kind === 'subckt' || statement.kind === 'libSection' || statement.kind === 'if') {
    return lines.lineOf(statement.span.start) === position.line;
  }
  return spanContains(statement.span, offset);
}

export function findTarget(syntax: ParseResult, position: LspPosition): SyntaxTarget | undefined {
  const offset = syntax.lines.offsetAt(position.line, position.character);
  let found: SyntaxTarget | undefined;
  forEachStatement(syntax.statements, (statement, scope) => {
    if (found || !isHeaderAt(statement, syntax.lines, position, offset)) return;
    const target: SyntaxTarget = { statement, scope };
    for (const field of headerFields(statement)) {
      const inner = fieldAt(field, offset);
      if (!inner) continue;
      target.field = inner.field;
      if (inner.assign) target.assign = inner.assign;
      if (inner.field.kind === 'expression') {
        const identifier = identifierAt(inner.field.expr, offset);
        if (identifier) target.identifier = identifier;
      }
      break;
    }
    found = target;
  });
  return found;
}

// ---------------------------------------------------------------- definitions

/** A definition found in some file: its uri, the statement, and its name's range. */
export interface Definition<T> {
  uri: string;
  node: T;
  nameRange: Range;
  scope: Scope;
}

export interface SyntaxIndex {
  models: Definition<ModelStatement>[];
  subcircuits: Definition<SubcktStatement>[];
  /** `.param` assignments and subcircuit parameter defaults (`params:`). */
  parameters: Definition<AssignField>[];
  elements: Definition<ElementStatement>[];
  includes: { uri: string; lines: LineIndex; statement: IncludeStatement | LibReferenceStatement; target: string }[];
}

function emptyIndex(): SyntaxIndex {
  return { models: [], subcircuits: [], parameters: [], elements: [], includes: [] };
}

function indexStatements(index: SyntaxIndex, uri: string, lines: LineIndex, statements: readonly Statement[], files: FileReader | undefined): void {
  const at = (span: Span): Range => lines.range(span);
  forEachStatement(statements, (statement, scope) => {
    switch (statement.kind) {
      case 'model':
        index.models.push({ uri, node: statement, nameRange: at(statement.name.span), scope });
        break;
      case 'subckt':
        index.subcircuits.push({ uri, node: statement, nameRange: at(statement.name.span), scope });
        for (const param of statement.params) index.parameters.push({ uri, node: param, nameRange: at(param.key.span), scope: [...scope, statement] });
        break;
      case 'param':
        for (const assign of statement.assigns) index.parameters.push({ uri, node: assign, nameRange: at(assign.key.span), scope });
        break;
      case 'element':
        index.elements.push({ uri, node: statement, nameRange: at(statement.name.span), scope });
        break;
      case 'include':
      case 'libReference':
        if (files) index.includes.push({ uri, lines, statement, target: files.resolve(uri, statement.path) });
        break;
      default:
        break;
    }
  });
}

/** Limits on following includes, so that a deep or looping include chain cannot stall a request. */
const INCLUDE_DEPTH_LIMIT = 16;
const INCLUDED_FILE_LIMIT = 200;

/** Parses included files once per text. */
export class IncludedSyntaxCache {
  private readonly cache = new Map<string, { text: string; syntax: ParseResult }>();

  get(uri: string, text: string): ParseResult {
    const cached = this.cache.get(uri);
    if (cached && cached.text === text) return cached.syntax;
    const syntax = parse(text, { isInclude: true });
    this.cache.set(uri, { text, syntax });
    return syntax;
  }

  forget(uri: string): void {
    this.cache.delete(uri);
  }
}

/**
 * Every definition in the file and in the files it includes (transitively, in include order).
 * `.lib file section` pulls in only that section's body.
 */
export function buildIndex(uri: string, syntax: ParseResult, files: FileReader, cache: IncludedSyntaxCache): SyntaxIndex {
  const index = emptyIndex();
  const visited = new Set<string>([uri]);
  const queue: { uri: string; lines: LineIndex; statements: readonly Statement[]; depth: number }[] = [{ uri, lines: syntax.lines, statements: syntax.statements, depth: 0 }];
  while (queue.length > 0) {
    const next = queue.shift()!;
    const before = index.includes.length;
    indexStatements(index, next.uri, next.lines, next.statements, files);
    if (next.depth >= INCLUDE_DEPTH_LIMIT) continue;
    for (const include of index.includes.slice(before)) {
      const key = include.statement.kind === 'libReference' ? `${include.target}#${include.statement.section.text.toLowerCase()}` : include.target;
      if (visited.has(key) || visited.size >= INCLUDED_FILE_LIMIT) continue;
      visited.add(key);
      const text = files.read(include.target);
      if (text === undefined) continue;
      const included = cache.get(include.target, text);
      let statements: readonly Statement[] = included.statements;
      if (include.statement.kind === 'libReference') {
        const section = include.statement.section.text.toLowerCase();
        statements = included.statements.filter((s) => s.kind === 'libSection' && s.name.text.toLowerCase() === section);
      }
      queue.push({ uri: include.target, lines: included.lines, statements, depth: next.depth + 1 });
    }
  }
  return index;
}

/** True when `definition` is visible from `scope`: defined at top level or in one of the enclosing subcircuits. */
function visibleFrom(definition: Definition<unknown>, scope: Scope): boolean {
  return definition.scope.every((subckt, level) => scope[level] === subckt);
}

/** The definition named `name` (case-insensitive) nearest to `scope`: the innermost subcircuit first, then outward. */
export function resolveName<T>(definitions: readonly Definition<T>[], name: string, scope: Scope, nameOf: (node: T) => string): Definition<T> | undefined {
  const wanted = name.toLowerCase();
  let best: Definition<T> | undefined;
  for (const definition of definitions) {
    if (nameOf(definition.node).toLowerCase() !== wanted || !visibleFrom(definition, scope)) continue;
    // SPICE engines keep the first of duplicate definitions; a deeper scope wins over a shallower one.
    if (!best || definition.scope.length > best.scope.length) best = definition;
  }
  return best;
}

export const modelName = (model: ModelStatement): string => model.name.text;
export const subcircuitName = (subckt: SubcktStatement): string => subckt.name.text;
export const parameterName = (assign: AssignField): string => assign.key.text;

/** The text of a field as written (for a group, its name and items). */
export function fieldText(field: Field): string {
  switch (field.kind) {
    case 'word':
    case 'number':
    case 'expression':
      return field.text;
    case 'assign':
      return `${field.key.text}=${fieldText(field.value)}`;
    case 'group':
      return `${field.name ? field.name.text : ''}(${field.items.map(fieldText).join(' ')})`;
  }
}

/** The plain words and numbers of an element line after its name (nodes, model or subcircuit name, value). */
export function positionalFields(element: ElementStatement): Field[] {
  return element.fields.filter((field) => field.kind === 'word' || field.kind === 'number' || field.kind === 'expression');
}

/** How many nodes an element letter takes before its model or value (SPICE3 element syntax). */
export const NODE_COUNT: Readonly<Record<string, number>> = {
  R: 2, C: 2, L: 2, V: 2, I: 2, D: 2, E: 4, G: 4, F: 2, H: 2, S: 4, W: 2, Q: 3, M: 4, J: 3, B: 2, T: 4,
};

/** The name of the subcircuit an X line instantiates: its last plain word before any `params:` or `key=value`. */
export function instanceSubcircuit(element: ElementStatement): Field | undefined {
  let last: Field | undefined;
  for (const field of element.fields) {
    if (field.kind === 'assign') break;
    if (field.kind === 'word' && field.text.toLowerCase() === 'params:') break;
    if (field.kind === 'word' || field.kind === 'number') last = field;
  }
  return last;
}
