// What the solver returns. Analyses fill these; the checks read them.
import type { NetlistDiagnostic } from '../netlist/circuit.js';

/**
 * A corner: one set of conditions to solve the circuit at. Anything not named keeps
 * its netlist value.
 */
export interface Corner {
  name: string;
  /** Independent source name → DC value (V or A) to use instead of the netlist's. */
  sources?: Record<string, number>;
  /** Circuit temperature in °C. */
  temperature?: number;
  /** Element name → factor applied to its value (resistance, gain, …), e.g. 1.05 for +5 %. */
  scale?: Record<string, number>;
}

export type DiodeRegion = 'forward' | 'reverse' | 'breakdown' | 'off';

export interface DiodeOperatingPoint {
  /** Anode to cathode, across the whole device including RS (V). */
  voltage: number;
  /** Anode to cathode through the device (A). */
  current: number;
  /** voltage × current (W). */
  power: number;
  region: DiodeRegion;
}

export interface OperatingPoint {
  corner: string;
  /** Node name → voltage to ground (V). Internal nodes (e.g. a diode's RS node) are not listed. */
  nodes: Record<string, number>;
  /**
   * Element name → current (A) into its first node, through it, out of its second node.
   * For a voltage source that is SPICE's convention: negative when it delivers power.
   */
  branches: Record<string, number>;
  diodes: Record<string, DiodeOperatingPoint>;
  /**
   * Element name → current (A) into the element at each of its nodes, in the element's node
   * order (e.g. collector, base, emitter). They sum to zero per element; Kirchhoff's current
   * law says they sum to zero per node.
   */
  terminals?: Record<string, number[]>;
  /** How it was reached, for the log and the hover. */
  method: 'newton' | 'gmin-stepping' | 'source-stepping';
  iterations: number;
  milliseconds: number;
}

export type SolveResult =
  | { ok: true; point: OperatingPoint; diagnostics: NetlistDiagnostic[] }
  | { ok: false; corner: string; diagnostics: NetlistDiagnostic[] };

/** Lets a caller stop a solve that is no longer wanted (e.g. the text changed). */
export interface CancellationToken {
  readonly isCancellationRequested: boolean;
}

export interface SolveOptions {
  /** Wall-clock budget for one corner, ms. */
  budgetMilliseconds?: number;
  /** Newton iterations allowed per attempt. */
  iterationLimit?: number;
  cancellation?: CancellationToken;
  /** Node name → voltage to start Newton from (e.g. another corner's solution), instead of SPICE's cold start. */
  initialGuess?: Record<string, number>;
  /**
   * Wall-clock budget for all the corners of one `solveCorners` call, ms; each corner's own
   * budget is cut to what is left. Corners not reached in time come back unsolved, saying why.
   */
  totalBudgetMilliseconds?: number;
  /**
   * `solveCorners` starts the first corner from `initialGuess` when one is given, and every
   * later corner from the first corner's solution (a corner moves a supply by a few per cent:
   * Newton then needs fewer iterations); a corner whose warm start does not converge is solved
   * cold as well. Circuits with switches (S, W) are solved cold throughout.
   */
  startFromFirstCorner?: boolean;
}
