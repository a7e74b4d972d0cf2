// The reference engine for the tests: ngspice 39 from Debian's packages, run in
// batch mode on a netlist (see shared/design/verification.md). The process
// handling and the reading of its output live in ngspice-run.mjs, shared with
// the benchmarks; this module gives them types and adds what the tests need:
// the CI gate and the mapping between pnlint's names and ngspice's.
import { test } from 'vitest';
import {
  buildOperatingPointDeck as buildDeck,
  hasNgspice as probeNgspice,
  readPrintedValues as readValues,
  runNgspiceOperatingPoint as runOperatingPoint,
  TIGHT_OPTIONS,
  TIGHT_TOLERANCES,
} from './ngspice-run.mjs';

export { TIGHT_OPTIONS, TIGHT_TOLERANCES };

/** ngspice's convergence tolerances (`.options`). */
export interface NgspiceTolerances {
  reltol?: number;
  /** Absolute current tolerance, A. */
  abstol?: number;
  /** Absolute voltage tolerance, V. */
  vntol?: number;
}

export interface NgspiceRun {
  /** True when ngspice solved and printed every value asked for. */
  ok: boolean;
  /** Vector name (lower case) → value: node voltages by node name, source and inductor currents as `name#branch`. */
  values: Map<string, number>;
  /** Why the run counts as failed (undefined when ok). */
  failure: string | undefined;
  stdout: string;
  stderr: string;
  /** The deck that was run: the netlist plus the tight options and the control block. */
  deck: string;
  milliseconds: number;
}

export interface NgspiceOptions {
  /** Files written beside the netlist (relative path → text), for its `.include` lines. */
  includes?: Record<string, string>;
  /** Vectors to print (`v(a)`, `i(vam)`); everything (`print all`) when omitted. */
  vectors?: string[];
  /** False: solve and quit without printing (for timing). */
  print?: boolean;
  timeoutMilliseconds?: number;
  /** Overrides some of TIGHT_TOLERANCES. */
  tolerances?: NgspiceTolerances;
}

/** Solves the DC operating point of `netlist` with ngspice; never throws for a failed solve. */
export function runNgspiceOperatingPoint(netlist: string, options: NgspiceOptions = {}): NgspiceRun {
  return runOperatingPoint(netlist, options) as NgspiceRun;
}

export function buildOperatingPointDeck(
  netlist: string,
  options: { vectors?: string[]; print?: boolean; tolerances?: NgspiceTolerances } = {},
): string {
  return buildDeck(netlist, options);
}

export function readPrintedValues(stdout: string): Map<string, number> | undefined {
  return readValues(stdout);
}

/** True when `ngspice` can be started on this machine. */
export function hasNgspice(): boolean {
  return probeNgspice();
}

/**
 * Whether the ngspice comparisons run here. Under CI (`process.env.CI` set) a
 * missing ngspice is a failure of the run (`.ci/run` installs it); elsewhere
 * the comparisons are skipped with this message.
 */
export function ngspiceGate(): { run: true } | { run: false; mustFail: boolean; message: string } {
  if (hasNgspice()) return { run: true };
  const underCi = Boolean(process.env.CI);
  return {
    run: false,
    mustFail: underCi,
    message: underCi
      ? 'ngspice is not on PATH, and under CI the reference comparisons must run (apt-get install -y ngspice)'
      : 'ngspice is not on PATH: the reference-engine comparisons are skipped (apt-get install -y ngspice to run them)',
  };
}

/**
 * Declares, in the calling test file, what happens when ngspice is missing: a
 * failing test under CI, a skipped test with the reason elsewhere. Returns true
 * when the comparisons can run.
 */
export function declareNgspiceGate(): boolean {
  const gate = ngspiceGate();
  if (gate.run) return true;
  if (gate.mustFail) {
    test('ngspice is installed', () => {
      throw new Error(gate.message);
    });
  } else {
    test.skip(gate.message, () => {});
  }
  return false;
}

/**
 * The name ngspice gives a node: lower case, hierarchical with dots as pnlint's
 * (`X1.a` → `x1.a`).
 */
export function ngspiceNodeName(node: string): string {
  return node.toLowerCase();
}

/**
 * The vector holding the current of a voltage source, inductor or other branch
 * element. ngspice renames an element inside a subcircuit to
 * `<letter>.<instance path>.<name>`: pnlint's `X1.VAM` is ngspice's `v.x1.vam`
 * (seen with ngspice 39).
 */
export function ngspiceBranchName(element: string): string {
  const parts = element.toLowerCase().split('.');
  const local = parts[parts.length - 1];
  if (parts.length === 1) return `${local}#branch`;
  return `${local[0]}.${parts.join('.')}#branch`;
}
