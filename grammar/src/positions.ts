// Offsets to line/column positions. The syntax tree keeps offsets only (spans);
// this index turns them into the lines and columns that people and LSP read.
// Built on first use in one pass over the text; lookups mostly move forward
// through the text, so a cursor makes them O(1) amortised.

import type { Position, Range, Span } from './ast.js';

export class LineIndex {
  /** Offset at which each line starts; line 0 starts at 0. `\r\n`, `\n` and `\r` end a line. Built on first use. */
  private starts: number[] | undefined;
  private ending: string | undefined;
  private cursor = 0;

  constructor(readonly text: string) {}

  private lineStarts(): number[] {
    if (this.starts) return this.starts;
    const starts = [0];
    const text = this.text;
    const length = text.length;
    let crlf = false;
    let lf = false;
    let cr = false;
    for (let index = 0; index < length; index++) {
      const code = text.charCodeAt(index);
      if (code === 10) {
        lf = true;
        starts.push(index + 1);
      } else if (code === 13) {
        if (text.charCodeAt(index + 1) === 10) {
          index++;
          crlf = true;
        } else cr = true;
        starts.push(index + 1);
      }
    }
    this.ending = crlf ? '\r\n' : lf ? '\n' : cr ? '\r' : '\n';
    return (this.starts = starts);
  }

  /** The line ending the text already uses (`\n` for a text of one line), so that an inserted line matches its neighbours. */
  get lineEnding(): string {
    this.lineStarts();
    return this.ending!;
  }

  /** The offset where the line holding `offset` starts. */
  lineStartOf(offset: number): number {
    return this.lineStarts()[this.lineOf(offset)]!;
  }

  /** The offset where the line holding `offset` ends, before its line ending. */
  lineEndOf(offset: number): number {
    const text = this.text;
    let index = offset;
    while (index < text.length && text.charCodeAt(index) !== 10 && text.charCodeAt(index) !== 13) index++;
    return index;
  }

  get lineCount(): number {
    return this.lineStarts().length;
  }

  /** The 0-based line on which `offset` stands (an offset past the end stands on the last line). */
  lineOf(offset: number): number {
    const starts = this.lineStarts();
    let line = this.cursor;
    if (offset >= starts[line]!) {
      // Forward: usually the same line or the next one.
      while (line + 1 < starts.length && offset >= starts[line + 1]!) {
        line++;
        if (line - this.cursor > 8) return (this.cursor = this.search(offset));
      }
      return (this.cursor = line);
    }
    return (this.cursor = this.search(offset));
  }

  private search(offset: number): number {
    const starts = this.lineStarts();
    let low = 0;
    let high = starts.length - 1;
    while (low < high) {
      const middle = (low + high + 1) >> 1;
      if (starts[middle]! <= offset) low = middle;
      else high = middle - 1;
    }
    return low;
  }

  /** The offset of a line and column (clamped to the line's start and the text's end). */
  offsetAt(line: number, column: number): number {
    const starts = this.lineStarts();
    if (line < 0) return 0;
    if (line >= starts.length) return this.text.length;
    return Math.min(starts[line]! + Math.max(0, column), this.text.length);
  }

  position(offset: number): Position {
    const line = this.lineOf(offset);
    return { line, column: offset - this.lineStarts()[line]!, offset };
  }

  /** The lines and columns of a span. */
  range(span: Span): Range {
    return { start: this.position(span.start), end: this.position(span.end) };
  }
}
