// The field parser: reads the words of element lines and dot commands into generic
// fields (word, number, expression, key=value, group). One Chevrotain parser, built
// once; all such lines of a file go through it in a single call, each ended by a
// Newline token, and the typed AST is built directly in its actions (no CST pass).
// The grammar accepts every token sequence: what is wrong is reported per line by
// the actions, so that one bad line never disturbs the next.

import { createTokenInstance, EmbeddedActionsParser, type IToken, type TokenType } from 'chevrotain';
import type { ExpressionField, Field, GroupField, Span, WordField, NumberField, AssignField } from './ast.js';
import { readExpression, type ExpressionProblem } from './expression.js';
import {
  BraceExpression,
  Comma,
  Equals,
  LeftParen,
  Newline,
  QuoteExpression,
  QuotedString,
  RightParen,
  StrayBrace,
  tokenTypes,
  Word,
} from './lexer.js';
import type { LineIndex } from './positions.js';
import { readSpiceValue } from './values.js';

export interface FieldLine {
  fields: Field[];
  /** The first syntax problem on the line, if any. */
  problem: ExpressionProblem | undefined;
}

/** Helpers shared with the statement builder, which reads some lines from their tokens. */
export class FieldMaker {
  /** The first syntax problem on the current line. */
  problem: ExpressionProblem | undefined;

  constructor(readonly index: LineIndex) {}

  report(message: string, span: Span): void {
    this.problem ??= { message, span };
  }

  tokenSpan(token: IToken): Span {
    return { start: token.startOffset, end: token.startOffset + token.image.length };
  }

  word(token: IToken): WordField {
    return { kind: 'word', text: token.image, span: this.tokenSpan(token) };
  }

  /** A word that begins like a number is a number (`4k7`, `1uF`, `-5`); its text is kept. */
  wordOrNumber(token: IToken): WordField | NumberField {
    const text = token.image;
    if (beginsLikeNumber(text)) {
      const value = readSpiceValue(text);
      if (value !== undefined) return { kind: 'number', text, value, span: this.tokenSpan(token) };
    }
    return { kind: 'word', text, span: this.tokenSpan(token) };
  }

  /** A `{…}` or `'…'` token. `text` is as written, with its delimiters; the span covers them. */
  delimitedExpression(token: IToken): ExpressionField {
    const text = token.image;
    const span = this.tokenSpan(token);
    const close = text.charCodeAt(0) === 123 ? '}' : "'";
    if (text.length < 2 || !text.endsWith(close)) {
      this.report(`this \`${text[0]}\` is not closed on its line`, { start: token.startOffset, end: token.startOffset + 1 });
      return { kind: 'expression', text, expr: undefined, span };
    }
    return this.expression(text, token.startOffset, 1, 1, span);
  }

  /** An expression written at `start` in the text; `skipStart`/`skipEnd` characters are delimiters. */
  expression(text: string, start: number, skipStart: number, skipEnd: number, span: Span): ExpressionField {
    const inner = text.slice(skipStart, text.length - skipEnd);
    const reading = readExpression(inner, start + skipStart);
    if (reading.problem) this.report(reading.problem.message, reading.problem.span);
    return { kind: 'expression', text, expr: reading.expr, span };
  }

  /**
   * `key=value`: the key is a word, a group such as `v(out)` in `.ic v(out)=1`, or an
   * expression as in `TABLE {v(a)} = (0,0) (1,1)`; a group or expression key is kept whole too.
   */
  assign(key: Field, value: Field): AssignField {
    const span = { start: key.span.start, end: value.span.end };
    if (key.kind === 'word') return { kind: 'assign', key, value, span };
    const text = this.index.text.slice(key.span.start, key.span.end);
    const word: WordField = { kind: 'word', text, span: key.span };
    if (key.kind === 'group') return { kind: 'assign', key: word, keyGroup: key, value, span };
    if (key.kind === 'expression') return { kind: 'assign', key: word, keyExpression: key, value, span };
    return { kind: 'assign', key: word, value, span };
  }
}

