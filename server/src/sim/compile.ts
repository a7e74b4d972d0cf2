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
import { CircuitSystem, grown, SLOTS_PER_ELEMENT, StructureBuilder, type BindContext, type Device } from './mna.js';

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
  switch (element.type) {
    // An infinite resistance is a legitimate open circuit; NaN anywhere is not.
    case 'R': return Number.isNaN(element.resistance) ? notFinite('resistance') : undefined;
    case 'V':
    case 'I': return Number.isFinite(element.dc) ? undefined : notFinite('DC value');
    case 'E':
    case 'F':
    case 'G':
    case 'H': return Number.isFinite(element.gain) ? undefined : notFinite('gain');
    case 'D':
    case 'Q': return Number.isFinite(element.area) ? undefined : notFinite('area');
    case 'M':
      if (element.width <= 0 || element.length <= 0) return 'its W or L is not positive';
      if (!Number.isFinite(element.width)) return notFinite('W');
      return Number.isFinite(element.length) ? undefined : notFinite('L');
    default: return undefined;
  }
}

function notFinite(value: string): string {
  return `its ${value} is not a finite number`;
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

  // One pass reads each element's type and nodes (elements come in many shapes, so each read
  // is slow), folds ground's other spelling into '0' (on a copy, so that device code sees '0'
  // only) and numbers every netlist node through the one map, in netlist order, before devices
  // add their own unknowns.
  const source = circuit.elements;
  const count = source.length;
  const builder = new StructureBuilder(circuit.nodes.map(canonicalNode).filter((n) => n !== GROUND), SLOTS_PER_ELEMENT * count);
  const elements: Element[] = new Array(count);
  const types: Element['type'][] = new Array(count);
  const nodeStart = new Int32Array(count + 1);
  let nodeNumbers: Int32Array = new Int32Array(2 * count + 4);
  let nodeTotal = 0;
  const branchOwners = new Set<string>();
  for (let i = 0; i < count; i++) {
    let element = source[i];
    let nodes = element.nodes;
    if (nodes.some((n) => canonicalNode(n) !== n)) {
      nodes = nodes.map(canonicalNode);
      element = { ...element, nodes } as Element;
    }
    elements[i] = element;
    const type = (types[i] = element.type);
    nodeStart[i] = nodeTotal;
    if (nodeTotal + nodes.length > nodeNumbers.length) nodeNumbers = grown(nodeNumbers, nodeTotal + nodes.length);
    for (let k = 0; k < nodes.length; k++) nodeNumbers[nodeTotal++] = builder.node(nodes[k]);
    // Voltage-defined elements, by lower-cased name, for F, H and W to find their control.
    if (type === 'V' || type === 'L' || type === 'E' || type === 'H') branchOwners.add(element.name.toLowerCase());
  }
  nodeStart[count] = nodeTotal;

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

  const nodeIndex = builder.nodeIndex;
  const structure = diagnoseStructure(circuit, { elements, types, active, nodeStart, nodeNumbers: nodeNumbers.subarray(0, nodeTotal), nodeIndex, nodeCount: builder.size });
  diagnostics.push(...structure.diagnostics);

  const devices: Device[] = [];
  // Branch current unknown of each voltage-defined element (V, L, E, H), by lower-cased name.
  const branchByName = new Map<string, number>();
  for (let i = 0; i < count; i++) {
    if (!active[i]) continue;
    const device = createDevice(elements[i]);
    if (!device) continue;
    builder.beginElement(nodeNumbers, nodeStart[i], nodeStart[i + 1] - nodeStart[i]);
    device.setup(builder);
    devices.push(device);
    const type = types[i];
    if (type === 'V' || type === 'L' || type === 'E' || type === 'H') {
      branchByName.set(elements[i].name.toLowerCase(), (device as VoltageSourceDevice | VcvsDevice | CcvsDevice).branch);
    }
  }
  // One context for every device that looks up another's branch (F, H, W).
  const binding: BindContext = {
    branchOf: (name) => branchByName.get(name.toLowerCase()),
    slot: (row, column) => builder.slot(row, column),
  };
  for (const device of devices) device.bind?.(binding);

  let voltageUnknowns = 0;
  for (let i = 1; i < builder.size; i++) if (!builder.isBranch(i)) voltageUnknowns++;
  const voltageDiagonals = new Int32Array(voltageUnknowns);
  for (let i = 1, k = 0; i < builder.size; i++) if (!builder.isBranch(i)) voltageDiagonals[k++] = builder.slot(i, i);
  const floatingDiagonals = Int32Array.from(structure.floatingNodes, (name) => builder.slot(nodeIndex.get(name)!, nodeIndex.get(name)!));

  const gmin = circuit.options?.gmin ?? DEFAULT_GMIN;
  const system = new CircuitSystem(builder, devices, voltageDiagonals, floatingDiagonals, gmin > 0 ? Math.min(gmin, FLOATING_NODE_CONDUCTANCE) : FLOATING_NODE_CONDUCTANCE);

  // The algebra's matrix, excluding ground: our slot k is its slot k − 1 when registered in order.
  const matrix = new SparseMatrix(Math.max(0, builder.size - 1));
  for (let k = 1; k < builder.slotCount; k++) {
    const slot = matrix.slot(builder.slotRow(k) - 1, builder.slotColumn(k) - 1);
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
