// From one logical line (its tokens, continuation lines joined) to a statement.
// Element lines and most dot commands arrive with their generic fields already
// read by the field parser; `.param`, `.func`, `.if`, `.include`, `.lib` and
// `.title` are read here from their tokens, since their text is not a field list.

import type { IToken } from 'chevrotain';
import type {
  AssignField,
  ParseDiagnostic,
  DotStatement,
  ExpressionField,
  Field,
  InlineComment,
  Span,
  Statement,
  WordField,
} from './ast.js';
import type { FieldMaker } from './fields.js';
import { BraceExpression, Comma, Equals, LeftParen, QuotedString, QuoteExpression, RightParen, Word } from './lexer.js';

/** A statement's words across its `+` lines, and its inline comment. */
export interface LogicalLine {
  /** The statement's first token. */
  first: IToken;
  /**
   * True when the field parser reads the line (element lines and most dot commands): its
   * tokens then go straight into the parser's input, and `tokens` stays empty.
   */
  readsFields: boolean;
  /** The tokens, for the lines built from their tokens (`.param`, `.func`, B sources, …). */
  tokens: IToken[];
  comment: IToken | undefined;
  /** End offset of the last token, the comment included. */
  end: number;
  /** The `(` at which parentheses nest deeper than MAX_NESTING, if they do. */
  tooDeep: IToken | undefined;
  /** The line's dot command once known (see dotCommandOf); null until then. */
  command: string | undefined | null;
}

/**
 * Parentheses nested deeper than this are not read (a diagnostic says so): the readers
 * recurse once per level, and no netlist needs more than a handful (common practice, no source).
 */
export const MAX_NESTING = 100;

/** A problem found while reading, at a span; the parser turns its span into a range at the end. */
export interface SpanDiagnostic extends Omit<ParseDiagnostic, 'range'> {
  span: Span;
}

/** Lines that close or split a block; the structure pass consumes them. */
export interface BlockMarker {
  kind: 'marker';
  command: 'ends' | 'endl' | 'elseif' | 'else' | 'endif';
  span: Span;
  commandSpan: Span;
  name: WordField | undefined;
  condition: ExpressionField | undefined;
}

export type LineResult = Statement | BlockMarker | undefined;

/** Dot commands kept as a DotStatement, with their aliases folded: written form → command. */
const DOT_COMMANDS: Readonly<Record<string, string>> = {
  options: 'options',
  option: 'options',
  opt: 'options',
  temp: 'temp',
  ic: 'ic',
  nodeset: 'nodeset',
  op: 'op',
  dc: 'dc',
  ac: 'ac',
  tran: 'tran',
  noise: 'noise',
  tf: 'tf',
  sens: 'sens',
  pz: 'pz',
  disto: 'disto',
  four: 'four',
  fourier: 'four',
  meas: 'meas',
  measure: 'meas',
  save: 'save',
  print: 'print',
  plot: 'plot',
  probe: 'probe',
  width: 'width',
  csparam: 'csparam',
  title: 'title',
  sp: 'sp',
  pss: 'pss',
};

/** Commands read from their tokens rather than as a list of fields. */
const RAW_COMMANDS = new Set(['param', 'func', 'if', 'elseif', 'include', 'inc', 'lib', 'title']);

/** The lower-cased dot command that `first` starts (`model` for `.MODEL`), or undefined for an element line. */
function dotCommandStartedBy(first: IToken): string | undefined {
  if (first.tokenType !== Word || first.image.charCodeAt(0) !== 46) return undefined;
  return first.image.slice(1).toLowerCase();
}

/** The lower-cased dot command of a line, or undefined for an element line. */
export function dotCommandOf(line: LogicalLine): string | undefined {
  if (line.command === null) line.command = dotCommandStartedBy(line.first);
  return line.command;
}

/**
 * True when the line that `first` starts goes through the field parser (unless its
 * parentheses nest too deep: see LogicalLine.tooDeep).
 */
export function readsFieldsFrom(first: IToken): boolean {
  const command = dotCommandStartedBy(first);
  if (command !== undefined) return !RAW_COMMANDS.has(command);
  return startsWithLetter(first) && !isBehaviouralSource(first);
}

/**
 * A B element (behavioural source): `V=`/`I=` take an expression that ngspice 39 reads
 * without braces too (`B1 a 0 V=(v(b)==1) ? 3 : 0`), so its line is read like `.param`.
 */
