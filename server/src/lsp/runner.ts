// Where analyses run. The pipeline is synchronous and a big circuit takes seconds, so
// the server runs it in a worker thread: the protocol thread stays free for hovers and
// completions, and a newer edit really stops the older analysis (the cancellation
// flag lives in shared memory, which the pipeline polls between solves). Without a
// worker (an embedder that gives no worker script) it runs in the protocol thread.
import { Worker } from 'node:worker_threads';
import { fileURLToPath } from 'node:url';
import type { CancellationToken } from 'vscode-languageserver';
import type { DiodeReport } from '../checks/index.js';
import type { Finding } from '../findings.js';
import type { Settings } from '../settings.js';

export interface OpenDocumentText {
  uri: string;
  version: number;
  text: string;
}

/** Everything one analysis needs, as plain data (it crosses to the worker). */
export interface RunRequest {
  uri: string;
  text: string;
  settings: Settings;
  config: { uri: string; text: string } | undefined;
  workspaceRoot: string | undefined;
  /** Workspace folder uris, for restricted mode. */
  folders: string[];
  /** The editors' texts: includes are read from these before the disk. */
  openDocuments: OpenDocumentText[];
}

/** What the server keeps of an analysis, as plain data. */
export interface RunResult {
  findings: Finding[];
  diodes: DiodeReport[];
  filesRead: string[];
  /** uri → version of each open document read (undefined: read from disk). */
  versionsRead: [string, number | undefined][];
  /** uri keys of every file looked for, found or not. */
  asked: string[];
  complete: boolean;
  milliseconds: number;
}

export interface AnalysisRunner {
  /** Gets ready before the first request (the worker loads the pipeline meanwhile). */
  warmUp(): void;
  run(request: RunRequest, token: CancellationToken): Promise<RunResult>;
  /** The `pnlint op` text of the last complete analysis of `uri`. */
  report(uri: string): Promise<string | undefined>;
  forget(uri: string): void;
  dispose(): void;
}

/** The pipeline is loaded only where analyses run (the worker), not in the protocol thread. */
const loadHost = () => import('./analysis-host.js');

export class InlineRunner implements AnalysisRunner {
  private readonly host = loadHost().then((host) => ({ host, latest: new host.LatestAnalyses() }));
  constructor(private readonly log: (message: string) => void) {}

  warmUp(): void {}

  async run(request: RunRequest, token: CancellationToken): Promise<RunResult> {
    const { host, latest } = await this.host;
    const { result, analysis } = host.runAnalysis(request, token, this.log);
    latest.keep(request.uri, analysis);
    return result;
  }
  async report(uri: string): Promise<string | undefined> {
    return (await this.host).latest.report(uri);
  }
  forget(uri: string): void {
    void this.host.then(({ latest }) => latest.forget(uri));
  }
  dispose(): void {}
}

// ------------------------------------------------------------------ the worker

/** Messages to the worker. */
export type WorkerRequest =
  | { type: 'run'; id: number; request: RunRequest; cancelled: SharedArrayBuffer }
  | { type: 'report'; id: number; uri: string }
  | { type: 'forget'; uri: string };

/** Messages from the worker. */
export type WorkerResponse =
  | { type: 'result'; id: number; result: RunResult }
  | { type: 'report'; id: number; text: string | undefined }
  | { type: 'failed'; id: number; error: string }
  | { type: 'log'; message: string };

/** Marks the worker thread in workerData, so that the entry script knows which part to run. */
export const WORKER_MARKER = 'pnlintAnalysisWorker';

/** After a cancellation, how long an analysis may take to notice before its worker is replaced (ours). */
const CANCELLATION_GRACE_MILLISECONDS = 2_000;

interface Pending {
  message: WorkerRequest & { id: number };
  /** Set for a run: true once it was cancelled. */
  isCancelled(): boolean;
  /** How many workers died while holding it. */
  attempts: number;
  resolve(value: unknown): void;
  reject(error: Error): void;
}

/** A request whose worker died this many times is failed, not retried: it is probably what kills it. */
const ATTEMPTS_PER_REQUEST = 2;

