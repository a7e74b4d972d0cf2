// reversed-diode, decided by a counterfactual solve (issue 4): an LED or series diode that
// never conducts, but would carry a plausible current turned around, is reversed. One
// that would short a supply turned around is an intentional clamp and is left alone. And
// a clamp or freewheel diode that a DC supply drives forward, shorting it, is reversed.
import type { Diode, Element } from '../../netlist/circuit.js';
import type { CornerPlan } from '../corners.js';
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext, type CheckedDiode } from '../context.js';
import { makeFinding } from '../finding.js';
import { bridgesInductor, currentNodes } from '../topology.js';
import {
  CONDUCTION_THRESHOLD,
  forwardCurrent,
  PLAUSIBLE_CURRENT,
  SUPPLY_SHORT_CURRENT,
  SUPPLY_SHORT_RESISTANCE,
  worstCorner,
} from '../thresholds.js';
import { kindNameOpening } from '../vocabulary.js';
import { cornerSources } from './related.js';
import type { Rule } from './rule.js';

const ID = 'reversed-diode';

export const reversedDiode: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    const partners = conductingPartners(context);
    const suspects: CheckedDiode[] = [];
    for (const diode of context.diodes) {
      if (diode.kind === 'zener' || diode.unchecked) continue; // a zener works reversed; zener-forward covers the other way
      const finding = drivenForwardIntoShort(context, diode);
      if (finding) findings.push(finding);
      else if (isSuspect(context, diode, partners)) suspects.push(diode);
    }
    const flippedCurrents = solveFlipped(context, suspects);
    for (const diode of suspects) {
      const finding = reversedVerdict(context, diode, flippedCurrents.get(diode));
      if (finding) findings.push(finding);
    }
    for (const finding of findings) finding.fixes = context.fixesFor({ kind: 'flip-diode', rule: ID, diode: finding.element! }, finding);
    return findings;
  },
};

/** A freewheel diode conducting at DC, or any diode carrying a supply-short current through next to no resistance. */
function drivenForwardIntoShort(context: CheckContext, diode: CheckedDiode): Finding | undefined {
  const worst = worstCorner(diode, forwardCurrent);
  if (!worst || worst.value < PLAUSIBLE_CURRENT) return undefined;
  const name = diode.element.name;
  const where = atCorner(worst.at.plan);
  const current = formatQuantity(worst.value, 'A');
  const related = cornerSources(context, worst.at.plan);
  if (diode.kind !== 'led' && bridgesInductor(context.topology, diode.element)) {
    const coil = inductorAcross(context, diode);
    if (coil) related.push({ location: coil.location, message: `${coil.name}, the coil it is across` });
    return makeFinding(
      ID,
      'error',
      `${name} sits across ${coil ? `the coil ${coil.name}` : 'a coil'} but a DC supply drives it forward: it carries ${current} ${where}, shorting the supply. ` +
        'A freewheel diode must be reverse-biased in normal operation (cathode towards the supply) and conduct only when the coil is switched off; turn it around.',
      diode.element.location,
      { element: name, related },
    );
  }
  if (diode.kind === 'led' || worst.value < SUPPLY_SHORT_CURRENT) return undefined; // an LED's overcurrent is led-current-unlimited's
  const thevenin = context.theveninView(diode, worst.at);
  if (!thevenin || thevenin.resistance >= SUPPLY_SHORT_RESISTANCE) return undefined;
  return makeFinding(
    ID,
    'error',
    `${kindNameOpening(diode.kind)} ${name} is driven forward with ${current} ${where} through next to nothing (${formatQuantity(thevenin.resistance, 'Ω')}): it shorts the supply. A clamp or protection diode across a supply must be reverse-biased; turn it around.`,
    diode.element.location,
    { element: name, related },
  );
}

/** An LED or series diode that conducts at no corner, and is not in a position where that is by design. */
function isSuspect(context: CheckContext, diode: CheckedDiode, partners: ConductingPartners): boolean {
  const worst = worstCorner(diode, forwardCurrent);
  if (!worst || worst.value >= CONDUCTION_THRESHOLD) return false;
  const element = diode.element;
  if (diode.kind !== 'led' && !isSeriesDiode(context, element)) return false;
  if (diode.kind !== 'led' && bridgesInductor(context.topology, element)) return false; // a freewheel diode is reverse-biased at DC by design
  return !hasConductingPartner(context, partners, diode); // diode-OR or reverse-protection partner
}

/**
 * Each suspect's largest current with it turned around, and the corner where it flows. Each
 * suspect is judged as if it alone were turned around. Suspects in regions that cannot see
 * each other (regions.ts) are turned around together, one from each region per solve, which
 * gives each the same answer as a solve of its own; a solve that fails for such a batch is
 * repeated for each suspect alone.
 */
