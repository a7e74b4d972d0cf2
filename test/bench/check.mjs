// Benchmark: `pnlint check` on the bundled demo netlists and on a generated
// 2,000-diode board (as built, and with every LED reversed). Figures: the CLI as a
// user runs it (a fresh Node process, so it includes Node's start-up), the shared
// analysis pipeline in process (what the language server pays per check, fixes
// included), the checks alone (checkCircuit on the elaborated circuit) and the fixes
// alone (attachVerifiedFixes on a finished check of the reversed board) in CPU time
// (process.cpuUsage) and wall time. Medians of several repetitions, with the
// machine's load average beside them: on a shared machine wall time follows the load.
// Reported, not a timed test.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { diskReader } from '../support/disk-reader.mjs';
import { indicatorBoard } from '../support/indicators.mjs';

const SERVER = fileURLToPath(new URL('../../server/', import.meta.url));
const CLI = join(SERVER, 'dist/cli/main.js');
const ANALYSIS = join(SERVER, 'dist/analysis.js');
const NETLIST = join(SERVER, 'dist/netlist/index.js');
const CHECKS = join(SERVER, 'dist/checks/index.js');
const SETTINGS = join(SERVER, 'dist/settings.js');
const FIXES = join(SERVER, 'dist/fixes/index.js');
const RULES = join(SERVER, 'dist/checks/rules');
const EXAMPLES = join(SERVER, 'examples');
/** The file extensions of product.md's `spice-netlist` language. */
const NETLIST_EXTENSIONS = /\.(cir|net|sp|spi|spice|ckt)$/i;
const GENERATED_DIODES = 2000;
const REPETITIONS = 5;
/** 67 indicators of three elements each, with the supply: 202 elements, the language server's latency case. */
const SMALL_BOARD_DIODES = 134;
const SMALL_BOARD_REPETITIONS = 100;
/** One check that takes longer than this is stopped and reported, so the bench always ends. */
const CHECK_TIME_LIMIT_MILLISECONDS = 120_000;
/** Fewer repetitions when one run is slow, so that a shared 2-core machine is not held for long. */
const TOTAL_TIME_PER_SET_MILLISECONDS = 60_000;

function percentile(values, fraction) {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * fraction))];
}

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

/** The same board with every LED turned around: the worst case for the counterfactual solves. */
function withLedsReversed(text) {
  return text.replace(/^(DL\d+) (\S+) (\S+) /gm, '$1 $3 $2 ');
}

/** CPU and wall time of one call, ms. */
function measured(run) {
  const cpu = process.cpuUsage();
  const started = performance.now();
  const value = run();
  const wall = performance.now() - started;
  const used = process.cpuUsage(cpu);
  return { value, wall, cpu: (used.user + used.system) / 1000 };
}

const load = () => loadavg().map((each) => each.toFixed(2)).join(' ');

function notAvailable(why) {
  console.log(`check-demo: not available yet (${why})`);
  console.log(`check-${GENERATED_DIODES}-diodes: not available yet (${why})`);
}

const rulesBuilt = existsSync(RULES) && readdirSync(RULES).some((name) => name.endsWith('.js'));
const demoFiles = existsSync(EXAMPLES) ? readdirSync(EXAMPLES).filter((name) => NETLIST_EXTENSIONS.test(name)).map((name) => join(EXAMPLES, name)) : [];