/** A word followed by one of these is not a plain word: it names a group or is a key. */
function takesTail(next: TokenType): boolean {
  return next === LeftParen || next === Equals;
}

function beginsLikeNumber(text: string): boolean {
  let code = text.charCodeAt(0);
  let at = 0;
  if (code === 43 || code === 45) code = text.charCodeAt(++at); // + -
  if (code === 46) code = text.charCodeAt(++at); // .
  return code >= 48 && code <= 57;
}

/**
 * The alternatives and repetition bodies are built once, as fields, and the actions test
 * RECORDING_PHASE instead of wrapping themselves in ACTION closures: a closure per token
 * was most of the garbage that a large file made. An OPTION or MANY whose only way in is
 * one token type is entered only when that token is next (`LA(1)`): the same decision that
 * its own lookahead makes, without the call. While the grammar is being recorded every
 * production is visited, so the grammar of record is unchanged.
 */
class FieldParser extends EmbeddedActionsParser {
  maker: FieldMaker | undefined;
  lines: FieldLine[] = [];
  // Scratch lists, reused for every line and group: fields are gathered here and copied to an
  // array of exact size when their line or group ends (an array grown by push keeps spare
  // room, and every line's array is kept). Counts rather than `length = 0`, which would give
  // up the scratch list's storage.
  /** The fields of the line being read: the first `lineFieldCount` entries. */
  private readonly lineFields: Field[] = [];
  private lineFieldCount = 0;
  /** The items of the groups being read, innermost last: each group's begin where it opened. */
  private readonly groupFields: Field[] = [];
  private groupFieldCount = 0;
  /** The `,`-separated rest of a list value (`ic=1,2`); the repetition that fills it does not nest. */
  private listRest: Field[] | undefined;

  constructor(skipValidations: boolean) {
    // LL(1): every decision is made on the next token (the list GATE looks further by hand).
    super(tokenTypes, { recoveryEnabled: false, maxLookahead: 1, skipValidations });
    this.performSelfAnalysis();
  }

  override reset(): void {
    super.reset();
    this.lineFieldCount = 0;
    this.groupFieldCount = 0;
    this.listRest = undefined;
  }

  private endLine(): void {
    const maker = this.maker!;
    this.lines.push({ fields: this.lineFields.slice(0, this.lineFieldCount), problem: maker.problem });
    this.lineFieldCount = 0;
    maker.problem = undefined;
  }

  private stray(token: IToken, message: string): void {
    if (!this.RECORDING_PHASE) this.maker!.report(message, this.maker!.tokenSpan(token));
  }

  /** True when the next token is of `type`, or while the grammar is recorded (every path is visited then). */
  private next(type: TokenType): boolean {
    return this.RECORDING_PHASE || this.LA(1).tokenType === type;
  }

  private readonly strayEquals = {
    ALT: () => this.stray(this.CONSUME(Equals), 'a `=` needs a name before it'),
  };
  private readonly strayBrace = {
    ALT: () => this.stray(this.CONSUME(StrayBrace), 'this `}` closes nothing'),
  };

  /**
   * The three forms of a field, as alternatives of the rule that reads them (the line rule
   * and the group rule each hold them, rather than calling a `field` rule: a rule call per
   * word was a measurable part of the time). `add` receives each field read.
   * Occurrence indices: OPTION1–4, SUBRULE–SUBRULE2, unused elsewhere in those two rules.
   */
  private fieldForms(add: (field: Field) => void): { ALT: () => void }[] {
    return [
      {
        // The most frequent field: a word, perhaps naming a group, perhaps the key of `key=value`.
        ALT: () => {
          const token = this.CONSUME(Word);
          const group = this.next(LeftParen) ? this.OPTION1(this.groupAfterWord) : undefined;
          const value = this.next(Equals) ? this.OPTION2(this.assignmentAfterWord) : undefined;
          if (this.RECORDING_PHASE) return;
          const maker = this.maker!;
          add(wordWithTails(token, group, value, maker));
          // The words after it that take no group and no value (most of an element line,
          // `R1 in out 4.7k`) are consumed here, each as the next round of the repetition
          // around this choice would take it, without that round's two lookahead decisions.
          while (this.LA(1).tokenType === Word && !takesTail(this.LA(2).tokenType)) add(maker.wordOrNumber(this.CONSUME(Word)));
        },
      },
      {
        // `{v(a)} = (0,0) (1,1)`: ngspice's TABLE form takes an expression as the key.
        ALT: () => {
          const field = this.SUBRULE(this.simpleValue);
          const value = this.next(Equals) ? this.OPTION3(this.assignmentAfterValue) : undefined;
          if (!this.RECORDING_PHASE) add(value ? this.maker!.assign(field, value) : field);
        },
      },
      {
        ALT: () => {
          const group = this.SUBRULE2(this.group);
          const value = this.next(Equals) ? this.OPTION4(this.assignmentAfterGroup) : undefined;
          if (!this.RECORDING_PHASE) add(value ? this.maker!.assign(group, value) : group);
        },
      },
    ];
  }

