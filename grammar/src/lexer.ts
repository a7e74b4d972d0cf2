// The netlist lexer: one Chevrotain lexer, built once and reused.
// SPICE is line-oriented, so several tokens only exist at the start of a line
// (`*` comment lines, `+` continuations, `.control` blocks, `.end`); they are
// custom patterns that look back over white space to the previous line break.

import { createToken, Lexer, type CustomPatternMatcherReturn, type TokenType } from 'chevrotain';

function isLineBreak(code: number): boolean {
  return code === 10 || code === 13;
}

function isBlank(code: number): boolean {
  return code === 32 || code === 9 || code === 12 || code === 11 || code === 0xfeff;
}

/** True when only white space stands between the previous line break (or the text's start) and `offset`. */
export function atLineStart(text: string, offset: number): boolean {
  let index = offset - 1;
  while (index >= 0 && isBlank(text.charCodeAt(index))) index--;
  return index < 0 || isLineBreak(text.charCodeAt(index));
}

function endOfLine(text: string, offset: number): number {
  let index = offset;
  while (index < text.length && !isLineBreak(text.charCodeAt(index))) index++;
  return index;
}

function matched(text: string, start: number, end: number): CustomPatternMatcherReturn {
  return [text.slice(start, end)] as unknown as CustomPatternMatcherReturn;
}

/** True when the word at `offset` (case-insensitive, starting with `.`) is `command` and ends there. */
function isCommandAt(text: string, offset: number, command: string): boolean {
  if (text.length - offset < command.length) return false;
  for (let index = 0; index < command.length; index++) {
    if ((text.charCodeAt(offset + index) | 0x20) !== (command.charCodeAt(index) | 0x20)) return false;
  }
  const next = text.charCodeAt(offset + command.length);
  // A command word ends at white space, a line break, an inline comment or the text's end.
  return Number.isNaN(next) || isBlank(next) || isLineBreak(next) || next === 59 /* ; */;
}

/**
 * Where the line after the line break at `offset` starts its continuation `+`, or -1.
 * Used by expressions that run on across `+` lines.
 */
function continuationAfter(text: string, offset: number): number {
  let index = offset;
  if (text.charCodeAt(index) === 13) index++;
  if (text.charCodeAt(index) === 10) index++;
  while (index < text.length && isBlank(text.charCodeAt(index))) index++;
  return text.charCodeAt(index) === 43 /* + */ ? index : -1;
}

/**
 * An expression delimited by `open`/`close` (`{…}` nests, `'…'` does not). It may run on across
 * `+` continuation lines. When it is not closed on its line, the token ends at the line's end
 * (or at a `;` comment) and the parser reports it at the opening character.
 */
function delimitedExpression(text: string, offset: number, open: number, close: number): CustomPatternMatcherReturn {
  let depth = 0;
  let index = offset;
  while (index < text.length) {
    const code = text.charCodeAt(index);
    if (code === close && (depth === 1 || open === close) && index > offset) return matched(text, offset, index + 1);
    if (code === open && open !== close) depth++;
    else if (code === close) depth--;
    else if (code === 59 /* ; */) return matched(text, offset, index);
    else if (isLineBreak(code)) {
      const plus = continuationAfter(text, index);
      if (plus < 0) return matched(text, offset, index);
      index = plus + 1;
      continue;
    }
    index++;
  }
  return matched(text, offset, index);
}

export const Newline = createToken({ name: 'Newline', pattern: /\r\n|\r|\n/, line_breaks: true });

/** `.control` … `.endc`: an opaque script. Matched whole, so that nothing inside is read as circuit. */
export const ControlBlock = createToken({
  name: 'ControlBlock',
  line_breaks: true,
  start_chars_hint: ['.'],
  pattern: {
    exec(text: string, offset: number) {
      if (!isCommandAt(text, offset, '.control') || !atLineStart(text, offset)) return null;
      const endc = /^[ \t]*\.endc(?=[\s;]|$)/gim;
      endc.lastIndex = offset;
      const found = endc.exec(text);
      if (!found) return matched(text, offset, text.length);
      return matched(text, offset, endOfLine(text, found.index + found[0].length));
    },
  },
});

/** `.end` and everything after it, which SPICE engines ignore. */
export const EndAndRest = createToken({
  name: 'EndAndRest',
  line_breaks: true,
  start_chars_hint: ['.'],
  pattern: {
    exec(text: string, offset: number) {
      if (!isCommandAt(text, offset, '.end') || !atLineStart(text, offset)) return null;
      return matched(text, offset, text.length);
    },
  },
});

