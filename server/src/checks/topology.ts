// Which elements meet at which node, counting only terminals that carry DC current:
// a capacitor is open at DC, a controlled source's sensing pins and a MOSFET's gate
// draw nothing. Rules use it to find a diode's series resistor, its parallel partners,
// an inductor it freewheels, and the part of the circuit an unmodeled element touches.
import { GROUND, type Circuit, type Element, type Resistor, type VoltageSource } from '../netlist/circuit.js';

export interface Topology {
  /** Node → elements with a current-carrying terminal on it. */
  connections: Map<string, Element[]>;
  /**
   * Nodes held at a fixed voltage (supply rails), ground included: those an ideal voltage
   * source ties to ground, or to another rail (a stacked supply, an ammeter in a supply lead).
   */
  rails: Set<string>;
  /** Each inductor with the end nodes of its series chain, for freewheel detection. */
  inductorSpans: { coil: Element; ends: [string, string] }[];
}

/** The terminals of an element that carry DC current. */
export function currentNodes(element: Element): string[] {
  switch (element.type) {
    case 'C':
    case 'K':
      return [];
    case 'E':
    case 'G':
    case 'S':
      return element.nodes.slice(0, 2);
    case 'Q':
      return element.nodes.slice(0, 3);
    case 'M':
      return [element.nodes[0]!, element.nodes[2]!];
    default:
      return element.nodes;
  }
}

export function buildTopology(circuit: Circuit): Topology {
  const connections = new Map<string, Element[]>();
  for (const element of circuit.elements) {
    for (const node of new Set(currentNodes(element))) {
      const list = connections.get(node) ?? [];
      list.push(element);
      connections.set(node, list);
    }
  }
  const rails = railsOf(circuit.elements);
  return { connections, rails, inductorSpans: inductorSpans(connections, rails, circuit.elements) };
}

/** Ground and every node that a chain of ideal voltage sources ties to it. */
function railsOf(elements: readonly Element[]): Set<string> {
  const sourcesAt = new Map<string, Element[]>();
  for (const element of elements) {
    if (element.type !== 'V') continue;
    for (const node of element.nodes) {
      const list = sourcesAt.get(node);
      if (list) list.push(element);
      else sourcesAt.set(node, [element]);
    }
  }
  const rails = new Set<string>([GROUND]);
  const stack = [GROUND];
  while (stack.length > 0) {
    const node = stack.pop()!;
    for (const source of sourcesAt.get(node) ?? []) {
      for (const other of source.nodes) {
        if (rails.has(other)) continue;
        rails.add(other);
        stack.push(other);
      }
    }
  }
  return rails;
}

/** A 0 V source with no time behaviour: an ammeter, which at DC is a wire. */
export function isAmmeter(element: Element): element is VoltageSource {
  return element.type === 'V' && element.dc === 0 && element.waveform === undefined;
}

/**
 * The elements joined at `node` other than `except`, looking through ammeters (a current
 * probe drawn in a lead joins what hangs on its far side to this node), each with the node
 * it is attached at.
 */
export function joinedAt(topology: Topology, node: string, except: Element): { element: Element; node: string }[] {
  const joined: { element: Element; node: string }[] = [];
  const seen = new Set<Element>([except]);
  const visit = (at: string): void => {
    for (const element of topology.connections.get(at) ?? []) {
      if (seen.has(element)) continue;
      seen.add(element);
      if (isAmmeter(element)) {
        const far = otherNode(element, at);
        if (far !== undefined && far !== at) visit(far);
      } else joined.push({ element, node: at });
    }
  };
  visit(node);
  return joined;
}

/** The other current-carrying terminal of a two-terminal path (a MOSFET's source for its drain, not its gate). */
export const otherNode = (element: Element, node: string): string | undefined => {
  const [first, second] = currentNodes(element);
  return first === node ? second : first;
};

/**
 * Walks from `start` away from `from` while each node on the way is a plain series
 * junction (exactly two current-carrying elements, neither end a rail), and returns the
 * two-terminal elements passed. The chain is what carries the same current as `from`.
 */
export function seriesChain(topology: Topology, from: Element, start: string): Element[] {
  const chain: Element[] = [];
  let node = start;
  let previous = from;
  const visited = new Set<string>();
  while (!topology.rails.has(node) && !visited.has(node)) {
    visited.add(node);
    const others = (topology.connections.get(node) ?? []).filter((element) => element !== previous);
    if (others.length !== 1) break;
    const next = others[0]!;
    if (currentNodes(next).length !== 2) break;
    chain.push(next);
    const after = otherNode(next, node);
    if (after === undefined) break;
    previous = next;
    node = after;
  }
  return chain;
}

