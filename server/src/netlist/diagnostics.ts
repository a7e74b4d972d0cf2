// Collects the diagnostics of one elaboration. A subcircuit body is elaborated
// once per instance, so the same problem at the same place would be reported
// once per instance: the sink keeps only the first of identical reports.
// The syntax tree gives offsets (spans); the sink turns them into the lines and
// columns of a SourceLocation with each file's line index.
import type { LineIndex, Range, Severity, Span } from '@pnlint/grammar';
import type { NetlistDiagnostic, SourceLocation } from './circuit.js';

export type DiagnosticExtras = Pick<NetlistDiagnostic, 'related' | 'suggestions' | 'element'>;

/** The start of a file: where problems with no place of their own are reported. */
export const FILE_START: Span = { start: 0, end: 0 };

const NO_RANGE: Range = { start: { line: 0, column: 0, offset: 0 }, end: { line: 0, column: 0, offset: 0 } };

export class DiagnosticSink {
  readonly diagnostics: NetlistDiagnostic[] = [];
  private readonly seen = new Set<string>();

  /** `lines(uri)`: the line index of a file read so far (undefined before it is read). */
  constructor(private readonly lines: (uri: string) => LineIndex | undefined = () => undefined) {}

  /** Where `span` is in the file at `uri`, in lines and columns. */
  location(uri: string, span: Span): SourceLocation {
    return { uri, range: this.lines(uri)?.range(span) ?? NO_RANGE };
  }

  add(diagnostic: NetlistDiagnostic): void {
    const { uri, range } = diagnostic.location;
    const key = `${diagnostic.code}\u0000${uri}\u0000${range.start.offset}\u0000${range.end.offset}\u0000${diagnostic.message}`;
    if (this.seen.has(key)) return;
    this.seen.add(key);
    this.diagnostics.push(diagnostic);
  }

  report(severity: Severity, code: string, uri: string, span: Span, message: string, extras: DiagnosticExtras = {}): void {
    this.add({ severity, code, message, location: this.location(uri, span), ...extras });
  }

  error(uri: string, span: Span, message: string, extras?: DiagnosticExtras): void {
    this.report('error', 'netlist', uri, span, message, extras);
  }

  /** An error at a place already in lines and columns (an element's line, say). */
  errorAt(location: SourceLocation, message: string, extras: DiagnosticExtras = {}): void {
    this.add({ severity: 'error', code: 'netlist', message, location, ...extras });
  }

  warning(uri: string, span: Span, message: string, extras?: DiagnosticExtras): void {
    this.report('warning', 'netlist', uri, span, message, extras);
  }

  info(uri: string, span: Span, message: string, extras?: DiagnosticExtras): void {
    this.report('info', 'netlist', uri, span, message, extras);
  }
}