if (!existsSync(CLI) || !existsSync(ANALYSIS)) {
  notAvailable('the CLI is not built: run npx tsc -b');
} else if (!rulesBuilt) {
  notAvailable('no diode rule in server/dist/checks/rules yet');
} else {
  const { analyze } = await import(pathToFileURL(ANALYSIS).href);
  const { elaborate } = await import(pathToFileURL(NETLIST).href);
  const { checkCircuit } = await import(pathToFileURL(CHECKS).href);
  const { DEFAULT_SETTINGS } = await import(pathToFileURL(SETTINGS).href);
  const { attachVerifiedFixes } = await import(pathToFileURL(FIXES).href);
  const folder = mkdtempSync(join(tmpdir(), 'pnlint-bench-check-'));
  try {
    const generated = join(folder, `board-${GENERATED_DIODES}-diodes.cir`);
    writeFileSync(generated, indicatorBoard(GENERATED_DIODES));
    const reversed = join(folder, `board-${GENERATED_DIODES}-diodes-reversed.cir`);
    writeFileSync(reversed, withLedsReversed(indicatorBoard(GENERATED_DIODES)));
    const sets = [
      { label: 'check-demo', files: demoFiles },
      { label: `check-${GENERATED_DIODES}-diodes`, files: [generated] },
      { label: `check-${GENERATED_DIODES}-diodes-reversed`, files: [reversed] },
    ];
    for (const { label, files } of sets) {
      if (files.length === 0) {
        console.log(`${label}: not available yet (no demo netlists in server/examples)`);
        continue;
      }
      // The first CLI run decides whether more are worth it: a check that does not finish
      // within its time limit is reported as such rather than repeated.
      const cliTimes = [];
      let cliProblem = '';
      for (let index = 0; index < REPETITIONS && !cliProblem; index++) {
        const started = performance.now();
        const child = spawnSync(process.execPath, [CLI, 'check', ...files, '--format', 'json'], {
          encoding: 'utf8',
          timeout: CHECK_TIME_LIMIT_MILLISECONDS,
          maxBuffer: 256 * 1024 * 1024,
        });
        const elapsed = performance.now() - started;
        if (child.signal) {
          cliProblem = `did not finish within ${CHECK_TIME_LIMIT_MILLISECONDS / 1000} s`;
        } else if (child.error || (child.status !== 0 && child.status !== 1)) {
          // Exit 0 (clean) and 1 (findings at error) are both a finished check; 2 is a usage or I/O error.
          cliProblem = `the CLI failed: ${child.error?.message ?? `exit ${child.status}`} ${(child.stderr ?? '').trim().split('\n')[0] ?? ''}`;
        } else {
          cliTimes.push(elapsed);
          if (elapsed * REPETITIONS > TOTAL_TIME_PER_SET_MILLISECONDS) break;
        }
      }
      if (cliTimes.length === 0) {
        console.log(`${label}: ${files.length} file(s), CLI ${cliProblem}`);
        continue;
      }
      const analysisTimes = [];
      let findings = 0;
      for (let index = 0; index < cliTimes.length; index++) {
        const started = performance.now();
        findings = 0;
        for (const file of files) findings += analyze({ uri: file, text: diskReader.read(file) ?? '', files: diskReader }).findings.length;
        analysisTimes.push(performance.now() - started);
      }
      // The checks alone, on circuits elaborated beforehand.
      const circuits = files.map((file) => elaborate(file, diskReader.read(file) ?? '', diskReader));
      const checkCpu = [];
      const checkWall = [];
      for (let index = 0; index < REPETITIONS; index++) {
        const { wall, cpu } = measured(() => circuits.map((circuit) => checkCircuit(circuit, DEFAULT_SETTINGS, undefined)));
        checkCpu.push(cpu);
        checkWall.push(wall);
      }
      console.log(
        `${label}: ${files.length} file(s), checks ${median(checkCpu).toFixed(1)} ms CPU / ${median(checkWall).toFixed(1)} ms wall (median of ${REPETITIONS}), ` +
          `in-process analysis with fixes ${median(analysisTimes).toFixed(1)} ms, CLI ${median(cliTimes).toFixed(0)} ms (includes Node start-up), ` +
          `${findings} finding(s), load average ${load()}${cliProblem ? ` (${cliProblem})` : ''}`,
      );
    }
    // The fixes alone, on a finished check of the reversed board: what the language server's
    // second phase pays, each fix verified by re-simulation within the fixes' own budget.
    const reversedCircuit = elaborate(reversed, diskReader.read(reversed) ?? '', diskReader);
    const reversedCheck = checkCircuit(reversedCircuit, DEFAULT_SETTINGS, undefined);
    const fixCpu = [];
    const fixWall = [];
    let fixRun;
    for (let index = 0; index < REPETITIONS; index++) {
      const { value, wall, cpu } = measured(() => attachVerifiedFixes(reversedCheck, reversedCircuit, diskReader, DEFAULT_SETTINGS, undefined));
      fixRun = value;
      fixCpu.push(cpu);
      fixWall.push(wall);
    }
    const offered = fixRun.findings.reduce((count, finding) => count + finding.fixes.filter((fix) => !fix.title.startsWith('Ignore')).length, 0);
    const ignores = fixRun.findings.reduce((count, finding) => count + finding.fixes.filter((fix) => fix.title.startsWith('Ignore')).length, 0);
    console.log(
      `fix-${GENERATED_DIODES}-diodes-reversed: fixes ${median(fixCpu).toFixed(1)} ms CPU / ${median(fixWall).toFixed(1)} ms wall (median of ${REPETITIONS}), ` +
        `${fixRun.statistics.verifications} re-check(s), ${offered} verified fix(es) and ${ignores} ignore fix(es) for ${fixRun.findings.length} finding(s), ` +
        `${fixRun.statistics.skipped} request(s) past the budget, load average ${load()}`,
    );
    // What the language server pays on a keystroke for a netlist of about 200 elements (the checks only).
    const small = elaborate(join(folder, 'board-200-elements.cir'), indicatorBoard(SMALL_BOARD_DIODES), diskReader);
    const smallCpu = [];
    const smallWall = [];
    for (let index = 0; index < SMALL_BOARD_REPETITIONS; index++) {
      const { wall, cpu } = measured(() => checkCircuit(small, DEFAULT_SETTINGS, undefined));
      smallCpu.push(cpu);
      smallWall.push(wall);
    }
    console.log(
      `check-${small.elements.length}-elements: checks ${median(smallCpu).toFixed(2)} ms CPU, wall median ${median(smallWall).toFixed(2)} ms, p95 ${percentile(smallWall, 0.95).toFixed(2)} ms over ${SMALL_BOARD_REPETITIONS} checks, load average ${load()}`,
    );
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}
