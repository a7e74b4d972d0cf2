// The analysis side of the runner: the pipeline itself, run in the worker thread (or in
// the protocol thread when there is no worker). Loaded only where analyses run.
// Two phases per run: the check without fixes, answered at once, then its verified fixes,
// which give way to any newer run (they are rebuilt after it) and stop on cancellation.
import { analyze, withVerifiedFixes, type Analysis, type AnalysisInput } from '../analysis.js';
import type { DiodeReport } from '../checks/index.js';
import { formatOperatingPointText } from '../cli/op-report.js';
import { CANCELLED_RESULT, type FixedFindings, type OpenDocumentText, type RunRequest, type RunResult, type WorkerRequest, type WorkerResponse } from './runner.js';
import { Workspace, type DocumentSource } from './workspace.js';

type Cancellation = { readonly isCancellationRequested: boolean };

/** One analysis without its fixes, and what its second phase needs. */
export interface PhaseOne {
  result: RunResult;
  diodes: DiodeReport[];
  analysis: Analysis;
  input: AnalysisInput;
}

/** Runs the first phase of one analysis where it is called; the worker and the in-thread runner share it. */
export function runAnalysis(request: RunRequest, cancellation: Cancellation, log: (message: string) => void): PhaseOne {
  const documents = new SnapshotDocuments(request.openDocuments);
  const workspace = new Workspace(documents);
  workspace.setFolders(request.folders);
  workspace.restricted = request.settings.restricted;
  const reader = workspace.createReader(log);
  const input: AnalysisInput = {
    uri: request.uri,
    text: request.text,
    files: reader,
    settings: request.settings,
    config: request.config,
    cancellation,
    // The reader refuses too (for every folder of a multi-root workspace); the pipeline says why at the include.
    restricted: request.settings.restricted,
    ...(request.workspaceRoot ? { workspaceRoot: request.workspaceRoot } : {}),
    // Fixes cost re-simulations: they are the second phase (buildFixes).
    withoutFixes: true,
  };
  const analysis = analyze(input);
  return {
    analysis,
    input,
    diodes: analysis.check?.diodes ?? [],
    result: {
      findings: analysis.findings,
      filesRead: analysis.filesRead,
      versionsRead: [...reader.versions],
      asked: [...reader.asked],
      complete: analysis.complete,
      milliseconds: analysis.milliseconds,
    },
  };
}

/** The second phase: the first phase's findings with their verified fixes; undefined when it was stopped. */
export function buildFixes(phaseOne: PhaseOne, cancellation: Cancellation): FixedFindings | undefined {
  if (!phaseOne.analysis.complete || cancellation.isCancellationRequested) return undefined;
  const started = performance.now();
  const fixed = withVerifiedFixes(phaseOne.analysis, { ...phaseOne.input, cancellation });
  if (!fixed.complete) return undefined;
  // The same findings in the same order, or none of the fixes: the diagnostics point at them by position.
  const same = fixed.findings.length === phaseOne.result.findings.length;
  return { findings: same ? fixed.findings : phaseOne.result.findings, fixAll: same ? fixed.fixAll : undefined, milliseconds: performance.now() - started };
}

/**
 * An invented lamp, analysed once as the worker starts and before any request: the first
 * analysis builds the parsers and compiles the pipeline (about a hundred milliseconds), and
 * it is better spent while the editor is still opening the file.
 */
const WARM_UP_NETLIST = 'warm-up lamp\nV1 supply 0 DC 5\nR1 supply lamp 220\nD1 lamp 0 DWARM\n.model DWARM D(IS=1e-20 N=1.9 RS=2)\n.end\n';

export function warmUp(): void {
  analyze({ uri: 'untitled:warm-up.cir', text: WARM_UP_NETLIST, files: { read: () => undefined, resolve: (_from, path) => path }, withoutFixes: true });
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

interface FixJob {
  id: number;
  phaseOne: PhaseOne;
  /** The run's own cancellation (a newer edit of its document). */
  cancelled: Int32Array;
}

/**
 * The worker thread's side: answers run, report and forget messages in the order they came,
 * one at a time; between them, builds the fixes of finished runs. `waitingRuns` counts runs
 * posted and not yet taken (shared with the protocol thread): fixes give way while it is not zero.
 */
export function serveAnalyses(
  port: { on(event: 'message', listener: (message: WorkerRequest) => void): void; postMessage(message: WorkerResponse): void },
  waitingRuns: Int32Array = new Int32Array(1),
): void {
  const latest = new LatestAnalyses();
  const log = (message: string) => port.postMessage({ type: 'log', message });
  const requests: WorkerRequest[] = [];
  const fixJobs: FixJob[] = [];
  let scheduled = false;

  const schedule = () => {
    if (scheduled) return;
    scheduled = true;
    // A turn of the event loop between jobs, so that requests posted meanwhile are queued before the next choice.
    setImmediate(step);
  };
  const step = () => {
    scheduled = false;
    const request = requests.shift();
    if (request) serve(request);
    else {
      const job = fixJobs.shift();
      if (job) fixes(job);
    }
    if (requests.length > 0 || fixJobs.length > 0) schedule();
  };

  const serve = (message: WorkerRequest) => {
    if (message.type === 'run') Atomics.sub(waitingRuns, 0, 1);
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
          const phaseOne = runAnalysis(message.request, token, log);
          latest.keep(message.request.uri, phaseOne.analysis);
          port.postMessage({ type: 'result', id: message.id, result: phaseOne.result });
          if (!phaseOne.result.complete) return;
          port.postMessage({ type: 'diodes', id: message.id, diodes: phaseOne.diodes });
          fixJobs.push({ id: message.id, phaseOne, cancelled: flag });
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
      if (message.type !== 'forget') port.postMessage({ type: 'failed', id: message.id, error: describe(error) });
    }
  };

  const fixes = (job: FixJob) => {
    const ownCancellation = () => Atomics.load(job.cancelled, 0) === 1;
    // Cancelled before it started: nothing to build.
    if (ownCancellation()) {
      port.postMessage({ type: 'fixes', id: job.id, fixes: undefined });
      return;
    }
    const token = { get isCancellationRequested() { return ownCancellation() || Atomics.load(waitingRuns, 0) > 0; } };
    try {
      const fixed = buildFixes(job.phaseOne, token);
      // Stopped only to let a newer run go first: build them again after it.
      if (!fixed && !ownCancellation() && Atomics.load(waitingRuns, 0) > 0) {
        fixJobs.unshift(job);
        return;
      }
      if (!fixed) log(`fixes for ${job.phaseOne.analysis.uri} stopped part-way: its text changed`);
      port.postMessage({ type: 'fixes', id: job.id, fixes: fixed });
    } catch (error) {
      // The findings are already shown: they stay, without fixes.
      log(`building the fixes for ${job.phaseOne.analysis.uri} failed: ${describe(error)}`);
      port.postMessage({ type: 'fixes', id: job.id, fixes: undefined });
    }
  };

  port.on('message', (message) => {
    requests.push(message);
    schedule();
  });
  // After the listener is in place, so that requests posted meanwhile queue up for after it.
  setImmediate(() => {
    try {
      warmUp();
    } catch (error) {
      log(`warm-up analysis failed: ${describe(error)}`);
    }
  });
}

function describe(error: unknown): string {
  return error instanceof Error ? (error.stack ?? error.message) : String(error);
}
