// Parse throughput on a generated ~10 MB netlist, and the grammar's start-up time.
// Build first (`npx tsc -b`): this imports the compiled grammar, as the language
// server and the CLI do.
// Usage: node test/bench/parse.mjs [megabytes]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { parse } from '../../grammar/dist/index.js';
import { netlistLexer } from '../../grammar/dist/lexer.js';

const targetMegabytes = Number(process.argv[2] ?? 10);
const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
/** Start-up is measured in this many fresh processes; the median is reported (one run is noisy on a shared machine). */
const STARTUP_RUNS = 5;

/** Lines of the kinds a board-level netlist holds, numbered so that names differ. */
function block(n) {
  return [
    `* ---- channel ${n}: supply filter, indicator LED and clamp`,
    `.subckt chan${n} in out gnd params: rload=10k gain=2`,
    `R${n}a in n${n}a 4.7k`,
    `R${n}b n${n}a out {rload*gain} ; scaled load`,
    `C${n}a n${n}a gnd 100nF ic=0`,
    `D${n}a n${n}a led${n} DRED`,
    `D${n}b gnd n${n}a D1N_CLAMP area=2 off`,
    `L${n} out n${n}c 10uH`,
    `.ends chan${n}`,
    `X${n} vin${n % 7} vout${n} 0 chan${n} rload=22k`,
    `V${n} vin${n % 7} 0 DC 5 AC 1 SIN(0 1 1k)`,
    `V${n}p p${n} 0 PULSE(0, 5, 0, 1n, 1n, 1u, 2u)`,
    `I${n} p${n} 0 PWL(0 0 1m 5m`,
    `+ 2m 0)`,
    `Q${n} c${n} b${n} e${n} QNPN_GEN`,
    `.model DRED D(IS=1e-18 N=1.9 RS=2 BV=5 IBV=10u)`,
    `.param r${n} = {2*1k + ${n}}`,
    `E${n} o${n} 0 in${n} 0 '2*gain'`,
  ];
}

const lines = ['bench netlist: generated channels'];
let size = 0;
for (let n = 0; size < targetMegabytes * 1e6; n++) {
  for (const line of block(n)) {
    lines.push(line);
    size += line.length + 1;
  }
}
lines.push('.end');
const text = lines.join('\n');
const megabytes = text.length / 1e6;

parse(text.slice(0, 200_000)); // warm up the parser's code paths
globalThis.gc?.(); // start from a settled heap when the bench runner allows it
const cpuBefore = process.cpuUsage();
const started = performance.now();
let result = parse(text);
const milliseconds = performance.now() - started;
const cpu = process.cpuUsage(cpuBefore);
const cpuMilliseconds = (cpu.user + cpu.system) / 1000;

console.log(`${lines.length} lines, ${megabytes.toFixed(1)} MB, ${result.statements.length} top-level statements, ${result.diagnostics.length} diagnostics`);
// On a shared machine wall time includes waiting for a core; CPU time (all threads,
// garbage collection included) shows the parser's own cost.
console.log(
  `parse-10MB: ${milliseconds.toFixed(0)} ms, ${(megabytes / (milliseconds / 1000)).toFixed(1)} MB/s (cpu ${(megabytes / (cpuMilliseconds / 1000)).toFixed(1)} MB/s)`,
);

