// The typed syntax tree of a SPICE netlist. Every node carries its exact
// source span (offsets) so that diagnostics, hovers and edits land where the user
// wrote; the parse result's line index turns a span into lines and columns.
// (Offsets rather than line/column objects: a 10 MB file has millions of nodes,
// and three position objects per node were most of the parser's allocation.)
// The grammar knows nothing of circuits: element lines keep their fields in a
// generic form, and `server/src/netlist` reads them per element letter.

/** A position in the text: 0-based line and UTF-16 column (as LSP counts), and the offset. */
export interface Position {
  line: number;
  column: number;
  offset: number;
}

export interface Range {
  start: Position;
  end: Position;
}

/** Where a node is written: UTF-16 offsets into the text, `end` exclusive. */
export interface Span {
  start: number;
  end: number;
}

import type { LineIndex } from './positions.js';

export type Severity = 'error' | 'warning' | 'info';

/** A problem found while reading the text. `code` is a rule id, e.g. `syntax`. */
export interface ParseDiagnostic {
  severity: Severity;
  code: string;
  message: string;
  range: Range;
}

// ---------------------------------------------------------------- expressions

export type Expr =
  | { kind: 'num'; value: number; text: string; span: Span }
  | { kind: 'ident'; name: string; span: Span }
  | { kind: 'unary'; op: '-' | '+' | '!'; operand: Expr; span: Span }
  | {
      kind: 'binary';
      op: '+' | '-' | '*' | '/' | '^' | '**' | '%' | '==' | '!=' | '<' | '<=' | '>' | '>=' | '&&' | '||';
      left: Expr;
      right: Expr;
      span: Span;
    }
  | { kind: 'ternary'; condition: Expr; whenTrue: Expr; whenFalse: Expr; span: Span }
  | { kind: 'call'; name: string; args: Expr[]; span: Span };

// --------------------------------------------------------------------- fields
// The words of an element line or of a dot command, classified but not interpreted.

/** A bare word: node name, model name, keyword (`DC`, `off`, `params:`), as written. */
export interface WordField {
  kind: 'word';
  text: string;
  span: Span;
}

/** A numeric literal as SPICE reads it (`4.7k`, `1uF`, `10`); `text` is kept so `1` can also be a node name. */
export interface NumberField {
  kind: 'number';
  text: string;
  /** The value a SPICE engine reads: leading number times scale factor; the rest of the word ignored. */
  value: number;
  span: Span;
}

/**
 * A `{…}` or `'…'` expression, or an undelimited one (`.param a = 2*b`, a `.func` body, an `.if`
 * condition). `text` is the source text that `span` covers, delimiters included.
 * `expr` is undefined when its text does not parse (a diagnostic says why).
 */
export interface ExpressionField {
  kind: 'expression';
  text: string;
  expr: Expr | undefined;
  span: Span;
}

/** `key=value`; the value may itself be a group, e.g. `ic=(1,2)`. */
export interface AssignField {
  kind: 'assign';
  /** The key as written; for a group key such as `v(out)` in `.ic v(out)=1`, its whole text. */
  key: WordField;
  /** Set when the key is a group (`v(out)=1`): the group as parsed. */
  keyGroup?: GroupField;
  /** Set when the key is an expression (`TABLE {v(a)} = (0,0) (1,1)`): the expression as parsed. */
  keyExpression?: ExpressionField;
  value: Field;
  span: Span;
}

/** A parenthesised list, with the word before it when there is one: `SIN(0 1 1k)`, `v(out)`, `(is=1e-14)`. */
export interface GroupField {
  kind: 'group';
  name: WordField | undefined;
  items: Field[];
  span: Span;
}

export type Field = WordField | NumberField | ExpressionField | AssignField | GroupField;

// ----------------------------------------------------------------- statements

export interface InlineComment {
  /** The text after `;` or ` $`, without the marker. */
  text: string;
  span: Span;
}

interface StatementBase {
  span: Span;
  /** An inline comment at the end of the statement's (last) line. */
  comment?: InlineComment;
  /** True when the line has a syntax error (a diagnostic says where): the fields are what could be read. */
  incomplete?: boolean;
}

