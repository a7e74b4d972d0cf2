// When and what to check: each open document is analysed after a pause in typing
// (debounced); a newer edit cancels the older analysis, and a result for a text that
// is no longer current is never published. A change to a file that an analysis read
// (an include, a pnlint.json) re-checks the documents that read it. The findings are
// published as soon as they are known; their verified fixes follow (the runner's second
// phase) and are kept for code actions, which wait for them a little.
import { CancellationTokenSource, DiagnosticSeverity, type Connection, type Diagnostic, type TextDocuments } from 'vscode-languageserver';
import type { TextDocument } from 'vscode-languageserver-textdocument';
import { parse } from '@pnlint/grammar';
import type { DiodeReport } from '../checks/index.js';
import type { Finding } from '../findings.js';
import { toDiagnostic } from './diagnostics.js';
import type { RulePages } from './rule-pages.js';
import type { ServerSettings } from './settings.js';
import { uriKey, type Workspace } from './workspace.js';
import { STATUS_NOTIFICATION, type StatusParams } from './protocol.js';
import type { AnalysisRunner, FixedFindings, Run, RunResult } from './runner.js';
import type { CombinedFixes } from '../fixes/combined.js';

/** The last published check of one document, kept for hover, code actions and the rest. */
export interface Checked {
  uri: string;
  /** Checked as a library (see Checker.isLibrary): its syntax only. */
  library: boolean;
  /** The document version analysed. */
  version: number;
  /** Without fixes until `fixesReady`; then the same findings, in the same order, with them. */
  findings: Finding[];
  /** Empty until the reports arrive, just after the findings (see `diodesSettled`). */
  diodes: DiodeReport[];
  /** True once the findings carry their verified fixes. */
  fixesReady: boolean;
  /** Once the fixes are ready: the preferred ones that passed a re-check applied together ("fix all"). */
  fixAll: CombinedFixes | undefined;
  /** Settles when the fixes are in `findings`, or will not come (a newer edit, a failure). */
  fixesSettled: Promise<void>;
  /** Settles when the diode reports are in `diodes`, or will not come. */
  diodesSettled: Promise<void>;
  settings: ServerSettings;
  /** uri → version of each open document read (undefined: read from disk). */
  versionsRead: Map<string, number | undefined>;
  /** uri keys of every file the analysis read or looked for, and its pnlint.json. */
  dependencies: Set<string>;
}

/** Files that are libraries by name: `.lib` and `.inc` (product.md's language table). */
const LIBRARY_EXTENSION = /\.(lib|inc)$/i;

interface DocumentState {
  timer?: NodeJS.Timeout;
  running?: CancellationTokenSource;
  checked?: Checked;
}

export class Checker {
  private readonly states = new Map<string, DocumentState>();
  /** target uri → analysed document uri → its diagnostics in the target. */
  private readonly published = new Map<string, Map<string, Diagnostic[]>>();

  constructor(
    private readonly connection: Connection,
    private readonly documents: TextDocuments<TextDocument>,
    private readonly workspace: Workspace,
    private readonly settingsFor: (uri: string) => Promise<ServerSettings>,
    private readonly pages: RulePages,
    private readonly runner: AnalysisRunner,
    /** Called after a document's check is published (the server refreshes inlay hints). */
    private readonly afterPublish: (uri: string) => void = () => {},
  ) {}

  private state(uri: string): DocumentState {
    let state = this.states.get(uri);
    if (!state) {
      state = {};
      this.states.set(uri, state);
    }
    return state;
  }

  latest(uri: string): Checked | undefined {
    return this.states.get(uri)?.checked;
  }

  /**
   * Library files (`.lib`, `.inc`, or a file that another open netlist includes) have no
   * title line and are no circuit of their own: only their syntax is checked as such, and
   * their circuit findings come from the netlists that include them.
   */
  isLibrary(uri: string): boolean {
    if (LIBRARY_EXTENSION.test(uri)) return true;
    const key = uriKey(uri);
    for (const [other, state] of this.states) {
      if (uriKey(other) !== key && state.checked && !state.checked.library && state.checked.dependencies.has(key)) return true;
    }
    return false;
  }

