// Benchmark: elaboration of a generated 20,000-section resistor–diode ladder
// (about 0.86 MB, 40,000 element lines), from the built server/dist (run
// `npx tsc -b` first). elaborate() parses the text itself, so the parse is
// timed alone as well and subtracted: the difference is elaboration's own work.
// Median of a few repetitions after one warm-up, each after a forced garbage
// collection (the script re-runs itself with --expose-gc) so that no call pays
// for the previous one's garbage; wall-clock and CPU time (process.cpuUsage:
// other work on a shared machine inflates the wall clock more than the CPU
// time; CPU time counts V8's helper threads too). Reported, not a timed test.
// Usage: node test/bench/elaborate.mjs [sections]
import { spawnSync } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { resistorDiodeLadder } from '../support/ladder.mjs';
import { diskReader } from '../support/disk-reader.mjs';

if (!globalThis.gc) {
  const child = spawnSync(process.execPath, ['--expose-gc', fileURLToPath(import.meta.url), ...process.argv.slice(2)], { stdio: 'inherit' });
  process.exit(child.status ?? 1);
}

const sections = Number(process.argv[2] ?? 20000);
/** Few repetitions: the machine is shared by many. */
const REPETITIONS = 5;

const grammar = await import(pathToFileURL(fileURLToPath(new URL('../../grammar/dist/index.js', import.meta.url))).href);
const netlist = await import(pathToFileURL(fileURLToPath(new URL('../../server/dist/netlist/index.js', import.meta.url))).href);

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

/** Wall-clock and CPU milliseconds of one call. */
function timed(run) {
  globalThis.gc();
  const cpuBefore = process.cpuUsage();
  const started = performance.now();
  const result = run();
  const wall = performance.now() - started;
  const cpu = process.cpuUsage(cpuBefore);
  return { result, wall, cpu: (cpu.user + cpu.system) / 1000 };
}

const text = resistorDiodeLadder(sections);
const uri = `/bench/ladder-${sections}.cir`;

// Warm-up: let the JIT compile the hot paths, as in a long-lived language server.
netlist.elaborate(uri, text, diskReader);

const parseWall = [];
const parseCpu = [];
const elaborateWall = [];
const elaborateCpu = [];
let circuit;
for (let index = 0; index < REPETITIONS; index++) {
  const parsed = timed(() => grammar.parse(text));
  parseWall.push(parsed.wall);
  parseCpu.push(parsed.cpu);
  const elaborated = timed(() => netlist.elaborate(uri, text, diskReader));
  elaborateWall.push(elaborated.wall);
  elaborateCpu.push(elaborated.cpu);
  circuit = elaborated.result;
}

const parse = median(parseWall);
const elaborate = median(elaborateWall);
const cpuParse = median(parseCpu);
const cpuElaborate = median(elaborateCpu);
const elements = circuit.elements.length;
console.log(`elaborate: load average ${loadavg()[0].toFixed(1)} on ${availableParallelism()} cores; ${(text.length / 1e6).toFixed(2)} MB, ${elements} elements, ${circuit.nodes.length} nodes, ${circuit.diagnostics.length} diagnostics`);
console.log(
  `elaborate-${sections}: parse ${parse.toFixed(1)} ms, elaborate ${elaborate.toFixed(1)} ms (excluding parse: ${(elaborate - parse).toFixed(1)}); ` +
    `cpu: parse ${cpuParse.toFixed(1)} ms, elaborate ${cpuElaborate.toFixed(1)} ms (excluding parse: ${(cpuElaborate - cpuParse).toFixed(1)}, ` +
    `${(((cpuElaborate - cpuParse) * 1000) / elements).toFixed(2)} µs per element)`,
);
