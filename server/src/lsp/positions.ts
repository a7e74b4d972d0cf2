// Conversions between the grammar's ranges (0-based line, UTF-16 column, offset)
// and the protocol's, and the few range tests the features share.
import type { Range } from '@pnlint/grammar';
import type { Position as LspPosition, Range as LspRange } from 'vscode-languageserver';

export function toLspRange(range: Range): LspRange {
  return {
    start: { line: range.start.line, character: range.start.column },
    end: { line: range.end.line, character: range.end.column },
  };
}

function compare(line: number, column: number, position: LspPosition): number {
  return line !== position.line ? line - position.line : column - position.character;
}

/** True when `position` is inside `range` or touches its end (a cursor just after a word still points at it). */
export function rangeContains(range: Range, position: LspPosition): boolean {
  return compare(range.start.line, range.start.column, position) <= 0 && compare(range.end.line, range.end.column, position) >= 0;
}

export function rangesOverlap(a: LspRange, b: LspRange): boolean {
  const before = (p: LspPosition, q: LspPosition) => p.line < q.line || (p.line === q.line && p.character <= q.character);
  return !(before(a.end, b.start) || before(b.end, a.start));
}
