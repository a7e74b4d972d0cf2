// The language server, wired in one place: capabilities, document sync, settings,
// workspace folders and watched files, and one handler per feature file.
import {
  CodeActionKind,
  DidChangeConfigurationNotification,
  DidChangeWatchedFilesNotification,
  FileChangeType,
  TextDocumentSyncKind,
  TextDocuments,
  type ClientCapabilities,
  type Connection,
  type InitializeResult,
} from 'vscode-languageserver';
import { TextDocument } from 'vscode-languageserver-textdocument';
import { Checker } from './checking.js';
import { codeActions, FIX_ALL_KIND } from './code-actions.js';
import { completion } from './completion.js';
import { FeatureContext } from './context.js';
import { definition } from './definition.js';
import { hover } from './hover.js';
import { inlayHints } from './inlay-hints.js';
import { operatingPoint } from './operating-point.js';
import { OPERATING_POINT_REQUEST, type InitializationOptions, type OperatingPointParams } from './protocol.js';
import { RulePages } from './rule-pages.js';
import { InlineRunner, WorkerRunner, type AnalysisRunner } from './runner.js';
import { readServerSettings, type ServerSettings } from './settings.js';
import { documentSymbols } from './symbols.js';
import { CONFIG_FILE_NAME, uriKey, Workspace } from './workspace.js';

export interface ServerOptions {
  /** Where the rule pages are, when not beside the running script (see rule-pages.ts). */
  rulePagesDirectory?: string;
  /**
   * A script that runs the analysis worker when started as a worker thread (entry.ts is
   * one). Without it, analyses run in the protocol thread.
   */
  analysisWorker?: URL;
  /** A runner already started (entry.ts starts the worker before loading the server); it wins over `analysisWorker`. */
  runner?: AnalysisRunner;
}

/** Files whose change on disk can change a check: netlists, libraries, and pnlint.json. */
const WATCHED_GLOBS = [`**/${CONFIG_FILE_NAME}`, '**/*.{cir,net,sp,spi,spice,ckt,lib,inc,mod,lib.sp}'];

/** Runs a handler so that a bug in one feature is logged and answered with `fallback`, never a crash. */
function guarded<P, R>(connection: Connection, name: string, fallback: R, handler: (params: P) => R): (params: P) => R {
  return (params: P) => {
    try {
      return handler(params);
    } catch (error) {
      connection.console.error(`${name} failed: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}`);
      return fallback;
    }
  };
}

/** The same for a handler that answers later. */
function guardedAsync<P, R>(connection: Connection, name: string, fallback: R, handler: (params: P) => Promise<R>): (params: P) => Promise<R> {
  return async (params: P) => {
    try {
      return await handler(params);
    } catch (error) {
      connection.console.error(`${name} failed: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}`);
      return fallback;
    }
  };
}

