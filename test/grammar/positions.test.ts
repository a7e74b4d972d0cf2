// The line index: offsets to lines and UTF-16 columns, and back.
import { describe, expect, it } from 'vitest';
import { LineIndex, parse } from '@pnlint/grammar';

describe('line index', () => {
  // Expected lines and columns counted by hand from the texts written here.
  it('counts LF, CRLF and lone CR as line ends', () => {
    const text = 'a\nbc\r\nd\re';
    const lines = new LineIndex(text);
    expect(lines.position(0)).toEqual({ line: 0, column: 0, offset: 0 });
    expect(lines.position(1)).toEqual({ line: 0, column: 1, offset: 1 }); // the \n itself
    expect(lines.position(2)).toEqual({ line: 1, column: 0, offset: 2 });
    expect(lines.position(5)).toEqual({ line: 1, column: 3, offset: 5 }); // the \n of \r\n
    expect(lines.position(6)).toEqual({ line: 2, column: 0, offset: 6 });
    expect(lines.position(8)).toEqual({ line: 3, column: 0, offset: 8 });
    expect(lines.position(9)).toEqual({ line: 3, column: 1, offset: 9 }); // end of text
    expect(lines.lineStartOf(4)).toBe(2);
    expect(lines.lineEndOf(2)).toBe(4);
  });

  it('keeps the line ending the file uses', () => {
    expect(new LineIndex('a\r\nb\r\n').lineEnding).toBe('\r\n');
    expect(new LineIndex('a\nb\n').lineEnding).toBe('\n');
    expect(new LineIndex('a\rb\r').lineEnding).toBe('\r');
    expect(new LineIndex('one line').lineEnding).toBe('\n');
  });

  it('finds positions deep in a long file', () => {
    const text = 'R1 a b 1k\n'.repeat(20_000);
    const lines = new LineIndex(text);
    for (let line = 0; line < 20_000; line += 7) expect(lines.position(line * 10 + 3)).toEqual({ line, column: 3, offset: line * 10 + 3 });
  });

  it('goes back from a line and column to the offset, clamped to the text', () => {
    const lines = new LineIndex('ab\ncd');
    expect(lines.offsetAt(1, 1)).toBe(4);
    expect(lines.offsetAt(0, 0)).toBe(0);
    expect(lines.offsetAt(7, 0)).toBe(5); // past the last line: the text's end
    expect(lines.offsetAt(1, 99)).toBe(5);
  });

  it('is the one a parse result carries, over the text it read', () => {
    const text = 'title\nR1 a b 1k\n';
    const result = parse(text);
    expect(result.lines.text).toBe(text);
    expect(result.lines.lineCount).toBe(3);
  });
});
