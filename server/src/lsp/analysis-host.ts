// The analysis side of the runner: the pipeline itself, run in the worker thread (or in
// the protocol thread when there is no worker). Loaded only where analyses run.
import { analyze, type Analysis } from '../analysis.js';
import { formatOperatingPointText } from '../cli/op-report.js';
import { CANCELLED_RESULT, type OpenDocumentText, type RunRequest, type RunResult, type WorkerRequest, type WorkerResponse } from './runner.js';
import { Workspace, type DocumentSource } from './workspace.js';

/** Runs one analysis where it is called; the worker and the in-thread runner share it. */
export function runAnalysis(request: RunRequest, cancellation: { readonly isCancellationRequested: boolean }, log: (message: string) => void): { result: RunResult; analysis: Analysis } {
  const documents = new SnapshotDocuments(request.openDocuments);
  const workspace = new Workspace(documents);
  workspace.setFolders(request.folders);
  workspace.restricted = request.settings.restricted;
  const reader = workspace.createReader(log);
  const analysis = analyze({
    uri: request.uri,
    text: request.text,
    files: reader,
    settings: request.settings,
    config: request.config,
    cancellation,
    // The reader refuses too (for every folder of a multi-root workspace); the pipeline says why at the include.
    restricted: request.settings.restricted,
    ...(request.workspaceRoot ? { workspaceRoot: request.workspaceRoot } : {}),
  });
  return {
    analysis,
    result: {
      findings: analysis.findings,
      diodes: analysis.check?.diodes ?? [],
      filesRead: analysis.filesRead,
      versionsRead: [...reader.versions],
      asked: [...reader.asked],
      complete: analysis.complete,
      milliseconds: analysis.milliseconds,
    },
  };
}

/** Open documents as sent to the worker, looked up like the server's TextDocuments. */
class SnapshotDocuments implements DocumentSource {
  private readonly byUri: Map<string, { uri: string; version: number; getText(): string }>;

  constructor(documents: OpenDocumentText[]) {
    this.byUri = new Map(documents.map((d) => [d.uri, { uri: d.uri, version: d.version, getText: () => d.text }]));
  }

  get(uri: string) {
    return this.byUri.get(uri);
  }

  all() {
    return [...this.byUri.values()];
  }
}

/** Keeps each document's last complete analysis, for the operating-point report. */
export class LatestAnalyses {
  private readonly analyses = new Map<string, Analysis>();
  keep(uri: string, analysis: Analysis): void {
    if (analysis.complete) this.analyses.set(uri, analysis);
  }
  report(uri: string): string | undefined {
    const analysis = this.analyses.get(uri);
    return analysis ? formatOperatingPointText(analysis) : undefined;
  }
  forget(uri: string): void {
    this.analyses.delete(uri);
  }
}

/** The worker thread's side: answers run, report and forget messages, one at a time. */
export function serveAnalyses(port: { on(event: 'message', listener: (message: WorkerRequest) => void): void; postMessage(message: WorkerResponse): void }): void {
  const latest = new LatestAnalyses();
  const log = (message: string) => port.postMessage({ type: 'log', message });
  port.on('message', (message) => {
    try {
      switch (message.type) {
        case 'run': {
          const flag = new Int32Array(message.cancelled);
          const token = { get isCancellationRequested() { return Atomics.load(flag, 0) === 1; } };
          // Cancelled while queued: skip the work.
          if (token.isCancellationRequested) {
            port.postMessage({ type: 'result', id: message.id, result: CANCELLED_RESULT });
            return;
          }
          const { result, analysis } = runAnalysis(message.request, token, log);
          latest.keep(message.request.uri, analysis);
          port.postMessage({ type: 'result', id: message.id, result });
          return;
        }
        case 'report':
          port.postMessage({ type: 'report', id: message.id, text: latest.report(message.uri) });
          return;
        case 'forget':
          latest.forget(message.uri);
          return;
      }
    } catch (error) {
      if (message.type !== 'forget') port.postMessage({ type: 'failed', id: message.id, error: error instanceof Error ? (error.stack ?? error.message) : String(error) });
    }
  });
}
