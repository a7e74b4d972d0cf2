// Helpers for the acceptance tests: pnlint run the way a hardware engineer runs it (the
// built CLI in a child process: build first with `npm run build`, as `npm test` does), the netlists of circuits/, the numbers read back out of
// its messages, and the reference engine (ngspice 39) run on the same netlists at a
// chosen corner. Expected values come from ngspice or from hand formulas in the tests,
// never from pnlint's own output.
import { execFile, spawnSync } from 'node:child_process';
import { cpSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runNgspiceOperatingPoint, type NgspiceRun } from '../support/ngspice.js';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const CIRCUITS = join(ROOT, 'test/acceptance/circuits');
const LAUNCHER = join(ROOT, 'server/bin/pnlint.js');

/**
 * The setup of each file (several CLI runs) may take this long on a loaded 2-core machine:
 * the default 10 s hook timeout was seen to expire.
 */
export const SETUP_TIMEOUT_MILLISECONDS = 180_000;

/** A CLI run is killed after this: nothing may hang. */
const CLI_TIMEOUT_MILLISECONDS = 60_000;

/**
 * Messages print three significant digits ("26 mA", "1.04 A"): rounding alone moves a
 * value by up to 0.5 %, so 1 % leaves room for the solvers' own tolerances.
 */
export const PRINTED_TOLERANCE = 0.01;

/** The default supply tolerance when no `*pnlint: supply` directive is given: 5 % (common practice, no source; product.md). */
export const DEFAULT_SUPPLY_TOLERANCE = 0.05;

/** The trade's rule of thumb for an LED without a rating: 20 mA continuous (common practice, no source). */
export const LED_RULE_OF_THUMB_CURRENT = 0.02;

/** IEC 60063, the E24 series of preferred numbers (one decade). */
export const E24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91];

export interface CliRun {
  code: number | null;
  stdout: string;
  stderr: string;
}

export function pnlint(args: string[], cwd: string): CliRun {
  const run = spawnSync(process.execPath, [LAUNCHER, ...args], {
    cwd,
    encoding: 'utf8',
    env: { ...process.env, NO_COLOR: '1' },
    timeout: CLI_TIMEOUT_MILLISECONDS,
  });
  return { code: run.status, stdout: run.stdout ?? '', stderr: run.stderr ?? '' };
}

/** Several CLI runs at once (each in its own process), for the tests that need many. */
export function pnlintAll(runs: { args: string[]; cwd: string }[]): Promise<CliRun[]> {
  return Promise.all(
    runs.map(
      ({ args, cwd }) =>
        new Promise<CliRun>((resolve) => {
          execFile(process.execPath, [LAUNCHER, ...args], { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' }, timeout: CLI_TIMEOUT_MILLISECONDS }, (error, stdout, stderr) => {
            const code = error ? (typeof error.code === 'number' ? error.code : null) : 0;
            resolve({ code, stdout, stderr });
          });
        }),
    ),
  );
}

/** One finding of `pnlint check --format json` (the stable JSON shape of issue 2). */
export interface JsonFinding {
  rule: string;
  severity: 'error' | 'warning' | 'info' | 'hint';
  message: string;
  element?: string;
  range: { start: { line: number; column: number }; end: { line: number; column: number } };
  fixes: { title: string; preferred: boolean }[];
}

export interface CheckReport {
  code: number | null;
  /** File name (no folder) → its findings. */
  byFile: Map<string, JsonFinding[]>;
  stderr: string;
}

/** `pnlint check --format json` on `files` (relative to `cwd`), in one process. */
export function checkJson(files: string[], cwd: string, extra: string[] = []): CheckReport {
  const run = pnlint(['check', ...files, '--format', 'json', ...extra], cwd);
  const report = JSON.parse(run.stdout) as { files: { path: string; findings: JsonFinding[] }[] };
  const byFile = new Map<string, JsonFinding[]>();
  for (const file of report.files) byFile.set(basename(file.path), file.findings);
  return { code: run.code, byFile, stderr: run.stderr };
}

/** The findings at warning or error: what a clean design must not show. */
export function alarms(findings: JsonFinding[]): JsonFinding[] {
  return findings.filter((finding) => finding.severity === 'error' || finding.severity === 'warning');
}

export function readCircuit(relativePath: string): string {
  return readFileSync(join(CIRCUITS, relativePath), 'utf8');
}

/** A fresh temporary copy of a circuits/ subfolder, for runs that write files (`--fix`). */
export function copyOfCircuits(subfolder: string): string {
  const folder = mkdtempSync(join(tmpdir(), 'pnlint-acceptance-'));
  cpSync(join(CIRCUITS, subfolder), folder, { recursive: true });
  return folder;
}