function solveFlipped(context: CheckContext, suspects: readonly CheckedDiode[]): Map<CheckedDiode, { current: number; plan: CornerPlan }> {
  const currents = new Map<CheckedDiode, { current: number; plan: CornerPlan }>();
  const corners = context.plans.map((plan, index) => ({ plan: index, corner: plan.corner }));
  const flipTogether = (batch: readonly CheckedDiode[]): boolean => {
    const flips = new Map<Element, Diode>(batch.map((diode) => [diode.element, { ...diode.element, nodes: [diode.element.nodes[1]!, diode.element.nodes[0]!] }]));
    const results = context.solveWithReplacements(flips, corners);
    let complete = results.length === corners.length;
    context.plans.forEach((plan, index) => {
      const result = results[index];
      if (!result?.ok) {
        if (context.solves[index]?.ok) complete = false; // the flip, not the circuit, failed to solve here
        return;
      }
      for (const diode of batch) {
        const current = result.point.diodes[diode.element.name]?.current;
        const best = currents.get(diode);
        if (current !== undefined && (!best || current > best.current)) currents.set(diode, { current, plan });
      }
    });
    return complete;
  };
  for (const batch of batchesOfIndependentSuspects(context, suspects)) {
    if (flipTogether(batch) || batch.length === 1) continue;
    for (const diode of batch) {
      currents.delete(diode);
      flipTogether([diode]);
    }
  }
  return currents;
}

/** The suspects in batches with at most one per region; one batch per suspect when the circuit has no independent regions. */
function batchesOfIndependentSuspects(context: CheckContext, suspects: readonly CheckedDiode[]): CheckedDiode[][] {
  const regions = context.regions;
  if (!regions) return suspects.map((diode) => [diode]);
  const perRegion = new Map<number | CheckedDiode, CheckedDiode[]>();
  for (const diode of suspects) {
    // A diode with both ends on rails shares its region with nothing.
    const key = regions.regionOfElement(diode.element) ?? diode;
    const list = perRegion.get(key);
    if (list) list.push(diode);
    else perRegion.set(key, [diode]);
  }
  const batches: CheckedDiode[][] = [];
  for (const list of perRegion.values()) {
    list.forEach((diode, index) => {
      if (index === batches.length) batches.push([]);
      batches[index]!.push(diode);
    });
  }
  return batches;
}

function reversedVerdict(context: CheckContext, diode: CheckedDiode, best: { current: number; plan: CornerPlan } | undefined): Finding | undefined {
  const element = diode.element;
  const isLed = diode.kind === 'led';
  if (!best || best.current < PLAUSIBLE_CURRENT) return undefined; // dark either way: unpowered, or switched off
  if (!isLed && best.current >= SUPPLY_SHORT_CURRENT) return undefined; // turned around it would short a supply: an intentional clamp
  const nominal = diode.corners[0];
  const reverse = nominal && nominal.point.voltage < 0 ? ` (${formatQuantity(-nominal.point.voltage, 'V')} reverse ${atCorner(nominal.plan)})` : '';
  const what = `${kindNameOpening(diode.kind)} ${element.name}`;
  return makeFinding(
    ID,
    isLed ? 'error' : 'warning',
    `${what} looks reversed: it conducts at no corner${reverse}, but turned around it would carry ${formatQuantity(best.current, 'A')} ${atCorner(best.plan)}.`,
    element.location,
    { element: element.name, related: cornerSources(context, best.plan) },
  );
}

/** A diode that carries its branch's whole current: one of its nodes (not a rail) joins it to exactly one other element. */
function isSeriesDiode(context: CheckContext, element: CheckedDiode['element']): boolean {
  return element.nodes.some((node) => !context.topology.rails.has(node) && (context.topology.connections.get(node)?.length ?? 0) === 2);
}

/** The conducting diodes, indexed by their anode and cathode nodes. */
interface ConductingPartners {
  byAnode: Map<string, CheckedDiode[]>;
  byCathode: Map<string, CheckedDiode[]>;
}

function conductingPartners(context: CheckContext): ConductingPartners {
  const partners: ConductingPartners = { byAnode: new Map(), byCathode: new Map() };
  for (const diode of context.diodes) {
    if (!diode.corners.some((at) => at.point.current >= CONDUCTION_THRESHOLD)) continue;
    const [anode, cathode] = diode.element.nodes as [string, string];
    for (const [index, node] of [[partners.byAnode, anode], [partners.byCathode, cathode]] as const) {
      const list = index.get(node);
      if (list) list.push(diode);
      else index.set(node, [diode]);
    }
  }
  return partners;
}

/** Another diode that conducts and shares this one's cathode or anode (diode-OR), or sits anti-parallel to it (reverse protection). */
function hasConductingPartner(context: CheckContext, partners: ConductingPartners, diode: CheckedDiode): boolean {
  const [anode, cathode] = diode.element.nodes as [string, string];
  const { rails } = context.topology;
  const antiParallel = (partners.byAnode.get(cathode) ?? []).some((other) => other.element.nodes[1] === anode);
  // A diode-OR joins at its output, never at ground or a rail, which every branch shares.
  const sameCathode = !rails.has(cathode) && (partners.byCathode.get(cathode) ?? []).some((other) => other !== diode && other.element.nodes[0] !== anode);
  const sameAnode = !rails.has(anode) && (partners.byAnode.get(anode) ?? []).some((other) => other !== diode && other.element.nodes[1] !== cathode);
  return antiParallel || sameCathode || sameAnode;
}

function inductorAcross(context: CheckContext, diode: CheckedDiode) {
  const nodes = new Set(diode.element.nodes);
  return context.circuit.elements.find((element) => element.type === 'L' && currentNodes(element).some((node) => nodes.has(node)));
}
