// Runs the checks and the fixes on netlist text held in memory, applies a fix's edits, and
// checks the edited netlist again: the same path the CLI's --fix and the editor take.
import { expect } from 'vitest';
import { parse } from '@pnlint/grammar';
import { elaborate } from '../../server/src/netlist/index.js';
import type { Circuit, FileReader } from '../../server/src/netlist/circuit.js';
import { checkCircuit, type CheckResult } from '../../server/src/checks/index.js';
import { readWorkspaceConfig, type WorkspaceConfig } from '../../server/src/config.js';
import { applyEdits } from '../../server/src/edits.js';
import type { Finding, Fix } from '../../server/src/findings.js';
import { DEFAULT_SETTINGS, type Settings } from '../../server/src/settings.js';
import { attachVerifiedFixes, type FixOptions, type FixStatistics } from '../../server/src/fixes/index.js';
import { runNgspiceOperatingPoint } from '../support/ngspice.js';

export const MAIN_URI = 'memory:/main.cir';

export function memoryReader(files: Record<string, string> = {}): FileReader {
  return {
    read: (uri) => files[uri],
    resolve: (from, path) => new URL(path, from).href,
  };
}

export interface Checked {
  circuit: Circuit;
  check: CheckResult;
  findings: Finding[];
  statistics: FixStatistics;
  settings: Settings;
  config: WorkspaceConfig | undefined;
  files: Record<string, string>;
}

export interface CheckInput {
  settings?: Partial<Settings>;
  config?: string;
  /** Other files, by uri (for includes). */
  files?: Record<string, string>;
  fixes?: FixOptions;
}

/** Elaborates, checks and attaches verified fixes, as the pipeline does. */
export function checkWithFixes(text: string, input: CheckInput = {}): Checked {
  const files = { ...input.files, [MAIN_URI]: text };
  const reader = memoryReader(files);
  const circuit = elaborate(MAIN_URI, text, reader);
  const config = input.config === undefined ? undefined : readWorkspaceConfig('memory:/pnlint.json', input.config).config;
  const settings = { ...DEFAULT_SETTINGS, ...input.settings };
  const check = checkCircuit(circuit, settings, config);
  const attached = attachVerifiedFixes(check, circuit, reader, settings, config, input.fixes);
  return { circuit, check, findings: attached.findings, statistics: attached.statistics, settings, config, files };
}

/** The files after a fix's edits; throws if an edit does not apply. */
export function applyFix(checked: Checked, fix: Fix): Record<string, string> {
  const files = { ...checked.files };
  for (const uri of new Set(fix.edits.map((edit) => edit.uri))) {
    const edited = applyEdits(files[uri]!, fix.edits.filter((edit) => edit.uri === uri));
    if (edited === undefined) throw new Error(`the edits of "${fix.title}" do not apply to ${uri}`);
    files[uri] = edited;
  }
  return files;
}

/** The edited netlist checked again from scratch (no fixes), with its own settings and config. */
export function recheck(checked: Checked, files: Record<string, string>): { circuit: Circuit; check: CheckResult } {
  const circuit = elaborate(MAIN_URI, files[MAIN_URI]!, memoryReader(files));
  return { circuit, check: checkCircuit(circuit, checked.settings, checked.config) };
}

export function findingOf(checked: Checked, rule: string, element?: string): Finding {
  const finding = checked.findings.find((each) => each.rule === rule && (element === undefined || each.element === element));
  if (!finding) throw new Error(`no ${rule} finding${element ? ` for ${element}` : ''}: ${checked.findings.map((each) => `${each.rule} ${each.element ?? ''} ${each.message}`).join('\n')}`);
  return finding;
}

export function preferredFix(finding: Finding): Fix {
  const fix = finding.fixes.find((each) => each.preferred);
  if (!fix) throw new Error(`no preferred fix for ${finding.rule} ${finding.element ?? ''}: ${finding.message}\n${finding.fixes.map((each) => each.title).join('\n')}`);
  return fix;
}

// IEC 60063 tables, typed from the standard (mantissas ×10⁻¹ for E12/E24, ×10⁻² for E96),
// independently of server/src/preferred.ts.
export const E12_PUBLISHED = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82];
export const E24_PUBLISHED = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91];
export const E96_PUBLISHED = [
  100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158, 162, 165, 169, 174,
  178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309,
  316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549,
  562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976,
];

/** Every value of a published table from 1 Ω to 10 MΩ, ascending. */
export function tableValues(mantissas: readonly number[]): number[] {
  const scale = mantissas[0]!; // 10 or 100: the mantissa of 1.0
  const values: number[] = [];
  for (let power = 0; power <= 6; power++) for (const mantissa of mantissas) values.push(Number(((mantissa / scale) * 10 ** power).toPrecision(6)));
  return values;
}