/** The resistors in series with an element, on either side. */
export function seriesResistors(topology: Topology, element: Element): Resistor[] {
  const found: Resistor[] = [];
  for (const node of element.nodes.slice(0, 2)) {
    for (const each of seriesChain(topology, element, node)) if (each.type === 'R') found.push(each);
  }
  return found;
}

/**
 * The inductor that bridges the element, alone or with what is in series with it (a snubber
 * resistor), the coil alone or in a series chain (with its winding resistance): the freewheel
 * position. Undefined when there is none.
 */
export function inductorBridging(topology: Topology, element: Element): Element | undefined {
  const candidates = [chainEnds(topology, element), element.nodes.slice(0, 2) as [string, string]];
  for (const [first, second] of candidates) {
    const found = topology.inductorSpans.find(({ ends }) => (ends[0] === first && ends[1] === second) || (ends[0] === second && ends[1] === first));
    if (found) return found.coil;
  }
  return undefined;
}

export function bridgesInductor(topology: Topology, element: Element): boolean {
  return inductorBridging(topology, element) !== undefined;
}

/** The two end nodes of a series chain of two-terminal parts, and the parts on it. */
export interface SeriesString {
  /** The parts in series, the element itself included, in the order met from its anode side. */
  parts: Element[];
  /** The node at each end of the chain (a rail, or a junction of more than two parts). */
  ends: [string, string];
}

/** The element with whatever is in series with it on either side (two-terminal parts only). */
export function seriesString(topology: Topology, element: Element): SeriesString {
  const sides = element.nodes.slice(0, 2).map((node) => {
    const chain = seriesChain(topology, element, node);
    let end = node;
    for (const part of chain) end = otherNode(part, end) ?? end;
    return { chain, end };
  });
  const [anodeSide, cathodeSide] = sides as [(typeof sides)[0], (typeof sides)[0]];
  return { parts: [...[...anodeSide.chain].reverse(), element, ...cathodeSide.chain], ends: [anodeSide.end, cathodeSide.end] };
}

/** The two end nodes of an element's series chain: the element with whatever is in series with it on either side. */
function chainEnds(topology: Topology, element: Element): [string, string] {
  return seriesString(topology, element).ends;
}

/** The two end nodes of each inductor's series chain (the coil with whatever is in series with it). */
function inductorSpans(connections: Map<string, Element[]>, rails: Set<string>, elements: readonly Element[]): Topology['inductorSpans'] {
  const partial: Topology = { connections, rails, inductorSpans: [] };
  return elements.filter((element) => element.type === 'L').map((coil) => ({ coil, ends: chainEnds(partial, coil) }));
}

/**
 * Nodes reachable from `start` through current-carrying elements, stopping at supply
 * rails and ground (an ideal source holds a rail whatever hangs on it).
 */
export function nodesWithinRails(topology: Topology, start: string): Set<string> {
  const seen = new Set<string>();
  const stack = [start];
  while (stack.length > 0) {
    const node = stack.pop()!;
    if (seen.has(node) || topology.rails.has(node)) continue;
    seen.add(node);
    for (const element of topology.connections.get(node) ?? []) for (const next of element.nodes) if (!seen.has(next)) stack.push(next);
  }
  return seen;
}

/**
 * The resistors that feed a zener conducting in reverse at one operating point: those at its
 * cathode that bring current in, and those at its anode that take it away, with the resistors
 * strictly in series with it. A load resistor across the zener is not among them.
 */
export function feedResistors(topology: Topology, diode: Element, nodes: Readonly<Record<string, number>>): Resistor[] {
  const [anode, cathode] = diode.nodes as [string, string];
  const found = new Set<Resistor>(seriesResistors(topology, diode));
  const voltage = (node: string) => nodes[node] ?? 0;
  for (const [node, direction] of [[cathode, 1], [anode, -1]] as const) {
    if (topology.rails.has(node)) continue;
    for (const element of topology.connections.get(node) ?? []) {
      if (element.type !== 'R') continue;
      const other = otherNode(element, node);
      if (other !== undefined && direction * (voltage(other) - voltage(node)) > 0) found.add(element);
    }
  }
  return [...found];
}

/**
 * The far end of a resistive path: from `node` across `resistor`, then on through whatever is
 * in series with it, as long as that is resistors or 0 V sources (ammeters). Undefined when
 * anything else is on the way.
 */
export function resistivePathEnd(topology: Topology, resistor: Resistor, node: string): { end: string; resistors: Resistor[] } | undefined {
  let end = otherNode(resistor, node);
  if (end === undefined) return undefined;
  const resistors = [resistor];
  for (const next of seriesChain(topology, resistor, end)) {
    if (next.type === 'R') resistors.push(next);
    else if (!isAmmeter(next)) return undefined;
    end = otherNode(next, end);
    if (end === undefined) return undefined;
  }
  return { end, resistors };
}

