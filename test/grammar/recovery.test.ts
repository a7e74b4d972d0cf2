// Error recovery and structural diagnostics: one broken line gives one diagnostic at
// that line, and every other statement is still read. Positions are counted in each input.
import { describe, expect, test } from 'vitest';
import { parse, type ElementStatement } from '@pnlint/grammar';
import { allStatements, covered } from './helpers.js';

/** A 1,000-line netlist of the project's own invention: a ladder of resistors and LEDs. */
function ladder(lines: number): string[] {
  const out = ['ladder of indicator channels'];
  for (let index = 1; out.length < lines; index++) {
    out.push(index % 3 === 0 ? `D${index} n${index} 0 DRED` : `R${index} n${index - 1} n${index} 470`);
  }
  return out;
}

describe('one broken line in a long file', () => {
  const breakages: [string, string, string][] = [
    // [what, broken line, text the diagnostic points at]
    ['an unterminated {', 'R500 n1 n2 {2*rbase', '{'],
    ["an unterminated '", "R500 n1 n2 '2*rbase", "'"],
    ['an unterminated (', 'V500 n1 0 SIN(0 1 1k', '('],
    ['a stray )', 'R500 n1 n2 470)', ')'],
    ['a stray =', 'R500 n1 n2 470, = 5', '='],
    ['a line that starts with a number', '500 n1 n2 470', '500'],
    ['a broken expression', 'R500 n1 n2 {2 * / 3}', '/'],
    ['a key with no value', 'R500 n1 n2 470 tc=', '='],
  ];
  for (const [what, broken, at] of breakages) {
    test(`${what}: exactly one diagnostic, at that line; all other statements present`, () => {
      const lines = ladder(1000);
      lines[500] = broken;
      const text = lines.join('\n') + '\n';
      const result = parse(text);
      expect(result.diagnostics).toHaveLength(1);
      const diagnostic = result.diagnostics[0]!;
      expect(diagnostic).toMatchObject({ severity: 'error', code: 'syntax' });
      expect(diagnostic.range.start.line).toBe(500);
      expect(covered(text, diagnostic.range)).toBe(at);
      const elements = result.statements.filter((statement) => statement.kind === 'element') as ElementStatement[];
      const names = new Set(elements.map((element) => element.name.text));
      for (let line = 1; line < 1000; line++) {
        if (line === 500) continue;
        expect(names.has(lines[line]!.split(' ')[0]!)).toBe(true);
      }
    });
  }

  test('the broken line is kept when it has a name, marked incomplete', () => {
    const result = parse('title\nR1 a b {2*r\nR2 b 0 1k\n');
    expect(result.statements[1]).toMatchObject({ kind: 'element', name: { text: 'R1' }, incomplete: true });
    expect(result.statements[2]).toMatchObject({ kind: 'element', name: { text: 'R2' } });
    expect(result.statements[2]!.incomplete).toBeUndefined();
  });

  test('an unterminated { on a line that is continued runs on, and is reported once', () => {
    const text = 'title\nR1 a b {2*r\n+ 1k\nR2 b 0 1k\n';
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(covered(text, result.diagnostics[0]!.range)).toBe('{');
    expect(result.statements.at(-1)).toMatchObject({ kind: 'element', name: { text: 'R2' } });
  });
});

