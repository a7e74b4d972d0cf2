// The entry point: text in, statements and diagnostics out. Never throws.
//
// 1. The lexer cuts the text into tokens (line-start tokens: title, `*` comments,
//    `+` continuations, `.control` blocks, `.end`).
// 2. Tokens are grouped into logical lines: a line and its `+` continuations are one
//    statement; comment lines between them are statements of their own.
// 3. The field parser reads all element and dot-command lines in one call.
// 4. Each line becomes a statement; blocks (`.subckt`, `.lib`, `.if`) are nested.

import type { IToken } from 'chevrotain';
import type { ParseOptions, ParseResult, Statement } from './ast.js';
import { END_OF_LINE, FieldMaker, readFieldLines, type FieldLine } from './fields.js';
import {
  atLineStart,
  CommentLine,
  Continuation,
  ControlBlock,
  EndAndRest,
  InlineComment,
  netlistLexer,
  Newline,
  Word,
  LeftParen,
  RightParen,
} from './lexer.js';
import { LineIndex } from './positions.js';
import { nestBlocks } from './structure.js';
import { MAX_NESTING, readsFieldsFrom, StatementBuilder, type LineResult, type LogicalLine, type SpanDiagnostic } from './statements.js';

/** What a chunk's tokens group into: a logical line still to read, or a finished statement. */
type Item = LogicalLine | Statement;

export function parse(text: string, options: ParseOptions = {}): ParseResult {
  try {
    return parseUnguarded(typeof text === 'string' ? text : String(text ?? ''), options ?? {});
  } catch (failure) {
    // A bug of ours must not take the editor down: say so at the top of the file.
    const message = failure instanceof Error ? failure.message : String(failure);
    return {
      statements: [],
      lines: new LineIndex(typeof text === 'string' ? text : ''),
      diagnostics: [
        {
          severity: 'error',
          code: 'syntax',
          message: `pnlint could not read this file (internal error: ${message})`,
          range: { start: { line: 0, column: 0, offset: 0 }, end: { line: 0, column: 0, offset: 0 } },
        },
      ],
    };
  }
}

/**
 * The text is read in chunks of about this many characters, cut at the start of a
 * statement, so that the tokens of one chunk are garbage before the next is lexed.
 * (Measured: holding every token of a 10 MB file alive costs more in garbage
 * collection than lexing it.)
 */
const CHUNK_SIZE = 64 * 1024;

function parseUnguarded(text: string, options: ParseOptions): ParseResult {
  const index = new LineIndex(text);
  const maker = new FieldMaker(index);
  const diagnostics: SpanDiagnostic[] = [];
  const builder = new StatementBuilder(maker, diagnostics);
  const results: LineResult[] = [];
  const controlBlocks = findControlBlocks(text);
  let start = 0;
  if (!options.isInclude) {
    start = titleLineEnd(text);
    // A byte-order mark is not part of the title.
    const bom = text.charCodeAt(0) === 0xfeff ? 1 : 0;
    if (start > bom) results.push({ kind: 'title', text: text.slice(bom, start), span: { start: bom, end: start } });
  }
  let ended = false;
  while (start < text.length && !ended) {
    const end = chunkEnd(text, start, CHUNK_SIZE, controlBlocks);
    const tokens = netlistLexer.tokenize(start === 0 && end === text.length ? text : text.slice(start, end)).tokens;
    if (start > 0) for (let at = 0; at < tokens.length; at++) tokens[at]!.startOffset += start;
    const last = tokens[tokens.length - 1];
    ended = last !== undefined && last.tokenType === EndAndRest;
    readChunk(tokens, maker, builder, diagnostics, results);
    start = end;
  }
  const statements = nestBlocks(results, diagnostics);
  diagnostics.sort((a, b) => a.span.start - b.span.start);
  return {
    statements,
    diagnostics: diagnostics.map(({ span, ...rest }) => ({ ...rest, range: index.range(span) })),
    lines: index,
  };
}

