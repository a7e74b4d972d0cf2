// Modified nodal analysis (Ho, Ruehli and Brennan, 1975): numbering of the unknowns
// (node voltages, then internal nodes, then branch currents), the device interface,
// and the loop that stamps every device into the matrix.
//
// Vectors are indexed by unknown number with index 0 standing for ground: the solution
// keeps 0 there and writes to it are discarded, so devices stamp without testing for
// ground. Matrix entries likewise use our own slot numbers, slot 0 being the discard.
import type { Element, NetlistDiagnostic } from '../netlist/circuit.js';

export type UnknownKind = 'node' | 'internal' | 'branch';

export interface Unknown {
  kind: UnknownKind;
  /** Node name, or the element that owns the internal node or branch current. */
  name: string;
  /** For internal nodes: what it is (`anode side of RS`); for branches: `current`. */
  label: string;
}

/** What a device learns about the circuit while it registers its unknowns and matrix entries. */
export interface SetupContext {
  /** Unknown number of a netlist node (0 for ground). */
  node(name: string): number;
  /** Unknown number of the element's node at `position` (its place on the netlist line), as the compiler numbered it. */
  terminal(position: number): number;
  /** A new internal node voltage owned by the device. */
  internalNode(owner: string, label: string): number;
  /** A new branch current owned by the device. */
  branch(owner: string): number;
  /** Registers matrix entry (row, column) and returns its slot; 0 when either is ground. */
  slot(row: number, column: number): number;
}

/** Resolved after every device has registered: the branch current unknowns of other elements. */
export interface BindContext {
  /** Branch unknown of a voltage-defined element (V, L, E, H), case-insensitively; undefined if none. */
  branchOf(elementName: string): number | undefined;
  /** Registers further matrix entries, as SetupContext.slot. */
  slot(row: number, column: number): number;
}

/** The conditions of one corner, as devices need them. */
export interface CornerConditions {
  /** Circuit temperature, kelvin. */
  temperature: number;
  /** Temperature at which model parameters were measured (`.options tnom`), kelvin. */
  nominalTemperature: number;
  /** Factor applied to an element's value (1 when the corner does not scale it). */
  scaleOf(elementName: string): number;
  /** An independent source's DC value at this corner. */
  sourceValue(elementName: string, netlistValue: number): number;
  gmin: number;
  relativeTolerance: number;
  /** A diode card's IS below this is raised to it, as ngspice 39 does (its `.options epsmin`, default 1e-28 A). */
  minimumSaturationCurrent: number;
}

export interface LoadContext {
  /** The present solution; index 0 (ground) is always 0. */
  solution: Float64Array;
  /** Matrix values by our slot number (slot 0 is the discard). */
  matrix: Float64Array;
  /** Right-hand side by unknown number (index 0 is the discard). */
  rhs: Float64Array;
  /** Source stepping scales every independent source by this (1 normally). */
  sourceFactor: number;
  /** Minimum junction conductance, S. */
  gmin: number;
  /** First iteration: junctions start from their own initial voltages, not from the solution (SPICE's MODEINITJCT). */
  initializeJunctions: boolean;
  /** Devices count here each limited junction or changed switch state: the iteration cannot be the last. */
  nonConvergent: number;
  relativeTolerance: number;
  currentTolerance: number;
}

export interface ConvergenceContext {
  /** The new solution, to compare with what the device loaded. */
  solution: Float64Array;
  relativeTolerance: number;
  currentTolerance: number;
}

/** What a device reports once the solve has converged. */
export interface DeviceResultSink {
  branch(elementName: string, current: number): void;
  /** Current into the element at each of its netlist nodes, in the element's node order. */
  terminals(elementName: string, currents: number[]): void;
  diode(
    elementName: string,
    point: { voltage: number; current: number; power: number; region: 'forward' | 'reverse' | 'breakdown' | 'off' },
  ): void;
}

