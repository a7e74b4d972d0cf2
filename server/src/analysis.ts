// The one pipeline that the CLI, the language server and the tests all run:
// text → syntax tree → elaborated circuit → operating points → findings → verified fixes.
// Pure: every file is reached through the injected FileReader.
import { parse, type ParseResult } from '@pnlint/grammar';
import type { Circuit, FileReader, NetlistDiagnostic } from './netlist/circuit.js';
import { elaborate, type ElaborateOptions } from './netlist/index.js';
import { checkCircuit, type CheckResult } from './checks/index.js';
import { effectiveSettings, readWorkspaceConfig, type WorkspaceConfig } from './config.js';
import { attachVerifiedFixes, FixSession } from './fixes/index.js';
import { combinePreferredFixes, type CombinedFixes } from './fixes/combined.js';
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
  /** Untrusted workspace: no file outside `workspaceRoot` is read. */
  restricted?: boolean;
  workspaceRoot?: string;
  /** Skip building and verifying fixes (they cost re-simulations). Default: build them. */
  withoutFixes?: boolean;
}

export interface Analysis {
  uri: string;
  /** The top-level file's syntax tree. */
  syntax: ParseResult;
  circuit: Circuit | undefined;
  /** The checks' full result: per-diode reports, corners and solves (undefined if elaboration failed outright). */
  check: CheckResult | undefined;
  config: WorkspaceConfig | undefined;
  /** Everything the user should see, for every file touched (each finding names its uri). */
  findings: Finding[];
  /** Every file the analysis read (for include-aware re-checking), the pnlint.json included. */
  filesRead: string[];
  /** False when cancelled before it finished; its findings are then incomplete. */
  complete: boolean;
  milliseconds: number;
  /** With verified fixes (withVerifiedFixes): the preferred fixes that pass a re-check applied together, for "fix all". */
  fixAll?: CombinedFixes;
}

/** Diagnostics the checks pass through themselves (they decide what each means for the diodes). */
const CODES_REPORTED_BY_CHECKS: ReadonlySet<string> = new Set(['unknown-model', 'unmodeled-element', 'floating-node', 'unsolved-circuit']);

export function analyze(input: AnalysisInput): Analysis {
  const started = performance.now();
  const settings = input.settings ?? DEFAULT_SETTINGS;
  const read = input.config ? readWorkspaceConfig(input.config.uri, input.config.text) : undefined;
  const config = read?.config;

  const circuit = elaborate(input.uri, input.text, input.files, elaborationOptions(input));
  const syntax = circuit.syntax?.get(input.uri) ?? parse(input.text);

  let check: CheckResult | undefined;
  let complete = true;
  let checked: Finding[] = [];
  if (input.cancellation?.isCancellationRequested) complete = false;
  else {
    check = checkCircuit(circuit, settings, config, input.cancellation ? { cancellation: input.cancellation } : {});
    // Fixes are built after the check, each verified by its own re-check (server/src/fixes).
    checked = input.withoutFixes ? check.findings : verifiedFixes(input, circuit, check, config);
    complete = !input.cancellation?.isCancellationRequested;
  }

  const filesRead = [...circuit.files.keys()];
  if (input.config) filesRead.push(input.config.uri);
  return {
    uri: input.uri,
    syntax,
    circuit,
    check,
    config,
    findings: visibleFindings(input, read?.findings ?? [], circuit, checked, config),
    filesRead,
    complete,
    milliseconds: performance.now() - started,
  };
}

/**
 * The second half of an analysis made `withoutFixes`: the same findings in the same order,
 * now with their verified fixes (and any note a fix search adds to a message), for callers
 * that show the findings first and the fixes when they are ready (the language server).
 * `input` is the one the analysis was made from; its cancellation stops the fixes too.
 */
export function withVerifiedFixes(analysis: Analysis, input: AnalysisInput): Analysis {
  if (!analysis.complete || !analysis.check || !analysis.circuit) return analysis;
  const started = performance.now();
  const checked = verifiedFixes(input, analysis.circuit, analysis.check, analysis.config);
  const configFindings = input.config ? readWorkspaceConfig(input.config.uri, input.config.text).findings : [];
  const findings = visibleFindings(input, configFindings, analysis.circuit, checked, analysis.config);
  // Verified together with a budget of its own: the fixes above spent theirs.
  const session = new FixSession(analysis.circuit, analysis.check.findings, input.files, input.settings ?? DEFAULT_SETTINGS, analysis.config, {
    ...(input.cancellation ? { cancellation: input.cancellation } : {}),
    elaborate: elaborationOptions(input),
  });
  const fixAll = combinePreferredFixes(findings, session);
  return {
    ...analysis,
    findings,
    fixAll,
    complete: !input.cancellation?.isCancellationRequested,
    milliseconds: analysis.milliseconds + performance.now() - started,
  };
}

function elaborationOptions(input: AnalysisInput): ElaborateOptions {
  const options: ElaborateOptions = {};
  if (input.restricted) options.restricted = true;
  if (input.workspaceRoot !== undefined) options.workspaceRoot = input.workspaceRoot;
  return options;
}

function verifiedFixes(input: AnalysisInput, circuit: Circuit, check: CheckResult, config: WorkspaceConfig | undefined): Finding[] {
  const options = input.cancellation ? { cancellation: input.cancellation } : {};
  return attachVerifiedFixes(check, circuit, input.files, input.settings ?? DEFAULT_SETTINGS, config, { ...options, elaborate: elaborationOptions(input) }).findings;
}

/** What the user sees, in this order: the pnlint.json's findings, the netlist's, the checks'; severities as set. */
function visibleFindings(input: AnalysisInput, configFindings: Finding[], circuit: Circuit, checked: Finding[], config: WorkspaceConfig | undefined): Finding[] {
  const netlistFindings = circuit.diagnostics.filter((d) => !CODES_REPORTED_BY_CHECKS.has(d.code)).map(fromNetlistDiagnostic);
  // The folder's pnlint.json may set severities too: the same merge the checks use.
  const merged = effectiveSettings(input.settings ?? DEFAULT_SETTINGS, config);
  return [...configFindings, ...netlistFindings, ...checked].map((finding) => withSeverityOverride(finding, merged)).filter((f): f is Finding => f !== undefined);
}

function fromNetlistDiagnostic(diagnostic: NetlistDiagnostic): Finding {
  return {
    rule: diagnostic.code,
    severity: diagnostic.severity,
    message: diagnostic.message,
    location: diagnostic.location,
    related: diagnostic.related ?? [],
    fixes: (diagnostic.suggestions ?? []).map((suggestion, index) => ({
      title: suggestion.title,
      preferred: index === 0,
      edits: suggestion.edits.map((edit) => ({ uri: edit.location.uri, range: edit.location.range, newText: edit.newText })),
    })),
  };
}

/** The user's severity setting for a rule ('off' hides it). */
function withSeverityOverride(finding: Finding, settings: Settings): Finding | undefined {
  const override = settings.severities[finding.rule];
  if (override === undefined) return finding;
  if (override === 'off') return undefined;
  return { ...finding, severity: override };
}
