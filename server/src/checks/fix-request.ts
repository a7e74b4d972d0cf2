// What a finding needs from a fix, described by the rule that raised it. The fixes
// module (server/src/fixes/) turns a request into text edits and re-simulates them; the
// rules never write edits themselves.
import type { Circuit } from '../netlist/circuit.js';
import type { Fix, Finding } from '../findings.js';
import type { Settings } from '../settings.js';
import type { CornerPlan } from './corners.js';

/** The rest of the circuit as the diode sees it at one corner, linearised there. */
export interface TheveninView {
  /** Open-circuit voltage across the diode's terminals, anode to cathode (V). */
  voltage: number;
  /** Resistance seen from the diode's terminals (Ω); 0 when an ideal source holds them. */
  resistance: number;
  /** The corner it was taken at. */
  corner: string;
}

export type FixRequest =
  /** Limit an LED's current: insert a series resistor, or change the one in series, so that every corner is inside the window. */
  | {
      kind: 'limit-current';
      rule: string;
      diode: string;
      /** Resistors already in series (the candidates to re-value); empty when a resistor must be inserted. */
      seriesResistors: string[];
      minimumCurrent?: number;
      maximumCurrent: number;
      governingCorner: string;
      thevenin?: TheveninView;
      /**
       * A current sink sets the current: its transistor and the emitter (source) resistor that
       * sets it, the current's response to that resistor (d ln I / d ln R) and the current at
       * the governing corner (A), and the corners at which the transistor is in its active
       * region. The fix re-values that resistor, and must leave the transistor active at those
       * corners; a resistor in series would only saturate it.
       */
      currentSetter?: { transistor: string; resistor: string; sensitivity: number; current: number; activeCorners: string[] };
    }
  /** Re-value a zener's series resistor inside its window from min supply/max load to max supply/min load. */
  | {
      kind: 'zener-window';
      rule: string;
      diode: string;
      seriesResistors: string[];
      minimumCurrent: number;
      maximumCurrent: number;
      zenerVoltage: number;
      governingCorner: string;
    }
  /** Swap a diode's two nodes. */
  | { kind: 'flip-diode'; rule: string; diode: string }
  /** Put a diode anti-parallel across an LED that sees reverse voltage. */
  | { kind: 'anti-parallel-diode'; rule: string; diode: string; reverseVoltage: number }
  /** Insert an `*pnlint: ignore` directive above the element. */
  | { kind: 'ignore'; rule: string; element: string };

export interface FixContext {
  circuit: Circuit;
  settings: Settings;
  plans: readonly CornerPlan[];
}

/** Turns a request into verified fixes (none when no fix passes re-simulation). */
export type FixProvider = (request: FixRequest, finding: Finding, context: FixContext) => Fix[];
