// The entry point: text in, statements and diagnostics out. Never throws.
//
// 1. The lexer cuts the text into tokens (line-start tokens: title, `*` comments,
//    `+` continuations, `.control` blocks, `.end`).
// 2. Tokens are grouped into logical lines: a line and its `+` continuations are one
//    statement; comment lines between them are statements of their own.
// 3. The field parser reads all element and dot-command lines in one call.
// 4. Each line becomes a statement; blocks (`.subckt`, `.lib`, `.if`) are nested.

import type { IToken } from 'chevrotain';
import type { ParseDiagnostic, ParseOptions, ParseResult, Statement } from './ast.js';
import { FieldMaker, readFieldLines, type FieldLine } from './fields.js';
import {
  CommentLine,
  Continuation,
  ControlBlock,
  EndAndRest,
  InlineComment,
  MAIN_MODE,
  netlistLexer,
  Newline,
  Title,
  TITLE_MODE,
  TitleNewline,
} from './lexer.js';
import { LineIndex } from './positions.js';
import { nestBlocks } from './structure.js';
import { needsFields, StatementBuilder, type LineResult, type LogicalLine } from './statements.js';

type Item = { line: LogicalLine } | { statement: Statement };

export function parse(text: string, options: ParseOptions = {}): ParseResult {
  try {
    return parseUnguarded(typeof text === 'string' ? text : String(text ?? ''), options ?? {});
  } catch (failure) {
    // A bug of ours must not take the editor down: say so at the top of the file.
    const message = failure instanceof Error ? failure.message : String(failure);
    return {
      statements: [],
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

function parseUnguarded(text: string, options: ParseOptions): ParseResult {
  const index = new LineIndex(text);
  const maker = new FieldMaker(index);
  const diagnostics: ParseDiagnostic[] = [];
  const lexed = netlistLexer.tokenize(text, options.isInclude ? MAIN_MODE : TITLE_MODE);
  const items = groupLines(lexed.tokens, maker, diagnostics);

  const fieldTokens: IToken[][] = [];
  for (const item of items) if ('line' in item && needsFields(item.line)) fieldTokens.push(item.line.tokens);
  const fieldLines = readFieldLines(fieldTokens, maker);

  const builder = new StatementBuilder(maker, diagnostics);
  const results: LineResult[] = [];
  let next = 0;
  for (const item of items) {
    if ('statement' in item) {
      results.push(item.statement);
      continue;
    }
    const reading: FieldLine | undefined = needsFields(item.line) ? fieldLines[next++] : undefined;
    results.push(builder.build(item.line, reading?.fields, reading?.problem));
  }
  const statements = nestBlocks(results, diagnostics);
  diagnostics.sort((a, b) => a.range.start.offset - b.range.start.offset);
  return { statements, diagnostics };
}

/** Groups tokens into logical lines and stand-alone statements, in source order. */
function groupLines(tokens: IToken[], maker: FieldMaker, diagnostics: ParseDiagnostic[]): Item[] {
  const items: Item[] = [];
  let current: LogicalLine | undefined;
  /** A line break was seen since the last token of the current physical line. */
  let afterBreak = true;
  /** The rest of this physical line is skipped (after a `+` with nothing to continue). */
  let skipping = false;

  const finish = (): void => {
    current = undefined;
  };

  for (const token of tokens) {
    const type = token.tokenType;
    if (type === Newline || type === TitleNewline) {
      afterBreak = true;
      continue;
    }
    if (type === CommentLine) {
      // A comment line may stand between a line and its continuation: it does not end the statement.
      items.push({ statement: { kind: 'comment', text: token.image.slice(1), range: maker.tokenRange(token) } });
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
        range: maker.tokenRange(token),
      });
      finish();
      afterBreak = false;
      skipping = true;
      continue;
    }
    if (afterBreak) {
      afterBreak = false;
      skipping = false;
      finish();
    }
    if (skipping) continue;
    if (type === Title) {
      items.push({ statement: { kind: 'title', text: token.image, range: maker.tokenRange(token) } });
      continue;
    }
    if (type === ControlBlock) {
      items.push({ statement: controlStatement(token, maker, diagnostics) });
      continue;
    }
    if (type === EndAndRest) {
      const word = /^\.end/i.exec(token.image)![0];
      items.push({ statement: { kind: 'end', range: maker.index.range(token.startOffset, token.startOffset + word.length) } });
      finish();
      continue;
    }
    if (type === InlineComment) {
      if (current) {
        current.comment = token;
        current.end = token.startOffset + token.image.length;
      } else {
        // A line holding only a `;` or `$` comment reads as a comment line.
        items.push({ statement: { kind: 'comment', text: token.image.slice(1), range: maker.tokenRange(token) } });
      }
      continue;
    }
    if (!current) {
      current = { tokens: [], comment: undefined, end: 0 };
      items.push({ line: current });
    }
    current.tokens.push(token);
    current.end = token.startOffset + token.image.length;
  }
  return items;
}

function controlStatement(token: IToken, maker: FieldMaker, diagnostics: ParseDiagnostic[]): Statement {
  const image = token.image;
  const firstBreak = image.search(/[\r\n]/);
  const lastLineStart = Math.max(image.lastIndexOf('\n'), image.lastIndexOf('\r')) + 1;
  const closed = firstBreak >= 0 && /^[ \t]*\.endc(?=[\s;]|$)/i.test(image.slice(lastLineStart));
  if (!closed) {
    diagnostics.push({
      severity: 'error',
      code: 'syntax',
      message: '`.control` has no `.endc`',
      range: maker.index.range(token.startOffset, token.startOffset + '.control'.length),
    });
  }
  // The script: the lines between `.control` and `.endc`.
  let script = '';
  if (firstBreak >= 0) {
    const bodyStart = image.charCodeAt(firstBreak) === 13 && image.charCodeAt(firstBreak + 1) === 10 ? firstBreak + 2 : firstBreak + 1;
    script = closed ? image.slice(bodyStart, Math.max(bodyStart, lastLineStart)) : image.slice(bodyStart);
  }
  return { kind: 'control', text: script, range: maker.tokenRange(token) };
}
