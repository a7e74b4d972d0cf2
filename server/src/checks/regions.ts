// Which part of a circuit a change at one element can reach. An ideal voltage source to
// ground holds its node whatever hangs on it, so a circuit falls apart at its supply rails
// into regions that do not see each other: a diode turned around, or replaced by a probe,
// moves only the voltages of its own region. A counterfactual solve then needs only that
// region, with each rail it touches held at the voltage solved at the corner: the very same
// equations, and on a board of a thousand indicators a thousand times fewer of them.
import { GROUND, type Circuit, type Element, type VoltageSource } from '../netlist/circuit.js';
import type { Corner, SolveResult } from '../sim/types.js';
import type { Topology } from './topology.js';

export interface Regions {
  /** The region of a node that is not a rail; undefined for rails and ground. */
  regionOf(node: string): number | undefined;
  /** The region an element belongs to (of any of its nodes that is not a rail); undefined when all its nodes are rails. */
  regionOfElement(element: Element): number | undefined;
  /** The elements with a node in the region, in netlist order. */
  elementsIn(region: number): readonly Element[];
}

/** A copy of part of the circuit, and the sources that stand in for the rails it touches. */
export interface LocalCircuit {
  circuit: Circuit;
  /** One source per rail the part touches, holding it at the voltage solved at each corner. */
  rails: { source: string; node: string }[];
}

/** Elements with no effect on a DC solve: capacitors are open, a coupling has no DC effect. */
const noDcEffect = (element: Element) => element.type === 'C' || element.type === 'K';

/**
 * The regions of a circuit; undefined when the circuit does not fall apart safely: when a
 * current-controlled element (F, H, W) senses a source on a rail, whose current every region
 * on that rail moves.
 */
export function buildRegions(circuit: Circuit, topology: Topology): Regions | undefined {
  const isRail = (node: string) => topology.rails.has(node);
  const index = new Map<string, number>();
  const parent: number[] = [];
  const idOf = (node: string): number => {
    let id = index.get(node);
    if (id === undefined) {
      id = parent.length;
      index.set(node, id);
      parent.push(id);
    }
    return id;
  };
  const find = (id: number): number => {
    let root = id;
    while (parent[root] !== root) root = parent[root]!;
    while (parent[id] !== root) {
      const next = parent[id]!;
      parent[id] = root;
      id = next;
    }
    return root;
  };
  const union = (nodes: readonly string[]) => {
    let first: number | undefined;
    for (const node of nodes) {
      if (isRail(node)) continue;
      const root = find(idOf(node));
      if (first === undefined) first = root;
      else if (root !== first) parent[root] = first;
    }
  };

  const byName = new Map<string, Element>();
  for (const element of circuit.elements) if (!byName.has(element.name.toLowerCase())) byName.set(element.name.toLowerCase(), element);
  for (const element of circuit.elements) {
    if (noDcEffect(element)) continue;
    // Every node an element senses or drives belongs with the others: a gate, a control pair.
    union(element.nodes);
    if (element.type === 'F' || element.type === 'H' || element.type === 'W') {
      const control = byName.get(element.controlSource.toLowerCase());
      if (!control) continue; // left open by the solver
      if (control.nodes.some(isRail)) return undefined;
      union([...element.nodes, ...control.nodes]);
    }
  }

  const members = new Map<number, Element[]>();
  const regionOf = (node: string) => {
    const id = index.get(node);
    return id === undefined ? undefined : find(id);
  };
  const regionOfElement = (element: Element) => {
    for (const node of element.nodes) {
      const region = regionOf(node);
      if (region !== undefined) return region;
    }
    return undefined;
  };
  for (const element of circuit.elements) {
    if (noDcEffect(element)) continue;
    const region = regionOfElement(element);
    if (region === undefined) continue;
    const list = members.get(region);
    if (list) list.push(element);
    else members.set(region, [element]);
  }
  return { regionOf, regionOfElement, elementsIn: (region) => members.get(region) ?? [] };
}

/** The circuit's element names, lower-cased, for picking names that none of them has. */
export function takenNames(circuit: Circuit): Set<string> {
  return new Set(circuit.elements.map((element) => element.name.toLowerCase()));
}

/** `base`, or `base2`, `base3`, … : the first that is neither taken nor given already. */
export function unusedName(base: string, taken: ReadonlySet<string>, given?: Set<string>): string {
  let name = base;
  for (let index = 2; taken.has(name.toLowerCase()) || given?.has(name.toLowerCase()); index++) name = `${base}${index}`;
  given?.add(name.toLowerCase());
  return name;
}

/**
 * The regions that the replaced elements belong to, with the replacements made and every rail
 * they touch held by a source; an element whose nodes are all rails comes alone.
 */
export function localCircuit(circuit: Circuit, regions: Regions, replacements: ReadonlyMap<Element, Element>, taken: ReadonlySet<string>): LocalCircuit {
  const wanted = new Set<number>();
  const loose: Element[] = [];
  for (const original of replacements.keys()) {
    const region = regions.regionOfElement(original);
    if (region === undefined) loose.push(original);
    else wanted.add(region);
  }
  const included = new Set<Element>(loose);
  for (const region of wanted) for (const element of regions.elementsIn(region)) included.add(element);
  const elements: Element[] = [];
  for (const element of circuit.elements) if (included.has(element)) elements.push(replacements.get(element) ?? element);

  const nodes = new Set<string>([GROUND]);
  const railNodes = new Set<string>();
  for (const element of elements) {
    for (const node of element.nodes) {
      nodes.add(node);
      if (node !== GROUND && regions.regionOf(node) === undefined) railNodes.add(node);
    }
  }
  const rails: LocalCircuit['rails'] = [];
  const given = new Set<string>();
  const place = elements[0] ?? circuit.elements[0];
  for (const node of railNodes) {
    const source: VoltageSource = {
      type: 'V',
      name: unusedName(`Vrail_${node.replace(/\./g, '_')}`, taken, given),
      nodes: [node, GROUND],
      dc: 0,
      waveform: undefined,
      location: place!.location,
      instances: [],
    };
    elements.push(source);
    rails.push({ source: source.name, node });
  }
  return {
    circuit: { ...circuit, elements, nodes: [...nodes], directives: [], diagnostics: [] },
    rails,
  };
}

/** A corner of the local circuit: the full circuit's corner with each rail at its solved voltage there. */
export function localCorner(corner: Corner, rails: LocalCircuit['rails'], solved: SolveResult): Corner | undefined {
  if (!solved.ok) return undefined;
  if (rails.length === 0) return corner;
  const sources: Record<string, number> = { ...(corner.sources ?? {}) };
  for (const rail of rails) {
    const voltage = solved.point.nodes[rail.node];
    if (voltage === undefined) return undefined;
    sources[rail.source] = voltage;
  }
  return { ...corner, sources };
}
