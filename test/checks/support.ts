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
