// Property-based tests (fast-check): random token soup and mutations of valid netlists
// never throw, never hit an internal error, and give ranges inside the text whose lines
// and columns agree with their offsets. Valid netlists built from a small generator read
// without any diagnostic. Time is bounded by vitest's per-test timeout and by keeping
// inputs small, not by wall-clock asserts.
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { parse, type ElementStatement, type ParseResult } from '@pnlint/grammar';
import { allSpans, allStatements, lineColumn } from './helpers.js';

const FRAGMENTS = [
  'R1', 'D2', 'XU1', 'V1', 'a', 'out+', '0', '4k7', '1e-3', '-5', '+5', 'DC', 'SIN', 'params:', 'ic', 'm',
  ' ', ' ', '\t', '\n', '\n', '\r\n', '\r', '+', '*', '*pnlint: rating D2 if=20m', '{', '}', '(', ')', "'", '"', '=', ',', ';', '$', '[', ']',
  '.subckt', '.ends', '.if', '.elseif', '.else', '.endif', '.control', '.endc', '.end', '.param', '.func', '.lib',
  '.endl', '.include', '.model', '.global', '.options', '.unknown', '2*x', '?', ':', '^', '**', '&&', '||', '!',
  '\u00b5', '\u{1F50B}', '\uFEFF', '\u0000',
];

const tokenSoup = fc.array(fc.constantFrom(...FRAGMENTS), { maxLength: 200 }).map((parts) => parts.join(''));

function checkResult(text: string, result: ParseResult): void {
  for (const diagnostic of result.diagnostics) expect(diagnostic.message).not.toMatch(/internal error/);
  for (const span of allSpans(result)) {
    expect(span.start).toBeGreaterThanOrEqual(0);
    expect(span.end).toBeLessThanOrEqual(text.length);
    expect(span.end).toBeGreaterThanOrEqual(span.start);
    // The line index agrees with lines and columns counted independently.
    const range = result.lines.range(span);
    for (const position of [range.start, range.end]) {
      expect({ line: position.line, column: position.column }).toEqual(lineColumn(text, position.offset));
    }
  }
  for (const diagnostic of result.diagnostics) {
    for (const position of [diagnostic.range.start, diagnostic.range.end]) {
      expect(position.offset).toBeGreaterThanOrEqual(0);
      expect(position.offset).toBeLessThanOrEqual(text.length);
      expect({ line: position.line, column: position.column }).toEqual(lineColumn(text, position.offset));
    }
  }
  // Output bounded by input: never more statements than characters.
  expect(allStatements(result.statements).length).toBeLessThanOrEqual(text.length + 1);
}

describe('fuzz', () => {
  test('random token soup', () => {
    fc.assert(
      fc.property(tokenSoup, fc.boolean(), (text, isInclude) => {
        checkResult(text, parse(text, { isInclude }));
      }),
      { numRuns: 400 },
    );
  });

  test('random unicode strings', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary', maxLength: 300 }), (text) => {
        checkResult(text, parse(text));
      }),
      { numRuns: 300 },
    );
  });

  const VALID_NETLIST = [
    'indicator board',
    '* supply and LED string',
    '.param rbase=470 vsup={5*1.05}',
    '.model DRED D(IS=1e-18 N=1.9 RS=2 BV=5 IBV=10u)',
    '.subckt chan in out params: r=1k',
    'R1 in mid {r}',
    'D1 mid out DRED',
    '.ends chan',
    'V1 vcc 0 DC {vsup} AC 1 SIN(0 1 1k)',
    'X1 vcc 0 chan r=680 ; one channel',
    'C1 vcc 0 10u ic=5',
    '+ m=2',
    '.if (rbase > 100)',
    'R9 vcc 0 10k',
    '.endif',
    '.control',
    "let x = 'op",
    '.endc',
    '.tran 1u 1m',
    '.end',
  ].join('\n');

  const edit = fc.record({
    at: fc.nat(),
    remove: fc.nat({ max: 6 }),
    insert: fc.constantFrom(...FRAGMENTS, ''),
  });

  test('mutations of a valid netlist', () => {
    fc.assert(
      fc.property(fc.array(edit, { minLength: 1, maxLength: 8 }), fc.boolean(), (edits, isInclude) => {
        let text = VALID_NETLIST;
        for (const { at, remove, insert } of edits) {
          const position = at % (text.length + 1);
          text = text.slice(0, position) + insert + text.slice(position + remove);
        }
        checkResult(text, parse(text, { isInclude }));
      }),
      { numRuns: 400 },
    );
  });

  test('the unmutated netlist reads without a diagnostic', () => {
    expect(parse(VALID_NETLIST).diagnostics).toEqual([]);
  });

  // Valid element lines, split at random spaces into + continuation lines.
  const name = fc.stringMatching(/^[a-z][a-z0-9_]{0,5}$/);
  const value = fc.constantFrom('1k', '4.7k', '100n', '2.2u', '1meg', '10', '0.5', '{2*rb}', '1e-3');
  const elementLine = fc.record({
    letter: fc.constantFrom('R', 'C', 'L', 'D', 'V', 'I'),
    number: fc.nat({ max: 9999 }),
    nodes: fc.array(name, { minLength: 2, maxLength: 2 }),
    value,
    params: fc.array(fc.tuple(fc.constantFrom('m', 'tc', 'ic', 'temp'), value), { maxLength: 2 }),
    comment: fc.option(fc.constantFrom(' ; note', ' $ note'), { nil: undefined }),
  });

  test('generated valid lines, with random continuations, read without a diagnostic and with exact names', () => {
    fc.assert(
      fc.property(fc.array(elementLine, { minLength: 1, maxLength: 30 }), fc.array(fc.boolean(), { maxLength: 200 }), (lines, splits) => {
        let splitIndex = 0;
        const written = lines.map((line) => {
          const words = [`${line.letter}${line.number}`, ...line.nodes, line.value, ...line.params.map(([key, v]) => `${key}=${v}`)];
          const joined = words.map((word, index) => (index > 0 && splits[splitIndex++ % Math.max(1, splits.length)] ? `\n+ ${word}` : ` ${word}`)).join('');
          return joined.slice(1) + (line.comment ?? '');
        });
        const text = ['generated', ...written].join('\n') + '\n';
        const result = parse(text);
        expect(result.diagnostics).toEqual([]);
        const elements = result.statements.filter((statement) => statement.kind === 'element') as ElementStatement[];
        expect(elements).toHaveLength(lines.length);
        elements.forEach((element, index) => {
          const expected = `${lines[index]!.letter}${lines[index]!.number}`;
          expect(element.name.text).toBe(expected);
          expect(text.slice(element.name.span.start, element.name.span.end)).toBe(expected);
          expect(element.fields).toHaveLength(3 + lines[index]!.params.length);
        });
        checkResult(text, result);
      }),
      { numRuns: 200 },
    );
  });
});