  /** Checks `uri` after the debounce delay; an analysis still pending or running for it is cancelled. */
  schedule(uri: string, delayMilliseconds?: number): void {
    const state = this.state(uri);
    if (state.timer) clearTimeout(state.timer);
    state.running?.cancel();
    const source = new CancellationTokenSource();
    state.running = source;
    const start = (delay: number) => {
      state.timer = setTimeout(() => {
        state.timer = undefined;
        void this.run(uri, source);
      }, delay);
    };
    if (delayMilliseconds !== undefined) start(delayMilliseconds);
    else void this.settingsFor(uri).then((settings) => !source.token.isCancellationRequested && start(settings.debounceMilliseconds), () => start(0));
  }

  /** Re-checks every open document that read `uri` (other than `uri` itself). */
  recheckDependents(uri: string): void {
    const key = uriKey(uri);
    for (const [documentUri, state] of this.states) {
      if (uriKey(documentUri) !== key && state.checked?.dependencies.has(key) && this.documents.get(documentUri)) this.schedule(documentUri);
    }
  }

  recheckAll(): void {
    for (const document of this.documents.all()) this.schedule(document.uri);
  }

  /** The document was closed: forget it, clear its diagnostics, and re-check what included it (now from disk). */
  close(uri: string): void {
    const state = this.states.get(uri);
    if (state?.timer) clearTimeout(state.timer);
    state?.running?.cancel();
    this.states.delete(uri);
    this.runner.forget(uri);
    this.replaceContributions(uri, new Map(), undefined);
    this.recheckDependents(uri);
  }

  private async run(uri: string, source: CancellationTokenSource): Promise<void> {
    const token = source.token;
    const document = this.documents.get(uri);
    if (!document || token.isCancellationRequested) return;
    const version = document.version;
    let settings: ServerSettings;
    try {
      settings = await this.settingsFor(uri);
    } catch (error) {
      this.connection.console.error(`settings for ${uri}: ${String(error)}`);
      return;
    }
    if (token.isCancellationRequested || this.documents.get(uri)?.version !== version) return;

    const workspaceRoot = this.workspace.folderUriOf(uri);
    const library = this.isLibrary(uri);
    let analysis: RunResult;
    let run: Run;
    try {
      run = library ? syntaxOnlyRun(uri, document.getText()) : this.runner.run(
        {
          uri,
          text: document.getText(),
          settings: settings.core,
          config: this.workspace.readConfig(uri),
          workspaceRoot,
          folders: this.workspace.folderUris(),
          openDocuments: this.documents.all().map((open) => ({ uri: open.uri, version: open.version, text: open.getText() })),
        },
        token,
      );
      analysis = await run.diagnostics;
    } catch (error) {
      if (token.isCancellationRequested) return;
      this.reportInternalError(uri, version, error);
      return;
    }
    if (!analysis.complete) {
      this.connection.console.info(`check of ${uri} (version ${version}) stopped early: the text changed`);
      return;
    }
    // Only the current text's results are shown: an edit since then has scheduled a newer check.
    if (token.isCancellationRequested || this.documents.get(uri)?.version !== version) return;

    const dependencies = new Set<string>([...analysis.filesRead.map(uriKey), ...analysis.asked]);
    const configUri = this.workspace.configUriFor(uri);
    if (configUri) dependencies.add(uriKey(configUri));
    const checked: Checked = {
      uri,
      library,
      version,
      findings: analysis.findings,
      diodes: [],
      fixesReady: library,
      fixAll: undefined,
      fixesSettled: Promise.resolve(),
      diodesSettled: Promise.resolve(),
      settings,
      versionsRead: new Map(analysis.versionsRead),
      dependencies,
    };
    // Still the one shown, for the text it was made from.
    const isShown = () => !token.isCancellationRequested && this.states.get(uri)?.checked === checked && this.documents.get(uri)?.version === version;
    checked.diodesSettled = run.diodes.then((diodes) => {
      if (!diodes || !isShown()) return;
      checked.diodes = diodes;
      this.afterPublish(uri);
    });
    checked.fixesSettled = run.fixes.then((fixed) => {
      if (fixed && isShown()) this.takeFixes(checked, fixed);
    });
    this.state(uri).checked = checked;
    // Open files it includes that were checked as netlists of their own are libraries now.
    if (!library) {
      for (const [other, state] of this.states) {
        if (other !== uri && state.checked && !state.checked.library && dependencies.has(uriKey(other))) this.schedule(other);
      }
    }
    this.publish(checked);
    this.sendStatus(uri, version, analysis.milliseconds);
  }

