// Verifying many fixes in one re-check. On a board with a thousand reversed LEDs, one full
// re-check per flip costs a thousand checks of the whole board. But an ideal voltage source
// to ground holds its node whatever hangs on it, so the circuit falls apart at its rails into
// regions that do not see each other (server/src/checks/regions.ts): a fix confined to one
// region leaves every other region's operating points, and so its findings, as they were.
// Fixes in separate regions are therefore applied together to one copy and re-checked once,
// in full: each is kept if its own finding is gone and its region shows nothing new. A new
// finding about an element marks its region's fix, which is then re-checked alone; anything
// new that no region explains (a finding with no element, a netlist diagnostic, a copy that
// does not elaborate) splits the group in halves, down to one fix at a time: the ordinary
// re-check.
import type { Element } from '../netlist/circuit.js';
import { buildRegions, type Regions } from '../checks/regions.js';
import { buildTopology } from '../checks/topology.js';
import type { Finding, Fix, TextEdit } from '../findings.js';
import { elementNamed } from './readings.js';
import type { FixSession, Verdict, Verified } from './verify.js';

/**
 * A fix whose edits are built and whose title waits for its re-check. Its edits stay within
 * the region of `element`: they change that element's own line (every element elaborated
 * from it, in every instance of a subcircuit) or add lines beside it across its own nodes.
 */
export interface FixCandidate {
  element: Element;
  target: Finding;
  edits: TextEdit[];
  /** The fix, its title carrying the numbers of the re-check that passed it. */
  titled(verified: Verified): Fix;
}

/** What each session's circuit falls apart into, worked out once. */
interface Independence {
  regions: Regions | undefined;
  /** Elements by the statement they were elaborated from (`uri|offset`): the instances of one line. */
  elementsByStatement: Map<string, Element[]>;
}

const independenceOf = new WeakMap<FixSession, Independence>();

const statementKey = (element: Element) => `${element.location.uri}|${element.location.range.start.offset}`;

function independence(session: FixSession): Independence {
  let known = independenceOf.get(session);
  if (!known) {
    const circuit = session.circuit;
    const elementsByStatement = new Map<string, Element[]>();
    for (const element of circuit.elements) {
      const key = statementKey(element);
      const list = elementsByStatement.get(key);
      if (list) list.push(element);
      else elementsByStatement.set(key, [element]);
    }
    known = { regions: buildRegions(circuit, buildTopology(circuit)), elementsByStatement };
    independenceOf.set(session, known);
  }
  return known;
}

/** The regions a candidate's edits reach; undefined when it cannot be told apart from the rest (no regions, or an element on rails alone). */
function footprint(session: FixSession, candidate: FixCandidate): Set<number> | undefined {
  const { regions, elementsByStatement } = independence(session);
  if (!regions) return undefined;
  const touched = new Set<number>();
  for (const element of elementsByStatement.get(statementKey(candidate.element)) ?? [candidate.element]) {
    const region = regions.regionOfElement(element);
    if (region === undefined) return undefined;
    touched.add(region);
  }
  return touched;
}

/** A candidate with the regions its edits reach. */
interface Placed {
  candidate: FixCandidate;
  regions: Set<number>;
}

/**
 * The verdict on each candidate, in order, as if each had been re-checked alone; candidates
 * in separate regions share re-checks. Each re-check counts against the session's budget.
 */
export function verifyIndependent(session: FixSession, candidates: readonly FixCandidate[]): Verdict[] {
  const verdicts: Verdict[] = new Array(candidates.length);
  // First fit: each candidate joins the first group that touches none of its regions.
  const groups: { regions: Set<number>; members: number[] }[] = [];
  const placed: (Placed | undefined)[] = candidates.map((candidate) => {
    const regions = footprint(session, candidate);
    return regions && { candidate, regions };
  });
  placed.forEach((each, index) => {
    if (!each) {
      verdicts[index] = session.verify(candidates[index]!.edits, candidates[index]!.target);
      return;
    }
    let group = groups.find((other) => ![...each.regions].some((region) => other.regions.has(region)));
    if (!group) groups.push((group = { regions: new Set(), members: [] }));
    for (const region of each.regions) group.regions.add(region);
    group.members.push(index);
  });
  for (const group of groups) {
    const results = verifyGroup(
      session,
      group.members.map((index) => placed[index]!),
    );
    group.members.forEach((index, position) => (verdicts[index] = results[position]!));
  }
  return verdicts;
}

/**
 * One re-check for the whole group. When the shared copy brings new findings, those about
 * elements tell their regions: the candidates there are re-checked alone, the others judged
 * on the shared copy. Anything new that names no region splits the group in halves.
 */
function verifyGroup(session: FixSession, group: readonly Placed[]): Verdict[] {
  if (group.length === 1) return [session.verify(group[0]!.candidate.edits, group[0]!.candidate.target)];
  const rechecked = session.recheck(group.flatMap((each) => each.candidate.edits));
  if (!rechecked.ok && rechecked.reason === 'budget') {
    session.statistics.skipped += group.length;
    return group.map(() => ({ ok: false, reason: 'budget' }));
  }
  const suspects = rechecked.ok ? suspectsOf(session, rechecked.verified, group) : undefined;
  if (!rechecked.ok || !suspects) {
    const middle = group.length >> 1;
    return [...verifyGroup(session, group.slice(0, middle)), ...verifyGroup(session, group.slice(middle))];
  }
  const verified = rechecked.verified;
  const remains = session.remainsAmong(verified);
  return group.map((each) => {
    if (suspects.has(each)) return session.verify(each.candidate.edits, each.candidate.target);
    // Its region alone decides its finding: still there together means still there alone.
    return remains(each.candidate.target) ? session.reject('target-remains', verified) : { ok: true, verified };
  });
}

/**
 * The candidates whose regions hold the shared copy's new findings (none when nothing is new);
 * undefined when something new cannot be placed in the region of a candidate.
 */
function suspectsOf(session: FixSession, verified: Verified, group: readonly Placed[]): Set<Placed> | undefined {
  const found = session.newFindings(verified);
  if (found.otherwise) return undefined;
  const suspects = new Set<Placed>();
  if (found.aboutElements.length === 0) return suspects;
  const { regions } = independence(session);
  const byRegion = new Map<number, Placed>();
  for (const each of group) for (const region of each.regions) byRegion.set(region, each);
  for (const finding of found.aboutElements) {
    const element = elementNamed(verified.circuit, finding.element!);
    // Placed by the nodes it shares with the original circuit (a new element sits on its fix's nodes).
    const region = element?.nodes.map((node) => regions?.regionOf(node)).find((each) => each !== undefined);
    const suspect = region === undefined ? undefined : byRegion.get(region);
    if (!suspect) return undefined;
    suspects.add(suspect);
  }
  return suspects;
}