describe('structural diagnostics', () => {
  test('.ends without .subckt', () => {
    const text = 'title\nR1 a b 1k\n.ends\n';
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(result.diagnostics[0]).toMatchObject({ severity: 'error', code: 'syntax' });
    expect(covered(text, result.diagnostics[0]!.range)).toBe('.ends');
  });

  test('a missing .ends is an error at the .subckt name; the body is still nested', () => {
    const text = 'title\n.subckt driver in out\nR1 in out 1k\n';
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(covered(text, result.diagnostics[0]!.range)).toBe('driver');
    const subckt = result.statements[1]!;
    expect(subckt.kind === 'subckt' && subckt.body.length).toBe(1);
    expect(subckt.kind === 'subckt' && subckt.ends).toBeUndefined();
  });

  test('.ends outer closes outer; the inner .subckt left open is reported', () => {
    const text = 'title\n.subckt outer a\n.subckt inner b\nR1 b 0 1\n.ends outer\n';
    const result = parse(text);
    expect(result.diagnostics.map((diagnostic) => covered(text, diagnostic.range))).toEqual(['inner']);
  });

  test('stray .endl and .endif; .else without .if', () => {
    const text = 'title\n.endl\n.endif\n.else\nR1 a 0 1\n';
    const result = parse(text);
    expect(result.diagnostics.map((diagnostic) => covered(text, diagnostic.range))).toEqual(['.endl', '.endif', '.else']);
    expect(allStatements(result.statements).map((statement) => statement.kind)).toEqual(['title', 'element']);
  });

  test('a missing .endif and a missing .endc', () => {
    const ifText = 'title\n.if (a)\nR1 a 0 1\n';
    const ifResult = parse(ifText);
    expect(ifResult.diagnostics).toHaveLength(1);
    expect(covered(ifText, ifResult.diagnostics[0]!.range)).toBe('.if');
    const controlText = 'title\nR1 a 0 1\n.control\nop\n';
    const controlResult = parse(controlText);
    expect(controlResult.diagnostics).toHaveLength(1);
    expect(covered(controlText, controlResult.diagnostics[0]!.range)).toBe('.control');
  });

  test('.endc without .control', () => {
    const text = 'title\n.endc\n';
    expect(parse(text).diagnostics.map((diagnostic) => covered(text, diagnostic.range))).toEqual(['.endc']);
  });

  test('.ends with another subcircuit\'s name closes the open one, with a warning', () => {
    const text = 'title\n.subckt cell a\n.ends other\n';
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(result.diagnostics[0]).toMatchObject({ severity: 'warning' });
    expect(covered(text, result.diagnostics[0]!.range)).toBe('other');
  });
});

describe('the entry point never throws', () => {
  test('empty, blank and odd inputs', () => {
    for (const text of ['', '\n', '\r\n\r\n', '+', '*', '.', '{', "'", '"', ')', '=', '\u0000', '\uFEFFtitle\nR1 a b 1']) {
      for (const isInclude of [false, true]) {
        expect(() => parse(text, { isInclude })).not.toThrow();
      }
    }
  });

  test('input that is not a string gives a result, not an exception', () => {
    expect(() => parse(undefined as unknown as string)).not.toThrow();
    expect(() => parse(42 as unknown as string, null as unknown as undefined)).not.toThrow();
  });
});

describe('unclosed parentheses in expressions', () => {
  test('.param a = (1+2 reports the ( that is left open', () => {
    const text = 'title\n.param a = (1+2\nR1 a 0 1k\n';
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(result.diagnostics[0]!.range.start).toMatchObject({ line: 1, column: 11 });
    expect(covered(text, result.diagnostics[0]!.range)).toBe('(');
  });

  test('a byte-order mark before the title is not part of it', () => {
    const result = parse('\uFEFFboard title\nR1 a 0 1k\n');
    expect(result.statements[0]).toMatchObject({ kind: 'title', text: 'board title', span: { start: 1 } });
  });
});

describe('deep nesting is refused, not a crash', () => {
  // The limit is a named constant; these inputs go far past it (common practice, no source:
  // real netlists nest a handful of levels).
  test('100,000 nested parentheses on an element line: one error, the next line read', () => {
    const text = `title\nV1 a 0 ${'('.repeat(100_000)}1${')'.repeat(100_000)}\nR1 a 0 1k\n`;
    const result = parse(text);
    expect(result.diagnostics).toHaveLength(1);
    expect(result.diagnostics[0]!.message).not.toMatch(/internal error/);
    expect(result.statements.at(-1)).toMatchObject({ kind: 'element', name: { text: 'R1' } });
  });

  test('deep expressions: parentheses, prefix operators, ternaries', () => {
    for (const expression of ['('.repeat(50_000) + '1' + ')'.repeat(50_000), '-'.repeat(50_000) + '1', '2^' + '-'.repeat(50_000) + '1', 'a?b:'.repeat(50_000) + 'c']) {
      const result = parse(`title\nR1 a 0 {${expression}}\nR2 a 0 1k\n`);
      expect(result.diagnostics).toHaveLength(1);
      expect(result.diagnostics[0]!.message).not.toMatch(/internal error/);
      expect(result.statements.at(-1)).toMatchObject({ kind: 'element', name: { text: 'R2' } });
    }
  });

  test('20,000 nested subcircuits left open, then as many stray closers: each reported', () => {
    const depth = 20_000;
    const lines = ['title'];
    for (let level = 0; level < depth; level++) lines.push(`.subckt s${level} a`);
    for (let level = 0; level < depth; level++) lines.push('.endl');
    const result = parse(lines.join('\n'));
    expect(result.diagnostics).toHaveLength(2 * depth);
  });
});
