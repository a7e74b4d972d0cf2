// The pnlint extension: a thin client. It starts the language server (which
// does all the analysis), and adds what only the editor can show: commands,
// the status-bar summary, the operating-point report and the rule pages.
import * as vscode from 'vscode';
import {
  LanguageClient,
  TransportKind,
  type LanguageClientOptions,
  type ServerOptions,
} from 'vscode-languageclient/node';

export const LANGUAGE_ID = 'spice-netlist';
/** The code-action kind under which the server offers every preferred fix at once. */
export const FIX_ALL_KIND = 'source.fixAll.pnlint';
const FIX_ALL_CODE_ACTION_KIND = vscode.CodeActionKind.SourceFixAll.append('pnlint');
/** Scheme of the read-only operating-point report documents. */
const OPERATING_POINT_SCHEME = 'pnlint-operating-point';

/** `pnlint/status`, sent by the server after it publishes a file's diagnostics. */
interface StatusNotification {
  uri: string;
  errors: number;
  warnings: number;
  milliseconds: number;
}

/** What the extension hands to tests and to other extensions. */
export interface PnlintApi {
  /** The running client, or undefined while the server is stopped. */
  client(): LanguageClient | undefined;
  /** The last `pnlint/status` the server sent for a document. */
  status(uri: vscode.Uri): StatusNotification | undefined;
  statusBarText(): string;
}

let client: LanguageClient | undefined;
const statusByUri = new Map<string, StatusNotification>();

export async function activate(context: vscode.ExtensionContext): Promise<PnlintApi> {
  const output = vscode.window.createOutputChannel('pnlint');
  context.subscriptions.push(output);

  const statusBar = vscode.window.createStatusBarItem('pnlint.status', vscode.StatusBarAlignment.Left, 50);
  statusBar.name = 'pnlint';
  statusBar.command = 'workbench.actions.view.problems';
  context.subscriptions.push(statusBar);
  const refreshStatusBar = (): void => updateStatusBar(statusBar);

  const operatingPoints = new OperatingPointDocuments();
  context.subscriptions.push(
    vscode.workspace.registerTextDocumentContentProvider(OPERATING_POINT_SCHEME, operatingPoints),
  );

  const start = async (): Promise<void> => {
    client = createClient(context, output);
    client.onNotification('pnlint/status', (status: StatusNotification) => {
      statusByUri.set(status.uri, status);
      refreshStatusBar();
    });
    try {
      await client.start();
    } catch (error) {
      output.appendLine(`pnlint: the language server did not start: ${String(error)}`);
      void vscode.window.showErrorMessage('pnlint: the language server did not start; see the "pnlint" output.');
    }
  };

  context.subscriptions.push(
    vscode.commands.registerCommand('pnlint.showOperatingPoint', (uri?: vscode.Uri) =>
      showOperatingPoint(operatingPoints, uri),
    ),
    vscode.commands.registerCommand('pnlint.fixAll', (uri?: vscode.Uri) => fixAll(uri)),
    vscode.commands.registerCommand('pnlint.restartServer', async () => {
      statusByUri.clear();
      if (client) {
        await client.stop().catch((error: unknown) => output.appendLine(`pnlint: stop failed: ${String(error)}`));
      }
      await start();
      refreshStatusBar();
    }),
    vscode.commands.registerCommand('pnlint.openRulePage', (rule?: string) => openRulePage(context, rule)),
    vscode.window.onDidChangeActiveTextEditor(refreshStatusBar),
    vscode.workspace.onDidCloseTextDocument((document) => {
      statusByUri.delete(document.uri.toString());
      refreshStatusBar();
    }),
    // Trust lifts the restriction on includes outside the workspace: restart without it.
    vscode.workspace.onDidGrantWorkspaceTrust(() => vscode.commands.executeCommand('pnlint.restartServer')),
  );

  await start();
  refreshStatusBar();

  return {
    client: () => client,
    status: (uri) => statusByUri.get(uri.toString()),
    statusBarText: () => statusBar.text,
  };
}