function isBehaviouralSource(first: IToken): boolean {
  return (first.image.charCodeAt(0) | 0x20) === 98 /* b */;
}

function startsWithLetter(first: IToken): boolean {
  if (first.tokenType !== Word) return false;
  const code = first.image.charCodeAt(0) | 0x20;
  return code >= 97 && code <= 122;
}

const PARAMETER_NAME = /^[A-Za-z_][\w.]*$/;
/** A lone literal that may stay a number in `.param a = 1k` (no operators in it). */
const LONE_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?[A-Za-z0-9_.]*$/;

export class StatementBuilder {
  constructor(
    private readonly maker: FieldMaker,
    private readonly diagnostics: SpanDiagnostic[],
  ) {}

  private get text(): string {
    return this.maker.index.text;
  }

  private error(message: string, span: Span): void {
    this.diagnostics.push({ severity: 'error', code: 'syntax', message, span });
  }

  private inlineComment(line: LogicalLine): InlineComment | undefined {
    const token = line.comment;
    if (!token) return undefined;
    return { text: token.image.slice(1), span: this.maker.tokenSpan(token) };
  }

  /** Builds the statement of one line; `fields` is the field parser's reading when it read the line. */
  build(line: LogicalLine, fields: Field[] | undefined, fieldProblem: { message: string; span: Span } | undefined): LineResult {
    const first = line.first;
    const span = this.lineSpan(line);
    this.maker.problem = fieldProblem;
    const command = dotCommandOf(line);
    let result: LineResult;
    if (line.tooDeep) {
      this.maker.report(`parentheses nested more than ${MAX_NESTING} deep: this line is not read`, this.maker.tokenSpan(line.tooDeep));
      result = undefined;
    } else if (command === undefined) {
      if (!startsWithLetter(first)) {
        this.maker.report('a netlist line starts with an element name (a letter), a dot command, `*` or `+`', this.maker.tokenSpan(first));
        result = undefined;
      } else if (isBehaviouralSource(first)) {
        result = this.behaviouralSource(line, span);
      } else {
        result = this.element(fields!, span);
      }
    } else {
      result = this.dotCommand(command, line, fields, span);
    }
    const problem = this.maker.problem as { message: string; span: Span } | undefined;
    this.maker.problem = undefined;
    if (problem) this.error(problem.message, problem.span);
    if (result && result.kind !== 'marker') {
      const comment = this.inlineComment(line);
      if (comment) result.comment = comment;
      if (problem) result.incomplete = true;
    }
    return result;
  }

  /** The statement's span: from its first token to its last (its inline comment included). */
  private lineSpan(line: LogicalLine): Span {
    return { start: line.first.startOffset, end: line.end };
  }

  private element(fields: Field[], span: Span): Statement | undefined {
    const name = fields[0];
    if (!name || name.kind !== 'word') {
      const at = name ? name.span : span;
      this.maker.report('an element line starts with the element name', at);
      return undefined;
    }
    fields.shift(); // the array is ours; shifting spares a copy per line
    return { kind: 'element', name, letter: name.text[0]!.toUpperCase(), fields, span };
  }

  /** `Bname n+ n- V=expr [tc1=…]`: two nodes, then `key=value` pairs whose values run up to the next `key=`. */
  private behaviouralSource(line: LogicalLine, span: Span): Statement | undefined {
    const [nameToken, ...rest] = line.tokens;
    const name = this.maker.word(nameToken!);
    const fields: Field[] = [];
    let at = 0;
    while (at < rest.length && at < 2 && rest[at]!.tokenType === Word && rest[at + 1]?.tokenType !== Equals) {
      fields.push(this.maker.wordOrNumber(rest[at]!));
      at++;
    }
    fields.push(...this.paramAssigns(rest, at));
    return { kind: 'element', name, letter: 'B', fields, span };
  }

  private asWord(field: Field | undefined): WordField | undefined {
    if (!field) return undefined;
    if (field.kind === 'word') return field;
    if (field.kind === 'number') return { kind: 'word', text: field.text, span: field.span };
    return undefined;
  }