function readChunk(tokens: IToken[], maker: FieldMaker, builder: StatementBuilder, diagnostics: SpanDiagnostic[], results: LineResult[]): void {
  // Every element line and most dot commands go through the field parser, in one call per
  // chunk: their tokens, each line ended by an end-of-line token, are its input.
  const fieldInput: IToken[] = [];
  const items = groupLines(tokens, maker, diagnostics, fieldInput);
  const fieldLines = readFieldLines(fieldInput, maker);
  let next = 0;
  for (let at = 0; at < items.length; at++) {
    const item = items[at]!;
    if (!('tokens' in item)) {
      results.push(item);
    } else if (!item.readsFields) {
      results.push(builder.build(item, undefined, undefined));
    } else {
      // The grammar accepts everything; should it ever stop early, the unread lines say so.
      const reading: FieldLine = fieldLines[next++] ?? { fields: [], problem: { message: 'this line could not be read', span: maker.tokenSpan(item.first) } };
      results.push(builder.build(item, reading.fields, reading.problem));
    }
  }
}

/** Where the first line ends: the title, whatever it holds, is not lexed. */
function titleLineEnd(text: string): number {
  const found = /[\r\n]/.exec(text);
  return found ? found.index : text.length;
}

const LINE_BREAK = /\r\n?|\n/g;
const CONTROL_WORD = /\.control(?=[\s;]|$)/gi;
const ENDC_LINE = /^[ \t]*\.endc(?=[\s;]|$)[^\r\n]*/gim;

/** The `.control` … `.endc` blocks of the text, as [start, end) offsets, and the first one not yet passed. */
interface ControlBlocks {
  ranges: [number, number][];
  next: number;
}

/** The `.control` … `.endc` blocks of the text; a chunk never cuts one. */
function findControlBlocks(text: string): ControlBlocks {
  const blocks: [number, number][] = [];
  CONTROL_WORD.lastIndex = 0;
  for (let found = CONTROL_WORD.exec(text); found; found = CONTROL_WORD.exec(text)) {
    if (!atLineStart(text, found.index)) continue;
    ENDC_LINE.lastIndex = found.index;
    const endc = ENDC_LINE.exec(text);
    const end = endc ? endc.index + endc[0].length : text.length;
    blocks.push([found.index, end]);
    CONTROL_WORD.lastIndex = end;
  }
  return { ranges: blocks, next: 0 };
}

/**
 * Where the chunk that starts at `start` ends: at the start of a line that begins a new
 * statement (a letter or a dot command; not `+`, `*`, a comment or a blank line, which may
 * belong to the statement before) and outside any `.control` block.
 */
function chunkEnd(text: string, start: number, size: number, controlBlocks: ControlBlocks): number {
  let from = start + size;
  for (;;) {
    if (from >= text.length) return text.length;
    const boundary = nextStatementStart(text, from);
    // Blocks are in text order and boundaries only move forward: skip the ones behind.
    const blocks = controlBlocks.ranges;
    while (controlBlocks.next < blocks.length && blocks[controlBlocks.next]![1] <= boundary) controlBlocks.next++;
    const inside = blocks[controlBlocks.next];
    if (!inside || inside[0] >= boundary) return boundary;
    from = inside[1];
  }
}

function nextStatementStart(text: string, from: number): number {
  LINE_BREAK.lastIndex = from;
  for (let found = LINE_BREAK.exec(text); found; found = LINE_BREAK.exec(text)) {
    const lineStart = found.index + found[0].length;
    let first = lineStart;
    while (first < text.length && (text.charCodeAt(first) === 32 || text.charCodeAt(first) === 9)) first++;
    const code = text.charCodeAt(first);
    const lower = code | 0x20;
    if ((lower >= 97 && lower <= 122) || code === 46 /* . */) return lineStart;
  }
  return text.length;
}

/**
 * Groups tokens into logical lines and stand-alone statements, in source order. The tokens
 * of the lines that the field parser reads go to `fieldInput`, each line followed by
 * END_OF_LINE.
 */