export interface Device {
  readonly element: Element;
  /**
   * Linear devices stamp the same values whatever the solution: they are loaded once per
   * corner and source factor. Nonlinear devices are loaded on every Newton iteration.
   */
  readonly linear: boolean;
  setup(context: SetupContext): void;
  bind?(context: BindContext): void;
  /** Effective parameters at a corner: temperature, scaling, source values. */
  prepare(conditions: CornerConditions): void;
  load(context: LoadContext): void;
  /** Device-level convergence (SPICE's per-device current test); true when it has none. */
  converged?(context: ConvergenceContext): boolean;
  /** Forget iteration state before a fresh solve. */
  reset?(): void;
  /** Initial guess of the device's junctions from a given solution (warm start). */
  warmStart?(solution: Float64Array): void;
  /** Results at the converged solution. */
  report(solution: Float64Array, sink: DeviceResultSink): void;
  /** Diagnostics arising during a solve (e.g. a switch that would not settle). */
  solveDiagnostics?(): NetlistDiagnostic[];
}

/** Unknown kinds by code, as StructureBuilder stores them (one small number per unknown, no object). */
const UNKNOWN_KINDS: readonly UnknownKind[] = ['node', 'internal', 'branch'];
const NODE = 0;
const INTERNAL = 1;
const BRANCH = 2;

/** The slot table is kept at most half full, so that a lookup probes about two places (open addressing, common practice). */
const SLOT_TABLE_MAXIMUM_LOAD = 0.5;
/** Matrix entries a typical two-terminal element registers (four for a conductance), to size the tables up front (ours). */
export const SLOTS_PER_ELEMENT = 4;

/** Numbers the unknowns and collects the matrix structure while devices register; no object per unknown or entry. */
export class StructureBuilder implements SetupContext {
  /** Netlist node name → unknown number, ground ('0') being 0; built once, read by everything after. */
  readonly nodeIndex = new Map<string, number>();
  private kinds: Uint8Array;
  private readonly names: string[] = [];
  private readonly labels: string[] = [];
  private unknownCount = 0;
  /** Our slot number → (row, column) as unknown numbers; slot 0 is the discard. */
  private rows: Int32Array;
  private columns: Int32Array;
  private entryCount = 1;
  /** Open-addressing hash table of slot numbers by (row, column); 0 marks an empty place. */
  private table: Int32Array;
  /** The node numbers of the element being set up: terminalNumbers[terminalStart … terminalStart + terminalCount). */
  private terminalNumbers: Int32Array = new Int32Array(0);
  private terminalStart = 0;
  private terminalCount = 0;

  /** `expectedSlots` only sizes the tables; they grow when it is exceeded. */
  constructor(nodeNames: readonly string[], expectedSlots = 0) {
    this.kinds = new Uint8Array(Math.max(16, nodeNames.length + 1));
    this.add(NODE, '0', 'ground');
    this.nodeIndex.set('0', 0);
    for (const name of nodeNames) this.node(name);
    const capacity = Math.max(16, expectedSlots + 1);
    this.rows = new Int32Array(capacity);
    this.columns = new Int32Array(capacity);
    this.table = new Int32Array(tableSizeFor(capacity));
  }

  private add(kind: number, name: string, label: string): number {
    const index = this.unknownCount++;
    if (index >= this.kinds.length) this.kinds = grown(this.kinds, index + 1);
    this.kinds[index] = kind;
    this.names.push(name);
    this.labels.push(label);
    return index;
  }

  node(name: string): number {
    const existing = this.nodeIndex.get(name);
    if (existing !== undefined) return existing;
    const index = this.add(NODE, name, 'node');
    this.nodeIndex.set(name, index);
    return index;
  }

  /** Says where the next device's node numbers are, before its setup(). */
  beginElement(numbers: Int32Array, start: number, count: number): void {
    this.terminalNumbers = numbers;
    this.terminalStart = start;
    this.terminalCount = count;
  }

  terminal(position: number): number {
    // The compiler gives each device at least the nodes its type needs: anything else is a bug here.
    if (!(position >= 0 && position < this.terminalCount)) throw new Error(`a device asked for node ${position + 1} of ${this.terminalCount}`);
    return this.terminalNumbers[this.terminalStart + position];
  }