// The same parse in a worker with the language server's analysis-worker heap settings,
// where the editor parses: its larger young generation spares the collector copying.
const { ANALYSIS_YOUNG_GENERATION_MB } = await import('../../server/dist/lsp/runner.js');
const workerMilliseconds = await new Promise((resolve, reject) => {
  const probe = [
    "const { parentPort, workerData } = await import('node:worker_threads');",
    `const { parse } = await import(${JSON.stringify(pathToFileURL(join(root, 'grammar/dist/index.js')).href)});`,
    'parse(workerData.slice(0, 200_000));',
    'const started = performance.now();',
    'parse(workerData);',
    'parentPort.postMessage(performance.now() - started);',
  ].join('\n');
  const worker = new Worker(new URL(`data:text/javascript,${encodeURIComponent(probe)}`), {
    workerData: text,
    resourceLimits: { maxYoungGenerationSizeMb: ANALYSIS_YOUNG_GENERATION_MB },
  });
  worker.once('message', (value) => {
    resolve(value);
    void worker.terminate();
  });
  worker.once('error', reject);
});
console.log(`parse-10MB-in-analysis-worker: ${workerMilliseconds.toFixed(0)} ms, ${(megabytes / (workerMilliseconds / 1000)).toFixed(1)} MB/s (young generation ${ANALYSIS_YOUNG_GENERATION_MB} MB)`);

// The lexer alone, in the parser's 64 kB chunks: how much of the time is tokenising.
// The syntax tree is let go first, or collecting around it would count as lexing.
result = undefined;
globalThis.gc?.();
const lexCpuBefore = process.cpuUsage();
const lexStarted = performance.now();
for (let start = 0; start < text.length; start += 65536) netlistLexer.tokenize(text.slice(start, start + 65536));
const lexMilliseconds = performance.now() - lexStarted;
const lexCpu = process.cpuUsage(lexCpuBefore);
const lexCpuMilliseconds = (lexCpu.user + lexCpu.system) / 1000;
console.log(`lexer alone: ${lexMilliseconds.toFixed(0)} ms (${(megabytes / (lexMilliseconds / 1000)).toFixed(1)} MB/s), cpu ${lexCpuMilliseconds.toFixed(0)} ms`);

/**
 * Start-up: in a fresh Node process, import the grammar and parse a first small netlist
 * (which builds the lexers and parsers). Measured by the child from before its import.
 */
function startupMilliseconds(moduleUrl) {
  const probe = [
    'const started = performance.now();',
    `const { parse } = await import(${JSON.stringify(moduleUrl)});`,
    "parse('startup\\nV1 a 0 DC 5 SIN(0 1 1k)\\nR1 a b 1k\\nD1 b 0 DLED\\n.model DLED D(IS=1e-18 N=2)\\n.param x={1+2}\\n.end\\n');",
    'console.log(performance.now() - started);',
  ].join('\n');
  const runs = [];
  for (let run = 0; run < STARTUP_RUNS; run++) {
    const child = spawnSync(process.execPath, ['--input-type=module', '-e', probe], { cwd: root, encoding: 'utf8' });
    const value = Number(child.stdout.trim());
    if (child.status !== 0 || !Number.isFinite(value)) throw new Error(`start-up probe failed: ${child.stderr}`);
    runs.push(value);
  }
  runs.sort((a, b) => a - b);
  return runs[Math.floor(runs.length / 2)];
}

console.log(`parse-startup: ${startupMilliseconds(pathToFileURL(join(root, 'grammar/dist/index.js')).href).toFixed(0)} ms`);

// The extension ships the server as one esbuild bundle; most of the start-up above is Node
// loading Chevrotain's and lodash-es's hundreds of separate modules, which a bundle avoids.
const bundleFolder = mkdtempSync(join(tmpdir(), 'pnlint-parse-bench-'));
try {
  const { build } = await import('esbuild');
  const bundle = join(bundleFolder, 'grammar.mjs');
  const entry = join(bundleFolder, 'entry.mjs');
  writeFileSync(entry, `export { parse } from ${JSON.stringify(join(root, 'grammar/src/index.ts'))};\n`);
  await build({ entryPoints: [entry], bundle: true, platform: 'node', format: 'esm', outfile: bundle, logLevel: 'error' });
  console.log(`parse-startup-bundled: ${startupMilliseconds(pathToFileURL(bundle).href).toFixed(0)} ms`);
} catch (failure) {
  console.log(`parse-startup-bundled: not measured (${failure instanceof Error ? failure.message : String(failure)})`);
} finally {
  rmSync(bundleFolder, { recursive: true, force: true });
}
