// The language server process: the VS Code extension starts this file over IPC, and
// `pnlint lsp --stdio` over stdio; createConnection reads which from the command line.
// The same file, started as a worker thread by the server, runs the analyses (so that
// a bundle of this file alone is a complete server).
import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import { createConnection, ProposedFeatures } from 'vscode-languageserver/node.js';
import { WAITING_RUNS, WORKER_MARKER } from './runner.js';
import { startLanguageServer } from './server.js';

if (!isMainThread && parentPort && (workerData as Record<string, unknown> | null)?.[WORKER_MARKER]) {
  const port = parentPort;
  const waitingRuns = (workerData as Record<string, unknown>)[WAITING_RUNS];
  void import('./analysis-host.js').then((host) => host.serveAnalyses(port, waitingRuns instanceof SharedArrayBuffer ? new Int32Array(waitingRuns) : undefined));
} else {
  startLanguageServer(createConnection(ProposedFeatures.all), { analysisWorker: new URL(import.meta.url) });
}