/** A `*` comment line (first non-blank character `*`), up to the line break. */
export const CommentLine = createToken({
  name: 'CommentLine',
  start_chars_hint: ['*'],
  pattern: {
    exec(text: string, offset: number) {
      if (text.charCodeAt(offset) !== 42 || !atLineStart(text, offset)) return null;
      return matched(text, offset, endOfLine(text, offset));
    },
  },
});

/** `+` as the first non-blank character of a line: the line continues the previous one. */
export const Continuation = createToken({
  name: 'Continuation',
  start_chars_hint: ['+'],
  pattern: {
    exec(text: string, offset: number) {
      if (text.charCodeAt(offset) !== 43 || !atLineStart(text, offset)) return null;
      return matched(text, offset, offset + 1);
    },
  },
});

/** `;` anywhere, or `$` after white space (or at a line's start): the rest of the line is a comment. */
export const InlineComment = createToken({
  name: 'InlineComment',
  start_chars_hint: [';', '$'],
  pattern: {
    exec(text: string, offset: number) {
      const code = text.charCodeAt(offset);
      if (code === 59) return matched(text, offset, endOfLine(text, offset));
      if (code !== 36) return null;
      const before = offset === 0 ? 10 : text.charCodeAt(offset - 1);
      if (!isBlank(before) && !isLineBreak(before)) return null;
      return matched(text, offset, endOfLine(text, offset));
    },
  },
});

export const WhiteSpace = createToken({ name: 'WhiteSpace', pattern: /[ \t\f\v\uFEFF]+/, group: Lexer.SKIPPED });

export const BraceExpression = createToken({
  name: 'BraceExpression',
  line_breaks: true,
  start_chars_hint: ['{'],
  pattern: {
    exec(text: string, offset: number) {
      if (text.charCodeAt(offset) !== 123) return null;
      return delimitedExpression(text, offset, 123, 125);
    },
  },
});

export const QuoteExpression = createToken({
  name: 'QuoteExpression',
  line_breaks: true,
  start_chars_hint: ["'"],
  pattern: {
    exec(text: string, offset: number) {
      if (text.charCodeAt(offset) !== 39) return null;
      return delimitedExpression(text, offset, 39, 39);
    },
  },
});

/** A `"…"` string, for file paths; unterminated runs to the line's end. */
export const QuotedString = createToken({ name: 'QuotedString', pattern: /"[^"\r\n]*"?/ });
export const Equals = createToken({ name: 'Equals', pattern: '=' });
export const LeftParen = createToken({ name: 'LeftParen', pattern: '(' });
export const RightParen = createToken({ name: 'RightParen', pattern: ')' });
export const Comma = createToken({ name: 'Comma', pattern: ',' });
/** A `}` with no `{` before it on its line. */
export const StrayBrace = createToken({ name: 'StrayBrace', pattern: '}' });

/**
 * A word: node, element or model name, number, keyword. Anything but white space and
 * `= ( ) , ; { } ' "`. Written as positive ranges so that the lexer's first-character
 * optimisation applies (it cannot use a negated set).
 */
export const Word = createToken({
  name: 'Word',
  pattern: /[\x00-\x08\x0e-\x1f!#-&*+\-./0-9:<>-z|~\x7f-\ufefe\uff00-\uffff]+/,
});

export const tokenTypes: TokenType[] = [
  ControlBlock,
  EndAndRest,
  CommentLine,
  Continuation,
  Newline,
  WhiteSpace,
  InlineComment,
  BraceExpression,
  QuoteExpression,
  QuotedString,
  Equals,
  LeftParen,
  RightParen,
  Comma,
  StrayBrace,
  Word,
];

// One mode: the title line of a top-level file is cut off before lexing (see parser.ts),
// which spares the lexer its per-token mode handling. Positions are offsets only; lines and
// columns come from the line index (positions.ts).
const LEXER_CONFIG = { positionTracking: 'onlyOffset', ensureOptimizations: true } as const;

/** The lexer in use skips Chevrotain's definition checks, a start-up cost; validateLexer runs them in a test. */
export const netlistLexer = new Lexer(tokenTypes, { ...LEXER_CONFIG, skipValidations: true });

/** Builds the lexer with Chevrotain's definition checks on; throws if the token definitions are faulty. */
export function validateLexer(): void {
  new Lexer(tokenTypes, { ...LEXER_CONFIG, skipValidations: false });
}
