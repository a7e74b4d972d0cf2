// What every editor feature reads: the open document, its syntax tree (the analysed
// one when it is current), the definitions it can see, and the last check's results.
import { parse, type ParseResult } from '@pnlint/grammar';
import type { Connection, TextDocuments } from 'vscode-languageserver';
import type { TextDocument } from 'vscode-languageserver-textdocument';
import type { DiodeReport } from '../checks/index.js';
import type { Checked, Checker } from './checking.js';
import { buildIndex, IncludedSyntaxCache, type SyntaxIndex } from './syntax.js';
import { uriKey, type Workspace } from './workspace.js';

/**
 * How long a hover or an inlay-hint request waits for the diode reports, which the worker
 * sends just after the findings (ours: their transfer takes milliseconds, even for thousands of diodes).
 */
const DIODES_WAIT_MILLISECONDS = 1_000;

export class FeatureContext {
  private readonly parsed = new Map<string, { version: number; library: boolean; syntax: ParseResult }>();
  readonly includedSyntax = new IncludedSyntaxCache();

  constructor(
    readonly connection: Connection,
    readonly documents: TextDocuments<TextDocument>,
    readonly workspace: Workspace,
    readonly checker: Checker,
  ) {}

  log(message: string): void {
    this.connection.console.info(message);
  }

  /** The document's syntax tree for its current text. */
  syntax(document: TextDocument): ParseResult {
    const library = this.checker.isLibrary(document.uri);
    const cached = this.parsed.get(document.uri);
    if (cached && cached.version === document.version && cached.library === library) return cached.syntax;
    const syntax = parse(document.getText(), { isInclude: library });
    this.parsed.set(document.uri, { version: document.version, library, syntax });
    return syntax;
  }

  /** Every definition visible from the document, its includes' included. */
  index(document: TextDocument): SyntaxIndex {
    return buildIndex(document.uri, this.syntax(document), this.workspace.createReader((message) => this.log(message)), this.includedSyntax);
  }

  /** The last published check, only when it was made from the document's current text. */
  current(document: TextDocument): Checked | undefined {
    const checked = this.checker.latest(document.uri);
    return checked && checked.version === document.version ? checked : undefined;
  }

  /** Resolves when the current check's diode reports are in (or will not come), or after a bounded wait. */
  async diodesArrived(uri: string): Promise<void> {
    const document = this.documents.get(uri);
    const checked = document && this.current(document);
    if (!checked) return;
    let timer: NodeJS.Timeout | undefined;
    await Promise.race([checked.diodesSettled, new Promise<void>((resolve) => (timer = setTimeout(resolve, DIODES_WAIT_MILLISECONDS)))]);
    clearTimeout(timer);
  }

  /**
   * The current check's reports of the diodes written on `line` of the document: one per
   * instance when the line is inside a subcircuit (`X1.D1`, `X2.D1`).
   */
  diodeReportsAt(document: TextDocument, line: number): DiodeReport[] {
    const reports = this.current(document)?.diodes ?? [];
    const key = uriKey(document.uri);
    return reports.filter((report) => report.location.range.start.line === line && uriKey(report.location.uri) === key);
  }

  forget(uri: string): void {
    this.parsed.delete(uri);
    this.includedSyntax.forget(uri);
  }
}
