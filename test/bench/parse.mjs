// Parse throughput on a generated ~10 MB netlist. Build first (`npx tsc -b`):
// this imports the compiled grammar, as the language server and the CLI do.
// Usage: node test/bench/parse.mjs [megabytes]
import { parse } from '../../grammar/dist/index.js';
import { netlistLexer } from '../../grammar/dist/lexer.js';

const targetMegabytes = Number(process.argv[2] ?? 10);

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
const cpuBefore = process.cpuUsage();
const started = performance.now();
const result = parse(text);
const milliseconds = performance.now() - started;
const cpu = process.cpuUsage(cpuBefore);
const cpuMilliseconds = (cpu.user + cpu.system) / 1000;
const throughput = megabytes / (milliseconds / 1000);

console.log(`${lines.length} lines, ${megabytes.toFixed(1)} MB, ${result.statements.length} top-level statements, ${result.diagnostics.length} diagnostics`);
console.log(`parse-10MB: ${milliseconds.toFixed(0)} ms, ${throughput.toFixed(1)} MB/s`);
// On a shared machine wall time includes waiting for a core; CPU time (all threads,
// garbage collection included) shows the parser's own cost.
console.log(`cpu: ${cpuMilliseconds.toFixed(0)} ms, ${(megabytes / (cpuMilliseconds / 1000)).toFixed(1)} MB/s of CPU time`);

// The lexer alone, in the parser's 64 kB chunks: how much of the time is tokenising.
const lexCpuBefore = process.cpuUsage();
const lexStarted = performance.now();
for (let start = 0; start < text.length; start += 65536) netlistLexer.tokenize(text.slice(start, start + 65536));
const lexMilliseconds = performance.now() - lexStarted;
const lexCpu = process.cpuUsage(lexCpuBefore);
const lexCpuMilliseconds = (lexCpu.user + lexCpu.system) / 1000;
console.log(`lexer alone: ${lexMilliseconds.toFixed(0)} ms (${(megabytes / (lexMilliseconds / 1000)).toFixed(1)} MB/s), cpu ${lexCpuMilliseconds.toFixed(0)} ms`);
