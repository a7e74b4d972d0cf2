// A small JSON reader that keeps where each value was written, so that a mistake in
// pnlint.json gets a diagnostic at its own key rather than at the top of the file.
// RFC 8259 JSON; it never throws: a syntax error is returned with its range.
import type { Position, Range } from '@pnlint/grammar';

export type JsonNode =
  | { type: 'object'; members: JsonMember[]; range: Range }
  | { type: 'array'; items: JsonNode[]; range: Range }
  | { type: 'string'; value: string; range: Range }
  | { type: 'number'; value: number; range: Range }
  | { type: 'boolean'; value: boolean; range: Range }
  | { type: 'null'; range: Range };

export interface JsonMember {
  key: string;
  keyRange: Range;
  value: JsonNode;
}

export type JsonReading = { ok: true; root: JsonNode } | { ok: false; message: string; range: Range };

/** Nesting deeper than this is refused rather than recursed into (no input can exhaust the stack). */
const MAXIMUM_DEPTH = 200;

class JsonSyntaxError {
  constructor(
    readonly message: string,
    readonly offset: number,
  ) {}
}

export function readJson(text: string): JsonReading {
  const lineStarts = [0];
  for (let index = 0; index < text.length; index++) if (text[index] === '\n') lineStarts.push(index + 1);
  const position = (offset: number): Position => {
    let low = 0;
    let high = lineStarts.length - 1;
    while (low < high) {
      const middle = (low + high + 1) >> 1;
      if (lineStarts[middle]! <= offset) low = middle;
      else high = middle - 1;
    }
    return { line: low, column: offset - lineStarts[low]!, offset };
  };
  const range = (start: number, end: number): Range => ({ start: position(start), end: position(end) });
  let cursor = text.charCodeAt(0) === 0xfeff ? 1 : 0; // a byte-order mark is not content

  const skipSpace = () => {
    while (cursor < text.length && ' \t\r\n'.includes(text[cursor]!)) cursor++;
  };
  const fail = (message: string): never => {
    throw new JsonSyntaxError(message, cursor);
  };

  const readString = (): { value: string; start: number; end: number } => {
    const start = cursor;
    cursor++; // opening quote
    let value = '';
    while (cursor < text.length) {
      const character = text[cursor]!;
      if (character === '"') {
        cursor++;
        return { value, start, end: cursor };
      }
      if (character === '\\') {
        const escape = text[cursor + 1];
        const simple: Record<string, string> = { '"': '"', '\\': '\\', '/': '/', b: '\b', f: '\f', n: '\n', r: '\r', t: '\t' };
        if (escape !== undefined && simple[escape] !== undefined) {
          value += simple[escape];
          cursor += 2;
        } else if (escape === 'u' && /^[0-9a-fA-F]{4}$/.test(text.slice(cursor + 2, cursor + 6))) {
          value += String.fromCharCode(parseInt(text.slice(cursor + 2, cursor + 6), 16));
          cursor += 6;
        } else fail('Bad escape in a string.');
        continue;
      }
      if (character < ' ') fail('A string cannot hold a raw control character or line break.');
      value += character;
      cursor++;
    }
    return fail('Unterminated string.');
  };

  const readValue = (depth: number): JsonNode => {
    if (depth > MAXIMUM_DEPTH) fail('Nested too deeply.');
    skipSpace();
    const start = cursor;
    const character = text[cursor];
    if (character === '{') {
      cursor++;
      const members: JsonMember[] = [];
      skipSpace();
      if (text[cursor] === '}') {
        cursor++;
        return { type: 'object', members, range: range(start, cursor) };
      }
      for (;;) {
        skipSpace();
        if (text[cursor] !== '"') fail('Expected a quoted key.');
        const key = readString();
        skipSpace();
        if (text[cursor] !== ':') fail("Expected ':' after the key.");
        cursor++;
        const value = readValue(depth + 1);
        members.push({ key: key.value, keyRange: range(key.start, key.end), value });
        skipSpace();
        if (text[cursor] === ',') {
          cursor++;
          continue;
        }
        if (text[cursor] === '}') {
          cursor++;
          return { type: 'object', members, range: range(start, cursor) };
        }
        fail("Expected ',' or '}'.");
      }
    }
    if (character === '[') {
      cursor++;
      const items: JsonNode[] = [];
      skipSpace();
      if (text[cursor] === ']') {
        cursor++;
        return { type: 'array', items, range: range(start, cursor) };
      }
      for (;;) {
        items.push(readValue(depth + 1));
        skipSpace();
        if (text[cursor] === ',') {
          cursor++;
          continue;
        }
        if (text[cursor] === ']') {
          cursor++;
          return { type: 'array', items, range: range(start, cursor) };
        }
        fail("Expected ',' or ']'.");
      }
    }
    if (character === '"') {
      const string = readString();
      return { type: 'string', value: string.value, range: range(string.start, string.end) };
    }
    const number = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(text.slice(cursor, cursor + 400));
    if (number) {
      cursor += number[0].length;
      return { type: 'number', value: Number(number[0]), range: range(start, cursor) };
    }
    for (const [word, node] of [
      ['true', { type: 'boolean', value: true }],
      ['false', { type: 'boolean', value: false }],
      ['null', { type: 'null' }],
    ] as const) {
      if (text.startsWith(word, cursor)) {
        cursor += word.length;
        return { ...node, range: range(start, cursor) } as JsonNode;
      }
    }
    return fail(cursor >= text.length ? 'Unexpected end of the file.' : `Unexpected '${character}'.`);
  };

  try {
    const root = readValue(0);
    skipSpace();
    if (cursor < text.length) fail('Unexpected text after the JSON value.');
    return { ok: true, root };
  } catch (error) {
    if (error instanceof JsonSyntaxError) {
      const end = Math.min(error.offset + 1, text.length);
      return { ok: false, message: error.message, range: range(Math.min(error.offset, text.length), end) };
    }
    throw error;
  }
}
