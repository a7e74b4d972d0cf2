// Offsets to line/column positions. Built once per text in one pass; lookups
// mostly move forward through the text, so a cursor makes them O(1) amortised.

import type { Position, Range } from './ast.js';

export class LineIndex {
  /** Offset at which each line starts; line 0 starts at 0. `\r\n`, `\n` and `\r` end a line. */
  private readonly lineStarts: number[] = [0];
  private cursor = 0;

  constructor(readonly text: string) {
    const length = text.length;
    for (let index = 0; index < length; index++) {
      const code = text.charCodeAt(index);
      if (code === 10) this.lineStarts.push(index + 1);
      else if (code === 13) {
        if (text.charCodeAt(index + 1) === 10) index++;
        this.lineStarts.push(index + 1);
      }
    }
  }

  get lineCount(): number {
    return this.lineStarts.length;
  }

  lineOf(offset: number): number {
    const starts = this.lineStarts;
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
    const starts = this.lineStarts;
    let low = 0;
    let high = starts.length - 1;
    while (low < high) {
      const middle = (low + high + 1) >> 1;
      if (starts[middle]! <= offset) low = middle;
      else high = middle - 1;
    }
    return low;
  }

  position(offset: number): Position {
    const line = this.lineOf(offset);
    return { line, column: offset - this.lineStarts[line]!, offset };
  }

  range(start: number, end: number): Range {
    return { start: this.position(start), end: this.position(end) };
  }

  /** A range known not to cross a line break (a word): one line lookup instead of two. */
  lineRange(start: number, end: number): Range {
    const line = this.lineOf(start);
    const column = start - this.lineStarts[line]!;
    return { start: { line, column, offset: start }, end: { line, column: column + end - start, offset: end } };
  }
}
