// From an elaborated circuit to its equations: one device per simulated element, the
// unknowns numbered, the matrix structure fixed. Done once; every corner reuses it.
import type { Circuit, Element, NetlistDiagnostic } from '../netlist/circuit.js';
import { GROUND } from '../netlist/circuit.js';
import { SparseLU, SparseMatrix } from './algebra/index.js';
import { DEFAULT_GMIN } from './constants.js';
import { CcvsDevice } from './devices/ccvs.js';
import { CccsDevice } from './devices/cccs.js';
import { CurrentSourceDevice } from './devices/current-source.js';
import { CurrentSwitchDevice } from './devices/current-switch.js';
import { DiodeDevice } from './devices/diode.js';
import { ResistorDevice } from './devices/resistor.js';
import { VccsDevice } from './devices/vccs.js';
import { VcvsDevice } from './devices/vcvs.js';
import { VoltageSourceDevice } from './devices/voltage-source.js';
import { VoltageSwitchDevice } from './devices/voltage-switch.js';
import { BjtDevice } from './devices/bjt.js';
import { MosfetDevice } from './devices/mosfet.js';
import { circuitLocation, diagnoseStructure } from './diagnose.js';
import { CircuitSystem, StructureBuilder, type Device } from './mna.js';

/** A node with no DC path to ground is tied to it through this conductance so the rest solves (ngspice's default gmin, 1e-12 S). */
export const FLOATING_NODE_CONDUCTANCE = 1e-12;

export interface CompiledCircuit {
  readonly circuit: Circuit;
  /** Found while compiling: unmodeled elements, floating nodes, loops of voltage sources. */
  readonly diagnostics: readonly NetlistDiagnostic[];
  /** Nodes that touch an element the solver leaves open: results there are not trustworthy. */
  readonly unmodeledNodes: ReadonlySet<string>;
  /** Nodes with no DC path to ground (their voltages are arbitrary). */
  readonly floatingNodes: ReadonlySet<string>;
  /** Set when the structure alone rules out any solution (e.g. a loop of voltage sources). */
  readonly unsolvable: boolean;
  /** The equations (internal to the solver). */
  readonly system: CircuitSystem;
  readonly matrix: SparseMatrix;
  readonly lu: SparseLU;
  /** Netlist node name → unknown number (ground 0). */
  readonly nodeIndex: ReadonlyMap<string, number>;
}

function canonicalNode(name: string): string {
  return name === GROUND || (name.length === 3 && name.toLowerCase() === 'gnd') ? GROUND : name;
}

function createDevice(element: Element): Device | undefined {
  switch (element.type) {
    case 'R':
      return new ResistorDevice(element);
    case 'V':
    case 'L':
      return new VoltageSourceDevice(element);
    case 'I':
      return new CurrentSourceDevice(element);
    case 'E':
      return new VcvsDevice(element);
    case 'G':
      return new VccsDevice(element);
    case 'F':
      return new CccsDevice(element);
    case 'H':
      return new CcvsDevice(element);
    case 'S':
      return new VoltageSwitchDevice(element);
    case 'W':
      return new CurrentSwitchDevice(element);
    case 'D':
      return new DiodeDevice(element);
    case 'Q':
      return new BjtDevice(element);
    case 'M':
      return new MosfetDevice(element);
    default:
      return undefined; // C (open at DC), K (no effect at DC), unmodeled
  }
}

/** Why a value of the element cannot be simulated (NaN from a failed expression, a MOSFET without a channel), if so. */
function unreadableValue(element: Element): string | undefined {
  const values: [string, number][] = [];
  switch (element.type) {
    case 'R': values.push(['resistance', element.resistance]); break;
    case 'V':
    case 'I': values.push(['DC value', element.dc]); break;
    case 'E':
    case 'F':
    case 'G':
    case 'H': values.push(['gain', element.gain]); break;
    case 'D':
    case 'Q': values.push(['area', element.area]); break;
    case 'M':
      values.push(['W', element.width], ['L', element.length]);
      if (element.width <= 0 || element.length <= 0) return 'its W or L is not positive';
      break;
    default: break;
  }
  // An infinite resistance is a legitimate open circuit; NaN anywhere is not.
  const bad = values.find(([name, value]) => Number.isNaN(value) || (name !== 'resistance' && !Number.isFinite(value)));
  return bad ? `its ${bad[0]} is not a finite number` : undefined;
}

/** How many nodes each element type needs (the rest of the solver indexes them freely). */
const REQUIRED_NODES: Partial<Record<Element['type'], number>> = { R: 2, C: 2, L: 2, V: 2, I: 2, E: 4, G: 4, F: 2, H: 2, S: 4, W: 2, D: 2, Q: 3, M: 4 };

export function compileCircuit(circuit: Circuit): CompiledCircuit {
  try {
    return compileUnguarded(circuit);
  } catch (error) {
    // Never throw at the caller: report the bug as such and leave nothing to solve.
    const empty = compileUnguarded({ ...circuit, elements: [], nodes: [GROUND] });
    const diagnostic: NetlistDiagnostic = {
      severity: 'warning',
      code: 'unsolved-circuit',
      message: `internal solver error while reading the circuit: ${error instanceof Error ? error.message : String(error)}`,
      location: circuitLocation(circuit),
    };
    return { ...empty, circuit, diagnostics: [diagnostic], unsolvable: true };
  }
}

