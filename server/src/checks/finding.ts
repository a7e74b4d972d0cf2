// Building findings: one helper so every rule fills the same fields the same way.
import type { Severity } from '@pnlint/grammar';
import type { SourceLocation } from '../netlist/circuit.js';
import type { Finding } from '../findings.js';

export function makeFinding(
  rule: string,
  severity: Severity,
  message: string,
  location: SourceLocation,
  extra: { element?: string; related?: Finding['related'] } = {},
): Finding {
  const finding: Finding = { rule, severity, message, location, related: extra.related ?? [], fixes: [] };
  if (extra.element !== undefined) finding.element = extra.element;
  return finding;
}
