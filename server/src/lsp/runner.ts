// Where analyses run. The pipeline is synchronous and a big circuit takes seconds, so
// the server runs it in a worker thread: the protocol thread stays free for hovers and
// completions, and a newer edit really stops the older analysis (the cancellation
// flag lives in shared memory, which the pipeline polls between solves). Without a
// worker (an embedder that gives no worker script) it runs in the protocol thread.
// Each run answers in three steps: the findings without fixes (published at once), the
// diode reports (for hover and inlay hints), then the findings with their verified fixes
// (re-simulations, up to a second or two). A newer edit cancels whichever is running,
// and a run waiting in the worker's queue goes before any fixes still being built.
import { Worker } from 'node:worker_threads';
import { fileURLToPath } from 'node:url';
import type { CancellationToken } from 'vscode-languageserver';
import type { DiodeReport } from '../checks/index.js';
import type { Finding } from '../findings.js';
import type { CombinedFixes } from '../fixes/combined.js';
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

/** What the server keeps of an analysis, as plain data (its diode reports come separately). */
export interface RunResult {
  /** Without their verified fixes (those come with FixedFindings); a netlist diagnostic's own suggestions are here. */
  findings: Finding[];
  filesRead: string[];
  /** uri → version of each open document read (undefined: read from disk). */
  versionsRead: [string, number | undefined][];
  /** uri keys of every file looked for, found or not. */
  asked: string[];
  complete: boolean;
  milliseconds: number;
}

/** The second phase of a run: the same findings, in the same order, with their verified fixes. */
export interface FixedFindings {
  findings: Finding[];
  /** Their preferred fixes that passed a re-check applied together ("fix all"). */
  fixAll: CombinedFixes | undefined;
  milliseconds: number;
}

/** One run's three answers. The later two settle as undefined when the run was cancelled or failed. */
export interface Run {
  /** The findings without their fixes: publish them at once. */
  diagnostics: Promise<RunResult>;
  /** The diodes' reports, sent after the diagnostics (they are large: hover and inlay hints read them). */
  diodes: Promise<DiodeReport[] | undefined>;
  fixes: Promise<FixedFindings | undefined>;
}

export interface AnalysisRunner {
  /** Gets ready before the first request (the worker loads the pipeline meanwhile). */
  warmUp(): void;
  run(request: RunRequest, token: CancellationToken): Run;
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

