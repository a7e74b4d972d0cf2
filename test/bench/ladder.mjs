// Benchmark: the DC operating point of generated resistor–diode ladders of
// 2,000 and 20,000 sections, pnlint (built server/dist, elaborate + compile +
// solve, in process) beside ngspice 39 (a child process) in the same run.
// ngspice's figure is its wall-clock time minus its own start-and-quit time,
// measured on a one-resistor circuit, so that both figures are solve work.
// Median of several repetitions. Heap: measured in a fresh process per size,
// after a forced GC. Reported, not a timed test.
import { spawnSync } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
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

const MEMORY_MODE = '--measure-heap';

/**
 * The heap that one elaborated, compiled and solved ladder holds, measured in a
 * fresh Node process (with --expose-gc), so that nothing from the timing runs
 * (or from V8 keeping an earlier iteration's values alive) blurs it.
 * @param {number} sections
 * @returns {{ used: number, held: number } | undefined}
 */
function measureHeapInFreshProcess(sections) {
  const child = spawnSync(process.execPath, ['--expose-gc', fileURLToPath(import.meta.url), MEMORY_MODE, String(sections)], {
    encoding: 'utf8',
    timeout: 300_000,
  });
  try {
    return JSON.parse(child.stdout);
  } catch {
    return undefined;
  }
}

if (process.argv[2] === MEMORY_MODE) {
  const sections = Number(process.argv[3]);
  const built = await loadBuiltSolver();
  if (!built.available || !globalThis.gc) process.exit(1);
  const text = resistorDiodeLadder(sections);
  const before = settleHeap();
  // Kept reachable while the heap is read: what a language server holds per open file.
  const circuit = built.elaborate(`/bench/ladder-${sections}.cir`, text);
  const compiled = built.compile(circuit);
  const result = built.solve(compiled);
  const after = settleHeap();
  console.log(JSON.stringify({ used: after / MEGABYTE, held: (after - before) / MEGABYTE, solved: [circuit, compiled, result].length === 3 && result.ok }));
  process.exit(0);
}

// Other work on the machine inflates every figure: say how busy it was.
console.log(`ladder: load average ${loadavg()[0].toFixed(1)} on ${availableParallelism()} cores at the start`);

const ngspiceAvailable = hasNgspice();
const startAndQuit = ngspiceAvailable ? ngspiceMilliseconds(EMPTY_CIRCUIT, 7) : undefined;
if (startAndQuit !== undefined) {
  console.log(`ladder: ngspice start and quit ${startAndQuit.toFixed(1)} ms (one-resistor circuit), subtracted from its figures below`);
} else {
  console.log('ladder: ngspice not on PATH, its column is missing');
}

const solver = await loadBuiltSolver();
if (!solver.available) console.log(`ladder: pnlint ${solver.reason}`);

/** @type {Record<number, { used: number, held: number } | undefined>} heap after the solve, MB, by number of sections */
const heapAfterSolve = {};
for (const sections of SIZES) {
  const text = resistorDiodeLadder(sections);
  const uri = `/bench/ladder-${sections}.cir`;
  const repetitions = REPETITIONS[sections];

  let pnlintMilliseconds;
  let phases = '';
  let note = '';
  if (solver.available) {
    // One warm-up run lets the JIT compile the hot paths, as it would in a long-lived language server.
    solver.solve(solver.compile(solver.elaborate(uri, text)));
    const times = { total: [], elaborate: [], compile: [], solve: [] };
    for (let index = 0; index < repetitions; index++) {
      const started = performance.now();
      const circuit = solver.elaborate(uri, text);
      const elaborated = performance.now();
      const compiled = solver.compile(circuit);
      const compiledAt = performance.now();
      const result = solver.solve(compiled);
      const solved = performance.now();
      times.total.push(solved - started);
      times.elaborate.push(elaborated - started);
      times.compile.push(compiledAt - elaborated);
      times.solve.push(solved - compiledAt);
      if (!result.ok) note = ` (pnlint did not solve it: ${result.diagnostics.map((d) => d.message).join('; ')})`;
    }
    pnlintMilliseconds = median(times.total);
    phases = ` (elaborate ${median(times.elaborate).toFixed(1)}, compile ${median(times.compile).toFixed(1)}, solve ${median(times.solve).toFixed(1)})`;
    heapAfterSolve[sections] = measureHeapInFreshProcess(sections);
  }
  const ngspiceSolve = startAndQuit !== undefined ? Math.max(0, ngspiceMilliseconds(text, repetitions) - startAndQuit) : undefined;

  const pnlintText = pnlintMilliseconds !== undefined ? `${pnlintMilliseconds.toFixed(1)} ms` : 'n/a';
  const ngspiceText = ngspiceSolve !== undefined ? `${ngspiceSolve.toFixed(1)} ms` : 'n/a';
  const ratio = pnlintMilliseconds !== undefined && ngspiceSolve ? (pnlintMilliseconds / ngspiceSolve).toFixed(2) : 'n/a';
  const memory = heapAfterSolve[sections];
  const heap = memory ? `, heap used after solve ${memory.used.toFixed(1)} MB (${memory.held.toFixed(1)} MB held by the circuit and its solution)` : '';
  console.log(`ladder-${sections}: pnlint ${pnlintText}${phases}, ngspice ${ngspiceText}, ratio ${ratio}${heap}${note}`);
}

if (heapAfterSolve[2000] && heapAfterSolve[20000]) {
  const small = heapAfterSolve[2000].held;
  const large = heapAfterSolve[20000].held;
  console.log(
    `ladder-memory: heap held by circuit and solution ${small.toFixed(1)} MB at 2,000 sections, ${large.toFixed(1)} MB at 20,000: x${(large / small).toFixed(1)} for x10 sections (linear is about x10)`,
  );
} else {
  console.log('ladder-memory: not available yet (needs pnlint\'s solver)');
}
