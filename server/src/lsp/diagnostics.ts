// The one place where a Finding becomes an LSP Diagnostic: rule id as `code`, a link
// to the rule's page, related locations, and the user's severity overrides.
import { DiagnosticSeverity, type Diagnostic } from 'vscode-languageserver';
import type { Severity } from '@pnlint/grammar';
import type { Finding } from '../findings.js';
import type { Settings } from '../settings.js';
import { toLspRange } from './positions.js';
import type { RulePages } from './rule-pages.js';

export const SOURCE = 'pnlint';

/** What a diagnostic carries back to the server in a code-action request. */
export interface FindingReference {
  /** The document whose analysis produced the finding. */
  analyzed: string;
  /** Its version then; a code action for another version is not offered. */
  version: number;
  /** The finding's position in that analysis' findings. */
  index: number;
}

const LSP_SEVERITY: Record<Severity, DiagnosticSeverity> = {
  error: DiagnosticSeverity.Error,
  warning: DiagnosticSeverity.Warning,
  info: DiagnosticSeverity.Information,
};

/** The severity the user asked for, or 'off'. */
export function effectiveSeverity(finding: Finding, settings: Settings): Severity | 'off' {
  return settings.severities[finding.rule] ?? finding.severity;
}

/** undefined when the user turned the rule off. */
export function toDiagnostic(finding: Finding, settings: Settings, pages: RulePages, reference: FindingReference): Diagnostic | undefined {
  const severity = effectiveSeverity(finding, settings);
  if (severity === 'off') return undefined;
  const diagnostic: Diagnostic = {
    range: toLspRange(finding.location.range),
    severity: LSP_SEVERITY[severity],
    code: finding.rule,
    source: SOURCE,
    message: finding.message,
    data: reference,
  };
  const page = pages.uriOf(finding.rule);
  if (page) diagnostic.codeDescription = { href: page };
  if (finding.related.length > 0) {
    diagnostic.relatedInformation = finding.related.map((related) => ({
      location: { uri: related.location.uri, range: toLspRange(related.location.range) },
      message: related.message,
    }));
  }
  return diagnostic;
}

export function isFindingReference(value: unknown): value is FindingReference {
  if (!value || typeof value !== 'object') return false;
  const candidate = value as Record<string, unknown>;
  return typeof candidate['analyzed'] === 'string' && typeof candidate['version'] === 'number' && typeof candidate['index'] === 'number';
}