  private dotCommand(command: string, line: LogicalLine, fields: Field[] | undefined, span: Span): LineResult {
    const commandToken = line.first;
    const commandSpan = this.maker.tokenSpan(commandToken);
    const rest = fields ? fields.slice(1) : [];
    switch (command) {
      case 'model':
        return this.model(rest, span, commandSpan);
      case 'subckt':
        return this.subckt(rest, span, commandSpan);
      case 'ends':
      case 'endl':
        return { kind: 'marker', command, span, commandSpan, name: this.asWord(rest[0]), condition: undefined };
      case 'else':
      case 'endif':
        return { kind: 'marker', command, span, commandSpan, name: undefined, condition: undefined };
      case 'endc':
        this.maker.report('`.endc` without a `.control` before it', commandSpan);
        return undefined;
      case 'global':
        return { kind: 'global', nodes: this.words(rest, '`.global` lists node names'), span };
      case 'param':
        return { kind: 'param', assigns: this.paramAssigns(line.tokens, 1), span };
      case 'func':
        return this.func(line.tokens, span, commandSpan);
      case 'if':
      case 'elseif': {
        const condition = this.condition(line.tokens, commandSpan, command);
        if (command === 'elseif') return { kind: 'marker', command, span, commandSpan, name: undefined, condition };
        return { kind: 'if', branches: [{ condition, body: [], span }], endif: undefined, span };
      }
      case 'include':
      case 'inc':
        return this.include(line.tokens, span, commandSpan);
      case 'lib':
        return this.lib(line.tokens, span, commandSpan);
      case 'title': {
        const titleFields: Field[] = [];
        const words = line.tokens.slice(1);
        if (words.length > 0) {
          const start = words[0]!.startOffset;
          const last = words[words.length - 1]!;
          const end = last.startOffset + last.image.length;
          titleFields.push({ kind: 'word', text: this.text.slice(start, end), span: { start, end } });
        }
        return { kind: 'dot', command: 'title', commandSpan, known: true, fields: titleFields, span };
      }
      default: {
        const known = DOT_COMMANDS[command];
        const statement: DotStatement = { kind: 'dot', command: known ?? command, commandSpan, known: known !== undefined, fields: rest, span };
        if (known === undefined) {
          // Unknown to pnlint, perhaps known to some engine: its words are not judged.
          this.maker.problem = undefined;
          this.diagnostics.push({
            severity: 'warning',
            code: 'unknown-command',
            message: `unknown dot command \`${commandToken.image}\`: pnlint does not read it`,
            span: commandSpan,
          });
        }
        return statement;
      }
    }
  }

  private words(fields: Field[], message: string): WordField[] {
    const words: WordField[] = [];
    for (const field of fields) {
      const word = this.asWord(field);
      if (word) words.push(word);
      else this.maker.report(message, field.span);
    }
    return words;
  }

  private model(rest: Field[], span: Span, commandSpan: Span): Statement | undefined {
    const name = this.asWord(rest[0]);
    const typeField = rest[1];
    let type: WordField | undefined;
    const params: AssignField[] = [];
    const extra: Field[] = [];
    const take = (field: Field): void => {
      if (field.kind === 'assign') params.push(field);
      else if (field.kind === 'group' && field.name === undefined) field.items.forEach(take);
      else extra.push(field);
    };
    if (typeField?.kind === 'group' && typeField.name) {
      type = typeField.name;
      typeField.items.forEach(take);
    } else {
      type = this.asWord(typeField);
    }
    if (!name || !type) {
      this.maker.report('`.model` needs a name and a type, e.g. `.model DLED D(IS=1e-18 N=2)`', rest[0]?.span ?? commandSpan);
      return undefined;
    }
    rest.slice(2).forEach(take);
    return { kind: 'model', name, type, params, extra, span };
  }

  private subckt(rest: Field[], span: Span, commandSpan: Span): Statement | undefined {
    const name = this.asWord(rest[0]);
    if (!name) {
      this.maker.report('`.subckt` needs a name', rest[0]?.span ?? commandSpan);
      return undefined;
    }
    const ports: WordField[] = [];
    const params: AssignField[] = [];
    let inParams = false;
    for (const field of rest.slice(1)) {
      if (field.kind === 'assign') {
        inParams = true;
        params.push(this.withoutParamsPrefix(field));
      } else if (field.kind === 'word' && /^params:$/i.test(field.text)) {
        inParams = true;
      } else if (!inParams && this.asWord(field)) {
        ports.push(this.asWord(field)!);
      } else {
        this.maker.report(inParams ? 'expected `name=default` after `params:`' : 'expected a port name', field.span);
      }
    }
    return { kind: 'subckt', name, ports, params, body: [], ends: undefined, span };
  }

