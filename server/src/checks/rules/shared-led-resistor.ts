// shared-led-resistor: LEDs wired in parallel (same anode and cathode nodes) share one
// current limit; their forward voltages differ from part to part, and the one with the
// lowest takes most of the current (common practice, no source).
import type { Element, Resistor } from '../../netlist/circuit.js';
import type { Finding } from '../../findings.js';
import type { CheckContext, CheckedDiode } from '../context.js';
import { makeFinding } from '../finding.js';
import { seriesResistors } from '../topology.js';
import { CONDUCTION_THRESHOLD } from '../thresholds.js';
import type { Rule } from './rule.js';

const ID = 'shared-led-resistor';

export const sharedLedResistor: Rule = {
  id: ID,
  check(context: CheckContext): Finding[] {
    const groups = new Map<string, CheckedDiode[]>();
    for (const diode of context.diodes) {
      if (diode.kind !== 'led' || diode.unchecked) continue;
      const key = `${diode.element.nodes[0]}\u0000${diode.element.nodes[1]}`;
      const group = groups.get(key);
      if (group) group.push(diode);
      else groups.set(key, [diode]);
    }
    const findings: Finding[] = [];
    for (const group of groups.values()) {
      if (group.length < 2) continue;
      if (!group.some((diode) => diode.corners.some((at) => at.point.current >= CONDUCTION_THRESHOLD))) continue;
      const [first, ...others] = group as [CheckedDiode, ...CheckedDiode[]];
      // The resistors in series with the group: found from a node that only the group and one resistor share.
      const limits = [...new Set(group.flatMap((diode) => seriesResistorsAcrossGroup(context, diode, group)))];
      const names = group.map((diode) => diode.element.name).join(', ');
      const limitText = limits.length > 0 ? `one current limit (${limits.map((resistor) => resistor.name).join(', ')})` : 'one current limit';
      findings.push(
        makeFinding(
          ID,
          'warning',
          `LEDs ${names} are in parallel and share ${limitText}: their forward voltages differ from part to part, so the one with the lowest takes most of the current. Give each LED its own resistor.`,
          first.element.location,
          {
            element: first.element.name,
            related: [
              ...others.map((diode) => ({ location: diode.element.location, message: `${diode.element.name}, in parallel` })),
              ...limits.map((resistor) => ({ location: resistor.location, message: `${resistor.name}, the shared resistor` })),
            ],
          },
        ),
      );
    }
    return findings;
  },
};

/** Resistors in series with a parallel group: walk on from a node where only the group's LEDs and one other element meet. */
function seriesResistorsAcrossGroup(context: CheckContext, diode: CheckedDiode, group: CheckedDiode[]) {
  const members = new Set<Element>(group.map((each) => each.element));
  const found: Element[] = [];
  for (const node of diode.element.nodes) {
    const others = (context.topology.connections.get(node) ?? []).filter((element) => !members.has(element));
    if (others.length !== 1 || context.topology.rails.has(node)) continue;
    const next = others[0]!;
    if (next.type === 'R') found.push(next);
    found.push(...seriesResistors(context.topology, next).filter((resistor) => resistor !== next));
  }
  return found.filter((element): element is Resistor => element.type === 'R');
}
