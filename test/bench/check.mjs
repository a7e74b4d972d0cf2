// Benchmark: `pnlint check` on the bundled demo netlists and on a generated
// 2,000-diode board. Two figures each: the CLI as a user runs it (a fresh Node
// process, so it includes Node's start-up), and the shared analysis pipeline
// in process (what the language server pays per check). Median of several
// repetitions. Reported, not a timed test.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { diskReader } from '../support/disk-reader.mjs';
import { indicatorBoard } from '../support/indicators.mjs';

const SERVER = fileURLToPath(new URL('../../server/', import.meta.url));
const CLI = join(SERVER, 'dist/cli/main.js');
const ANALYSIS = join(SERVER, 'dist/analysis.js');
const RULES = join(SERVER, 'dist/checks/rules');
const EXAMPLES = join(SERVER, 'examples');
/** The file extensions of product.md's `spice-netlist` language. */
const NETLIST_EXTENSIONS = /\.(cir|net|sp|spi|spice|ckt)$/i;
const GENERATED_DIODES = 2000;
const REPETITIONS = 5;
/** One check that takes longer than this is stopped and reported, so the bench always ends. */
const CHECK_TIME_LIMIT_MILLISECONDS = 120_000;
/** Fewer repetitions when one run is slow, so that a shared 2-core machine is not held for long. */
const TOTAL_TIME_PER_SET_MILLISECONDS = 60_000;

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = sorted.length >> 1;
  return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

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
  const folder = mkdtempSync(join(tmpdir(), 'pnlint-bench-check-'));
  try {
    const generated = join(folder, `board-${GENERATED_DIODES}-diodes.cir`);
    writeFileSync(generated, indicatorBoard(GENERATED_DIODES));
    const sets = [
      { label: 'check-demo', files: demoFiles },
      { label: `check-${GENERATED_DIODES}-diodes`, files: [generated] },
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
      console.log(
        `${label}: ${files.length} file(s), CLI ${median(cliTimes).toFixed(0)} ms (includes Node start-up), in-process analysis ${median(analysisTimes).toFixed(1)} ms, ${findings} finding(s), median of ${cliTimes.length}${cliProblem ? ` (${cliProblem})` : ''}`,
      );
    }
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}