  /** `params:r=1k` written without a space: the key is `r`. */
  private withoutParamsPrefix(field: AssignField): AssignField {
    const match = /^params:/i.exec(field.key.text);
    if (!match || field.key.text.length === match[0].length) return field;
    const start = field.key.span.start + match[0].length;
    const key: WordField = { kind: 'word', text: field.key.text.slice(match[0].length), span: { start: start, end: field.key.span.end } };
    return { ...field, key };
  }

  private tokenEnd(token: IToken): number {
    return token.startOffset + token.image.length;
  }

  /** A value written as `tokens`: a lone number, a delimited expression, a string, or an expression. */
  private valueOf(tokens: IToken[]): Field {
    const first = tokens[0]!;
    const last = tokens[tokens.length - 1]!;
    if (tokens.length === 1) {
      if (first.tokenType === Word && LONE_NUMBER.test(first.image)) return this.maker.wordOrNumber(first);
      if (first.tokenType === BraceExpression || first.tokenType === QuoteExpression) return this.maker.delimitedExpression(first);
      if (first.tokenType === QuotedString) return this.maker.word(first);
    }
    return this.bareExpression(first.startOffset, this.tokenEnd(last));
  }

  private bareExpression(start: number, end: number): ExpressionField {
    return this.maker.expression(this.text.slice(start, end), start, 0, 0, { start, end });
  }

  /** `a = 2*b  c={x}` from `tokens[from]` on: the value runs up to the next `name =`. */
  private paramAssigns(tokens: IToken[], from: number): AssignField[] {
    const assigns: AssignField[] = [];
    const startsAssign = (at: number): boolean =>
      tokens[at]?.tokenType === Word &&
      PARAMETER_NAME.test(tokens[at]!.image) &&
      tokens[at + 1]?.tokenType === Equals &&
      tokens[at + 2]?.tokenType !== Equals;
    let at = from;
    while (at < tokens.length) {
      const key = tokens[at]!;
      if (key.tokenType === Comma) {
        at++;
        continue;
      }
      if (key.tokenType !== Word) {
        this.maker.report('expected a parameter name', this.maker.tokenSpan(key));
        break;
      }
      const equals = tokens[at + 1];
      if (equals?.tokenType !== Equals) {
        this.maker.report(`expected \`=\` and a value after \`${key.image}\``, this.maker.tokenSpan(key));
        break;
      }
      const valueStart = at + 2;
      let valueEnd = valueStart;
      while (valueEnd < tokens.length && !(valueEnd > valueStart && startsAssign(valueEnd))) valueEnd++;
      let last = valueEnd;
      while (last > valueStart && tokens[last - 1]!.tokenType === Comma) last--;
      if (last === valueStart) {
        this.maker.report('a value is missing after this `=`', this.maker.tokenSpan(equals));
        break;
      }
      const value = this.valueOf(tokens.slice(valueStart, last));
      const keyField = this.maker.word(key);
      assigns.push({ kind: 'assign', key: keyField, value, span: { start: keyField.span.start, end: value.span.end } });
      at = valueEnd;
    }
    return assigns;
  }

  private func(tokens: IToken[], span: Span, commandSpan: Span): Statement | undefined {
    const nameToken = tokens[1];
    if (nameToken?.tokenType !== Word) {
      this.maker.report('`.func` needs a name, e.g. `.func half(x) {x/2}`', nameToken ? this.maker.tokenSpan(nameToken) : commandSpan);
      return undefined;
    }
    const name = this.maker.word(nameToken);
    const args: WordField[] = [];
    let at = 2;
    const open = tokens[at];
    if (open?.tokenType !== LeftParen) {
      this.maker.report('expected `(` and the argument names after the function name', name.span);
      return { kind: 'func', name, args, body: undefined, span };
    }
    at++;
    while (at < tokens.length && tokens[at]!.tokenType !== RightParen) {
      const token = tokens[at]!;
      if (token.tokenType === Word) args.push(this.maker.word(token));
      else if (token.tokenType !== Comma) {
        this.maker.report('expected an argument name', this.maker.tokenSpan(token));
        return { kind: 'func', name, args, body: undefined, span };
      }
      at++;
    }
    if (at >= tokens.length) {
      this.maker.report('this `(` is not closed', this.maker.tokenSpan(open));
      return { kind: 'func', name, args, body: undefined, span };
    }
    at++;
    if (tokens[at]?.tokenType === Equals) at++;
    const bodyTokens = tokens.slice(at);
    if (bodyTokens.length === 0) {
      this.maker.report('`.func` needs a body, e.g. `{x/2}`', name.span);
      return { kind: 'func', name, args, body: undefined, span };
    }
    const body = this.valueOf(bodyTokens);
    const expression: ExpressionField =
      body.kind === 'expression' ? body : this.bareExpression(bodyTokens[0]!.startOffset, this.tokenEnd(bodyTokens[bodyTokens.length - 1]!));
    return { kind: 'func', name, args, body: expression, span };
  }

