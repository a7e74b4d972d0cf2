// @ts-check
// Runs the reference engine, ngspice (39, from Debian's packages), on a netlist and
// reads back its DC operating point. Plain JavaScript so that both the tests
// (through test/support/ngspice.ts) and the benchmarks (plain Node) use the very
// same deck and the very same reading of its output.
// How to drive ngspice and read its numbers: shared/design/verification.md.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';

/** The executable, overridable for machines where it lives elsewhere. */
export const NGSPICE_COMMAND = process.env.PNLINT_NGSPICE ?? 'ngspice';

/**
 * Tight tolerances so that ngspice's answer is exact to far better than the
 * comparison tolerances (ngspice's defaults are reltol=1e-3, abstol=1e-12,
 * vntol=1e-6: too loose to compare at 1 µV). Values from verification.md.
 */
export const TIGHT_TOLERANCES = Object.freeze({ reltol: 1e-9, abstol: 1e-18, vntol: 1e-12 });

/** The `.options` card for `tolerances` (defaults: TIGHT_TOLERANCES). */
export function optionsCard(tolerances = {}) {
  const merged = { ...TIGHT_TOLERANCES, ...tolerances };
  return `.options reltol=${merged.reltol} abstol=${merged.abstol} vntol=${merged.vntol}`;
}

export const TIGHT_OPTIONS = optionsCard();

/** Digits printed per value: enough to compare at 1e-9 relative. */
export const PRINTED_DIGITS = 15;

/** A run longer than this is killed and counted as failed: nothing hangs. */
export const DEFAULT_TIMEOUT_MILLISECONDS = 60_000;

const BEGIN_MARKER = '@@BEGIN';
/**
 * `print all` of a single vector labels it `all` instead of its name (seen with
 * ngspice 39), so the control block adds this vector to keep at least two.
 */
const PADDING_VECTOR = 'pnlint_padding';
const END_MARKER = '@@END';

/** ngspice's exit code is 0 even when the solve fails; these lines in its stderr say it failed. */
const FAILURE_IN_STDERR = /simulation\(s\) aborted|^Error|fatal error/m;
/** ngspice prints this on stdout when the operating point did not converge. */
const FAILURE_IN_STDOUT = /DC solution failed/;

/** One `name = value` line of `print`. */
const VALUE_LINE = /^(\S+)\s+=\s+(\S+)/;

/** The last `.end` line of the deck (not `.ends`, not `.endc`). */
const END_CARD = /^[ \t]*\.end[ \t]*(?:[;$].*)?$/im;

/**
 * The netlist with the tight options and a `.control` block that solves the
 * operating point, prints `vectors` (or everything) between markers, and quits.
 * @param {string} netlist
 * @param {{ vectors?: string[], print?: boolean, tolerances?: { reltol?: number, abstol?: number, vntol?: number } }} [options]
 *   `print: false` solves and quits without printing (for timing);
 *   `tolerances` overrides some of TIGHT_TOLERANCES.
 */
export function buildOperatingPointDeck(netlist, options = {}) {
  const lines = netlist.replace(/\r\n?/g, '\n').split('\n');
  // Drop the `.end` card (and anything after it, which ngspice ignores) so that
  // the control block lands inside the deck.
  let endIndex = -1;
  for (let index = 1; index < lines.length; index++) {
    if (END_CARD.test(lines[index])) {
      endIndex = index;
      break;
    }
  }
  const circuit = endIndex >= 0 ? lines.slice(0, endIndex) : lines;
  const print = options.print ?? true;
  const what = options.vectors && options.vectors.length > 0 ? options.vectors.join(' ') : 'all';
  const control = print
    ? ['.control', `set numdgt=${PRINTED_DIGITS}`, 'op', `let ${PADDING_VECTOR} = 0`, `echo ${BEGIN_MARKER}`, `print ${what}`, `echo ${END_MARKER}`, 'quit', '.endc']
    : ['.control', 'op', 'quit', '.endc'];
  return [...circuit, optionsCard(options.tolerances), ...control, '.end', ''].join('\n');
}

/**
 * The `name = value` pairs printed between the markers, names lower-cased (as
 * ngspice prints them). Returns undefined when a marker is missing.
 * @param {string} stdout
 * @returns {Map<string, number> | undefined}
 */
export function readPrintedValues(stdout) {
  const lines = stdout.split(/\r?\n/);
  const begin = lines.indexOf(BEGIN_MARKER);
  const end = lines.indexOf(END_MARKER, begin + 1);
  if (begin < 0 || end < 0) return undefined;
  /** @type {Map<string, number>} */
  const values = new Map();
  for (const line of lines.slice(begin + 1, end)) {
    const match = VALUE_LINE.exec(line.trim());
    if (match && match[1].toLowerCase() !== PADDING_VECTOR) values.set(match[1].toLowerCase(), Number(match[2]));
  }
  return values;
}

