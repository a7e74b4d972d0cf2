// Conversions between the grammar's spans and ranges (0-based line, UTF-16 column,
// offset) and the protocol's, and the few range tests the features share.
import type { LineIndex, Range, Span } from '@pnlint/grammar';
import type { Range as LspRange } from 'vscode-languageserver';

export function toLspRange(range: Range): LspRange {
  return {
    start: { line: range.start.line, character: range.start.column },
    end: { line: range.end.line, character: range.end.column },
  };
}

/** The protocol range of a span of the text that `lines` indexes. */
export function lspRangeOf(lines: LineIndex, span: Span): LspRange {
  return toLspRange(lines.range(span));
}

/** True when `offset` is inside `span` or touches its end (a cursor just after a word still points at it). */
export function spanContains(span: Span, offset: number): boolean {
  return span.start <= offset && offset <= span.end;
}

