// The language server process: the VS Code extension starts this file over IPC, and
// `pnlint lsp --stdio` over stdio; createConnection reads which from the command line.
// The same file, started as a worker thread by the server, runs the analyses (so that
// a bundle of this file alone is a complete server). Each side loads only its own part,
// and the protocol side starts the worker before it loads the rest, so that the two load
// side by side.
import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import { WAITING_RUNS, WORKER_MARKER, WorkerRunner } from './runner.js';

if (!isMainThread && parentPort && (workerData as Record<string, unknown> | null)?.[WORKER_MARKER]) {
  const port = parentPort;
  const waitingRuns = (workerData as Record<string, unknown>)[WAITING_RUNS];
  void import('./analysis-host.js').then((host) => host.serveAnalyses(port, waitingRuns instanceof SharedArrayBuffer ? new Int32Array(waitingRuns) : undefined));
} else {
  // Until the connection exists, the worker's log goes to stderr (never stdout: in stdio mode that is the protocol).
  let log = (message: string): void => {
    process.stderr.write(`${message}\n`);
  };
  const runner = new WorkerRunner(new URL(import.meta.url), (message) => log(message));
  runner.warmUp();
  void Promise.all([import('vscode-languageserver/node.js'), import('./server.js')]).then(([{ createConnection, ProposedFeatures }, { startLanguageServer }]) => {
    const connection = createConnection(ProposedFeatures.all);
    log = (message) => {
      connection.console.info(message);
    };
    startLanguageServer(connection, { runner });
  });
}
