// Titles, comments, continuations, line ends and case: the line structure of a netlist.
// Expected positions are counted in each test's own input text; the netlist conventions
// are those of the SPICE3 user's manual (Quarles, 1989) and ngspice 39 (design/verification.md).
import { describe, expect, test } from 'vitest';
import { parse, type ElementStatement, type Statement } from '@pnlint/grammar';
import { covered } from './helpers.js';

function element(statements: Statement[], index = 0): ElementStatement {
  const elements = statements.filter((statement): statement is ElementStatement => statement.kind === 'element');
  const found = elements[index];
  expect(found).toBeDefined();
  return found!;
}

describe('title line', () => {
  test('the first line of a top-level file is its title, whatever it looks like', () => {
    const text = 'R1 a b {unclosed ( 1k\nR2 a 0 1k\n';
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    expect(result.statements[0]).toMatchObject({ kind: 'title', text: 'R1 a b {unclosed ( 1k' });
    expect(covered(text, result.statements[0]!.span)).toBe('R1 a b {unclosed ( 1k');
    expect(element(result.statements).name.text).toBe('R2');
  });

  test('an included file has no title: its first line is a statement', () => {
    const result = parse('R1 a b 1k\n', { isInclude: true });
    expect(result.statements.map((statement) => statement.kind)).toEqual(['element']);
  });

  test('an empty first line is an empty title, not a statement', () => {
    const result = parse('\nR1 a b 1k\n');
    expect(result.statements.map((statement) => statement.kind)).toEqual(['element']);
    expect(result.lines.lineOf(result.statements[0]!.span.start)).toBe(1);
  });
});

describe('comments', () => {
  test('a * line is a comment; its text is everything after the *, verbatim', () => {
    const text = 'title\n*pnlint: rating DRED kind=led if=20m\n   * indented note\n';
    const result = parse(text);
    const comments = result.statements.filter((statement) => statement.kind === 'comment');
    expect(comments).toMatchObject([{ text: 'pnlint: rating DRED kind=led if=20m' }, { text: ' indented note' }]);
    expect(covered(text, comments[0]!.span)).toBe('*pnlint: rating DRED kind=led if=20m');
    expect(covered(text, comments[1]!.span)).toBe('* indented note');
  });

  test('a ; comment ends a line anywhere, even against a word', () => {
    const text = 'title\nR1 a b 1k;pnlint: ignore overdissipation\n';
    const r1 = element(parse(text).statements);
    expect(r1.fields.map((field) => field.kind === 'number' && field.text)).toEqual([false, false, '1k']);
    expect(r1.comment?.text).toBe('pnlint: ignore overdissipation');
    expect(covered(text, r1.comment!.span)).toBe(';pnlint: ignore overdissipation');
    // The statement's range takes its inline comment in.
    expect(covered(text, r1.span)).toBe('R1 a b 1k;pnlint: ignore overdissipation');
  });

  test('$ starts a comment after white space, and is part of a word otherwise (ngspice 39)', () => {
    const text = 'title\nR1 a$b 0 1k $ load resistor\n';
    const r1 = element(parse(text).statements);
    expect(r1.fields[0]).toMatchObject({ kind: 'word', text: 'a$b' });
    expect(r1.comment?.text).toBe(' load resistor');
  });

  test('a * comment line between a line and its + continuation is legal', () => {
    const text = 'title\nV1 in 0\n* the source value follows\n+ DC 5\n';
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    const v1 = element(result.statements);
    expect(v1.fields.map((field) => ('text' in field ? field.text : field.kind))).toEqual(['in', '0', 'DC', '5']);
    expect(result.statements.map((statement) => statement.kind)).toEqual(['title', 'element', 'comment']);
  });
});

describe('comment-only lines of ; and $', () => {
  test('a line holding only a ; comment is a comment, and may stand before a continuation like a * line', () => {
    const text = 'title\nR1 a b\n; value on the next line\n+ 1k\n';
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    expect(result.statements.map((statement) => statement.kind)).toEqual(['title', 'element', 'comment']);
    expect(result.statements[2]).toMatchObject({ kind: 'comment', text: ' value on the next line' });
    expect(element(result.statements).fields).toHaveLength(3);
  });
});

