// Test helpers: where a range lands in the text, computed independently of the parser.
import { expect } from 'vitest';
import type { Position, Range, Span, Statement, ParseResult } from '@pnlint/grammar';

let cachedText: string | undefined;
let cachedStarts: number[] = [];

/** Line and UTF-16 column of `offset`, counting `\r\n`, `\n` and `\r` as line ends. */
export function lineColumn(text: string, offset: number): { line: number; column: number } {
  if (text !== cachedText) {
    cachedText = text;
    cachedStarts = [0];
    for (let index = 0; index < text.length; index++) {
      const char = text[index];
      if (char === '\r' && text[index + 1] === '\n') continue;
      if (char === '\n' || char === '\r') cachedStarts.push(index + 1);
    }
  }
  let line = 0;
  while (line + 1 < cachedStarts.length && cachedStarts[line + 1]! <= offset) line++;
  return { line, column: offset - cachedStarts[line]! };
}

export function expectPositionConsistent(text: string, position: Position): void {
  expect(position.offset).toBeGreaterThanOrEqual(0);
  expect(position.offset).toBeLessThanOrEqual(text.length);
  expect({ line: position.line, column: position.column }).toEqual(lineColumn(text, position.offset));
}

/** The text a span (or a diagnostic's range) covers, after checking that it lies in the text (and that a range's lines and columns agree with its offsets). */
export function covered(text: string, at: Span | Range): string {
  if (typeof at.start === 'number' && typeof at.end === 'number') {
    expect(at.start).toBeGreaterThanOrEqual(0);
    expect(at.end).toBeGreaterThanOrEqual(at.start);
    expect(at.end).toBeLessThanOrEqual(text.length);
    return text.slice(at.start, at.end);
  }
  const range = at as Range;
  expectPositionConsistent(text, range.start);
  expectPositionConsistent(text, range.end);
  expect(range.end.offset).toBeGreaterThanOrEqual(range.start.offset);
  return text.slice(range.start.offset, range.end.offset);
}

/** Every statement of a result, nested bodies included, in source order. */
export function allStatements(statements: Statement[]): Statement[] {
  const all: Statement[] = [];
  const visit = (list: Statement[]): void => {
    for (const statement of list) {
      all.push(statement);
      if (statement.kind === 'subckt' || statement.kind === 'libSection') visit(statement.body);
      if (statement.kind === 'if') for (const branch of statement.branches) visit(branch.body);
    }
  };
  visit(statements);
  return all;
}

/** Every span reachable from the statements of a result. */
export function allSpans(result: ParseResult): Span[] {
  const spans: Span[] = [];
  const visit = (value: unknown): void => {
    if (!value || typeof value !== 'object') return;
    if (Array.isArray(value)) {
      for (const item of value) visit(item);
      return;
    }
    const record = value as Record<string, unknown>;
    if (typeof record.start === 'number' && typeof record.end === 'number') {
      spans.push(record as unknown as Span);
      return;
    }
    for (const key of Object.keys(record)) visit(record[key]);
  };
  visit(result.statements);
  return spans;
}