  private readonly groupAfterWord = (): GroupField => this.SUBRULE1(this.group);
  private readonly assignmentAfterWord = (): Field => this.SUBRULE(this.assignedValue);
  private readonly assignmentAfterValue = (): Field => this.SUBRULE1(this.assignedValue);
  private readonly assignmentAfterGroup = (): Field => this.SUBRULE2(this.assignedValue);

  private readonly lineAlternatives = [
    ...this.fieldForms((field) => {
      this.lineFields[this.lineFieldCount++] = field;
    }),
    {
      ALT: () => {
        this.CONSUME(Newline);
        if (!this.RECORDING_PHASE) this.endLine();
      },
    },
    { ALT: () => { this.CONSUME(Comma); } },
    this.strayEquals,
    this.strayBrace,
    { ALT: () => this.stray(this.CONSUME(RightParen), 'this `)` closes nothing') },
  ];
  private readonly lineItem = (): void => {
    this.OR(this.lineAlternatives);
  };

  netlist = this.RULE('netlist', () => {
    this.MANY(this.lineItem);
  });

  private readonly simpleAlternatives = [
    { ALT: () => this.expressionToken(this.CONSUME(BraceExpression)) },
    { ALT: () => this.expressionToken(this.CONSUME(QuoteExpression)) },
    {
      ALT: (): Field => {
        const token = this.CONSUME(QuotedString);
        return this.RECORDING_PHASE ? (undefined as unknown as Field) : this.maker!.word(token);
      },
    },
  ];

  private expressionToken(token: IToken): Field {
    return this.RECORDING_PHASE ? (undefined as unknown as Field) : this.maker!.delimitedExpression(token);
  }

  /** An expression or a quoted string: fields that take no name and no group. */
  simpleValue = this.RULE('simpleValue', (): Field => this.OR(this.simpleAlternatives));

  private readonly groupAlternatives = [
    ...this.fieldForms((field) => {
      this.groupFields[this.groupFieldCount++] = field;
    }),
    { ALT: () => { this.CONSUME(Comma); } },
    this.strayEquals,
    this.strayBrace,
  ];
  private readonly groupItem = (): void => {
    this.OR(this.groupAlternatives);
  };
  private readonly closeParen = (): IToken => this.CONSUME(RightParen);

  /** `( items )`; a missing `)` is reported at the `(`. The name, if any, is set by the caller. */
  group = this.RULE('group', (): GroupField => {
    const open = this.CONSUME(LeftParen);
    const begin = this.groupFieldCount;
    this.MANY(this.groupItem);
    const close = this.next(RightParen) ? this.OPTION(this.closeParen) : undefined;
    if (this.RECORDING_PHASE) return undefined as unknown as GroupField;
    const items = this.groupFields.slice(begin, this.groupFieldCount);
    this.groupFieldCount = begin;
    const maker = this.maker!;
    let end = open.startOffset + 1;
    if (close) end = close.startOffset + 1;
    else {
      const last = items[items.length - 1];
      if (last) end = last.span.end;
      maker.report('this `(` is not closed on its line', maker.tokenSpan(open));
    }
    return { kind: 'group', name: undefined, items, span: { start: open.startOffset, end } };
  });