/** The result of an analysis that was stopped before it started or finished. */
export const CANCELLED_RESULT: RunResult = { findings: [], diodes: [], filesRead: [], versionsRead: [], asked: [], complete: false, milliseconds: 0 };

export class WorkerRunner implements AnalysisRunner {
  private worker: Worker | undefined;
  private nextId = 1;
  private readonly pending = new Map<number, Pending>();

  constructor(
    private readonly script: URL,
    private readonly log: (message: string) => void,
  ) {}

  warmUp(): void {
    this.ensureWorker();
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(fileURLToPath(this.script), { workerData: { [WORKER_MARKER]: true }, stdout: true, stderr: true });
    // The worker's console must never reach stdout: in stdio mode that is the protocol channel.
    worker.stdout.on('data', (chunk: Buffer) => this.log(chunk.toString().trimEnd()));
    worker.stderr.on('data', (chunk: Buffer) => this.log(chunk.toString().trimEnd()));
    worker.on('message', (message: WorkerResponse) => this.receive(message));
    worker.on('error', (error) => this.fail(worker, error));
    worker.on('exit', (code) => this.fail(worker, new Error(`the analysis worker stopped (exit code ${code})`)));
    worker.unref();
    this.worker = worker;
    return worker;
  }

  private receive(message: WorkerResponse): void {
    if (message.type === 'log') {
      this.log(message.message);
      return;
    }
    const pending = this.pending.get(message.id);
    if (!pending) return;
    this.pending.delete(message.id);
    if (message.type === 'failed') pending.reject(new Error(message.error));
    else pending.resolve(message.type === 'result' ? message.result : message.text);
  }

  /**
   * The worker died (or was replaced for not stopping): cancelled runs end as incomplete,
   * the rest go to a new worker, unless they have already outlived two.
   */
  private fail(worker: Worker, error: Error): void {
    if (this.worker !== worker) return;
    this.worker = undefined;
    const pending = [...this.pending.values()];
    for (const job of pending) {
      job.attempts += 1;
      if (job.isCancelled()) {
        this.pending.delete(job.message.id);
        job.resolve(CANCELLED_RESULT);
      } else if (job.attempts >= ATTEMPTS_PER_REQUEST) {
        this.pending.delete(job.message.id);
        job.reject(error);
      }
    }
    const retried = [...this.pending.values()];
    if (retried.length > 0) {
      const replacement = this.ensureWorker();
      for (const job of retried) replacement.postMessage(job.message);
    }
  }

  private send<T>(message: WorkerRequest & { id: number }, isCancelled: () => boolean = () => false): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      this.pending.set(message.id, { message, isCancelled, attempts: 0, resolve: resolve as (value: unknown) => void, reject });
      this.ensureWorker().postMessage(message);
    });
  }

  run(request: RunRequest, token: CancellationToken): Promise<RunResult> {
    const id = this.nextId++;
    const cancelled = new SharedArrayBuffer(4);
    const flag = new Int32Array(cancelled);
    let watchdog: NodeJS.Timeout | undefined;
    const listener = token.onCancellationRequested(() => {
      Atomics.store(flag, 0, 1);
      const worker = this.worker;
      watchdog = setTimeout(() => {
        // Still busy long after it was told to stop: replace the worker rather than wait.
        if (this.pending.has(id) && worker && this.worker === worker) {
          this.log(`an analysis did not stop within ${CANCELLATION_GRACE_MILLISECONDS} ms of being cancelled; restarting the analysis worker`);
          void worker.terminate();
        }
      }, CANCELLATION_GRACE_MILLISECONDS);
      watchdog.unref();
    });
    if (token.isCancellationRequested) Atomics.store(flag, 0, 1);
    return this.send<RunResult>({ type: 'run', id, request, cancelled }, () => Atomics.load(flag, 0) === 1).finally(() => {
      listener.dispose();
      if (watchdog) clearTimeout(watchdog);
    });
  }

  report(uri: string): Promise<string | undefined> {
    return this.send<string | undefined>({ type: 'report', id: this.nextId++, uri });
  }

  forget(uri: string): void {
    this.worker?.postMessage({ type: 'forget', uri } satisfies WorkerRequest);
  }

  dispose(): void {
    void this.worker?.terminate();
    this.worker = undefined;
  }
}