export async function deactivate(): Promise<void> {
  await client?.stop();
  client = undefined;
}

function createClient(context: vscode.ExtensionContext, output: vscode.OutputChannel): LanguageClient {
  const serverModule = context.asAbsolutePath('out/server.js');
  const serverOptions: ServerOptions = {
    run: { module: serverModule, transport: TransportKind.ipc },
    debug: { module: serverModule, transport: TransportKind.ipc, options: { execArgv: ['--nolazy', '--inspect=6011'] } },
  };
  const clientOptions: LanguageClientOptions = {
    documentSelector: [
      { scheme: 'file', language: LANGUAGE_ID },
      { scheme: 'untitled', language: LANGUAGE_ID },
    ],
    synchronize: {
      // Includes and pnlint.json edited outside the editor must re-check the files that use them.
      fileEvents: vscode.workspace.createFileSystemWatcher(
        '**/{pnlint.json,*.cir,*.net,*.sp,*.spi,*.spice,*.ckt,*.lib,*.inc}',
      ),
    },
    initializationOptions: {
      // No include outside the workspace folders is read while the workspace is not trusted.
      restricted: !vscode.workspace.isTrusted,
    },
    outputChannel: output,
    traceOutputChannel: output,
  };
  // The id 'pnlint' makes the client read the `pnlint.trace.server` setting.
  return new LanguageClient('pnlint', 'pnlint', serverOptions, clientOptions);
}

function updateStatusBar(statusBar: vscode.StatusBarItem): void {
  const editor = vscode.window.activeTextEditor;
  if (!editor || editor.document.languageId !== LANGUAGE_ID) {
    statusBar.hide();
    return;
  }
  const status = statusByUri.get(editor.document.uri.toString());
  if (!status) {
    statusBar.text = '$(sync~spin) pnlint';
    statusBar.tooltip = 'pnlint is checking this netlist';
  } else {
    const icon = status.errors > 0 ? '$(error)' : status.warnings > 0 ? '$(warning)' : '$(check)';
    const time = formatMilliseconds(status.milliseconds);
    statusBar.text = `${icon} pnlint ${status.errors} ${plural(status.errors, 'error')}, ${status.warnings} ${plural(status.warnings, 'warning')} · ${time}`;
    statusBar.tooltip = `pnlint: ${status.errors} ${plural(status.errors, 'error')} and ${status.warnings} ${plural(status.warnings, 'warning')} in this netlist; solved in ${time}. Click for the Problems panel.`;
  }
  statusBar.show();
}

function plural(count: number, word: string): string {
  return count === 1 ? word : `${word}s`;
}

function formatMilliseconds(milliseconds: number): string {
  return milliseconds < 10 ? `${milliseconds.toFixed(1)} ms` : `${Math.round(milliseconds)} ms`;
}

function targetDocument(uri: vscode.Uri | undefined): vscode.TextDocument | undefined {
  if (uri) return vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri.toString());
  const document = vscode.window.activeTextEditor?.document;
  return document?.languageId === LANGUAGE_ID ? document : undefined;
}

/**
 * Read-only documents `pnlint-operating-point:/<name>.txt?<netlist uri>` whose
 * text the server computes on request.
 */
class OperatingPointDocuments implements vscode.TextDocumentContentProvider {
  private readonly changed = new vscode.EventEmitter<vscode.Uri>();
  readonly onDidChange = this.changed.event;

  reportUri(netlist: vscode.Uri): vscode.Uri {
    const name = netlist.path.split('/').pop() ?? 'netlist';
    return vscode.Uri.from({ scheme: OPERATING_POINT_SCHEME, path: `/${name} operating point.txt`, query: netlist.toString() });
  }

  refresh(report: vscode.Uri): void {
    this.changed.fire(report);
  }