  private readonly valueAlternatives = [
    {
      ALT: (): Field => {
        const token = this.CONSUME(Word);
        const group = this.next(LeftParen) ? this.OPTION2(this.groupAfterValueWord) : undefined;
        if (this.RECORDING_PHASE) return undefined as unknown as Field;
        return group ? named(group, token, this.maker!) : this.maker!.wordOrNumber(token);
      },
    },
    { ALT: () => this.SUBRULE(this.simpleValue) },
    { ALT: () => this.SUBRULE1(this.group) },
  ];
  private readonly value = (): Field => this.OR(this.valueAlternatives);
  private readonly groupAfterValueWord = (): GroupField => this.SUBRULE(this.group);

  private readonly listRepetition = {
    GATE: () => this.LA(1).tokenType === Comma && this.LA(2).tokenType === Word && this.LA(3).tokenType !== Equals,
    DEF: () => {
      this.CONSUME(Comma);
      const token = this.CONSUME1(Word);
      if (!this.RECORDING_PHASE) (this.listRest ??= []).push(this.maker!.wordOrNumber(token));
    },
  };

  /**
   * `= value`: a word, a named or bare group, an expression or a string. A list such as
   * `ic=1,2` becomes an unnamed group; a comma followed by `key=` ends the value.
   */
  assignedValue = this.RULE('assignedValue', (): Field => {
    const equals = this.CONSUME(Equals);
    const first = this.OPTION(this.value);
    this.listRest = undefined;
    if (this.next(Comma)) this.MANY(this.listRepetition);
    if (this.RECORDING_PHASE) return undefined as unknown as Field;
    const maker = this.maker!;
    const rest = this.listRest;
    this.listRest = undefined;
    let value: Field;
    if (first) value = first;
    else {
      maker.report('a value is missing after this `=`', maker.tokenSpan(equals));
      const after = equals.startOffset + 1;
      value = { kind: 'word', text: '', span: { start: after, end: after } };
    }
    if (!rest) return value;
    const items = [value, ...rest];
    return { kind: 'group', name: undefined, items, span: { start: value.span.start, end: items[items.length - 1]!.span.end } };
  });
}

/**
 * A word, a named group `SIN(…)`, and either of them as the key of `key=value`. A word
 * followed by `(` names the group with or without white space between (`SIN (0 1 1k)`).
 */
function wordWithTails(token: IToken, group: GroupField | undefined, value: Field | undefined, maker: FieldMaker): Field {
  const key = group ? named(group, token, maker) : undefined;
  if (value) return maker.assign(key ?? maker.word(token), value);
  return key ?? maker.wordOrNumber(token);
}

/** A group written right after a word: the word names it, and its span starts there. */
function named(group: GroupField, token: IToken, maker: FieldMaker): GroupField {
  const name = maker.word(token);
  group.name = name;
  // The group's span was made by the group rule and is shared with nothing yet: it is moved
  // to start at the name rather than replaced.
  group.span.start = name.span.start;
  return group;
}

let parser: FieldParser | undefined;

/**
 * Builds the field parser with Chevrotain's grammar validations on, which throws if the grammar
 * is ambiguous or ill-formed. The parser in use skips them (they are a start-up cost, and the
 * grammar does not change at run time); a test calls this instead.
 */
export function validateFieldGrammar(): void {
  new FieldParser(false);
}

/** Ends each line of the field parser's input. */
export const END_OF_LINE = createTokenInstance(Newline, '', Number.NaN, Number.NaN, Number.NaN, Number.NaN, Number.NaN, Number.NaN);

/**
 * Reads lines into fields, in one parser call: `input` holds each line's tokens followed by
 * END_OF_LINE. One FieldLine per line read; fewer only if the parser stopped early.
 */
export function readFieldLines(input: IToken[], maker: FieldMaker): FieldLine[] {
  parser ??= new FieldParser(true);
  parser.maker = maker;
  parser.lines = [];
  parser.input = input;
  parser.netlist();
  const result = parser.lines;
  parser.lines = [];
  parser.maker = undefined;
  parser.input = [];
  return result;
}
