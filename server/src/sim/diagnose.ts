// Why a circuit cannot be solved, in the user's terms. Before solving: loops of
// voltage-defined branches (voltage sources, inductors, E and H outputs), whose currents
// are then undetermined, and nodes with no DC path to ground, whose voltages are. After a
// failure: which node the singular matrix or the non-converging Newton points at.
import type { Circuit, Element, NetlistDiagnostic, SourceLocation } from '../netlist/circuit.js';

/** Elements listed by name in one message, at most (ours: keeps a message readable). */
export const MAXIMUM_NAMES_IN_MESSAGE = 6;

/** Pairs of node positions (indices into `element.nodes`) that an element connects at DC. */
export function dcConnections(element: Element): [number, number][] {
  switch (element.type) {
    case 'R':
    case 'L':
    case 'V':
    case 'D':
    case 'W':
    case 'H':
    case 'E':
    case 'S':
      return [[0, 1]];
    case 'Q':
      return [
        [0, 1],
        [1, 2],
      ];
    case 'M':
      return [
        [0, 2],
        [2, 3],
      ];
    default:
      return [];
  }
}

/** Whether the element fixes the voltage between its first two nodes (a branch equation at DC). */
export function isVoltageDefined(element: Element): boolean {
  return element.type === 'V' || element.type === 'L' || element.type === 'E' || element.type === 'H';
}

class DisjointSets {
  private readonly parent: Int32Array;
  constructor(size: number) {
    this.parent = new Int32Array(size);
    for (let i = 0; i < size; i++) this.parent[i] = i;
  }
  find(i: number): number {
    let root = i;
    while (this.parent[root] !== root) root = this.parent[root];
    while (this.parent[i] !== root) {
      const next = this.parent[i];
      this.parent[i] = root;
      i = next;
    }
    return root;
  }
  union(a: number, b: number): boolean {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra === rb) return false;
    this.parent[ra] = rb;
    return true;
  }
}

function listNames(names: string[]): string {
  if (names.length <= MAXIMUM_NAMES_IN_MESSAGE) return names.join(', ');
  return `${names.slice(0, MAXIMUM_NAMES_IN_MESSAGE).join(', ')} and ${names.length - MAXIMUM_NAMES_IN_MESSAGE} more`;
}

/** A place to show a circuit-wide diagnostic: the given element's line, else the top of the file. */
export function circuitLocation(circuit: Circuit, element?: Element): SourceLocation {
  if (element) return element.location;
  const first = circuit.elements?.[0];
  if (first) return first.location;
  return { uri: circuit.uri, range: { start: { line: 0, column: 0 }, end: { line: 0, column: 0 } } } as SourceLocation;
}

export interface StructuralFindings {
  diagnostics: NetlistDiagnostic[];
  /** Nodes with no DC path to ground. */
  floatingNodes: Set<string>;
  /** True when a loop of voltage-defined branches makes every solve singular. */
  hasVoltageLoop: boolean;
}

/** The circuit's connections, read once by the compiler: element i's nodes are nodeNumbers[nodeStart[i] … nodeStart[i + 1]). */
export interface Topology {
  elements: Element[];
  types: Element['type'][];
  /** 1 where the element is simulated. */
  active: Uint8Array;
  nodeStart: Int32Array;
  nodeNumbers: Int32Array;
  /** Netlist node name → unknown number (ground 0). */
  nodeIndex: ReadonlyMap<string, number>;
  /** Unknowns numbered so far (node numbers are below this). */
  nodeCount: number;
}

/** Node positions an element type connects at DC (see dcConnections), by type. */
function dcPairs(type: Element['type']): readonly (readonly [number, number])[] {
  return DC_PAIRS[type] ?? NO_PAIRS;
}
const NO_PAIRS: readonly (readonly [number, number])[] = [];
const DC_PAIRS: Partial<Record<Element['type'], readonly (readonly [number, number])[]>> = {};
for (const type of ['R', 'L', 'V', 'D', 'W', 'H', 'E', 'S', 'Q', 'M'] as const) {
  DC_PAIRS[type] = dcConnections({ type } as Element);
}