describe('continuation lines', () => {
  test('a statement spans its + lines; each field keeps the range where it is written', () => {
    const text = 'title\nD1 anode\n+ cathode\n  +   DLED\n';
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    const d1 = element(result.statements);
    expect(covered(text, d1.span)).toBe('D1 anode\n+ cathode\n  +   DLED');
    expect(result.lines.position(d1.span.start)).toMatchObject({ line: 1, column: 0 });
    expect(result.lines.position(d1.span.end)).toMatchObject({ line: 3, column: 10 });
    const [anode, cathode, model] = d1.fields;
    expect(result.lines.position(anode!.span.start)).toMatchObject({ line: 1, column: 3 });
    expect(result.lines.position(cathode!.span.start)).toMatchObject({ line: 2, column: 2 });
    expect(result.lines.position(model!.span.start)).toMatchObject({ line: 3, column: 6 });
    expect(covered(text, model!.span)).toBe('DLED');
  });

  test('+5 in the middle of a line is a value, not a continuation', () => {
    const d1 = element(parse('title\nV1 a 0 +5\n').statements);
    expect(d1.fields[2]).toMatchObject({ kind: 'number', value: 5, text: '+5' });
  });

  test('a + line with nothing before it is one error at the +, and the next line reads normally', () => {
    const text = 'title\n+ 1k 2k\nR1 a b 1k\n';
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(result.diagnostics[0]).toMatchObject({ severity: 'error', code: 'syntax' });
    expect(covered(text, result.diagnostics[0]!.range)).toBe('+');
    expect(element(result.statements).name.text).toBe('R1');
  });
});

describe('line ends, tabs and case', () => {
  test('CRLF line ends: columns and ranges exclude the \\r', () => {
    const text = 'title\r\nR1\ta\tb\t1k\r\n+ tc=0.001\r\n.END\r\n';
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    const r1 = element(result.statements);
    expect(covered(text, r1.span)).toBe('R1\ta\tb\t1k\r\n+ tc=0.001');
    expect(result.lines.position(r1.fields[1]!.span.start)).toMatchObject({ line: 1, column: 5 });
    expect(result.statements.at(-1)!.kind).toBe('end');
  });

  test('a lone \\r ends a line too', () => {
    const text = 'title\rR1 a b 1k\rR2 b 0 2k';
    const result = parse(text);
    expect(result.statements.filter((statement) => statement.kind === 'element')).toHaveLength(2);
    expect(result.lines.position(element(result.statements, 1).span.start)).toMatchObject({ line: 2, column: 0 });
  });

  test('commands and keywords in any case', () => {
    const result = parse('title\n.MODEL DX d(is=1e-14)\n.Subckt CELL a b\nR1 a b 1k\n.ENDS cell\n.End\n');
    expect(result.diagnostics).toEqual([]);
    expect(result.statements.map((statement) => statement.kind)).toEqual(['title', 'model', 'subckt', 'end']);
  });

  test('a missing .end is fine; text after .end is ignored', () => {
    expect(parse('title\nR1 a b 1k\n').diagnostics).toEqual([]);
    const result = parse('title\nR1 a b 1k\n.end\nthis is not { a netlist (\n');
    expect(result.diagnostics).toEqual([]);
    expect(result.statements.map((statement) => statement.kind)).toEqual(['title', 'element', 'end']);
  });

  test('UTF-16 columns: a character outside the BMP counts two', () => {
    const text = 'title\n* \u{1F50B} cell\nR1 a b 1k ; 10 \u{1F50B}\nR2 b 0 1k\n';
    const result = parse(text);
    const r2 = element(result.statements, 1);
    expect(result.lines.position(r2.span.start)).toMatchObject({ line: 3, column: 0 });
    expect(covered(text, element(result.statements).comment!.span)).toBe('; 10 \u{1F50B}');
  });
});

describe('a file larger than one reading chunk', () => {
  test('continuations, comment lines and .control blocks read the same wherever the chunks are cut', () => {
    // ~200 kB: the parser reads in chunks of 64 kB cut at statement starts.
    const piece = ['R1 a b 1k', '* between a line and its continuation', '+ m=2', '.control', "let x = 'open", 'R9 q w {', '.endc', 'V1 a 0 SIN(0 1', '+ 1k)', 'D1 a 0 DRED'];
    for (const shift of [0, 1, 7]) {
      const lines = ['title', ...Array.from({ length: shift }, (_unused, index) => `R${index} x 0 1`)];
      for (let index = 0; index < 3000; index++) lines.push(...piece);
      const text = lines.join('\n');
      const result = parse(text);
      expect(result.diagnostics).toEqual([]);
      const count = (kind: string): number => result.statements.filter((statement) => statement.kind === kind).length;
      expect(count('element')).toBe(3000 * 3 + shift);
      expect(count('control')).toBe(3000);
      expect(count('comment')).toBe(3000);
      const last = result.statements.at(-1)!;
      expect(covered(text, last.span)).toBe('D1 a 0 DRED');
    }
  });
});
