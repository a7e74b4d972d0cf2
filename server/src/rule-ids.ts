// Every rule id a finding can carry, with its one-line summary and default severity.
// Ids and meanings are product.md's; directives, SARIF, completion and the docs read this list.
import type { Severity } from '@pnlint/grammar';

export interface RuleDescription {
  id: string;
  summary: string;
  defaultSeverity: Severity;
}

export const RULES: readonly RuleDescription[] = [
  { id: 'reversed-diode', summary: 'A diode is wired against its source: it never conducts although flipped it would, or a clamp is driven forward by a supply.', defaultSeverity: 'error' },
  { id: 'led-current-unlimited', summary: "An LED's current is not limited, or exceeds its forward-current rating at the worst corner.", defaultSeverity: 'error' },
  { id: 'reverse-overvoltage', summary: "The peak reverse voltage across a diode exceeds its (derated) reverse rating.", defaultSeverity: 'error' },
  { id: 'zener-underbiased', summary: "A zener's current at the worst corner is below its minimum regulating current.", defaultSeverity: 'warning' },
  { id: 'zener-forward', summary: 'A zener is placed forward: it clamps at about 0.7 V, not at its zener voltage.', defaultSeverity: 'warning' },
  { id: 'forward-overcurrent', summary: "A diode's forward current exceeds its rating.", defaultSeverity: 'error' },
  { id: 'overdissipation', summary: "A diode's, zener's or series resistor's power exceeds its rating.", defaultSeverity: 'error' },
  { id: 'shared-led-resistor', summary: 'LEDs in parallel share one resistor: the one with the lowest forward voltage takes most of the current.', defaultSeverity: 'warning' },
  { id: 'unknown-model', summary: 'A model or subcircuit the element needs is not defined, so it could not be checked.', defaultSeverity: 'warning' },
  { id: 'unmodeled-element', summary: 'An element pnlint does not simulate; checks that depend on its part of the circuit are skipped.', defaultSeverity: 'warning' },
  { id: 'floating-node', summary: 'A node has no DC path to ground, so the circuit has no unique operating point.', defaultSeverity: 'warning' },
  { id: 'unsolved-circuit', summary: 'The operating point could not be solved; diode checks that need it were not made.', defaultSeverity: 'warning' },
  { id: 'syntax', summary: 'The netlist does not parse.', defaultSeverity: 'error' },
  { id: 'unknown-command', summary: 'A dot command pnlint does not know; the line is ignored.', defaultSeverity: 'warning' },
  { id: 'netlist', summary: 'The netlist is structurally wrong: node counts, missing definitions, duplicates, include and parameter problems.', defaultSeverity: 'error' },
  { id: 'ambiguous-value', summary: 'A value SPICE engines read differently from how it looks, such as 4k7 read as 4 k.', defaultSeverity: 'warning' },
  { id: 'directive', summary: 'A *pnlint: directive or pnlint.json entry that cannot be understood.', defaultSeverity: 'error' },
  { id: 'hazardous-voltage', summary: 'The circuit has a source above the extra-low-voltage limits: the check is a design aid, not a safety approval.', defaultSeverity: 'info' },
];

export const RULE_IDS: ReadonlySet<string> = new Set(RULES.map((rule) => rule.id));

export function describeRule(id: string): RuleDescription | undefined {
  return RULES.find((rule) => rule.id === id);
}