export function startLanguageServer(connection: Connection, options: ServerOptions = {}): void {
  const documents = new TextDocuments(TextDocument);
  const workspace = new Workspace(documents);
  const pages = new RulePages(options.rulePagesDirectory);
  let capabilities: ClientCapabilities = {};
  let initialization: InitializationOptions = {};
  /** Settings pushed by `didChangeConfiguration` (for clients without `workspace/configuration`). */
  let pushedSettings: unknown = undefined;
  const settingsCache = new Map<string, Promise<ServerSettings>>();
  const log = (message: string) => connection.console.info(message);

  const settingsFor = (uri: string): Promise<ServerSettings> => {
    let cached = settingsCache.get(uri);
    if (!cached) {
      const restricted = initialization.restricted === true;
      cached = capabilities.workspace?.configuration
        ? connection.workspace.getConfiguration({ scopeUri: uri, section: 'pnlint' }).then(
            (section: unknown) => readServerSettings(section ?? pushedSettings ?? initialization.settings, restricted, log),
            () => readServerSettings(pushedSettings ?? initialization.settings, restricted, log),
          )
        : Promise.resolve(readServerSettings(pushedSettings ?? initialization.settings, restricted, log));
      settingsCache.set(uri, cached);
    }
    return cached;
  };

  const refreshInlayHints = () => {
    if (capabilities.workspace?.inlayHint?.refreshSupport) void connection.languages.inlayHint.refresh().catch(() => undefined);
  };
  const runner: AnalysisRunner = options.runner ?? (options.analysisWorker ? new WorkerRunner(options.analysisWorker, log) : new InlineRunner(log));
  const checker = new Checker(connection, documents, workspace, settingsFor, pages, runner, refreshInlayHints);
  const context = new FeatureContext(connection, documents, workspace, checker);

  connection.onInitialize((params): InitializeResult => {
    capabilities = params.capabilities;
    initialization = (params.initializationOptions ?? {}) as InitializationOptions;
    workspace.restricted = initialization.restricted === true;
    const folders = params.workspaceFolders?.map((folder) => folder.uri) ?? (params.rootUri ? [params.rootUri] : []);
    workspace.setFolders(folders);
    return {
      capabilities: {
        textDocumentSync: { openClose: true, change: TextDocumentSyncKind.Incremental },
        hoverProvider: true,
        definitionProvider: true,
        documentSymbolProvider: true,
        inlayHintProvider: true,
        completionProvider: { triggerCharacters: ['.', '='] },
        codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix, FIX_ALL_KIND] },
        workspace: { workspaceFolders: { supported: true, changeNotifications: true } },
      },
      serverInfo: { name: 'pnlint' },
    };
  });

  connection.onInitialized(() => {
    if (capabilities.workspace?.didChangeConfiguration?.dynamicRegistration) {
      void connection.client.register(DidChangeConfigurationNotification.type, { section: 'pnlint' });
    }
    if (capabilities.workspace?.didChangeWatchedFiles?.dynamicRegistration) {
      void connection.client.register(DidChangeWatchedFilesNotification.type, { watchers: WATCHED_GLOBS.map((globPattern) => ({ globPattern })) });
    }
    if (capabilities.workspace?.workspaceFolders) {
      connection.workspace.onDidChangeWorkspaceFolders((event) => {
        workspace.addFolders(event.added.map((f) => f.uri), event.removed.map((f) => f.uri));
        settingsCache.clear();
        checker.recheckAll();
      });
    }
    runner.warmUp();
    log(`pnlint language server started${workspace.restricted ? ' (restricted: untrusted workspace)' : ''}`);
  });

  connection.onDidChangeConfiguration((change) => {
    const settings = (change.settings as Record<string, unknown> | null | undefined)?.['pnlint'];
    if (settings !== undefined) pushedSettings = settings;
    settingsCache.clear();
    checker.recheckAll();
  });

  // Fired on open too: an opened file's editor text also replaces what its includers read from disk.
  documents.onDidChangeContent((event) => {
    context.forget(event.document.uri);
    checker.schedule(event.document.uri);
    checker.recheckDependents(event.document.uri);
  });
  documents.onDidClose((event) => {
    context.forget(event.document.uri);
    settingsCache.delete(event.document.uri);
    checker.close(event.document.uri);
  });

  connection.onDidChangeWatchedFiles((event) => {
    for (const change of event.changes) {
      context.forget(change.uri);
      // An open document's editor text governs, not the disk.
      if (change.type !== FileChangeType.Deleted && workspace.openDocument(change.uri)) continue;
      if (uriKey(change.uri).endsWith(CONFIG_FILE_NAME)) log(`${change.uri} changed: re-checking the files it governs`);
      checker.recheckDependents(change.uri);
    }
  });

  const versionedEdits = () => capabilities.workspace?.workspaceEdit?.documentChanges === true;
  // Hover and inlay hints read the diode reports, which arrive just after the diagnostics.
  connection.onHover(guardedAsync(connection, 'hover', null, async (params) => {
    await context.diodesArrived(params.textDocument.uri);
    return hover(context, params);
  }));
  connection.onDefinition(guarded(connection, 'definition', null, (params) => definition(context, params)));
  connection.onDocumentSymbol(guarded(connection, 'document symbols', [], (params) => documentSymbols(context, params)));
  connection.languages.inlayHint.on(guardedAsync(connection, 'inlay hints', [], async (params) => {
    await context.diodesArrived(params.textDocument.uri);
    return inlayHints(context, params);
  }));
  connection.onCompletion(guarded(connection, 'completion', [], (params) => completion(context, params)));
  connection.onCodeAction(guardedAsync(connection, 'code actions', [], (params) => codeActions(context, params, { versionedEdits: versionedEdits() })));
  connection.onRequest(OPERATING_POINT_REQUEST, async (params: OperatingPointParams) => {
    try {
      return await operatingPoint(context, runner, params);
    } catch (error) {
      connection.console.error(`${OPERATING_POINT_REQUEST} failed: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}`);
      return 'pnlint could not build the operating-point report; see the pnlint output channel.\n';
    }
  });


  connection.onShutdown(() => runner.dispose());
  documents.listen(connection);
  connection.listen();
}