function compileUnguarded(circuit: Circuit): CompiledCircuit {
  const diagnostics: NetlistDiagnostic[] = [];
  const unmodeledNodes = new Set<string>();
  const leaveOpen = (element: Element, reason: string, severity: 'warning' | 'info' = 'warning'): void => {
    diagnostics.push({
      severity,
      code: 'unmodeled-element',
      message: `${element.name} is not simulated (${reason}); the circuit is solved with it left open, and checks that depend on its nodes are skipped`,
      location: element.location,
    });
    for (const node of element.nodes) if (node !== GROUND) unmodeledNodes.add(node);
  };

  // Work on copies with ground folded, so that device code sees '0' only.
  const elements: Element[] = circuit.elements.map((e) => (e.nodes.some((n) => canonicalNode(n) !== n) ? ({ ...e, nodes: e.nodes.map(canonicalNode) } as Element) : e));

  // One pass reads each element's type and nodes (elements come in many shapes, so each read
  // is slow) and numbers every netlist node, in netlist order, before devices add their own unknowns.
  const builder = new StructureBuilder(circuit.nodes.map(canonicalNode).filter((n) => n !== GROUND));
  const count = elements.length;
  const types: Element['type'][] = new Array(count);
  const nodeStart = new Int32Array(count + 1);
  const nodeNumbers: number[] = [];
  const branchOwners = new Set<string>();
  for (let i = 0; i < count; i++) {
    const element = elements[i];
    const type = (types[i] = element.type);
    nodeStart[i] = nodeNumbers.length;
    for (const node of element.nodes) nodeNumbers.push(builder.node(node));
    // Voltage-defined elements, by lower-cased name, for F, H and W to find their control.
    if (type === 'V' || type === 'L' || type === 'E' || type === 'H') branchOwners.add(element.name.toLowerCase());
  }
  nodeStart[count] = nodeNumbers.length;

  const active = new Uint8Array(count);
  let activeCount = 0;
  for (let i = 0; i < count; i++) {
    const element = elements[i];
    const type = types[i];
    const nodeCount = nodeStart[i + 1] - nodeStart[i];
    const required = REQUIRED_NODES[type];
    if (required !== undefined && nodeCount < required) {
      leaveOpen(element, `it has ${nodeCount} nodes where ${required} are needed`);
      continue;
    }
    const unreadable = unreadableValue(element);
    if (unreadable) {
      leaveOpen(element, unreadable);
      continue;
    }
    if (element.type === 'unmodeled') {
      leaveOpen(element, element.reason);
      continue;
    }
    if ((element.type === 'F' || element.type === 'H' || element.type === 'W') && !branchOwners.has(element.controlSource.toLowerCase())) {
      leaveOpen(element, `its controlling source ${element.controlSource} is not a voltage source, inductor or E/H source of this circuit`);
      continue;
    }
    if (type === 'C' || type === 'K') continue;
    active[i] = 1;
    activeCount++;
  }

  const nodeIndex = new Map<string, number>(builder.nodeEntries());
  const structure = diagnoseStructure(circuit, { elements, types, active, nodeStart, nodeNumbers: Int32Array.from(nodeNumbers), nodeIndex, nodeCount: builder.size });
  diagnostics.push(...structure.diagnostics);

  const devices: Device[] = [];
  for (let i = 0; i < count; i++) {
    if (!active[i]) continue;
    const device = createDevice(elements[i]);
    if (!device) continue;
    device.setup(builder);
    devices.push(device);
  }
  const branchByName = new Map<string, number>();
  for (const device of devices) {
    if (device instanceof VoltageSourceDevice || device instanceof VcvsDevice || device instanceof CcvsDevice) branchByName.set(device.element.name.toLowerCase(), device.branch);
  }
  for (const device of devices) {
    device.bind?.({
      branchOf: (name) => branchByName.get(name.toLowerCase()),
      slot: (row, column) => builder.slot(row, column),
    });
  }

  const voltageDiagonals: number[] = [];
  for (let i = 1; i < builder.size; i++) if (builder.unknowns[i].kind !== 'branch') voltageDiagonals.push(builder.slot(i, i));
  const floatingDiagonals = [...structure.floatingNodes].map((name) => builder.slot(nodeIndex.get(name)!, nodeIndex.get(name)!));

  const gmin = circuit.options?.gmin ?? DEFAULT_GMIN;
  const system = new CircuitSystem(builder, devices, Int32Array.from(voltageDiagonals), Int32Array.from(floatingDiagonals), gmin > 0 ? Math.min(gmin, FLOATING_NODE_CONDUCTANCE) : FLOATING_NODE_CONDUCTANCE);

  // The algebra's matrix, excluding ground: our slot k is its slot k − 1 when registered in order.
  const matrix = new SparseMatrix(Math.max(0, builder.size - 1));
  for (let k = 1; k < builder.slotCount; k++) {
    const slot = matrix.slot(builder.slotRows[k] - 1, builder.slotColumns[k] - 1);
    if (slot !== k - 1) throw new Error('matrix slots out of order');
  }
  matrix.finalize();
  const lu = new SparseLU(matrix);

  if (activeCount === 0 && count > 0) {
    diagnostics.push({ severity: 'info', code: 'unsolved-circuit', message: 'nothing in this circuit is simulated at DC', location: circuitLocation(circuit) });
  }

  return {
    circuit,
    diagnostics,
    unmodeledNodes,
    floatingNodes: structure.floatingNodes,
    unsolvable: structure.hasVoltageLoop,
    system,
    matrix,
    lu,
    nodeIndex,
  };
}
