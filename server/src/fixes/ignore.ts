// The ignore fix: a `*pnlint: ignore <rule> -- ` comment line above the element's line, with
// the same indentation, for the user to finish with a reason. It is never the preferred fix
// (fixing everything must not silence everything), and it needs no re-simulation: the copy
// is only elaborated, to see that the directive does suppress the finding.
import type { Finding, Fix } from '../findings.js';
import { leafName } from './names.js';
import { elementNamed } from './readings.js';
import { linesBefore } from './source-text.js';
import type { FixSession } from './verify.js';

/** Findings a directive cannot silence: a line that does not parse is not checked at all. */
export const UNIGNORABLE_RULES: ReadonlySet<string> = new Set(['syntax']);

/** The ignore fix for a finding about an element, not yet checked (see `verifiedIgnoreFixes`). */
export function ignoreFix(session: FixSession, finding: Finding, rule: string = finding.rule, elementName: string | undefined = finding.element): Fix | undefined {
  if (elementName === undefined || UNIGNORABLE_RULES.has(rule)) return undefined;
  const element = elementNamed(session.circuit, elementName);
  const located = element && session.files.statementOf(element);
  if (!located) return undefined;
  // A line inside a subcircuit is every instance's line: the directive silences them all.
  const what = element.instances.length > 0 ? `${leafName(element.name)} in every instance of its subcircuit` : element.name;
  return {
    title: `Ignore ${rule} for ${what} (add a pnlint directive above its line)`,
    preferred: false,
    edits: [linesBefore(located, [`*pnlint: ignore ${rule} -- `])],
  };
}

/**
 * The ignore fixes of many findings, checked together in one elaboration: each is kept if,
 * with every directive in place, its finding is suppressed and no directive is reported.
 * Should the directives together bring a diagnostic, each is checked alone instead.
 */
export function verifiedIgnoreFixes(session: FixSession, findings: readonly Finding[]): (Fix | undefined)[] {
  const fixes = findings.map((finding) => ignoreFix(session, finding));
  const offered = fixes.flatMap((fix, index) => (fix ? [{ fix, finding: findings[index]! }] : []));
  if (offered.length === 0) return fixes;
  const together = session.suppresses(
    offered.flatMap((each) => each.fix.edits),
    offered.map((each) => each.finding),
  );
  const kept = new Set<Fix>();
  offered.forEach((each, index) => {
    const works = together.directiveProblems ? verifiedIgnore(session, each.fix, each.finding) : together.suppressed[index];
    if (works) kept.add(each.fix);
  });
  return fixes.map((fix) => (fix && kept.has(fix) ? fix : undefined));
}

/** One ignore fix checked alone. */
export function verifiedIgnore(session: FixSession, fix: Fix, finding: Finding): boolean {
  const alone = session.suppresses(fix.edits, [finding]);
  return !alone.directiveProblems && alone.suppressed[0] === true;
}
