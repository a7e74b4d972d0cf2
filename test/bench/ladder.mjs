// Benchmark: the DC operating point of generated resistor–diode ladders of
// 2,000 and 20,000 sections, pnlint (built server/dist, elaborate + compile +
// solve, in process) beside ngspice 39 (a child process) in the same run.
// ngspice's figure is its wall-clock time minus its own start-and-quit time,
// measured on a one-resistor circuit, so that both figures are solve work.
// Median of several repetitions; heap measured after a forced GC when the
// runner passes --expose-gc. Reported, not a timed test.
import { resistorDiodeLadder } from '../support/ladder.mjs';
import { hasNgspice, runNgspiceOperatingPoint } from '../support/ngspice-run.mjs';
import { loadBuiltSolver } from '../support/pnlint-dist.mjs';

const SIZES = [2000, 20000];
/** Repetitions per measurement: enough for a stable median, few enough for a 2-core machine shared by many. */
const REPETITIONS = { 2000: 7, 20000: 3 };
const EMPTY_CIRCUIT = 'start and quit\nV1 a 0 1\nR1 a 0 1\n.end\n';
const MEGABYTE = 1024 * 1024;

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

function settleHeap() {
  if (globalThis.gc) {
    globalThis.gc();
    globalThis.gc();
  }
  return process.memoryUsage().heapUsed;
}

function ngspiceMilliseconds(text, repetitions) {
  const times = [];
  for (let index = 0; index < repetitions; index++) {
    const run = runNgspiceOperatingPoint(text, { print: false });
    if (!run.ok) throw new Error(`ngspice failed: ${run.failure}`);
    times.push(run.milliseconds);
  }
  return median(times);
}

const ngspiceAvailable = hasNgspice();
const startAndQuit = ngspiceAvailable ? ngspiceMilliseconds(EMPTY_CIRCUIT, 7) : undefined;
if (startAndQuit !== undefined) {
  console.log(`ladder: ngspice start and quit ${startAndQuit.toFixed(1)} ms (one-resistor circuit), subtracted from its figures below`);
} else {
  console.log('ladder: ngspice not on PATH, its column is missing');
}

const solver = await loadBuiltSolver();
if (!solver.available) console.log(`ladder: pnlint ${solver.reason}`);

const heapAfterSolve = {};
for (const sections of SIZES) {
  const text = resistorDiodeLadder(sections);
  const uri = `/bench/ladder-${sections}.cir`;
  const repetitions = REPETITIONS[sections];

  let pnlintMilliseconds;
  let heapMegabytes;
  let heapUsedMegabytes;
  let note = '';
  if (solver.available) {
    // One warm-up run lets the JIT compile the hot paths, as it would in a long-lived language server.
    solver.solve(solver.compile(solver.elaborate(uri, text)));
    const times = [];
    for (let index = 0; index < repetitions; index++) {
      const heapBefore = settleHeap();
      const started = performance.now();
      const circuit = solver.elaborate(uri, text);
      const result = solver.solve(solver.compile(circuit));
      times.push(performance.now() - started);
      if (!result.ok) note = ` (pnlint did not solve it: ${result.diagnostics.map((d) => d.message).join('; ')})`;
      // Heap still held by the circuit and its solution, on top of what was there before.
      const heapAfter = settleHeap();
      heapMegabytes = (heapAfter - heapBefore) / MEGABYTE;
      heapUsedMegabytes = heapAfter / MEGABYTE;
      void circuit;
    }
    pnlintMilliseconds = median(times);
    heapAfterSolve[sections] = heapMegabytes;
  }
  const ngspiceSolve = startAndQuit !== undefined ? Math.max(0, ngspiceMilliseconds(text, repetitions) - startAndQuit) : undefined;

  const pnlintText = pnlintMilliseconds !== undefined ? `${pnlintMilliseconds.toFixed(1)} ms` : 'n/a';
  const ngspiceText = ngspiceSolve !== undefined ? `${ngspiceSolve.toFixed(1)} ms` : 'n/a';
  const ratio = pnlintMilliseconds !== undefined && ngspiceSolve ? (pnlintMilliseconds / ngspiceSolve).toFixed(2) : 'n/a';
  const heap =
    heapMegabytes !== undefined
      ? `, heap used after solve ${heapUsedMegabytes.toFixed(1)} MB (${heapMegabytes.toFixed(1)} MB held by the circuit and its solution)`
      : '';
  console.log(`ladder-${sections}: pnlint ${pnlintText}, ngspice ${ngspiceText}, ratio ${ratio}${heap}${note}`);
}

if (heapAfterSolve[2000] !== undefined && heapAfterSolve[20000] !== undefined) {
  const growth = heapAfterSolve[20000] / heapAfterSolve[2000];
  console.log(
    `ladder-memory: heap held after solve ${heapAfterSolve[2000].toFixed(1)} MB at 2,000 sections, ${heapAfterSolve[20000].toFixed(1)} MB at 20,000: x${growth.toFixed(1)} for x10 sections (linear is about x10)${globalThis.gc ? '' : ' (no --expose-gc: figures are noisy)'}`,
  );
} else {
  console.log('ladder-memory: not available yet (needs pnlint\'s solver)');
}
