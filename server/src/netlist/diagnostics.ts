// Collects the diagnostics of one elaboration. A subcircuit body is elaborated
// once per instance, so the same problem at the same place would be reported
// once per instance: the sink keeps only the first of identical reports.
import type { Range, Severity } from '@pnlint/grammar';
import type { NetlistDiagnostic, SourceLocation } from './circuit.js';

export type DiagnosticExtras = Pick<NetlistDiagnostic, 'related' | 'suggestions' | 'element'>;

export class DiagnosticSink {
  readonly diagnostics: NetlistDiagnostic[] = [];
  private readonly seen = new Set<string>();

  add(diagnostic: NetlistDiagnostic): void {
    const { uri, range } = diagnostic.location;
    const key = `${diagnostic.code}\u0000${uri}\u0000${range.start.offset}\u0000${range.end.offset}\u0000${diagnostic.message}`;
    if (this.seen.has(key)) return;
    this.seen.add(key);
    this.diagnostics.push(diagnostic);
  }

  report(severity: Severity, code: string, uri: string, range: Range, message: string, extras: DiagnosticExtras = {}): void {
    const location: SourceLocation = { uri, range };
    this.add({ severity, code, message, location, ...extras });
  }

  error(uri: string, range: Range, message: string, extras?: DiagnosticExtras): void {
    this.report('error', 'netlist', uri, range, message, extras);
  }

  warning(uri: string, range: Range, message: string, extras?: DiagnosticExtras): void {
    this.report('warning', 'netlist', uri, range, message, extras);
  }

  info(uri: string, range: Range, message: string, extras?: DiagnosticExtras): void {
    this.report('info', 'netlist', uri, range, message, extras);
  }
}