/** The smallest table value at or above `value`. */
export function roundUpIn(mantissas: readonly number[], value: number): number {
  const found = tableValues(mantissas).find((candidate) => candidate >= value * (1 - 1e-12));
  if (found === undefined) throw new Error(`no table value above ${value}`);
  return found;
}

/** The table values inside [low, high]. */
export function tableValuesBetween(mantissas: readonly number[], low: number, high: number): number[] {
  return tableValues(mantissas).filter((value) => value >= low && value <= high);
}


/** Values from ngspice 39's operating point of `netlist`; throws when it did not solve. */
export function ngspiceValues(netlist: string, vectors: string[], includes?: Record<string, string>): Map<string, number> {
  const run = runNgspiceOperatingPoint(netlist, { vectors, ...(includes ? { includes } : {}) });
  if (!run.ok) throw new Error(`ngspice did not solve: ${run.failure ?? 'no value'}\n${run.deck}\n${run.stderr}`);
  return run.values;
}

export function ngspiceValue(netlist: string, vector: string, includes?: Record<string, string>): number {
  const value = ngspiceValues(netlist, [vector], includes).get(vector.toLowerCase());
  if (value === undefined) throw new Error(`ngspice printed no ${vector}`);
  return value;
}

/** The forward (or, for a negative current, reverse) voltage of a diode model driven alone by a current, from ngspice 39. */
export function ngspiceDiodeVoltage(model: string, current: number): number {
  const netlist = `diode alone\n${current >= 0 ? `I1 0 a ${current}` : `I1 a 0 ${-current}`}\nD1 a 0 ${model.split(/\s+/)[1]}\n${model}\n.end\n`;
  return ngspiceValue(netlist, 'v(a)');
}

/** Replaces a source's value on its own line (`V1 a b 5` → `V1 a b 5.25`), to ask ngspice for a corner. */
export function atSource(netlist: string, source: string, value: number): string {
  return netlist.replace(new RegExp(`^(${source} \\S+ \\S+) \\S+`, 'mi'), `$1 ${value}`);
}

/**
 * What every offered fix must do (issue 4): applied and checked again, its finding is gone,
 * no finding appears that was not there before (by rule, element and severity), the netlist
 * still parses with no new diagnostic, and ngspice 39 still solves it.
 */
export function expectFixHolds(checked: Checked, finding: Finding, fix: Fix, ngspice: boolean): { files: Record<string, string>; after: CheckResult; circuit: Circuit } {
  const files = applyFix(checked, fix);
  const { circuit, check: after } = recheck(checked, files);
  const same = (a: Finding, b: Finding) => a.rule === b.rule && a.element === b.element;
  expect(after.findings.filter((each) => same(each, finding)), `${fix.title}: the finding remains`).toEqual([]);
  const before = checked.check.findings.map((each) => `${each.rule}|${each.severity}|${each.element ?? each.message}`);
  const appeared = after.findings.filter((each) => !before.includes(`${each.rule}|${each.severity}|${each.element ?? each.message}`));
  expect(appeared.map((each) => `${each.rule} ${each.element ?? ''}: ${each.message}`), `${fix.title}: new findings`).toEqual([]);
  for (const [uri, text] of Object.entries(files)) {
    const syntax = parse(text, { isInclude: uri !== MAIN_URI }).diagnostics.filter((each) => each.severity === 'error');
    expect(syntax, `${uri} no longer parses`).toEqual([]);
  }
  expect(circuit.diagnostics.length, 'the edit brought a netlist diagnostic').toBeLessThanOrEqual(checked.circuit.diagnostics.length);
  if (ngspice) {
    const includes = Object.fromEntries(Object.entries(files).filter(([uri]) => uri !== MAIN_URI).map(([uri, text]) => [uri.replace(/^memory:\//, ''), text]));
    const run = runNgspiceOperatingPoint(files[MAIN_URI]!, { includes });
    expect(run.ok, `ngspice 39 does not solve the fixed netlist: ${run.failure}\n${run.deck}`).toBe(true);
  }
  return { files, after, circuit };
}

// Two indicator LEDs on a zener-regulated rail. Each LED's resistor fix alone leaves the other
// LED drawing most of the feed current; both together hand that current to the zener.
export const ZENER_PANEL = [
  'status panel: two indicator LEDs on a zener-regulated 5.1 V rail',
  'VIN in 0 DC 12',
  'RFEED in z 100',
  'DZ 0 z ZREF',
  '*pnlint: rating ZREF kind=zener vz=5.1 pd=200m',
  'R1 z a1 68',
  'D1 a1 0 DLED',
  'R2 z a2 68',
  'D2 a2 0 DLED',
  '*pnlint: rating DLED kind=led if=20m',
  '.model ZREF D(IS=1e-14 N=1 RS=2 BV=5.1 IBV=5m)',
  '.model DLED D(IS=1e-20 N=1.8 RS=2.5)',
  '.end',
  '',
].join('\n');