/** Checks the topology of the simulated elements: loops of voltage-defined branches, nodes with no DC path to ground. */
export function diagnoseStructure(circuit: Circuit, topology: Topology): StructuralFindings {
  const { elements, types, active, nodeStart, nodeNumbers, nodeIndex, nodeCount } = topology;
  const diagnostics: NetlistDiagnostic[] = [];

  // Loops of voltage-defined branches: a spanning forest of them, and any branch closing a cycle.
  let hasVoltageLoop = false;
  const forest = new DisjointSets(nodeCount);
  const forestEdges = new Map<number, { to: number; element: Element }[]>();
  for (let i = 0; i < elements.length; i++) {
    const type = types[i];
    if (!active[i] || !(type === 'V' || type === 'L' || type === 'E' || type === 'H')) continue;
    const element = elements[i];
    const a = nodeNumbers[nodeStart[i]];
    const b = nodeNumbers[nodeStart[i] + 1];
    if (forest.union(a, b)) {
      if (!forestEdges.has(a)) forestEdges.set(a, []);
      if (!forestEdges.has(b)) forestEdges.set(b, []);
      forestEdges.get(a)!.push({ to: b, element });
      forestEdges.get(b)!.push({ to: a, element });
      continue;
    }
    hasVoltageLoop = true;
    const path = a === b ? [] : forestPath(forestEdges, a, b);
    const members = [element, ...path];
    const what = members.some((m) => m.type === 'L') ? 'voltage sources and inductors (a DC short)' : 'voltage sources';
    diagnostics.push({
      severity: 'warning',
      code: 'unsolved-circuit',
      message:
        a === b
          ? `${element.name} has both ends on node ${element.nodes[0]}: a shorted ${type === 'L' ? 'inductor' : 'voltage source'} leaves its current undetermined, so the circuit cannot be solved`
          : `${listNames(members.map((m) => m.name))} form a loop of ${what}: the current around it is undetermined, so the circuit cannot be solved`,
      location: element.location,
      related: path.map((m) => ({ location: m.location, message: `${m.name} is part of the loop` })),
    });
  }

  // Nodes with no DC path to ground.
  const connected = new DisjointSets(nodeCount);
  for (let i = 0; i < elements.length; i++) {
    if (!active[i]) continue;
    const first = nodeStart[i];
    const nodes = nodeStart[i + 1] - first;
    for (const [p, q] of dcPairs(types[i])) {
      if (p < nodes && q < nodes) connected.union(nodeNumbers[first + p], nodeNumbers[first + q]);
    }
  }
  const groundRoot = connected.find(0);
  const islands = new Map<number, string[]>();
  const floatingNodes = new Set<string>();
  for (const [name, i] of nodeIndex) {
    if (i === 0) continue;
    const root = connected.find(i);
    if (root === groundRoot) continue;
    floatingNodes.add(name);
    const island = islands.get(root);
    if (island) island.push(name);
    else islands.set(root, [name]);
  }
  if (islands.size === 0) return { diagnostics, floatingNodes, hasVoltageLoop };

  // Only now, with something to report: which elements sit on which floating node.
  const elementsOnNode = new Map<number, Element[]>();
  for (let i = 0; i < elements.length; i++) {
    for (let k = nodeStart[i]; k < nodeStart[i + 1]; k++) {
      const node = nodeNumbers[k];
      if (node === 0 || connected.find(node) === groundRoot) continue;
      const list = elementsOnNode.get(node);
      if (list) {
        if (list[list.length - 1] !== elements[i]) list.push(elements[i]);
      } else elementsOnNode.set(node, [elements[i]]);
    }
  }
  for (const nodes of islands.values()) {
    const onIsland = [...new Set(nodes.flatMap((n) => elementsOnNode.get(nodeIndex.get(n) ?? 0) ?? []))];
    const subject = nodes.length === 1 ? `node ${nodes[0]} has` : `nodes ${listNames(nodes)} have`;
    const islandNodes = new Set(nodes);
    const driver = onIsland.find((e) => (e.type === 'I' || e.type === 'G' || e.type === 'F') && e.nodes.slice(0, 2).some((n) => islandNodes.has(n)));
    diagnostics.push({
      severity: 'warning',
      code: 'floating-node',
      message:
        `${subject} no DC path to ground` +
        (onIsland.length ? ` (connected only through ${listNames(onIsland.map((e) => e.name))})` : ' (nothing simulated is connected)') +
        (driver
          ? `; ${driver.name} drives current into it with nowhere to go, so it has no DC operating point and the voltages shown there are meaningless`
          : `; ${nodes.length === 1 ? 'its voltage is' : 'their voltages are'} undetermined at DC and solved as if tied to ground through a negligible conductance`),
      location: circuitLocation(circuit, onIsland[0]),
      related: onIsland.slice(1, MAXIMUM_NAMES_IN_MESSAGE).map((e) => ({ location: e.location, message: `${e.name} is on the floating node` })),
    });
  }
  return { diagnostics, floatingNodes, hasVoltageLoop };
}

function forestPath(edges: Map<number, { to: number; element: Element }[]>, from: number, to: number): Element[] {
  const previous = new Map<number, { node: number; element: Element }>();
  const queue = [from];
  const visited = new Set([from]);
  for (let head = 0; head < queue.length; head++) {
    const node = queue[head];
    if (node === to) break;
    for (const edge of edges.get(node) ?? []) {
      if (visited.has(edge.to)) continue;
      visited.add(edge.to);
      previous.set(edge.to, { node, element: edge.element });
      queue.push(edge.to);
    }
  }
  const path: Element[] = [];
  let node = to;
  while (node !== from && previous.has(node)) {
    const step = previous.get(node)!;
    path.push(step.element);
    node = step.node;
  }
  return path;
}
