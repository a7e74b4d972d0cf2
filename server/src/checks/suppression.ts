// Suppression (product.md): `*pnlint: ignore <rule>` for the next element line (or, inline,
// its own line), `*pnlint: ignore-file <rule>` for the whole file, and pnlint.json's ignores.
// The suppressions are indexed by rule once, so that a board with thousands of findings and
// thousands of ignores is filtered in time linear in both.
import type { Circuit, Element } from '../netlist/circuit.js';
import type { Finding } from '../findings.js';
import type { WorkspaceConfig } from '../config.js';
import type { Directives } from './directives.js';

/** What silences one rule. */
interface RuleSuppressions {
  /** Files whose findings are silenced (`ignore-file`). */
  files: Set<string>;
  /** Lower-cased element names whose findings are silenced. */
  elements: Set<string>;
  /** `uri|line` of the ignored elements' lines: a finding placed on such a line is silenced too. */
  lines: Set<string>;
  /** pnlint.json ignores the rule everywhere. */
  everywhere: boolean;
}

const lineKey = (uri: string, line: number) => `${uri}|${line}`;

interface SuppressionIndex {
  circuit: Circuit;
  config: WorkspaceConfig | undefined;
  byRule: Map<string, RuleSuppressions>;
}

/** The last index built for each set of directives: callers that filter one finding at a time reuse it. */
const indexes = new WeakMap<Directives, SuppressionIndex>();

export function applySuppressions(findings: Finding[], circuit: Circuit, directives: Directives, config: WorkspaceConfig | undefined): Finding[] {
  let index = indexes.get(directives);
  if (!index || index.circuit !== circuit || index.config !== config) {
    index = { circuit, config, byRule: indexSuppressions(circuit, directives, config) };
    indexes.set(directives, index);
  }
  const byRule = index.byRule;
  if (byRule.size === 0) return findings.slice();
  return findings.filter((finding) => {
    const entry = byRule.get(finding.rule);
    if (!entry) return true;
    if (entry.everywhere || entry.files.has(finding.location.uri)) return false;
    if (finding.element !== undefined && entry.elements.has(finding.element.toLowerCase())) return false;
    return !entry.lines.has(lineKey(finding.location.uri, finding.location.range.start.line));
  });
}

function indexSuppressions(circuit: Circuit, directives: Directives, config: WorkspaceConfig | undefined): Map<string, RuleSuppressions> {
  const byRule = new Map<string, RuleSuppressions>();
  const forRule = (rule: string): RuleSuppressions => {
    let entry = byRule.get(rule);
    if (!entry) byRule.set(rule, (entry = { files: new Set(), elements: new Set(), lines: new Set(), everywhere: false }));
    return entry;
  };
  let elementsByName: Map<string, Element> | undefined;
  const elementNamed = (name: string): Element | undefined => {
    if (!elementsByName) {
      elementsByName = new Map();
      // The first element of a name, as a search from the top would find it.
      for (const element of circuit.elements) if (!elementsByName.has(element.name)) elementsByName.set(element.name, element);
    }
    return elementsByName.get(name);
  };

  for (const suppression of directives.suppressions) {
    const element = suppression.file === undefined && suppression.element !== undefined ? elementNamed(suppression.element) : undefined;
    for (const rule of suppression.rules) {
      const entry = forRule(rule);
      if (suppression.file !== undefined) {
        // A top-level ignore-file covers the whole check; one in an included file covers findings placed there.
        if (suppression.file === circuit.uri) entry.everywhere = true;
        else entry.files.add(suppression.file);
        continue;
      }
      if (suppression.element === undefined) continue;
      entry.elements.add(suppression.element.toLowerCase());
      if (element) entry.lines.add(lineKey(element.location.uri, element.location.range.start.line));
    }
  }
  for (const suppression of config?.suppressions ?? []) {
    for (const rule of suppression.rules) {
      const entry = forRule(rule);
      if (!suppression.elements) entry.everywhere = true;
      else for (const name of suppression.elements) entry.elements.add(name.toLowerCase());
    }
  }
  return byRule;
}
