// A real LSP client for the protocol tests: spawns the built server over stdio and
// speaks to it with vscode-languageserver-protocol's node connection.
// PNLINT_SERVER_ENTRY=<script> runs the same tests against another build (e.g. the extension's bundle).
import { spawn, type ChildProcessWithoutNullStreams } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import {
  createProtocolConnection,
  StreamMessageReader,
  StreamMessageWriter,
  type ProtocolConnection,
  type PublishDiagnosticsParams,
  type TextDocumentContentChangeEvent,
} from 'vscode-languageserver-protocol/node.js';

export const SERVER_ENTRY = process.env['PNLINT_SERVER_ENTRY'] ?? fileURLToPath(new URL('../../server/dist/lsp/entry.js', import.meta.url));

export interface StartOptions {
  folders?: string[];
  /** The `pnlint` settings section the client answers `workspace/configuration` with. */
  settings?: Record<string, unknown>;
  initializationOptions?: Record<string, unknown>;
}

export interface Status {
  uri: string;
  version: number;
  errors: number;
  warnings: number;
  milliseconds: number;
}

export class TestClient {
  readonly published: PublishDiagnosticsParams[] = [];
  readonly statuses: Status[] = [];
  readonly logs: string[] = [];
  private waiters: (() => void)[] = [];
  settings: Record<string, unknown>;

  constructor(
    readonly connection: ProtocolConnection,
    readonly process: ChildProcessWithoutNullStreams,
    settings: Record<string, unknown>,
  ) {
    this.settings = settings;
    connection.onNotification('textDocument/publishDiagnostics', (params: PublishDiagnosticsParams) => {
      this.published.push(params);
      this.wake();
    });
    connection.onNotification('pnlint/status', (status: Status) => {
      this.statuses.push(status);
      this.wake();
    });
    connection.onNotification('window/logMessage', (message: { message: string }) => this.logs.push(message.message));
    connection.onRequest('workspace/configuration', (params: { items: unknown[] }) => params.items.map(() => this.settings));
    connection.onRequest('client/registerCapability', () => null);
  }

  private wake(): void {
    const waiters = this.waiters;
    this.waiters = [];
    for (const wake of waiters) wake();
  }

  /** Waits until `predicate` holds over what was received, or fails after `timeout` ms. */
  async until<T>(predicate: () => T | undefined | false, what: string, timeout = 10_000): Promise<T> {
    const deadline = Date.now() + timeout;
    for (;;) {
      const value = predicate();
      if (value) return value;
      const left = deadline - Date.now();
      if (left <= 0) throw new Error(`timed out waiting for ${what}; received: ${JSON.stringify(this.published.map((p) => [p.uri, p.version, p.diagnostics.length]))}`);
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, left);
        this.waiters.push(() => {
          clearTimeout(timer);
          resolve();
        });
      });
    }
  }

  /** The next diagnostics published for `uri` after `after` earlier publishes (default: the next new one). */
  async diagnostics(uri: string, options: { after?: number; version?: number } = {}): Promise<PublishDiagnosticsParams> {
    const after = options.after ?? this.publishedFor(uri).length;
    return this.until(() => {
      const list = this.publishedFor(uri).slice(after);
      return list.find((p) => options.version === undefined || p.version === options.version);
    }, `diagnostics for ${uri}`);
  }

  publishedFor(uri: string): PublishDiagnosticsParams[] {
    return this.published.filter((p) => p.uri === uri);
  }

  open(uri: string, text: string, version = 1): void {
    void this.connection.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId: 'spice-netlist', version, text } });
  }

  change(uri: string, version: number, contentChanges: TextDocumentContentChangeEvent[]): void {
    void this.connection.sendNotification('textDocument/didChange', { textDocument: { uri, version }, contentChanges });
  }

  closeDocument(uri: string): void {
    void this.connection.sendNotification('textDocument/didClose', { textDocument: { uri } });
  }

  request<R>(method: string, params: unknown): Promise<R> {
    return this.connection.sendRequest(method, params) as Promise<R>;
  }

  async stop(): Promise<void> {
    try {
      await Promise.race([this.connection.sendRequest('shutdown'), new Promise((resolve) => setTimeout(resolve, 2000))]);
      void this.connection.sendNotification('exit');
    } catch {
      // already gone
    }
    this.connection.dispose();
    const exited = new Promise((resolve) => this.process.once('exit', resolve));
    setTimeout(() => this.process.kill(), 2000).unref();
    await exited;
  }
}

export async function startServer(options: StartOptions = {}): Promise<TestClient> {
  const child = spawn(process.execPath, [SERVER_ENTRY, '--stdio'], { stdio: 'pipe' });
  const connection = createProtocolConnection(new StreamMessageReader(child.stdout), new StreamMessageWriter(child.stdin));
  const client = new TestClient(connection, child, options.settings ?? {});
  connection.listen();
  const folders = options.folders ?? [];
  await connection.sendRequest('initialize', {
    processId: process.pid,
    rootUri: folders[0] ? pathToFileURL(folders[0]).href : null,
    workspaceFolders: folders.map((folder) => ({ uri: pathToFileURL(folder).href, name: folder })),
    capabilities: {
      workspace: {
        configuration: true,
        workspaceFolders: true,
        didChangeWatchedFiles: { dynamicRegistration: true },
        didChangeConfiguration: { dynamicRegistration: true },
        workspaceEdit: { documentChanges: true },
      },
      textDocument: { publishDiagnostics: { relatedInformation: true, versionSupport: true, codeDescriptionSupport: true, dataSupport: true } },
    },
    initializationOptions: options.initializationOptions ?? {},
  });
  void connection.sendNotification('initialized', {});
  return client;
}

/** A temporary folder with the given files; `cleanup` removes it. */
export function makeFolder(files: Record<string, string>): { folder: string; uri: (name: string) => string; write: (name: string, text: string) => void; cleanup: () => void } {
  const folder = mkdtempSync(join(tmpdir(), 'pnlint-lsp-'));
  const write = (name: string, text: string) => {
    mkdirSync(dirname(join(folder, name)), { recursive: true });
    writeFileSync(join(folder, name), text);
  };
  for (const [name, text] of Object.entries(files)) write(name, text);
  return { folder, uri: (name) => pathToFileURL(join(folder, name)).href, write, cleanup: () => rmSync(folder, { recursive: true, force: true }) };
}

/** Applies LSP text edits to a text (for checking what a code action does). */
export function applyLspEdits(text: string, edits: { range: { start: { line: number; character: number }; end: { line: number; character: number } }; newText: string }[]): string {
  const lineStarts = [0];
  for (let i = 0; i < text.length; i++) if (text[i] === '\n') lineStarts.push(i + 1);
  const offset = (p: { line: number; character: number }) => (lineStarts[p.line] ?? text.length) + p.character;
  const sorted = [...edits].sort((a, b) => offset(b.range.start) - offset(a.range.start));
  let result = text;
  for (const edit of sorted) result = result.slice(0, offset(edit.range.start)) + edit.newText + result.slice(offset(edit.range.end));
  return result;
}
