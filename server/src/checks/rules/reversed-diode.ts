// reversed-diode, decided by a counterfactual solve (issue 4): an LED or series diode that
// never conducts, but would carry a plausible current turned around, is reversed. One
// that would short a supply turned around is an intentional clamp and is left alone. And
// a clamp or freewheel diode that a DC supply drives forward, shorting it, is reversed; so
// is a pin clamp whose anode is on the rail (it holds the pin near the rail against its
// driver), and a freewheel diode whose anode is on the coil's supply side even while the
// coil is switched off (it shorts the supply once the switch closes).
import { GROUND, type Diode, type Element, type Resistor, type VoltageSource } from '../../netlist/circuit.js';
import type { CornerPlan } from '../corners.js';
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, type CheckContext, type CheckedDiode } from '../context.js';
import { makeFinding } from '../finding.js';
import { unusedName } from '../regions.js';
import { bridgesInductor, inductorBridging, joinedAt, resistivePathEnd } from '../topology.js';
import {
  CONDUCTION_THRESHOLD,
  forwardCurrent,
  PLAUSIBLE_CURRENT,
  SUPPLY_SHORT_CURRENT,
  SUPPLY_SHORT_RESISTANCE,
  worstCorner,
} from '../thresholds.js';
import { kindNameOpening } from '../vocabulary.js';
import { cornerSources, nodesAt } from './related.js';
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
      const finding = drivenForwardIntoShort(context, diode) ?? clampFittedBackwards(context, diode) ?? idleFreewheelFittedBackwards(context, diode);
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

/**
 * An upper clamp fitted backwards: its anode on a supply rail, its cathode on a node that
 * another source drives through a resistor. It conducts at DC and holds that node near the
 * rail whatever the driver says; turned around, as a clamp belongs, it would idle at every
 * corner. (The mirror case, a lower clamp with its anode on the node and its cathode on
 * ground, is left alone: at DC it is the same circuit as a diode-logic input that its driver
 * pulls low.)
 */
function clampFittedBackwards(context: CheckContext, diode: CheckedDiode): Finding | undefined {
  if (diode.kind === 'led') return undefined;
  const element = diode.element;
  const [anode, cathode] = element.nodes as [string, string];
  const { rails, connections } = context.topology;
  if (anode === GROUND || !rails.has(anode) || rails.has(cathode) || bridgesInductor(context.topology, element)) return undefined;
  const worst = worstCorner(diode, forwardCurrent);
  if (!worst || worst.value < PLAUSIBLE_CURRENT) return undefined;
  const nodes = nodesAt(context, worst.at);
  const railVoltage = nodes[anode];
  const pinVoltage = nodes[cathode];
  if (railVoltage === undefined || pinVoltage === undefined || !(railVoltage > 0)) return undefined;
  // An OR output: another diode feeds the same node from somewhere other than ground.
  const joined = joinedAt(context.topology, cathode, element);
  const orPartner = joined.some(({ element: other, node }) => other.type === 'D' && other.nodes[1] === node && other.nodes[0] !== GROUND);
  if (orPartner) return undefined;
  const driver = drivingSource(context, cathode, joined, anode, nodes, railVoltage);
  if (!driver) return undefined;
  // The counterfactual: turned around, it idles at every corner that solves.
  const flipped: Diode = { ...element, nodes: [cathode, anode] };
  const results = context.solveWithReplacements(new Map([[element, flipped]]), context.plans.map((plan, index) => ({ plan: index, corner: plan.corner })));
  const flippedCurrents = results.flatMap((result) => (result?.ok ? [result.point.diodes[element.name]?.current ?? 0] : []));
  if (flippedCurrents.length === 0 || flippedCurrents.some((current) => current >= CONDUCTION_THRESHOLD)) return undefined;
  const name = element.name;
  const through = driver.resistors.map((resistor) => resistor.name).join(' and ');
  const pin = driver.node; // the pin itself, where the driver's resistor meets it (the cathode, or across a probe from it)
  return makeFinding(
    ID,
    'warning',
    `${kindNameOpening(diode.kind)} ${name} looks like a clamp fitted backwards: its anode is on the supply rail ${anode} (${formatQuantity(railVoltage, 'V')}) and it carries ` +
      `${formatQuantity(worst.value, 'A')} into ${pin} ${atCorner(worst.at.plan)}, holding ${pin} at ${formatQuantity(pinVoltage, 'V')} although ${driver.source.name} drives it to ` +
      `${formatQuantity(driver.voltage, 'V')} through ${through}. Turned around (cathode to ${anode}) it would idle, and clamp only above the rail.`,
    element.location,
    {
      element: name,
      related: [
        ...cornerSources(context, worst.at.plan),
        { location: driver.source.location, message: `${driver.source.name}, which drives ${pin}` },
        ...driver.resistors.map((resistor) => ({ location: resistor.location, message: `${resistor.name} (${formatQuantity(resistor.resistance, 'Ω')}) from the driver` })),
      ],
    },
  );
}

/**
 * An independent source, other than ground and the diode's own rail, that drives `node`
 * through resistors from a level inside the rails (what a clamp guards), taking the diode's
 * current at this operating point. `joined`: the elements at `node` (joinedAt).
 */
