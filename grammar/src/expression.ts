// Expressions inside `{…}` and `'…'`, in `.param` values, `.func` bodies and `.if`
// conditions. Precedence, loosest first: `?:`, `||`, `&&`, comparisons, `+ -`,
// `* / %`, unary `- + !`, power `^`/`**` (chained from the left, as ngspice 39 does:
// 2^3^2 = 64). Numbers take SPICE
// scale factors (`2*1k`, `1meg`), read by the one value reader.

import { createToken, EmbeddedActionsParser, EOF, Lexer, type IToken, type TokenType } from 'chevrotain';
import type { Expr, Span } from './ast.js';
import { readSpiceValue } from './values.js';

const Blank = createToken({ name: 'Blank', pattern: /[ \t\r\n\f\v\uFEFF]+/, group: Lexer.SKIPPED });
const NumberLiteral = createToken({ name: 'NumberLiteral', pattern: /(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?[A-Za-z_]*/ });
const Identifier = createToken({ name: 'Identifier', pattern: /[A-Za-z_@][\w.$#@[\]]*/ });
const Power = createToken({ name: 'Power', pattern: /\*\*|\^/ });
const Times = createToken({ name: 'Times', pattern: /[*/%]/ });
const Plus = createToken({ name: 'Plus', pattern: /[+-]/ });
const Comparison = createToken({ name: 'Comparison', pattern: /==|!=|<=|>=|<|>/ });
const Not = createToken({ name: 'Not', pattern: '!' });
const And = createToken({ name: 'And', pattern: '&&' });
const Or = createToken({ name: 'Or', pattern: '||' });
const Question = createToken({ name: 'Question', pattern: '?' });
const Colon = createToken({ name: 'Colon', pattern: ':' });
const Open = createToken({ name: 'Open', pattern: '(' });
const Close = createToken({ name: 'Close', pattern: ')' });
const Separator = createToken({ name: 'Separator', pattern: ',' });

// Order matters where one operator is the prefix of another (`**` before `*`, `!=` before `!`).
const expressionTokens: TokenType[] = [
  Blank,
  NumberLiteral,
  Identifier,
  Power,
  Times,
  Plus,
  Comparison,
  Not,
  And,
  Or,
  Question,
  Colon,
  Open,
  Close,
  Separator,
];

const EXPRESSION_LEXER_CONFIG = { positionTracking: 'onlyOffset', ensureOptimizations: true } as const;
// Chevrotain's definition checks are a start-up cost; validateExpressionGrammar runs them in a test.
const expressionLexer = new Lexer(expressionTokens, { ...EXPRESSION_LEXER_CONFIG, skipValidations: true });

type BinaryOp = Extract<Expr, { kind: 'binary' }>['op'];

/** How tightly each binary operator binds, loosest first; all of them group from the left. */
const BINDING = new Map<TokenType, number>([
  [Or, 1],
  [And, 2],
  [Comparison, 3],
  [Plus, 4],
  [Times, 5],
]);

/**
 * One rule reads a chain of binary operators at every precedence level (the operands and
 * operators are gathered, then grouped by precedence), rather than one rule per level: a
 * lone number went through eight rule calls before. Actions test RECORDING_PHASE instead of
 * allocating ACTION closures, and an OPTION or MANY whose only way in is one token type is
 * entered only when that token is next (while the grammar is recorded, always).
 */
class ExpressionParser extends EmbeddedActionsParser {
  /** Maps the lexed slice's offsets into the whole text. */
  base = 0;
  // The operands and operators of the binary chains being read, each chain above where it
  // began (a chain may hold a parenthesised one); counts rather than `length = 0`, which would
  // give up the lists' storage.
  private readonly chainOperands: Expr[] = [];
  private chainOperandCount = 0;
  private readonly chainOperators: IToken[] = [];
  private chainOperatorCount = 0;
  /** Scratch stacks of groupChain, which reads no input and so never nests. */
  private readonly groupedValues: Expr[] = [];
  private readonly pendingOperators: IToken[] = [];

  constructor(skipValidations: boolean) {
    super(expressionTokens, { recoveryEnabled: false, maxLookahead: 1, skipValidations });
    this.performSelfAnalysis();
  }

  override reset(): void {
    super.reset();
    // A chain left half-read by a syntax error must not linger into the next expression.
    this.chainOperandCount = 0;
    this.chainOperatorCount = 0;
  }

  private next(type: TokenType): boolean {
    return this.RECORDING_PHASE || this.LA(1).tokenType === type;
  }

  private span(start: number, end: number): Span {
    return { start: this.base + start, end: this.base + end };
  }

  private tokenSpan(token: IToken): Span {
    return this.span(token.startOffset, token.startOffset + token.image.length);
  }

  private join(left: Expr, right: Expr): Span {
    return { start: left.span.start, end: right.span.end };
  }

  whole = this.RULE('whole', (): Expr => {
    const expr = this.SUBRULE(this.ternary);
    this.CONSUME(EOF);
    return expr;
  });

  ternary = this.RULE('ternary', (): Expr => {
    const condition = this.SUBRULE(this.binary);
    if (!this.next(Question)) return condition;
    let result = condition;
    this.OPTION(() => {
      this.CONSUME(Question);
      const whenTrue = this.SUBRULE1(this.ternary);
      this.CONSUME(Colon);
      const whenFalse = this.SUBRULE2(this.ternary);
      if (this.RECORDING_PHASE) return;
      result = { kind: 'ternary', condition, whenTrue, whenFalse, span: this.join(condition, whenFalse) };
    });
    return result;
  });

  private readonly operatorAlternatives = [Or, And, Comparison, Plus, Times].map((type) => ({ ALT: () => this.CONSUME(type) }));

  private readonly chainLink = (): void => {
    const operator = this.OR(this.operatorAlternatives);
    const operand = this.SUBRULE1(this.unary);
    if (this.RECORDING_PHASE) return;
    this.chainOperators[this.chainOperatorCount++] = operator;
    this.chainOperands[this.chainOperandCount++] = operand;
  };

  /** `a || b && c < d + e * f`: unary operands joined by binary operators. */
  binary = this.RULE('binary', (): Expr => {
    const first = this.SUBRULE(this.unary);
    if (!this.RECORDING_PHASE && !BINDING.has(this.LA(1).tokenType)) return first;
    const operandBase = this.chainOperandCount;
    const operatorBase = this.chainOperatorCount;
    if (!this.RECORDING_PHASE) this.chainOperands[this.chainOperandCount++] = first;
    this.MANY(this.chainLink);
    if (this.RECORDING_PHASE) return first;
    const chain = this.groupChain(operandBase, operatorBase);
    this.chainOperandCount = operandBase;
    this.chainOperatorCount = operatorBase;
    return chain;
  });

  private binaryNode(operator: IToken, left: Expr, right: Expr): Expr {
    return { kind: 'binary', op: operator.image as BinaryOp, left, right, span: this.join(left, right) };
  }

  /** Groups the chain gathered above the bases by precedence, each level from the left (operator-precedence parsing). */
  private groupChain(operandBase: number, operatorBase: number): Expr {
    const operands = this.chainOperands;
    const operators = this.chainOperators;
    const operatorCount = this.chainOperatorCount - operatorBase;
    if (operatorCount === 1) return this.binaryNode(operators[operatorBase]!, operands[operandBase]!, operands[operandBase + 1]!);
    const values = this.groupedValues;
    const pending = this.pendingOperators;
    let valueCount = 0;
    let pendingCount = 0;
    values[valueCount++] = operands[operandBase]!;
    for (let at = 0; at <= operatorCount; at++) {
      // Past the last operator, everything still pending is grouped.
      const binding = at < operatorCount ? BINDING.get(operators[operatorBase + at]!.tokenType)! : 0;
      while (pendingCount > 0 && BINDING.get(pending[pendingCount - 1]!.tokenType)! >= binding) {
        const right = values[--valueCount]!;
        const left = values[--valueCount]!;
        values[valueCount++] = this.binaryNode(pending[--pendingCount]!, left, right);
      }
      if (at === operatorCount) break;
      pending[pendingCount++] = operators[operatorBase + at]!;
      values[valueCount++] = operands[operandBase + 1 + at]!;
    }
    return values[0]!;
  }

  private readonly prefixAlternatives = [{ ALT: () => this.CONSUME(Plus) }, { ALT: () => this.CONSUME(Not) }];

  private prefixed(op: IToken, operand: Expr): Expr {
    if (this.RECORDING_PHASE) return operand;
    return { kind: 'unary', op: op.image as '-' | '+' | '!', operand, span: { start: this.base + op.startOffset, end: operand.span.end } };
  }

  private readonly unaryAlternatives = [
    {
      ALT: (): Expr => {
        const op = this.OR1(this.prefixAlternatives);
        return this.prefixed(op, this.SUBRULE(this.unary));
      },
    },
    { ALT: (): Expr => this.SUBRULE(this.power) },
  ];

  unary = this.RULE('unary', (): Expr => this.OR(this.unaryAlternatives));

  // Binds tighter than unary minus, and chains from the left as ngspice 39 evaluates it:
  // -2^2 = -(2^2) = -4, 2^3^2 = (2^3)^2 = 64, 2^-1 = 0.5.
  power = this.RULE('power', (): Expr => {
    let result = this.SUBRULE(this.primary);
    if (!this.next(Power)) return result;
    this.MANY(() => {
      const op = this.CONSUME(Power);
      const exponent = this.SUBRULE(this.exponent);
      if (this.RECORDING_PHASE) return;
      result = { kind: 'binary', op: op.image as '^' | '**', left: result, right: exponent, span: this.join(result, exponent) };
    });
    return result;
  });

  private readonly exponentAlternatives = [
    {
      ALT: (): Expr => {
        const op = this.OR1(this.prefixAlternatives);
        return this.prefixed(op, this.SUBRULE(this.exponent));
      },
    },
    { ALT: (): Expr => this.SUBRULE(this.primary) },
  ];

  /** The right side of `^`: a primary, perhaps signed (`2^-1`). */
  exponent = this.RULE('exponent', (): Expr => this.OR(this.exponentAlternatives));

  private readonly primaryAlternatives = [
    {
      ALT: (): Expr => {
        const token = this.CONSUME(NumberLiteral);
        if (this.RECORDING_PHASE) return undefined as unknown as Expr;
        return { kind: 'num', value: readSpiceValue(token.image) ?? Number.NaN, text: token.image, span: this.tokenSpan(token) };
      },
    },
    {
      ALT: (): Expr => {
        const name = this.CONSUME(Identifier);
        if (!this.next(Open)) return { kind: 'ident', name: name.image, span: this.tokenSpan(name) };
        let call: { args: Expr[]; close: IToken } | undefined;
        this.OPTION(() => {
          this.CONSUME(Open);
          const args: Expr[] = [];
          this.MANY_SEP({
            SEP: Separator,
            DEF: () => {
              const arg = this.SUBRULE(this.ternary);
              if (!this.RECORDING_PHASE) args.push(arg);
            },
          });
          const close = this.CONSUME(Close);
          call = { args, close };
        });
        if (this.RECORDING_PHASE) return undefined as unknown as Expr;
        if (!call) return { kind: 'ident', name: name.image, span: this.tokenSpan(name) };
        return { kind: 'call', name: name.image, args: call.args, span: this.span(name.startOffset, call.close.startOffset + 1) };
      },
    },
    {
      ALT: (): Expr => {
        this.CONSUME1(Open);
        const inner = this.SUBRULE1(this.ternary);
        this.CONSUME1(Close);
        return inner;
      },
    },
  ];

  primary = this.RULE('primary', (): Expr => this.OR(this.primaryAlternatives));
}

let parser: ExpressionParser | undefined;

/** Builds the expression lexer and parser with Chevrotain's checks on (they throw on a faulty definition); for a test. */
export function validateExpressionGrammar(): void {
  new Lexer(expressionTokens, { ...EXPRESSION_LEXER_CONFIG, skipValidations: false });
  new ExpressionParser(false);
}

export interface ExpressionProblem {
  message: string;
  span: Span;
}

export interface ExpressionReading {
  expr: Expr | undefined;
  problem: ExpressionProblem | undefined;
}

/**
 * `+` continuation markers and `*` comment lines inside a multi-line expression are not
 * part of it; they become blanks so that offsets still match the text.
 */
function blankContinuations(source: string): string {
  if (!/[\r\n]/.test(source)) return source;
  return source.replace(/([\r\n][ \t]*)(\+|\*[^\r\n]*)/g, (_all, before: string, marker: string) => before + ' '.repeat(marker.length));
}

/**
 * Parentheses and prefix operators nested deeper than this are not read: the parser recurses
 * once per level, and no netlist needs more than a handful (common practice, no source).
 */
const MAX_EXPRESSION_NESTING = 100;

/** The token at which nesting passes the limit, if it does. A run of prefix operators counts as nesting. */
function tooDeeplyNested(tokens: IToken[]): IToken | undefined {
  let depth = 0;
  let prefixRun = 0;
  let questions = 0;
  let previous: TokenType | undefined;
  for (const token of tokens) {
    const type = token.tokenType;
    if (type === Open) {
      if (++depth > MAX_EXPRESSION_NESTING) return token;
    } else if (type === Close) depth = Math.max(0, depth - 1);
    // A + - ! after an operator or at the start is a prefix.
    const prefix = (type === Plus || type === Not) && (previous === undefined || (previous !== NumberLiteral && previous !== Identifier && previous !== Close));
    prefixRun = prefix ? prefixRun + 1 : 0;
    // Each `?` nests the rest of the expression inside a ternary.
    if (type === Question) questions++;
    if (prefixRun + depth + questions > MAX_EXPRESSION_NESTING) return token;
    previous = type;
  }
  return undefined;
}

/** The last `(` left open, if any: where to point when an expression ends too early. */
function unclosedParenthesis(tokens: IToken[]): IToken | undefined {
  const open: IToken[] = [];
  for (const token of tokens) {
    if (token.tokenType === Open) open.push(token);
    else if (token.tokenType === Close) open.pop();
  }
  return open[open.length - 1];
}

/** Parses `source`, which is written at offset `base` in the text. Never throws. */
export function readExpression(source: string, base: number): ExpressionReading {
  const lexed = expressionLexer.tokenize(blankContinuations(source));
  if (lexed.errors.length > 0) {
    const error = lexed.errors[0]!;
    const character = source.slice(error.offset, error.offset + Math.max(1, error.length));
    return {
      expr: undefined,
      problem: {
        message: `unexpected \`${character}\` in the expression`,
        span: { start: base + error.offset, end: base + error.offset + Math.max(1, error.length) },
      },
    };
  }
  if (lexed.tokens.length === 0) {
    return { expr: undefined, problem: { message: 'the expression is empty', span: { start: base, end: base + source.length } } };
  }
  const tooDeep = tooDeeplyNested(lexed.tokens);
  if (tooDeep) {
    const at = base + tooDeep.startOffset;
    return { expr: undefined, problem: { message: `the expression nests more than ${MAX_EXPRESSION_NESTING} deep`, span: { start: at, end: at + tooDeep.image.length } } };
  }
  parser ??= new ExpressionParser(true);
  parser.base = base;
  parser.input = lexed.tokens;
  let expr: Expr | undefined;
  try {
    expr = parser.whole();
  } catch (failure) {
    // Only a stack overflow can get here, on input the nesting check did not foresee.
    if (!(failure instanceof RangeError)) throw failure;
    return { expr: undefined, problem: { message: 'the expression is too deeply nested to read', span: { start: base, end: base + source.length } } };
  }
  const error = parser.errors[0];
  if (!error || expr === undefined) {
    if (!error && expr !== undefined) return { expr, problem: undefined };
  }
  const token = error?.token;
  if (!token || token.tokenType === EOF || Number.isNaN(token.startOffset)) {
    const open = unclosedParenthesis(lexed.tokens);
    if (open) {
      const at = base + open.startOffset;
      return { expr: undefined, problem: { message: 'this `(` is not closed', span: { start: at, end: at + 1 } } };
    }
    const end = base + source.length;
    return { expr: undefined, problem: { message: 'the expression ends too early', span: { start: end, end: end } } };
  }
  return {
    expr: undefined,
    problem: {
      message: `unexpected \`${token.image}\` in the expression`,
      span: { start: base + token.startOffset, end: base + token.startOffset + token.image.length },
    },
  };
}
