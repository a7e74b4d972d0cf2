// The field parser: reads the words of element lines and dot commands into generic
// fields (word, number, expression, key=value, group). One Chevrotain parser, built
// once; all such lines of a file go through it in a single call, each ended by a
// Newline token, and the typed AST is built directly in its actions (no CST pass).
// The grammar accepts every token sequence: what is wrong is reported per line by
// the actions, so that one bad line never disturbs the next.

import { createTokenInstance, EmbeddedActionsParser, type IToken } from 'chevrotain';
import type { ExpressionField, Field, GroupField, Range, WordField, NumberField, AssignField } from './ast.js';
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
import { readSpiceNumber } from './values.js';

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

  report(message: string, range: Range): void {
    this.problem ??= { message, range };
  }

  tokenRange(token: IToken): Range {
    return this.index.range(token.startOffset, token.startOffset + token.image.length);
  }

  word(token: IToken): WordField {
    return { kind: 'word', text: token.image, range: this.tokenRange(token) };
  }

  /** A word that begins like a number is a number (`4k7`, `1uF`, `-5`); its text is kept. */
  wordOrNumber(token: IToken): WordField | NumberField {
    const text = token.image;
    if (beginsLikeNumber(text)) {
      const reading = readSpiceNumber(text);
      if (reading) return { kind: 'number', text, value: reading.value, range: this.tokenRange(token) };
    }
    return { kind: 'word', text, range: this.tokenRange(token) };
  }

  /** A `{…}` or `'…'` token. `text` is as written, with its delimiters; the range covers them. */
  delimitedExpression(token: IToken): ExpressionField {
    const text = token.image;
    const range = this.tokenRange(token);
    const close = text.charCodeAt(0) === 123 ? '}' : "'";
    if (text.length < 2 || !text.endsWith(close)) {
      const opening = this.index.range(token.startOffset, token.startOffset + 1);
      this.report(`this \`${text[0]}\` is not closed on its line`, opening);
      return { kind: 'expression', text, expr: undefined, range };
    }
    return this.expression(text, token.startOffset, 1, 1, range);
  }

  /** An expression written at `start` in the text; `skipStart`/`skipEnd` characters are delimiters. */
  expression(text: string, start: number, skipStart: number, skipEnd: number, range: Range): ExpressionField {
    const inner = text.slice(skipStart, text.length - skipEnd);
    const reading = readExpression(inner, start + skipStart, this.index);
    if (reading.problem) this.report(reading.problem.message, reading.problem.range);
    return { kind: 'expression', text, expr: reading.expr, range };
  }

  /** `key=value`: the key is a word, or a group such as `v(out)` in `.ic v(out)=1`. */
  assign(key: WordField | GroupField, value: Field): AssignField {
    const range = { start: key.range.start, end: value.range.end };
    if (key.kind === 'word') return { kind: 'assign', key, value, range };
    const text = this.index.text.slice(key.range.start.offset, key.range.end.offset);
    return { kind: 'assign', key: { kind: 'word', text, range: key.range }, keyGroup: key, value, range };
  }
}

function beginsLikeNumber(text: string): boolean {
  let code = text.charCodeAt(0);
  let at = 0;
  if (code === 43 || code === 45) code = text.charCodeAt(++at); // + -
  if (code === 46) code = text.charCodeAt(++at); // .
  return code >= 48 && code <= 57;
}

class FieldParser extends EmbeddedActionsParser {
  maker: FieldMaker | undefined;
  lines: FieldLine[] = [];
  private current: Field[] = [];

  constructor() {
    super(tokenTypes, { recoveryEnabled: false, maxLookahead: 3, skipValidations: false });
    this.performSelfAnalysis();
  }

  private endLine(): void {
    const maker = this.maker!;
    this.lines.push({ fields: this.current, problem: maker.problem });
    this.current = [];
    maker.problem = undefined;
  }

  private stray(token: IToken, message: string): void {
    this.maker!.report(message, this.maker!.tokenRange(token));
  }

  netlist = this.RULE('netlist', () => {
    this.MANY(() => {
      this.OR([
        {
          ALT: () => {
            const field = this.SUBRULE(this.field);
            this.ACTION(() => this.current.push(field));
          },
        },
        { ALT: () => { this.CONSUME(Newline); this.ACTION(() => this.endLine()); } },
        { ALT: () => { this.CONSUME(Comma); } },
        ...this.strays(0, false),
      ]);
    });
  });

  /** Tokens that can stand nowhere: each is reported, and reading goes on. Inside a group, `)` closes it. */
  private strays(index: number, insideGroup: boolean) {
    const strays = [
      { ALT: () => { const token = this.consume(index, Equals); this.ACTION(() => this.stray(token, 'a `=` needs a name before it')); } },
      { ALT: () => { const token = this.consume(index, StrayBrace); this.ACTION(() => this.stray(token, 'this `}` closes nothing')); } },
    ];
    if (!insideGroup) {
      strays.push({ ALT: () => { const token = this.consume(index, RightParen); this.ACTION(() => this.stray(token, 'this `)` closes nothing')); } });
    }
    return strays;
  }

  field = this.RULE('field', (): Field => {
    return this.OR([
      { ALT: () => this.SUBRULE(this.wordField) },
      { ALT: () => this.SUBRULE(this.simpleValue) },
      {
        ALT: () => {
          const group = this.SUBRULE(this.group, { ARGS: [undefined] });
          let result: Field = group;
          this.OPTION(() => {
            const equals = this.CONSUME(Equals);
            const value = this.SUBRULE(this.assignedValue, { ARGS: [equals] });
            result = this.ACTION(() => this.maker!.assign(group, value));
          });
          return result;
        },
      },
    ]);
  });