  run(request: RunRequest, token: CancellationToken): Run {
    const phaseOne = this.host.then(({ host, latest }) => {
      const ran = host.runAnalysis(request, token, this.log);
      latest.keep(request.uri, ran.analysis);
      return { host, ran };
    });
    // The fixes wait for a turn of the event loop, so that the diagnostics are published first.
    const fixes = phaseOne.then(({ host, ran }) =>
      new Promise<FixedFindings | undefined>((resolve) =>
        setImmediate(() => resolve(token.isCancellationRequested ? undefined : host.buildFixes(ran, token))),
      ),
    );
    return {
      diagnostics: phaseOne.then(({ ran }) => ran.result),
      diodes: phaseOne.then(({ ran }) => ran.diodes, () => undefined),
      fixes: fixes.catch(() => undefined),
    };
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

/** Messages from the worker; a run is answered by a result, then diodes, then fixes. */
export type WorkerResponse =
  | { type: 'result'; id: number; result: RunResult }
  | { type: 'diodes'; id: number; diodes: DiodeReport[] }
  | { type: 'fixes'; id: number; fixes: FixedFindings | undefined }
  | { type: 'report'; id: number; text: string | undefined }
  | { type: 'failed'; id: number; error: string }
  | { type: 'log'; message: string };

/** Marks the worker thread in workerData, so that the entry script knows which part to run. */
export const WORKER_MARKER = 'pnlintAnalysisWorker';
/**
 * In workerData: a shared counter of run requests posted to the worker and not yet taken up.
 * Fixes being built give way while it is above zero (a new check goes first).
 */
export const WAITING_RUNS = 'pnlintWaitingRuns';

/** After a cancellation, how long an analysis may take to notice before its worker is replaced (ours). */
const CANCELLATION_GRACE_MILLISECONDS = 2_000;

interface Pending {
  message: WorkerRequest & { id: number };
  /** Set for a run: true once it was cancelled. */
  isCancelled(): boolean;
  /** How many workers died while holding it. */
  attempts: number;
  /** Called with each answer the worker sends for it (a run gets three). */
  receive(message: WorkerResponse & { id: number }): void;
  /** The worker failed it (or died holding it too often): settle everything still open. */
  fail(error: Error): void;
}

/** A request whose worker died this many times is failed, not retried: it is probably what kills it. */
const ATTEMPTS_PER_REQUEST = 2;

/**
 * The analysis worker's young generation, at most (MB). Reading a netlist makes millions of
 * short-lived tokens next to a syntax tree that lives on; with a worker's default (smaller)
 * young generation the collector copies the tree again and again. Measured on a 10 MB netlist:
 * repeated parses 1.1–1.4× faster at 128 MB than at the default. V8 grows it only as far as a file needs.
 */
export const ANALYSIS_YOUNG_GENERATION_MB = 128;

/** The result of an analysis that was stopped before it started or finished. */
export const CANCELLED_RESULT: RunResult = { findings: [], filesRead: [], versionsRead: [], asked: [], complete: false, milliseconds: 0 };

/** A promise with its resolve, for answers that arrive as messages. */
function settleable<T>(): { promise: Promise<T>; resolve: (value: T) => void; reject: (error: Error) => void } {
  let resolve!: (value: T) => void;
  let reject!: (error: Error) => void;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  return { promise, resolve, reject };
}

export class WorkerRunner implements AnalysisRunner {
  private worker: Worker | undefined;
  /** The current worker's count of runs posted and not yet started (see WAITING_RUNS). */
  private waitingRuns = new Int32Array(new SharedArrayBuffer(4));
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
    // A new worker has a queue of its own: count afresh.
    this.waitingRuns = new Int32Array(new SharedArrayBuffer(4));
    const worker = new Worker(fileURLToPath(this.script), {
      workerData: { [WORKER_MARKER]: true, [WAITING_RUNS]: this.waitingRuns.buffer },
      resourceLimits: { maxYoungGenerationSizeMb: ANALYSIS_YOUNG_GENERATION_MB },
      stdout: true,
      stderr: true,
    });
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
    // A run stays pending until its fixes arrive; everything else has one answer.
    if (message.type === 'failed' || message.type === 'fixes' || message.type === 'report') this.pending.delete(message.id);
    if (message.type === 'failed') pending.fail(new Error(message.error));
    else pending.receive(message);
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
        job.receive({ type: 'result', id: job.message.id, result: CANCELLED_RESULT });
        job.receive({ type: 'fixes', id: job.message.id, fixes: undefined });
      } else if (job.attempts >= ATTEMPTS_PER_REQUEST) {
        this.pending.delete(job.message.id);
        job.fail(error);
      }
    }
    const retried = [...this.pending.values()];
    if (retried.length > 0) {
      const replacement = this.ensureWorker();
      for (const job of retried) this.post(replacement, job.message);
    }
  }

  private post(worker: Worker, message: WorkerRequest): void {
    if (message.type === 'run') Atomics.add(this.waitingRuns, 0, 1);
    worker.postMessage(message);
  }

  private send(pending: Pending): void {
    this.pending.set(pending.message.id, pending);
    this.post(this.ensureWorker(), pending.message);
  }

  run(request: RunRequest, token: CancellationToken): Run {
    const id = this.nextId++;
    const cancelled = new SharedArrayBuffer(4);
    const flag = new Int32Array(cancelled);
    const diagnostics = settleable<RunResult>();
    const diodes = settleable<DiodeReport[] | undefined>();
    const fixes = settleable<FixedFindings | undefined>();
    let watchdog: NodeJS.Timeout | undefined;
    /** Set once the findings arrived: the fixes stop between re-checks, and waiting for them never needs a new worker. */
    let answered = false;
    const listener = token.onCancellationRequested(() => {
      Atomics.store(flag, 0, 1);
      const worker = this.worker;
      if (answered) return;
      watchdog = setTimeout(() => {
        // Still busy long after it was told to stop: replace the worker rather than wait.
        if (!answered && this.pending.has(id) && worker && this.worker === worker) {
          this.log(`an analysis did not stop within ${CANCELLATION_GRACE_MILLISECONDS} ms of being cancelled; restarting the analysis worker`);
          void worker.terminate();
        }
      }, CANCELLATION_GRACE_MILLISECONDS);
      watchdog.unref();
    });
    if (token.isCancellationRequested) Atomics.store(flag, 0, 1);
    const finished = () => {
      listener.dispose();
      if (watchdog) clearTimeout(watchdog);
    };
    this.send({
      message: { type: 'run', id, request, cancelled },
      isCancelled: () => Atomics.load(flag, 0) === 1,
      attempts: 0,
      receive: (message) => {
        if (message.type === 'result') {
          answered = true;
          if (watchdog) clearTimeout(watchdog);
          diagnostics.resolve(message.result);
          // An incomplete run sends nothing more.
          if (!message.result.complete) this.settle(id, diodes, fixes, finished);
        } else if (message.type === 'diodes') diodes.resolve(message.diodes);
        else if (message.type === 'fixes') {
          diodes.resolve(undefined);
          fixes.resolve(message.fixes);
          finished();
        }
      },
      fail: (error) => {
        diagnostics.reject(error);
        diodes.resolve(undefined);
        fixes.resolve(undefined);
        finished();
      },
    });
    return { diagnostics: diagnostics.promise, diodes: diodes.promise, fixes: fixes.promise };
  }

  /** Ends a run early: its later answers settle as undefined. */
  private settle(id: number, diodes: { resolve(value: undefined): void }, fixes: { resolve(value: undefined): void }, finished: () => void): void {
    this.pending.delete(id);
    diodes.resolve(undefined);
    fixes.resolve(undefined);
    finished();
  }

  report(uri: string): Promise<string | undefined> {
    const answer = settleable<string | undefined>();
    this.send({
      message: { type: 'report', id: this.nextId++, uri },
      isCancelled: () => false,
      attempts: 0,
      receive: (message) => answer.resolve(message.type === 'report' ? message.text : undefined),
      fail: (error) => answer.reject(error),
    });
    return answer.promise;
  }

  forget(uri: string): void {
    this.worker?.postMessage({ type: 'forget', uri } satisfies WorkerRequest);
  }

  dispose(): void {
    void this.worker?.terminate();
    this.worker = undefined;
  }
}