function groupLines(tokens: IToken[], maker: FieldMaker, diagnostics: SpanDiagnostic[], fieldInput: IToken[]): Item[] {
  const items: Item[] = [];
  let current: LogicalLine | undefined;
  /** Where the current line's tokens begin in `fieldInput`. */
  let inputStart = 0;
  /** A line break was seen since the last token of the current physical line. */
  let afterBreak = true;
  /** The rest of this physical line is skipped (after a `+` with nothing to continue). */
  let skipping = false;
  /** Parenthesis depth in the current statement. */
  let depth = 0;

  const finish = (): void => {
    if (current?.readsFields) {
      // A line nested too deep is not read (the builder says so): its tokens leave the input.
      if (current.tooDeep) {
        fieldInput.length = inputStart;
        current.readsFields = false;
      } else fieldInput.push(END_OF_LINE);
    }
    current = undefined;
  };

  for (let at = 0; at < tokens.length; at++) {
    const token = tokens[at]!;
    const type = token.tokenType;
    if (type === Newline) {
      afterBreak = true;
      continue;
    }
    if (type === CommentLine) {
      // A comment line may stand between a line and its continuation: it does not end the statement.
      items.push({ kind: 'comment', text: token.image.slice(1), span: maker.tokenSpan(token) });
      continue;
    }
    if (type === Continuation) {
      if (current && afterBreak) {
        afterBreak = false;
        skipping = false;
        continue;
      }
      diagnostics.push({
        severity: 'error',
        code: 'syntax',
        message: 'a `+` continuation line with no statement before it to continue',
        span: maker.tokenSpan(token),
      });
      finish();
      afterBreak = false;
      skipping = true;
      continue;
    }
    if (type === InlineComment && (afterBreak || !current)) {
      // A line holding only a `;` or `$` comment reads as a comment line, and like one it
      // may stand between a line and its continuation.
      if (!skipping || afterBreak) items.push({ kind: 'comment', text: token.image.slice(1), span: maker.tokenSpan(token) });
      continue;
    }
    if (afterBreak) {
      afterBreak = false;
      skipping = false;
      finish();
    }
    if (skipping) continue;
    if (type === ControlBlock) {
      items.push(controlStatement(token, maker, diagnostics));
      continue;
    }
    if (type === InlineComment) {
      if (current) {
        current.comment = token;
        current.end = token.startOffset + token.image.length;
      }
      continue;
    }
    if (type === EndAndRest) {
      const word = /^\.end/i.exec(token.image)![0];
      items.push({ kind: 'end', span: { start: token.startOffset, end: token.startOffset + word.length } });
      finish();
      continue;
    }
    if (!current) {
      const readsFields = readsFieldsFrom(token);
      current = { first: token, readsFields, tokens: readsFields ? NO_TOKENS : [], comment: undefined, end: 0, tooDeep: undefined, command: null };
      items.push(current);
      inputStart = fieldInput.length;
      depth = 0;
    }
    if (type === LeftParen) {
      if (++depth > MAX_NESTING) current.tooDeep ??= token;
    } else if (type === RightParen && depth > 0) depth--;
    if (current.readsFields) fieldInput.push(token);
    else current.tokens.push(token);
    current.end = token.startOffset + token.image.length;
  }
  finish();
  return items;
}

/** The `tokens` of every line that the field parser reads: never added to. */
const NO_TOKENS: IToken[] = [];

function controlStatement(token: IToken, maker: FieldMaker, diagnostics: SpanDiagnostic[]): Statement {
  const image = token.image;
  const firstBreak = image.search(/[\r\n]/);
  const lastLineStart = Math.max(image.lastIndexOf('\n'), image.lastIndexOf('\r')) + 1;
  const closed = firstBreak >= 0 && /^[ \t]*\.endc(?=[\s;]|$)/i.test(image.slice(lastLineStart));
  if (!closed) {
    diagnostics.push({
      severity: 'error',
      code: 'syntax',
      message: '`.control` has no `.endc`',
      span: { start: token.startOffset, end: token.startOffset + '.control'.length },
    });
  }
  // The script: the lines between `.control` and `.endc`.
  let script = '';
  if (firstBreak >= 0) {
    const bodyStart = image.charCodeAt(firstBreak) === 13 && image.charCodeAt(firstBreak + 1) === 10 ? firstBreak + 2 : firstBreak + 1;
    script = closed ? image.slice(bodyStart, Math.max(bodyStart, lastLineStart)) : image.slice(bodyStart);
  }
  return { kind: 'control', text: script, span: maker.tokenSpan(token) };
}