export interface TitleStatement extends StatementBase {
  kind: 'title';
  text: string;
}

/** A `*` comment line. `text` is everything after the `*`. pnlint directives are comments: `*pnlint: …`. */
export interface CommentStatement extends StatementBase {
  kind: 'comment';
  text: string;
}

/** Any element line: R, C, L, K, V, I, E, F, G, H, B, D, Q, M, J, S, W, X, T, A, … */
export interface ElementStatement extends StatementBase {
  kind: 'element';
  name: WordField;
  /** The first letter of the name, upper-cased: the element's type. */
  letter: string;
  fields: Field[];
}

export interface ModelStatement extends StatementBase {
  kind: 'model';
  name: WordField;
  type: WordField;
  params: AssignField[];
  /** Fields that are not `key=value` (a flag such as `level 1` written without `=`). */
  extra: Field[];
}

export interface SubcktStatement extends StatementBase {
  kind: 'subckt';
  name: WordField;
  ports: WordField[];
  /** Defaults from `params:` (or bare `key=value` after the ports). */
  params: AssignField[];
  body: Statement[];
  /** The `.ends` line's span; undefined when it is missing (a diagnostic says so). */
  ends: Span | undefined;
}

export interface ParamStatement extends StatementBase {
  kind: 'param';
  assigns: AssignField[];
}

export interface FuncStatement extends StatementBase {
  kind: 'func';
  name: WordField;
  args: WordField[];
  body: ExpressionField | undefined;
}

/** `.include path` / `.inc path`. */
export interface IncludeStatement extends StatementBase {
  kind: 'include';
  path: string;
  pathSpan: Span;
}

/** `.lib path section`: pull one section out of a library file. */
export interface LibReferenceStatement extends StatementBase {
  kind: 'libReference';
  path: string;
  pathSpan: Span;
  section: WordField;
}

/** `.lib section` … `.endl`: a section defined in a library file. */
export interface LibSectionStatement extends StatementBase {
  kind: 'libSection';
  name: WordField;
  body: Statement[];
  endl: Span | undefined;
}

export interface GlobalStatement extends StatementBase {
  kind: 'global';
  nodes: WordField[];
}

export interface IfBranch {
  /** undefined for `.else`. */
  condition: ExpressionField | undefined;
  body: Statement[];
  span: Span;
}

export interface IfStatement extends StatementBase {
  kind: 'if';
  branches: IfBranch[];
  endif: Span | undefined;
}

/** `.control` … `.endc`, kept opaque: it is a script for the simulator's shell, not circuit. */
export interface ControlStatement extends StatementBase {
  kind: 'control';
  text: string;
}

export interface EndStatement extends StatementBase {
  kind: 'end';
}

/**
 * Every other dot command, known or not: `.options`, `.temp`, `.ic`, `.nodeset`,
 * `.op`, `.dc`, `.ac`, `.tran`, `.meas`, `.save`, `.print`, `.plot`, …
 * `command` is lower-cased without the dot, with aliases folded (`option` → `options`,
 * `measure` → `meas`). `known` is false for a command the grammar does not know (a warning).
 */
export interface DotStatement extends StatementBase {
  kind: 'dot';
  command: string;
  commandSpan: Span;
  known: boolean;
  fields: Field[];
}

export type Statement =
  | TitleStatement
  | CommentStatement
  | ElementStatement
  | ModelStatement
  | SubcktStatement
  | ParamStatement
  | FuncStatement
  | IncludeStatement
  | LibReferenceStatement
  | LibSectionStatement
  | GlobalStatement
  | IfStatement
  | ControlStatement
  | EndStatement
  | DotStatement;

export interface ParseOptions {
  /** Included and library files have no title line. Default false (a top-level file: line 1 is its title). */
  isInclude?: boolean;
}

export interface ParseResult {
  /** Top-level statements in source order; subcircuit, `.lib` section and `.if` bodies are nested. */
  statements: Statement[];
  diagnostics: ParseDiagnostic[];
  /** Lines and columns of the text: `lines.range(node.span)`. */
  lines: LineIndex;
}