const SCALE: Record<string, number> = { f: 1e-15, p: 1e-12, n: 1e-9, µ: 1e-6, u: 1e-6, m: 1e-3, '': 1, k: 1e3, M: 1e6, G: 1e9 };

/**
 * The value of the first quantity in `text` that follows `after` (a regular expression
 * source) and carries `unit`: "carries 26 mA" → 0.026. Minus signs may be U+2212.
 */
export function quantityAfter(text: string, after: string, unit: 'A' | 'V' | 'W' | 'Ω'): number {
  const pattern = new RegExp(`${after}\\s*([−-]?\\d+(?:\\.\\d+)?(?:e[+-]?\\d+)?)\\s*([fpnµumkMG]?)${unit}`);
  const match = pattern.exec(text);
  if (!match) throw new Error(`no quantity in ${unit} after /${after}/ in: ${text}`);
  return Number(match[1].replace('−', '-')) * SCALE[match[2]];
}

/** A resistance as the fixes write it ("240 Ω", "2.2 kΩ") → ohms. */
export function ohms(text: string): number {
  return quantityAfter(text, '', 'Ω');
}

/** True when `value` (ohms) is a member of the E24 series (IEC 60063) in some decade. */
export function isE24(value: number): boolean {
  const decade = Math.pow(10, Math.floor(Math.log10(value)) - 1);
  const mantissa = Math.round((value / decade) * 1000) / 1000;
  return E24.includes(mantissa);
}

/**
 * The netlist with some element lines replaced: `{ V12: 'V12 v12 0 DC 12.6' }` swaps
 * the line whose first word is V12 (case-insensitive). Used to set a corner's source
 * values, or to turn a diode around, for the reference engine.
 */
export function withLines(netlist: string, replacements: Record<string, string>): string {
  const wanted = new Map(Object.entries(replacements).map(([name, line]) => [name.toLowerCase(), line]));
  const seen = new Set<string>();
  const lines = netlist.split('\n').map((line) => {
    const name = line.trim().split(/\s+/)[0]?.toLowerCase() ?? '';
    const replacement = wanted.get(name);
    if (replacement === undefined) return line;
    seen.add(name);
    return replacement;
  });
  for (const name of wanted.keys()) if (!seen.has(name)) throw new Error(`no element line ${name} to replace`);
  return lines.join('\n');
}

/**
 * The netlist with a 0 V source in series with the anode of `element` (a two-terminal
 * line `D1 a k MODEL`), so that ngspice reports the diode's forward current as
 * `i(vam_<element>)` (verification.md: an ammeter source, not `@d1[id]`).
 */
export function withAmmeter(netlist: string, element: string): { netlist: string; vector: string } {
  const ammeter = `vam_${element.toLowerCase()}`;
  let found = false;
  const lines = netlist.split('\n').flatMap((line) => {
    const words = line.trim().split(/\s+/);
    if (words[0]?.toLowerCase() !== element.toLowerCase()) return [line];
    found = true;
    const anode = words[1];
    const probe = `${anode}_${ammeter}`;
    return [`${ammeter} ${anode} ${probe} DC 0`, [words[0], probe, ...words.slice(2)].join(' ')];
  });
  if (!found) throw new Error(`no element line ${element}`);
  return { netlist: lines.join('\n'), vector: `i(${ammeter})` };
}

/** ngspice 39's DC operating point; throws with its output when it failed, so the test says why. */
export function referenceSolve(netlist: string, vectors: string[], includes?: Record<string, string>): Map<string, number> {
  const run: NgspiceRun = runNgspiceOperatingPoint(netlist, includes ? { vectors, includes } : { vectors });
  if (!run.ok) throw new Error(`ngspice failed: ${run.failure}\n${run.stderr}\n${run.deck}`);
  return run.values;
}

/** The forward current of `element` from ngspice 39, with the netlist's lines replaced first. */
export function referenceDiodeCurrent(netlist: string, element: string, replacements: Record<string, string> = {}): number {
  const probed = withAmmeter(withLines(netlist, replacements), element);
  return referenceSolve(probed.netlist, [probed.vector]).get(probed.vector)!;
}

/** `relative` closeness, with an absolute floor for values near zero. */
export function near(actual: number, expected: number, relative = PRINTED_TOLERANCE, absolute = 0): boolean {
  return Math.abs(actual - expected) <= Math.max(relative * Math.abs(expected), absolute);
}
