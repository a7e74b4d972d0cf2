// A finding is what the user sees: one problem, at one place, with its numbers
// and the fixes that were verified by re-simulation. The CLI, SARIF and the LSP
// all render this one shape.
import type { Range, Severity } from '@pnlint/grammar';
import type { SourceLocation } from './netlist/circuit.js';

export interface TextEdit {
  uri: string;
  range: Range;
  newText: string;
}

export interface Fix {
  /** Carries the numbers: "Insert 150 Ω series resistor (LED 13.8 mA, resistor 29 mW)". */
  title: string;
  preferred: boolean;
  edits: TextEdit[];
}

export interface Finding {
  rule: string;
  severity: Severity;
  message: string;
  location: SourceLocation;
  /** The element it is about (hierarchical name), when there is one. */
  element?: string;
  related: { location: SourceLocation; message: string }[];
  fixes: Fix[];
}