  /** `.if(cond)` / `.elseif (cond)`: the condition between the parentheses (or the rest of the line). */
  private condition(tokens: IToken[], commandSpan: Span, command: string): ExpressionField | undefined {
    const words = tokens.slice(1);
    if (words.length === 0) {
      this.maker.report(`\`.${command}\` needs a condition, e.g. \`.${command} (corner == 1)\``, commandSpan);
      return undefined;
    }
    const first = words[0]!;
    const last = words[words.length - 1]!;
    if (first.tokenType === LeftParen && last.tokenType === RightParen && words.length >= 2) {
      if (words.length === 2) {
        this.maker.report('the condition is empty', { start: first.startOffset, end: this.tokenEnd(last) });
        return undefined;
      }
      return this.bareExpression(words[1]!.startOffset, this.tokenEnd(words[words.length - 2]!));
    }
    if (words.length === 1 && (first.tokenType === BraceExpression || first.tokenType === QuoteExpression)) {
      return this.maker.delimitedExpression(first);
    }
    if (first.tokenType === LeftParen) {
      this.maker.report('this `(` is not closed', this.maker.tokenSpan(first));
      return undefined;
    }
    return this.bareExpression(first.startOffset, this.tokenEnd(last));
  }

  /** A path: `"quoted"`, `'quoted'`, or the words as written. */
  private path(words: IToken[]): { path: string; pathSpan: Span; used: number } | undefined {
    const first = words[0];
    if (!first) return undefined;
    if (first.tokenType === QuotedString || first.tokenType === QuoteExpression) {
      const quote = first.image[0]!;
      const closed = first.image.length >= 2 && first.image.endsWith(quote);
      if (!closed) this.maker.report(`this \`${quote}\` is not closed on its line`, { start: first.startOffset, end: first.startOffset + 1 });
      const start = first.startOffset + 1;
      const end = this.tokenEnd(first) - (closed ? 1 : 0);
      return { path: this.text.slice(start, end), pathSpan: { start, end }, used: 1 };
    }
    return { path: first.image, pathSpan: this.maker.tokenSpan(first), used: 1 };
  }

  private include(tokens: IToken[], span: Span, commandSpan: Span): Statement | undefined {
    const words = tokens.slice(1);
    const first = words[0];
    if (!first) {
      this.maker.report('`.include` needs a file path', commandSpan);
      return undefined;
    }
    if (first.tokenType === QuotedString || first.tokenType === QuoteExpression) {
      const { path, pathSpan } = this.path(words)!;
      return { kind: 'include', path, pathSpan, span };
    }
    // A bare path is everything written after the command, spaces included.
    const start = first.startOffset;
    const end = this.tokenEnd(words[words.length - 1]!);
    return { kind: 'include', path: this.text.slice(start, end), pathSpan: { start, end }, span };
  }

  private lib(tokens: IToken[], span: Span, commandSpan: Span): Statement | undefined {
    const words = tokens.slice(1);
    if (words.length === 0) {
      this.maker.report('`.lib` needs a file path and a section name, or a section name', commandSpan);
      return undefined;
    }
    const quoted = words[0]!.tokenType === QuotedString || words[0]!.tokenType === QuoteExpression;
    if (words.length === 1 && !quoted) {
      return { kind: 'libSection', name: this.maker.word(words[0]!), body: [], endl: undefined, span };
    }
    const { path, pathSpan, used } = this.path(words)!;
    const sectionToken = words[used];
    if (!sectionToken || sectionToken.tokenType !== Word) {
      this.maker.report('`.lib` with a file path needs the section name after it', sectionToken ? this.maker.tokenSpan(sectionToken) : pathSpan);
      return undefined;
    }
    return { kind: 'libReference', path, pathSpan, section: this.maker.word(sectionToken), span };
  }
}
