// Each fault told once, with the fix that cures it. Two passes over the rules' findings:
// - A diode reported reversed is the cause of what else goes wrong with it as drawn (a
//   reversed LED in reverse breakdown): those findings say so, and offer no fix of their own
//   (a guard diode across a reversed LED would leave it dark for good), since turning the
//   diode around cures them too.
// - A line inside a subcircuit is one line however many instances place it: the findings of
//   its instances that fare alike (one rule, the same message but for the instance's name)
//   become one finding, about the first, naming the others. Its fix edits that one line,
//   which every instance reads.
import type { Element, SourceLocation } from '../netlist/circuit.js';
import type { Finding } from '../findings.js';
import type { FixRequest } from './fix-request.js';

const REVERSED_RULE = 'reversed-diode';
/** Instances named in a merged finding's message; the rest are counted. */
const INSTANCES_NAMED = 3;

export interface ToldOnce {
  findings: Finding[];
  fixRequests: { finding: Finding; request: FixRequest }[];
}

export function tellOnce(
  findings: readonly Finding[],
  fixRequests: readonly { finding: Finding; request: FixRequest }[],
  elementNamed: (name: string) => Element | undefined,
  isLed: (name: string) => boolean,
): ToldOnce {
  const causes = blameReversal(findings, fixRequests, isLed);
  return mergeInstances(causes.findings, causes.fixRequests, elementNamed);
}

function blameReversal(findings: readonly Finding[], fixRequests: readonly { finding: Finding; request: FixRequest }[], isLed: (name: string) => boolean): ToldOnce {
  const reversed = new Set(findings.filter((finding) => finding.rule === REVERSED_RULE && finding.element !== undefined).map((finding) => finding.element!));
  if (reversed.size === 0) return { findings: [...findings], fixRequests: [...fixRequests] };
  const explained = new Set<Finding>();
  const told = findings.map((finding) => {
    if (finding.rule === REVERSED_RULE || finding.element === undefined || !reversed.has(finding.element)) return finding;
    // Fixes already attached (a fix provider's): only the ignore fix stays, which is never the preferred one.
    const fixes = finding.fixes.filter((fix) => !fix.preferred);
    const dark = isLed(finding.element) ? ', and a guard diode across it would leave it dark' : '';
    const copy: Finding = { ...finding, message: `${finding.message} ${finding.element} is reversed (reversed-diode): turned around it would not see this${dark}.`, fixes };
    explained.add(finding);
    return copy;
  });
  const byOriginal = new Map(findings.map((finding, index) => [finding, told[index]!]));
  return {
    findings: told,
    // An explained finding keeps only its ignore fix.
    fixRequests: fixRequests
      .filter(({ finding, request }) => !explained.has(finding) || request.kind === 'ignore')
      .map(({ finding, request }) => ({ finding: byOriginal.get(finding) ?? finding, request })),
  };
}

function mergeInstances(findings: readonly Finding[], fixRequests: readonly { finding: Finding; request: FixRequest }[], elementNamed: (name: string) => Element | undefined): ToldOnce {
  const groups = new Map<string, Finding[]>();
  const keyOf = (finding: Finding): string | undefined => {
    const element = finding.element === undefined ? undefined : elementNamed(finding.element);
    if (!element || element.instances.length === 0) return undefined;
    const { uri, range } = finding.location;
    // Only instances that fare alike: the same message once the instance's own name is taken out.
    // Instances whose parameters make them differ keep a finding each.
    const message = finding.message.split(finding.element!).join('\u0000');
    return `${finding.rule}|${uri}|${range.start.offset}|${range.end.offset}|${finding.severity}|${message}`;
  };
  for (const finding of findings) {
    const key = keyOf(finding);
    if (key === undefined) continue;
    const group = groups.get(key);
    if (group) group.push(finding);
    else groups.set(key, [finding]);
  }
  const replaced = new Map<Finding, Finding | undefined>();
  for (const group of groups.values()) {
    if (group.length < 2) continue;
    const first = group[0]!;
    const others = group.filter((each) => each !== first);
    const named = others.slice(0, INSTANCES_NAMED).map((each) => each.element!);
    const more = others.length - named.length;
    const list = more > 0 ? `${named.join(', ')} and ${more} more` : named.join(' and ');
    const related: { location: SourceLocation; message: string }[] = [...first.related];
    for (const other of others) {
      const placed = elementNamed(other.element!)?.instances.at(-1);
      if (placed) related.push({ location: placed, message: `${other.element}: the same line in another instance` });
    }
    replaced.set(first, { ...first, message: `${first.message} The same holds for ${list}: ${others.length === 1 ? 'another instance' : 'other instances'} of this subcircuit line.`, related });
    for (const other of others) replaced.set(other, undefined);
  }
  if (replaced.size === 0) return { findings: [...findings], fixRequests: [...fixRequests] };
  return {
    findings: findings.flatMap((finding) => {
      if (!replaced.has(finding)) return [finding];
      const merged = replaced.get(finding);
      return merged ? [merged] : [];
    }),
    fixRequests: fixRequests.flatMap(({ finding, request }) => {
      if (!replaced.has(finding)) return [{ finding, request }];
      const merged = replaced.get(finding);
      return merged ? [{ finding: merged, request }] : [];
    }),
  };
}
