// Runs the checks on netlist text held in memory, as the CLI and the server would.
import { elaborate } from '../../server/src/netlist/index.js';
import type { FileReader } from '../../server/src/netlist/circuit.js';
import { checkCircuit, type CheckOptions, type CheckResult } from '../../server/src/checks/index.js';
import { readWorkspaceConfig } from '../../server/src/config.js';
import { DEFAULT_SETTINGS, type Settings } from '../../server/src/settings.js';

export const MAIN_URI = 'memory:/main.cir';

export function memoryReader(files: Record<string, string> = {}): FileReader {
  return {
    read: (uri) => files[uri],
    resolve: (from, path) => new URL(path, from).href,
  };
}

export function check(
  text: string,
  options: { settings?: Partial<Settings>; config?: string; files?: Record<string, string>; check?: CheckOptions } = {},
): CheckResult {
  const circuit = elaborate(MAIN_URI, text, memoryReader(options.files));
  const config = options.config === undefined ? undefined : readWorkspaceConfig('memory:/pnlint.json', options.config).config;
  return checkCircuit(circuit, { ...DEFAULT_SETTINGS, ...options.settings }, config, options.check);
}

/** The findings of one rule. */
export function findingsOf(result: CheckResult, rule: string) {
  return result.findings.filter((finding) => finding.rule === rule);
}

/** Every finding at warning or error. */
export function problems(result: CheckResult) {
  return result.findings.filter((finding) => finding.severity !== 'info');
}

import { runNgspiceOperatingPoint } from '../support/ngspice.js';

/** One value from ngspice 39's operating point of `netlist` (`i(vam)`, `v(out)`); throws when it did not solve. */
export function ngspiceValue(netlist: string, vector: string): number {
  const run = runNgspiceOperatingPoint(netlist, { vectors: [vector] });
  const value = run.values.get(vector.toLowerCase());
  if (!run.ok || value === undefined) throw new Error(`ngspice did not solve: ${run.failure ?? 'no value'}\n${run.deck}`);
  return value;
}

/** The solved operating point of one diode at one corner, from the check's report. */
export function diodeAt(result: CheckResult, diode: string, corner: string) {
  const report = result.diodes.find((each) => each.element === diode);
  const point = report?.corners.find((each) => each.corner === corner)?.point;
  if (!point) throw new Error(`no operating point for ${diode} at ${corner}`);
  return point;
}