  hasNode(name: string): boolean {
    return this.nodeIndex.has(name);
  }

  internalNode(owner: string, label: string): number {
    return this.add(INTERNAL, owner, label);
  }

  branch(owner: string): number {
    return this.add(BRANCH, owner, 'current');
  }

  slot(row: number, column: number): number {
    if (row === 0 || column === 0) return 0;
    const table = this.table;
    const mask = table.length - 1;
    let place = slotHash(row, column) & mask;
    for (let existing = table[place]; existing !== 0; existing = table[place]) {
      if (this.rows[existing] === row && this.columns[existing] === column) return existing;
      place = (place + 1) & mask;
    }
    const index = this.entryCount++;
    if (index >= this.rows.length) {
      this.rows = grown(this.rows, index + 1);
      this.columns = grown(this.columns, index + 1);
    }
    this.rows[index] = row;
    this.columns[index] = column;
    table[place] = index;
    if (this.entryCount > table.length * SLOT_TABLE_MAXIMUM_LOAD) this.rehash();
    return index;
  }

  private rehash(): void {
    const table = new Int32Array(this.table.length * 2);
    const mask = table.length - 1;
    for (let index = 1; index < this.entryCount; index++) {
      let place = slotHash(this.rows[index], this.columns[index]) & mask;
      while (table[place] !== 0) place = (place + 1) & mask;
      table[place] = index;
    }
    this.table = table;
  }

  get size(): number {
    return this.unknownCount;
  }

  get slotCount(): number {
    return this.entryCount;
  }

  /** Row (unknown number) of our slot k. */
  slotRow(k: number): number {
    return this.rows[k];
  }

  /** Column (unknown number) of our slot k. */
  slotColumn(k: number): number {
    return this.columns[k];
  }

  isBranch(i: number): boolean {
    return this.kinds[i] === BRANCH;
  }

  /** What unknown i is, built on demand (messages only). */
  unknown(i: number): Unknown | undefined {
    if (!(i >= 0 && i < this.unknownCount)) return undefined;
    return { kind: UNKNOWN_KINDS[this.kinds[i]], name: this.names[i], label: this.labels[i] };
  }
}

/** A well-mixed 31-bit hash of a matrix position (multiplicative hashing with odd constants, common practice). */
function slotHash(row: number, column: number): number {
  const mixed = Math.imul(row, 0x9e3779b1) ^ Math.imul(column + 0x7f4a7c15, 0x85ebca77);
  return (mixed ^ (mixed >>> 15)) >>> 0;
}

/** The power of two that holds `entries` within SLOT_TABLE_MAXIMUM_LOAD. */
function tableSizeFor(entries: number): number {
  let size = 16;
  while (size * SLOT_TABLE_MAXIMUM_LOAD < entries) size *= 2;
  return size;
}

/** A copy of `array` with room for at least `needed` items (doubling, so that growth stays linear overall). */
export function grown<T extends Uint8Array | Int32Array>(array: T, needed: number): T {
  const bigger = new (array.constructor as new (length: number) => T)(Math.max(needed, array.length * 2));
  bigger.set(array);
  return bigger;
}

/** The four slots [aa, ab, ba, bb] of a conductance between unknowns a and b (small arrays: cheaper than typed arrays per device). */
export function conductanceSlots(context: SetupContext, a: number, b: number): number[] {
  return [context.slot(a, a), context.slot(a, b), context.slot(b, a), context.slot(b, b)];
}

export function stampConductance(matrix: Float64Array, slots: readonly number[], conductance: number): void {
  matrix[slots[0]] += conductance;
  matrix[slots[1]] -= conductance;
  matrix[slots[2]] -= conductance;
  matrix[slots[3]] += conductance;
}

/**
 * The assembled equations of one compiled circuit: the devices, the matrix structure and
 * the work vectors, reused for every corner and every Newton iteration.
 */