/**
 * @typedef {object} NgspiceRun
 * @property {boolean} ok  true when ngspice solved and printed every value asked for
 * @property {Map<string, number>} values  vector name (lower case) → value; node voltages by node name, source currents as `name#branch`
 * @property {string | undefined} failure  why the run counts as failed
 * @property {string} stdout
 * @property {string} stderr
 * @property {string} deck  the deck that was run
 * @property {number} milliseconds  wall-clock time of the ngspice process
 */

/**
 * Solves `netlist`'s DC operating point with ngspice in a fresh temporary
 * directory. `includes` are written beside it (relative paths → text), so that
 * `.include` lines resolve as they do for a user.
 * @param {string} netlist
 * @param {{ includes?: Record<string, string>, vectors?: string[], print?: boolean, timeoutMilliseconds?: number, tolerances?: { reltol?: number, abstol?: number, vntol?: number } }} [options]
 * @returns {NgspiceRun}
 */
export function runNgspiceOperatingPoint(netlist, options = {}) {
  const directory = mkdtempSync(join(tmpdir(), 'pnlint-ngspice-'));
  try {
    for (const [path, text] of Object.entries(options.includes ?? {})) {
      const target = join(directory, path);
      mkdirSync(dirname(target), { recursive: true });
      writeFileSync(target, text);
    }
    const deck = buildOperatingPointDeck(netlist, options);
    const deckPath = join(directory, 'deck.cir');
    writeFileSync(deckPath, deck);
    const started = performance.now();
    const child = spawnSync(NGSPICE_COMMAND, ['-n', '-b', deckPath], {
      cwd: directory,
      env: { ...process.env, LC_ALL: 'C' },
      encoding: 'utf8',
      timeout: options.timeoutMilliseconds ?? DEFAULT_TIMEOUT_MILLISECONDS,
      maxBuffer: 512 * 1024 * 1024,
    });
    const milliseconds = performance.now() - started;
    const stdout = child.stdout ?? '';
    const stderr = child.stderr ?? '';
    /** @type {(failure: string | undefined, values?: Map<string, number>) => NgspiceRun} */
    const result = (failure, values = new Map()) => ({ ok: failure === undefined, values, failure, stdout, stderr, deck, milliseconds });

    if (child.error) return result(`could not run ${NGSPICE_COMMAND}: ${child.error.message}`);
    if (child.signal) return result(`ngspice was stopped by ${child.signal} (timeout?)`);
    const stderrFailure = FAILURE_IN_STDERR.exec(stderr);
    if (stderrFailure) return result(`ngspice reported failure: ${lineAround(stderr, stderrFailure.index)}`);
    if (FAILURE_IN_STDOUT.test(stdout)) return result('ngspice: DC solution failed');
    if (options.print === false) return result(child.status === 0 ? undefined : `ngspice exited with status ${child.status}`);

    const values = readPrintedValues(stdout);
    if (!values) return result('ngspice printed no value block (markers missing)');
    if (values.size === 0) return result('ngspice printed no values');
    for (const [name, value] of values) {
      if (!Number.isFinite(value)) return result(`ngspice printed a non-numeric value for ${name}`, values);
    }
    for (const vector of options.vectors ?? []) {
      if (!values.has(vector.toLowerCase())) return result(`ngspice printed no value for ${vector}`, values);
    }
    return result(undefined, values);
  } finally {
    rmSync(directory, { recursive: true, force: true });
  }
}

/** @param {string} text @param {number} index */
function lineAround(text, index) {
  const start = text.lastIndexOf('\n', index) + 1;
  const end = text.indexOf('\n', index);
  return text.slice(start, end < 0 ? undefined : end).trim();
}

/** @type {boolean | undefined} */
let ngspiceFound;

/** True when ngspice can be started here (checked once per process). */
export function hasNgspice() {
  if (ngspiceFound === undefined) {
    const probe = spawnSync(NGSPICE_COMMAND, ['--version'], { encoding: 'utf8', timeout: 10_000 });
    ngspiceFound = !probe.error && /ngspice/i.test(probe.stdout ?? '');
  }
  return ngspiceFound;
}

/** The version line, e.g. `ngspice-39`, or undefined. */
export function ngspiceVersion() {
  const probe = spawnSync(NGSPICE_COMMAND, ['--version'], { encoding: 'utf8', timeout: 10_000 });
  const match = /ngspice-(\S+)/.exec(probe.stdout ?? '');
  return match ? match[1] : undefined;
}
