// The files of a circuit as text, for writing edits into them: each element's statement
// found again by its position, the words on its line, its indentation and the file's
// own line ending. Edits touch only the words they change, so comments, spacing and
// continuation lines stay as the user wrote them. Each file is parsed, and its lines and
// statements indexed, once per session: a board with thousands of findings asks for
// thousands of positions in the same text.
import { parse, type ElementStatement, type Field, type ParseResult, type Position, type Range, type Statement } from '@pnlint/grammar';
import type { Circuit, Element } from '../netlist/circuit.js';
import type { TextEdit } from '../findings.js';

/** An element's statement in its file. */
export interface LocatedStatement {
  uri: string;
  text: string;
  statement: ElementStatement;
  /** The file's line index, for turning offsets into positions. */
  lines: LineIndex;
}

/** A file's parse, its element statements by start offset, and its line index. */
interface IndexedFile {
  parsed: ParseResult;
  elementsByOffset: Map<number, ElementStatement>;
  lines: LineIndex;
}

export class SourceFiles {
  private readonly indexed = new Map<string, IndexedFile>();

  constructor(private readonly circuit: Circuit) {}

  text(uri: string): string | undefined {
    return this.circuit.files.get(uri);
  }

  /** The file's statements, parsed once (an included file has no title line). */
  statements(uri: string): Statement[] {
    return this.indexOf(uri).parsed.statements;
  }

  /** Every file the circuit was read from. */
  uris(): string[] {
    return [...this.circuit.files.keys()];
  }

  /** The statement an element was elaborated from (undefined if its file is not at hand). */
  statementOf(element: Element): LocatedStatement | undefined {
    const { uri, range } = element.location;
    const text = this.text(uri);
    if (text === undefined) return undefined;
    const file = this.indexOf(uri);
    const found = file.elementsByOffset.get(range.start.offset);
    return found ? { uri, text, statement: found, lines: file.lines } : undefined;
  }

  private indexOf(uri: string): IndexedFile {
    let file = this.indexed.get(uri);
    if (!file) {
      const text = this.text(uri) ?? '';
      const parsed = parse(text, { isInclude: uri !== this.circuit.uri });
      const elementsByOffset = new Map<number, ElementStatement>();
      forEachStatement(parsed.statements, (statement) => {
        // The first statement at an offset, as a search from the top would find it.
        if (statement.kind === 'element' && !elementsByOffset.has(statement.range.start.offset)) elementsByOffset.set(statement.range.start.offset, statement);
      });
      file = { parsed, elementsByOffset, lines: new LineIndex(text) };
      this.indexed.set(uri, file);
    }
    return file;
  }
}

/** Visits every statement, also inside subcircuits, library sections and `.if` branches. */
export function forEachStatement(statements: readonly Statement[], visit: (statement: Statement) => void): void {
  for (const statement of statements) {
    visit(statement);
    if (statement.kind === 'subckt' || statement.kind === 'libSection') forEachStatement(statement.body, visit);
    else if (statement.kind === 'if') for (const branch of statement.branches) forEachStatement(branch.body, visit);
  }
}

/**
 * Where each line of a text starts, found in one pass, counting `\r\n`, `\n` and `\r` as
 * line ends (as the grammar does); positions are then a binary search away. Also the
 * text's own line ending, so that an inserted line matches its neighbours.
 */
export class LineIndex {
  /** Offsets of the first character of each line; lineStarts[0] is 0. */
  private readonly lineStarts: number[] = [0];
  /** The line ending the file already uses (`\n` for a file of one line). */
  readonly lineEnding: string;

  constructor(readonly text: string) {
    let sawCarriageReturnLineFeed = false;
    let sawLineFeed = false;
    let sawCarriageReturn = false;
    for (let index = 0; index < text.length; index++) {
      const code = text.charCodeAt(index);
      if (code === 13) {
        // A \r followed by \n ends its line at the \n.
        if (text.charCodeAt(index + 1) === 10) {
          sawCarriageReturnLineFeed = true;
          continue;
        }
        sawCarriageReturn = true;
        this.lineStarts.push(index + 1);
      } else if (code === 10) {
        if (index === 0 || text.charCodeAt(index - 1) !== 13) sawLineFeed = true;
        this.lineStarts.push(index + 1);
      }
    }
    this.lineEnding = sawCarriageReturnLineFeed ? '\r\n' : sawLineFeed ? '\n' : sawCarriageReturn ? '\r' : '\n';
  }

  /** Line and column of an offset. */
  positionAt(offset: number): Position {
    const line = this.lineOf(offset);
    return { line, column: offset - this.lineStarts[line]!, offset };
  }

  /** The offset where the line holding `offset` starts. */
  lineStartOffset(offset: number): number {
    return this.lineStarts[this.lineOf(offset)]!;
  }

  /** The offset of the end of the line holding `offset`, before its line ending. */
  lineEndOffset(offset: number): number {
    let index = offset;
    while (index < this.text.length && this.text[index] !== '\n' && this.text[index] !== '\r') index++;
    return index;
  }

  /** The last line whose start is at or before `offset`. */
  private lineOf(offset: number): number {
    let low = 0;
    let high = this.lineStarts.length - 1;
    while (low < high) {
      const middle = (low + high + 1) >> 1;
      if (this.lineStarts[middle]! <= offset) low = middle;
      else high = middle - 1;
    }
    return low;
  }
}

/** The white space before the statement on its first line. */
export function indentationOf(located: LocatedStatement): string {
  const start = located.statement.range.start.offset;
  const before = located.text.slice(located.lines.lineStartOffset(start), start);
  return /^[ \t]*$/.test(before) ? before : '';
}

export function replaceEdit(uri: string, range: Range, newText: string): TextEdit {
  return { uri, range, newText };
}

export function insertEdit(uri: string, lines: LineIndex, offset: number, newText: string): TextEdit {
  const position = lines.positionAt(offset);
  return { uri, range: { start: position, end: position }, newText };
}

/** An edit adding whole lines after the statement's last line (after its inline comment, before the line ending). */
export function linesAfter(located: LocatedStatement, lines: readonly string[]): TextEdit {
  const eol = located.lines.lineEnding;
  const end = located.lines.lineEndOffset(located.statement.range.end.offset);
  const indentation = indentationOf(located);
  return insertEdit(located.uri, located.lines, end, lines.map((line) => `${eol}${indentation}${line}`).join(''));
}

/** An edit adding whole lines before the statement's first line, with its indentation. */
export function linesBefore(located: LocatedStatement, lines: readonly string[]): TextEdit {
  const eol = located.lines.lineEnding;
  const start = located.lines.lineStartOffset(located.statement.range.start.offset);
  const indentation = indentationOf(located);
  return insertEdit(located.uri, located.lines, start, lines.map((line) => `${indentation}${line}${eol}`).join(''));
}

/** The words of an element line that are nodes: the first `count` positional fields, when they are plain words or numbers. */
export function nodeFields(statement: ElementStatement, count: number): (Field & { kind: 'word' | 'number' })[] | undefined {
  const positional = statement.fields.filter((field) => field.kind !== 'assign');
  const nodes = positional.slice(0, count);
  if (nodes.length < count) return undefined;
  if (!nodes.every((field): field is Field & { kind: 'word' | 'number' } => field.kind === 'word' || field.kind === 'number')) return undefined;
  return nodes;
}