export class CircuitSystem {
  readonly size: number;
  readonly linearDevices: Device[];
  readonly nonlinearDevices: Device[];
  /** Matrix values by our slot (slot 0 is the discard). */
  readonly stamps: Float64Array;
  readonly linearStamps: Float64Array;
  readonly rhs: Float64Array;
  readonly linearRhs: Float64Array;
  /** Diagonal slot of every voltage unknown (node and internal), for gmin stepping. */
  readonly voltageDiagonals: Int32Array;
  /** Diagonal slots of nodes with no DC path to ground, tied down by a negligible conductance. */
  readonly floatingDiagonals: Int32Array;
  /** 1 where the unknown is a branch current. */
  readonly isCurrent: Uint8Array;
  private linearFactor = Number.NaN;
  private workState: { solution: Float64Array; next: Float64Array } | undefined;

  constructor(
    private readonly builder: StructureBuilder,
    readonly devices: Device[],
    voltageDiagonals: Int32Array,
    floatingDiagonals: Int32Array,
    private readonly floatingConductance: number,
  ) {
    this.size = builder.size;
    this.linearDevices = devices.filter((d) => d.linear);
    this.nonlinearDevices = devices.filter((d) => !d.linear);
    this.stamps = new Float64Array(builder.slotCount);
    this.linearStamps = new Float64Array(builder.slotCount);
    this.rhs = new Float64Array(this.size);
    this.linearRhs = new Float64Array(this.size);
    this.voltageDiagonals = voltageDiagonals;
    this.floatingDiagonals = floatingDiagonals;
    this.isCurrent = new Uint8Array(this.size);
    for (let i = 0; i < this.size; i++) this.isCurrent[i] = builder.isBranch(i) ? 1 : 0;
  }

  /** What unknown i is (node, internal node or branch current, and whose). */
  unknown(i: number): Unknown | undefined {
    return this.builder.unknown(i);
  }

  /** Two solution-sized vectors for Newton, allocated once per compiled circuit and reused by every solve. */
  workVectors(): { solution: Float64Array; next: Float64Array } {
    this.workState ??= { solution: new Float64Array(this.size), next: new Float64Array(this.size) };
    return this.workState;
  }

  /** Call after devices were prepared for a new corner: the linear part is then reloaded. */
  invalidateLinear(): void {
    this.linearFactor = Number.NaN;
  }

  /** Loads every device at `context.solution` into `stamps` and `rhs`; the linear part comes from its cache. */
  assemble(context: LoadContext, diagonalGmin: number): void {
    if (this.linearFactor !== context.sourceFactor) {
      this.stamps.fill(0);
      this.rhs.fill(0);
      const linearContext: LoadContext = { ...context, matrix: this.stamps, rhs: this.rhs };
      for (const device of this.linearDevices) device.load(linearContext);
      for (let i = 0; i < this.floatingDiagonals.length; i++) this.stamps[this.floatingDiagonals[i]] += this.floatingConductance;
      this.linearStamps.set(this.stamps);
      this.linearRhs.set(this.rhs);
      this.linearFactor = context.sourceFactor;
    }
    this.stamps.set(this.linearStamps);
    this.rhs.set(this.linearRhs);
    context.matrix = this.stamps;
    context.rhs = this.rhs;
    const devices = this.nonlinearDevices;
    for (let i = 0; i < devices.length; i++) devices[i].load(context);
    if (diagonalGmin > 0) {
      const diagonals = this.voltageDiagonals;
      for (let i = 0; i < diagonals.length; i++) this.stamps[diagonals[i]] += diagonalGmin;
    }
    this.stamps[0] = 0;
    this.rhs[0] = 0;
  }

  /** A readable name for unknown i: `node out`, `the internal node of D1 (junction side of RS)`, `the current of V1`. */
  describe(i: number): string {
    const unknown = this.unknown(i);
    if (!unknown) return `unknown ${i}`;
    if (unknown.kind === 'node') return `node ${unknown.name}`;
    if (unknown.kind === 'internal') return `the internal node of ${unknown.name} (${unknown.label})`;
    return `the current of ${unknown.name}`;
  }
}