  /** A word, a named group `SIN(…)`, and either of them as the key of `key=value`. */
  wordField = this.RULE('wordField', (): Field => {
    const token = this.CONSUME(Word);
    let result: Field | undefined;
    this.OPTION(() => {
      const name = this.ACTION(() => this.maker!.word(token));
      result = this.SUBRULE(this.group, { ARGS: [name] });
    });
    this.OPTION1(() => {
      const equals = this.CONSUME(Equals);
      const value = this.SUBRULE(this.assignedValue, { ARGS: [equals] });
      result = this.ACTION(() => {
        const key = result?.kind === 'group' ? result : this.maker!.word(token);
        return this.maker!.assign(key, value);
      });
    });
    return this.ACTION(() => result ?? this.maker!.wordOrNumber(token));
  });

  /** An expression or a quoted string: fields that take no name and no group. */
  simpleValue = this.RULE('simpleValue', (): Field => {
    return this.OR([
      { ALT: () => { const token = this.CONSUME(BraceExpression); return this.ACTION(() => this.maker!.delimitedExpression(token)); } },
      { ALT: () => { const token = this.CONSUME(QuoteExpression); return this.ACTION(() => this.maker!.delimitedExpression(token)); } },
      { ALT: () => { const token = this.CONSUME(QuotedString); return this.ACTION(() => this.maker!.word(token)); } },
    ]);
  });

  /** `( items )`; a missing `)` is reported at the `(`. */
  group = this.RULE('group', (name: WordField | undefined): GroupField => {
    const open = this.CONSUME(LeftParen);
    const items: Field[] = [];
    this.MANY(() => {
      this.OR([
        {
          ALT: () => {
            const item = this.SUBRULE(this.field);
            this.ACTION(() => items.push(item));
          },
        },
        { ALT: () => { this.CONSUME(Comma); } },
        ...this.strays(1, true),
      ]);
    });
    let end = open.startOffset + 1;
    this.OR1([
      { ALT: () => { const close = this.CONSUME(RightParen); end = close.startOffset + 1; } },
      {
        ALT: () => {
          this.ACTION(() => {
            const last = items[items.length - 1];
            if (last) end = last.range.end.offset;
            this.stray(open, 'this `(` is not closed on its line');
          });
        },
      },
    ]);
    return this.ACTION(() => {
      const start = name ? name.range.start.offset : open.startOffset;
      return { kind: 'group', name, items, range: this.maker!.index.range(start, end) } satisfies GroupField;
    });
  });

  /**
   * The value after `=`: a word, a named or bare group, an expression or a string. A list
   * such as `ic=1,2` becomes an unnamed group; a comma followed by `key=` ends the value.
   */
  assignedValue = this.RULE('assignedValue', (equals: IToken): Field => {
    let first: Field | undefined;
    this.OR([
      {
        ALT: () => {
          const token = this.CONSUME(Word);
          first = this.ACTION(() => this.maker!.wordOrNumber(token));
          this.OPTION(() => {
            const name = this.ACTION(() => this.maker!.word(token));
            first = this.SUBRULE(this.group, { ARGS: [name] });
          });
        },
      },
      { ALT: () => { first = this.SUBRULE(this.simpleValue); } },
      { ALT: () => { first = this.SUBRULE1(this.group, { ARGS: [undefined] }); } },
      {
        // Nothing after `=`.
        ALT: () => {
          this.ACTION(() => {
            this.stray(equals, 'a value is missing after this `=`');
            first = { kind: 'word', text: '', range: this.maker!.index.range(equals.startOffset + 1, equals.startOffset + 1) };
          });
        },
      },
    ]);
    const list: Field[] | undefined = [];
    this.MANY({
      GATE: () => this.LA(1).tokenType === Comma && startsValue(this.LA(2)) && this.LA(3).tokenType !== Equals,
      DEF: () => {
        this.CONSUME(Comma);
        const token = this.CONSUME1(Word);
        this.ACTION(() => list.push(this.maker!.wordOrNumber(token)));
      },
    });
    return this.ACTION(() => {
      if (list.length === 0) return first!;
      const items = [first!, ...list];
      const range = { start: first!.range.start, end: items[items.length - 1]!.range.end };
      return { kind: 'group', name: undefined, items, range } satisfies GroupField;
    });
  });
}

function startsValue(token: IToken): boolean {
  return token.tokenType === Word;
}

let parser: FieldParser | undefined;
const endOfLine = createTokenInstance(Newline, '', Number.NaN, Number.NaN, Number.NaN, Number.NaN, Number.NaN, Number.NaN);

/** Reads each line (a list of tokens) into fields, in one parser call. */
export function readFieldLines(lines: readonly (readonly IToken[])[], maker: FieldMaker): FieldLine[] {
  const input: IToken[] = [];
  for (const line of lines) {
    for (const token of line) input.push(token);
    input.push(endOfLine);
  }
  parser ??= new FieldParser();
  parser.maker = maker;
  parser.lines = [];
  parser.input = input;
  parser.netlist();
  const result = parser.lines;
  parser.lines = [];
  parser.maker = undefined;
  parser.input = [];
  // The grammar accepts everything; should it ever stop early, the unread lines say so.
  while (result.length < lines.length) {
    const line = lines[result.length]!;
    const first = line[0];
    const range = first ? maker.tokenRange(first) : maker.index.range(0, 0);
    result.push({ fields: [], problem: { message: 'this line could not be read', range } });
  }
  return result;
}
