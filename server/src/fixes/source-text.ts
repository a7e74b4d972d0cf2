// The files of a circuit as text, for writing edits into them: each element's statement
// found again by its position, the words on its line, its indentation and the file's
// own line ending. Edits touch only the words they change, so comments, spacing and
// continuation lines stay as the user wrote them.
import { parse, type ElementStatement, type Field, type ParseResult, type Position, type Range, type Statement } from '@pnlint/grammar';
import type { Circuit, Element } from '../netlist/circuit.js';
import type { TextEdit } from '../findings.js';

/** An element's statement in its file. */
export interface LocatedStatement {
  uri: string;
  text: string;
  statement: ElementStatement;
}

export class SourceFiles {
  private readonly parsed = new Map<string, ParseResult>();

  constructor(private readonly circuit: Circuit) {}

  text(uri: string): string | undefined {
    return this.circuit.files.get(uri);
  }

  /** The file's statements, parsed once (an included file has no title line). */
  statements(uri: string): Statement[] {
    let result = this.parsed.get(uri);
    if (!result) {
      result = parse(this.text(uri) ?? '', { isInclude: uri !== this.circuit.uri });
      this.parsed.set(uri, result);
    }
    return result.statements;
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
    let found: ElementStatement | undefined;
    forEachStatement(this.statements(uri), (statement) => {
      if (!found && statement.kind === 'element' && statement.range.start.offset === range.start.offset) found = statement;
    });
    return found ? { uri, text, statement: found } : undefined;
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

/** The line ending the file already uses, so that an inserted line matches its neighbours. */
export function lineEnding(text: string): string {
  if (text.includes('\r\n')) return '\r\n';
  if (text.includes('\n')) return '\n';
  return text.includes('\r') ? '\r' : '\n';
}

/** Line and column of an offset, counting `\r\n`, `\n` and `\r` as line ends (as the grammar does). */
export function positionAt(text: string, offset: number): Position {
  let line = 0;
  let lineStart = 0;
  for (let index = 0; index < offset; index++) {
    const code = text.charCodeAt(index);
    // A \r followed by \n ends its line at the \n.
    if (code === 10 || (code === 13 && text.charCodeAt(index + 1) !== 10)) {
      line++;
      lineStart = index + 1;
    }
  }
  return { line, column: offset - lineStart, offset };
}

/** The offset where the line holding `offset` starts. */
export function lineStartOffset(text: string, offset: number): number {
  let index = offset;
  while (index > 0 && text[index - 1] !== '\n' && text[index - 1] !== '\r') index--;
  return index;
}

/** The offset of the end of the line holding `offset`, before its line ending. */
export function lineEndOffset(text: string, offset: number): number {
  let index = offset;
  while (index < text.length && text[index] !== '\n' && text[index] !== '\r') index++;
  return index;
}

/** The white space before the statement on its first line. */
export function indentationOf(located: LocatedStatement): string {
  const start = located.statement.range.start.offset;
  const before = located.text.slice(lineStartOffset(located.text, start), start);
  return /^[ \t]*$/.test(before) ? before : '';
}

export function replaceEdit(uri: string, range: Range, newText: string): TextEdit {
  return { uri, range, newText };
}

export function insertEdit(uri: string, text: string, offset: number, newText: string): TextEdit {
  const position = positionAt(text, offset);
  return { uri, range: { start: position, end: position }, newText };
}

/** An edit adding whole lines after the statement's last line (after its inline comment, before the line ending). */
export function linesAfter(located: LocatedStatement, lines: readonly string[]): TextEdit {
  const eol = lineEnding(located.text);
  const end = lineEndOffset(located.text, located.statement.range.end.offset);
  const indentation = indentationOf(located);
  return insertEdit(located.uri, located.text, end, lines.map((line) => `${eol}${indentation}${line}`).join(''));
}

/** An edit adding whole lines before the statement's first line, with its indentation. */
export function linesBefore(located: LocatedStatement, lines: readonly string[]): TextEdit {
  const eol = lineEnding(located.text);
  const start = lineStartOffset(located.text, located.statement.range.start.offset);
  const indentation = indentationOf(located);
  return insertEdit(located.uri, located.text, start, lines.map((line) => `${indentation}${line}${eol}`).join(''));
}

/** The words of an element line that are nodes: the first `count` positional fields, when they are plain words or numbers. */
export function nodeFields(statement: ElementStatement, count: number): (Field & { kind: 'word' | 'number' })[] | undefined {
  const positional = statement.fields.filter((field) => field.kind !== 'assign');
  const nodes = positional.slice(0, count);
  if (nodes.length < count) return undefined;
  if (!nodes.every((field): field is Field & { kind: 'word' | 'number' } => field.kind === 'word' || field.kind === 'number')) return undefined;
  return nodes;
}
