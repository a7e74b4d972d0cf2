// The files of a circuit as text, for writing edits into them: each element's statement
// found again by its position, the words on its line, its indentation and the file's
// own line ending. Edits touch only the words they change, so comments, spacing and
// continuation lines stay as the user wrote them. Each file is parsed, and its lines and
// statements indexed, once per session: a board with thousands of findings asks for
// thousands of positions in the same text.
import { parse, type ElementStatement, type Field, type LineIndex, type ParseResult, type Span, type Statement } from '@pnlint/grammar';
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

/** A file's parse (with its line index) and its element statements by start offset. */
interface IndexedFile {
  parsed: ParseResult;
  elementsByOffset: Map<number, ElementStatement>;
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
    return found ? { uri, text, statement: found, lines: file.parsed.lines } : undefined;
  }

  private indexOf(uri: string): IndexedFile {
    let file = this.indexed.get(uri);
    if (!file) {
      const text = this.text(uri) ?? '';
      const parsed = this.circuit.syntax?.get(uri) ?? parse(text, { isInclude: uri !== this.circuit.uri });
      const elementsByOffset = new Map<number, ElementStatement>();
      forEachStatement(parsed.statements, (statement) => {
        // The first statement at an offset, as a search from the top would find it.
        if (statement.kind === 'element' && !elementsByOffset.has(statement.span.start)) elementsByOffset.set(statement.span.start, statement);
      });
      file = { parsed, elementsByOffset };
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

/** The white space before the statement on its first line. */
export function indentationOf(located: LocatedStatement): string {
  const start = located.statement.span.start;
  const before = located.text.slice(located.lines.lineStartOf(start), start);
  return /^[ \t]*$/.test(before) ? before : '';
}

/** An edit replacing the words at `span` of a located statement's file. */
export function replaceEdit(located: LocatedStatement, span: Span, newText: string): TextEdit {
  return { uri: located.uri, range: located.lines.range(span), newText };
}

export function insertEdit(uri: string, lines: LineIndex, offset: number, newText: string): TextEdit {
  const position = lines.position(offset);
  return { uri, range: { start: position, end: position }, newText };
}

/** An edit adding whole lines after the statement's last line (after its inline comment, before the line ending). */
export function linesAfter(located: LocatedStatement, lines: readonly string[]): TextEdit {
  const eol = located.lines.lineEnding;
  const end = located.lines.lineEndOf(located.statement.span.end);
  const indentation = indentationOf(located);
  return insertEdit(located.uri, located.lines, end, lines.map((line) => `${eol}${indentation}${line}`).join(''));
}

/** An edit adding whole lines before the statement's first line, with its indentation. */
export function linesBefore(located: LocatedStatement, lines: readonly string[]): TextEdit {
  const eol = located.lines.lineEnding;
  const start = located.lines.lineStartOf(located.statement.span.start);
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
