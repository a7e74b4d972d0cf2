// reversed-diode, decided by a counterfactual solve (issue 4): an LED or series diode that
// never conducts, but would carry a plausible current turned around, is reversed. One
// that would short a supply turned around is an intentional clamp and is left alone. And
// a clamp or freewheel diode that a DC supply drives forward, shorting it, is reversed.
import type { Diode } from '../../netlist/circuit.js';
import type { Finding } from '../../findings.js';
import { formatQuantity } from '../../units.js';
import { atCorner, replaceElement, type CheckContext, type CheckedDiode } from '../context.js';
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
import { KIND_NAMES } from '../vocabulary.js';
import { cornerSources } from './related.js';
import type { Rule } from './rule.js';

const ID = 'reversed-diode';

export const reversedDiode: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const findings: Finding[] = [];
    for (const diode of context.diodes) {
      if (diode.kind === 'zener' || diode.unchecked) continue; // a zener works reversed; zener-forward covers the other way
      const finding = drivenForwardIntoShort(context, diode) ?? neverConducts(context, diode);
      if (!finding) continue;
      finding.fixes = context.fixesFor({ kind: 'flip-diode', rule: ID, diode: diode.element.name }, finding);
      findings.push(finding);
    }
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
    `${KIND_NAMES[diode.kind]} ${name} is driven forward with ${current} ${where} through next to nothing (${formatQuantity(thevenin.resistance, 'Ω')}): it shorts the supply. A clamp or protection diode across a supply must be reverse-biased; turn it around.`,
    diode.element.location,
    { element: name, related },
  );
}

function neverConducts(context: CheckContext, diode: CheckedDiode): Finding | undefined {
  const worst = worstCorner(diode, forwardCurrent);
  if (!worst || worst.value >= CONDUCTION_THRESHOLD) return undefined;
  const element = diode.element;
  const isLed = diode.kind === 'led';
  if (!isLed && !isSeriesDiode(context, element)) return undefined;
  if (bridgesInductor(context.topology, element)) return undefined; // a freewheel diode is reverse-biased at DC by design
  if (hasConductingPartner(context, diode)) return undefined; // diode-OR or reverse-protection partner
  const flipped: Diode = { ...element, nodes: [element.nodes[1]!, element.nodes[0]!] };
  const results = context.solveVariant(replaceElement(context.circuit, element, flipped), context.plans);
  let best: { current: number; plan: (typeof context.plans)[number] } | undefined;
  results.forEach((result, index) => {
    const current = result.ok ? result.point.diodes[element.name]?.current : undefined;
    if (current !== undefined && (!best || current > best.current)) best = { current, plan: context.plans[index]! };
  });
  if (!best || best.current < PLAUSIBLE_CURRENT) return undefined; // dark either way: unpowered, or switched off
  if (!isLed && best.current >= SUPPLY_SHORT_CURRENT) return undefined; // turned around it would short a supply: an intentional clamp
  const nominal = diode.corners[0];
  const reverse = nominal && nominal.point.voltage < 0 ? ` (${formatQuantity(-nominal.point.voltage, 'V')} reverse ${atCorner(nominal.plan)})` : '';
  const what = `${KIND_NAMES[diode.kind]} ${element.name}`;
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

/** Another diode that conducts and shares this one's cathode or anode (diode-OR), or sits anti-parallel to it (reverse protection). */
function hasConductingPartner(context: CheckContext, diode: CheckedDiode): boolean {
  const [anode, cathode] = diode.element.nodes;
  return context.diodes.some((other) => {
    if (other === diode || !other.corners.some((at) => at.point.current >= CONDUCTION_THRESHOLD)) return false;
    const [otherAnode, otherCathode] = other.element.nodes;
    const antiParallel = otherAnode === cathode && otherCathode === anode;
    const sameCathode = otherCathode === cathode && otherAnode !== anode;
    const sameAnode = otherAnode === anode && otherCathode !== cathode;
    return antiParallel || sameCathode || sameAnode;
  });
}

function inductorAcross(context: CheckContext, diode: CheckedDiode) {
  const nodes = new Set(diode.element.nodes);
  return context.circuit.elements.find((element) => element.type === 'L' && currentNodes(element).some((node) => nodes.has(node)));
}