  async provideTextDocumentContent(report: vscode.Uri, token: vscode.CancellationToken): Promise<string> {
    if (!client) return 'pnlint: the language server is not running.';
    try {
      const text = await client.sendRequest<string>('pnlint/operatingPoint', { uri: report.query }, token);
      return typeof text === 'string' ? text : JSON.stringify(text, null, 2);
    } catch (error) {
      return `pnlint: the operating point could not be computed: ${error instanceof Error ? error.message : String(error)}`;
    }
  }
}

async function showOperatingPoint(documents: OperatingPointDocuments, uri: vscode.Uri | undefined): Promise<void> {
  const netlist = targetDocument(uri);
  if (!netlist) {
    void vscode.window.showInformationMessage('pnlint: open a SPICE netlist to see its operating point.');
    return;
  }
  const report = documents.reportUri(netlist.uri);
  documents.refresh(report);
  const document = await vscode.workspace.openTextDocument(report);
  await vscode.window.showTextDocument(document, { viewColumn: vscode.ViewColumn.Beside, preview: true, preserveFocus: true });
}

async function fixAll(uri: vscode.Uri | undefined): Promise<void> {
  const document = targetDocument(uri);
  if (!document) {
    void vscode.window.showInformationMessage('pnlint: open a SPICE netlist to apply its fixes.');
    return;
  }
  const whole = new vscode.Range(document.positionAt(0), document.positionAt(document.getText().length));
  const actions =
    (await vscode.commands.executeCommand<vscode.CodeAction[]>(
      'vscode.executeCodeActionProvider',
      document.uri,
      whole,
      FIX_ALL_KIND,
    )) ?? [];
  // The server offers one action that carries every preferred fix, already re-simulated.
  const fixAllAction = actions.find((action) => action.kind && FIX_ALL_CODE_ACTION_KIND.contains(action.kind));
  if (!fixAllAction) {
    void vscode.window.showInformationMessage('pnlint: no verified fix to apply in this netlist.');
    return;
  }
  if (fixAllAction.edit) await vscode.workspace.applyEdit(fixAllAction.edit);
  if (fixAllAction.command) {
    await vscode.commands.executeCommand(fixAllAction.command.command, ...(fixAllAction.command.arguments ?? []));
  }
}

async function openRulePage(context: vscode.ExtensionContext, rule: string | undefined): Promise<void> {
  const folder = vscode.Uri.joinPath(context.extensionUri, 'docs', 'rules');
  let id = rule ?? ruleAtCursor();
  if (!id) {
    let names: string[] = [];
    try {
      names = (await vscode.workspace.fs.readDirectory(folder))
        .map(([name]) => name)
        .filter((name) => name.endsWith('.md'))
        .map((name) => name.slice(0, -'.md'.length))
        .sort();
    } catch {
      names = [];
    }
    if (names.length === 0) {
      void vscode.window.showWarningMessage('pnlint: no rule pages are installed with this extension.');
      return;
    }
    id = await vscode.window.showQuickPick(names, { placeHolder: 'Rule to read about' });
    if (!id) return;
  }
  const page = vscode.Uri.joinPath(folder, `${id}.md`);
  try {
    await vscode.workspace.fs.stat(page);
  } catch {
    void vscode.window.showWarningMessage(`pnlint: there is no page for the rule "${id}".`);
    return;
  }
  await vscode.commands.executeCommand('markdown.showPreview', page);
}

/** The rule id of a pnlint diagnostic under the cursor, if there is one. */
function ruleAtCursor(): string | undefined {
  const editor = vscode.window.activeTextEditor;
  if (!editor) return undefined;
  const position = editor.selection.active;
  for (const diagnostic of vscode.languages.getDiagnostics(editor.document.uri)) {
    if (diagnostic.source !== 'pnlint' || !diagnostic.range.contains(position)) continue;
    const code = typeof diagnostic.code === 'object' ? diagnostic.code.value : diagnostic.code;
    if (code !== undefined) return String(code);
  }
  return undefined;
}