function drivingSource(
  context: CheckContext,
  node: string,
  joined: readonly { element: Element; node: string }[],
  diodeRail: string,
  nodes: Readonly<Record<string, number>>,
  railVoltage: number,
): { source: VoltageSource; voltage: number; resistors: Resistor[]; node: string } | undefined {
  const { rails, connections } = context.topology;
  for (const { element: resistor, node: at } of joined) {
    if (resistor.type !== 'R') continue;
    const path = resistivePathEnd(context.topology, resistor, at);
    if (!path || path.end === GROUND || path.end === diodeRail || !rails.has(path.end)) continue;
    const voltage = nodes[path.end];
    const here = nodes[node];
    if (voltage === undefined || here === undefined || voltage < 0 || voltage > railVoltage || here <= voltage) continue;
    const source = (connections.get(path.end) ?? []).find((each): each is VoltageSource => each.type === 'V' && each.nodes.includes(GROUND));
    if (source) return { source, voltage, resistors: path.resistors, node: at };
  }
  return undefined;
}

/**
 * A freewheel diode fitted backwards on a coil that is switched off at DC: idle now, but with
 * its anode on the coil's supply side the supply drives it forward once the switch closes.
 * Decided by the on-state counterfactual: the transistor or switch on the coil's other end
 * taken as closed (a 0 V source across its current terminals).
 */
function idleFreewheelFittedBackwards(context: CheckContext, diode: CheckedDiode): Finding | undefined {
  if (diode.kind === 'led') return undefined;
  const element = diode.element;
  if (!bridgesInductor(context.topology, element)) return undefined;
  const worst = worstCorner(diode, forwardCurrent);
  if (!worst || worst.value >= PLAUSIBLE_CURRENT) return undefined; // conducting now: drivenForwardIntoShort's
  const [anode, cathode] = element.nodes as [string, string];
  const { rails, connections } = context.topology;
  if (rails.has(anode) === rails.has(cathode)) return undefined; // the coil's supply side is a rail, its other end is switched
  const switched = rails.has(anode) ? cathode : anode;
  const closable = (connections.get(switched) ?? []).map((each) => ({ each, terminals: switchTerminals(each) })).find((entry) => entry.terminals?.includes(switched));
  if (!closable?.terminals) return undefined;
  const switchElement = closable.each;
  const closed: VoltageSource = {
    type: 'V',
    name: unusedName(`Vclosed_${switchElement.name.replace(/\./g, '_')}`, context.takenNames),
    nodes: [...closable.terminals],
    dc: 0,
    waveform: undefined,
    location: switchElement.location,
    instances: switchElement.instances,
  };
  const results = context.solveWithReplacements(new Map([[switchElement, closed]]), context.plans.map((plan, index) => ({ plan: index, corner: plan.corner })));
  let best: { current: number; plan: CornerPlan } | undefined;
  results.forEach((result, index) => {
    const current = result?.ok ? result.point.diodes[element.name]?.current : undefined;
    if (current !== undefined && (!best || current > best.current)) best = { current, plan: context.plans[index]! };
  });
  if (!best || best.current < PLAUSIBLE_CURRENT) return undefined;
  const coil = inductorAcross(context, diode);
  const name = element.name;
  const short = best.current >= SUPPLY_SHORT_CURRENT;
  const related = cornerSources(context, best.plan);
  if (coil) related.push({ location: coil.location, message: `${coil.name}, the coil it is across` });
  related.push({ location: switchElement.location, message: `${switchElement.name}, taken as switched on` });
  return makeFinding(
    ID,
    short ? 'error' : 'warning',
    `${name} sits across ${coil ? `the coil ${coil.name}` : 'a coil'} the wrong way round: with ${switchElement.name} off it idles, but once ${switchElement.name} switches on ` +
      `the supply drives it forward with ${formatQuantity(best.current, 'A')} ${atCorner(best.plan)}${short ? ', shorting the supply' : ''}. ` +
      'A freewheel diode must be reverse-biased while the coil is energised (cathode towards the supply) and conduct only when the coil is switched off; turn it around.',
    element.location,
    { element: name, related },
  );
}

/** The two terminals a transistor or switch connects when it is on (collector and emitter, drain and source); undefined for anything else. */
function switchTerminals(element: Element): [string, string] | undefined {
  switch (element.type) {
    case 'Q':
      return [element.nodes[0]!, element.nodes[2]!];
    case 'M':
      return [element.nodes[0]!, element.nodes[2]!];
    case 'S':
    case 'W':
      return [element.nodes[0]!, element.nodes[1]!];
    default:
      return undefined;
  }
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

/**
 * A diode that carries its branch's whole current: one of its nodes (not a rail) joins it to
 * exactly one other element (an ammeter in between is a wire: the probe carries the same current).
 */
function isSeriesDiode(context: CheckContext, element: CheckedDiode['element']): boolean {
  return element.nodes.some((node) => !context.topology.rails.has(node) && joinedAt(context.topology, node, element).length === 1);
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
  return inductorBridging(context.topology, diode.element);
}