  /** The second phase's findings replace the first's; a message that changed (a note on why no fix exists) is published again. */
  private takeFixes(checked: Checked, fixed: FixedFindings): void {
    const changed = fixed.findings.some((finding, index) => finding.message !== checked.findings[index]?.message);
    checked.findings = fixed.findings;
    checked.fixAll = fixed.fixAll;
    checked.fixesReady = true;
    if (changed) this.publish(checked);
  }

  /** Publishes a check's diagnostics in every file its findings are in. */
  private publish(checked: Checked): void {
    const contributions = new Map<string, Diagnostic[]>();
    checked.findings.forEach((finding, index) => {
      const diagnostic = toDiagnostic(finding, checked.settings.core, this.pages, { analyzed: checked.uri, version: checked.version, index });
      if (!diagnostic) return;
      const target = this.workspace.openDocument(finding.location.uri)?.uri ?? finding.location.uri;
      let list = contributions.get(target);
      if (!list) contributions.set(target, (list = []));
      list.push(diagnostic);
    });
    if (!contributions.has(checked.uri)) contributions.set(checked.uri, []);
    this.replaceContributions(checked.uri, contributions, checked.version);
  }

  /** Replaces what the analysis of `analyzed` contributes to each file, and publishes the files that changed. */
  private replaceContributions(analyzed: string, contributions: Map<string, Diagnostic[]>, version: number | undefined): void {
    const targets = new Set<string>(contributions.keys());
    for (const [target, bySource] of this.published) if (bySource.has(analyzed)) targets.add(target);
    for (const target of targets) {
      let bySource = this.published.get(target);
      if (!bySource) this.published.set(target, (bySource = new Map()));
      const diagnostics = contributions.get(target);
      if (diagnostics) bySource.set(analyzed, diagnostics);
      else bySource.delete(analyzed);
      const all = dedupe([...bySource.values()].flat());
      if (bySource.size === 0) this.published.delete(target);
      void this.connection.sendDiagnostics({ uri: target, diagnostics: all, ...(target === analyzed && version !== undefined ? { version } : {}) });
    }
  }

  /** The diagnostics now shown for `uri`, from every analysis that reaches it. */
  shown(uri: string): Diagnostic[] {
    return dedupe([...(this.published.get(uri)?.values() ?? [])].flat());
  }

  private sendStatus(uri: string, version: number, milliseconds: number): void {
    const shown = this.shown(uri);
    const status: StatusParams = {
      uri,
      version,
      errors: shown.filter((d) => d.severity === DiagnosticSeverity.Error).length,
      warnings: shown.filter((d) => d.severity === DiagnosticSeverity.Warning).length,
      milliseconds: Math.round(milliseconds * 10) / 10,
    };
    void this.connection.sendNotification(STATUS_NOTIFICATION, status);
  }

  private reportInternalError(uri: string, version: number, error: unknown): void {
    const detail = error instanceof Error ? (error.stack ?? error.message) : String(error);
    this.connection.console.error(`internal error while checking ${uri}: ${detail}`);
    const diagnostic: Diagnostic = {
      range: { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } },
      severity: DiagnosticSeverity.Information,
      source: 'pnlint',
      message: 'pnlint could not check this file: it stopped on an internal error (details in the pnlint output channel). Please report it with the netlist.',
    };
    this.replaceContributions(uri, new Map([[uri, [diagnostic]]]), version);
  }
}

/** A library's own check, done here: its syntax, read as an included file (no title line). */
function syntaxOnlyRun(uri: string, text: string): Run {
  return { diagnostics: Promise.resolve(checkSyntaxOnly(uri, text)), diodes: Promise.resolve([]), fixes: Promise.resolve(undefined) };
}

function checkSyntaxOnly(uri: string, text: string): RunResult {
  const started = performance.now();
  const findings: Finding[] = parse(text, { isInclude: true }).diagnostics.map((diagnostic) => ({
    rule: diagnostic.code,
    severity: diagnostic.severity,
    message: diagnostic.message,
    location: { uri, range: diagnostic.range },
    related: [],
    fixes: [],
  }));
  return { findings, filesRead: [uri], versionsRead: [], asked: [], complete: true, milliseconds: performance.now() - started };
}

/** Two analyses that include the same file report its findings twice: show each once. */
function dedupe(diagnostics: Diagnostic[]): Diagnostic[] {
  const seen = new Set<string>();
  return diagnostics.filter((d) => {
    const key = `${d.range.start.line}:${d.range.start.character}:${d.range.end.line}:${d.range.end.character}:${String(d.code)}:${d.message}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}
