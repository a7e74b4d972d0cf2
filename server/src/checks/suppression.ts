// Suppression (product.md): `*pnlint: ignore <rule>` for the next element line (or, inline,
// its own line), `*pnlint: ignore-file <rule>` for the whole file, and pnlint.json's ignores.
import type { Circuit } from '../netlist/circuit.js';
import type { Finding } from '../findings.js';
import type { WorkspaceConfig } from '../config.js';
import type { Directives } from './directives.js';

export function applySuppressions(findings: Finding[], circuit: Circuit, directives: Directives, config: WorkspaceConfig | undefined): Finding[] {
  const sameName = (a: string | undefined, b: string) => a !== undefined && a.toLowerCase() === b.toLowerCase();
  return findings.filter((finding) => {
    for (const suppression of directives.suppressions) {
      if (!suppression.rules.includes(finding.rule)) continue;
      if (suppression.file !== undefined) {
        // A top-level ignore-file covers the whole check; one in an included file covers findings placed there.
        if (suppression.file === circuit.uri || suppression.file === finding.location.uri) return false;
        continue;
      }
      if (suppression.element === undefined) continue;
      if (sameName(finding.element, suppression.element)) return false;
      const element = circuit.elements.find((each) => each.name === suppression.element);
      if (element && element.location.uri === finding.location.uri && element.location.range.start.line === finding.location.range.start.line) return false;
    }
    for (const suppression of config?.suppressions ?? []) {
      if (!suppression.rules.includes(finding.rule)) continue;
      if (!suppression.elements) return false;
      if (suppression.elements.some((name) => sameName(finding.element, name))) return false;
    }
    return true;
  });
}
