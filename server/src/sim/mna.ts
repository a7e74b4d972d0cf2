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

/** Entries per matrix row searched linearly before a row gets a map (ours: a typical node has a handful). */
const SHORT_ROW_ENTRIES = 16;

/** Numbers the unknowns and collects the matrix structure while devices register. */
export class StructureBuilder implements SetupContext {
  readonly unknowns: Unknown[] = [{ kind: 'node', name: '0', label: 'ground' }];
  private readonly nodeIndex = new Map<string, number>();
  /** Our slot number → (row, column) as unknown numbers; slot 0 is the discard. */
  readonly slotRows: number[] = [0];
  readonly slotColumns: number[] = [0];
  /** Per row: (column, slot) pairs; rows beyond SHORT_ROW_ENTRIES also get a map. */
  private readonly rowEntries: number[][] = [];
  private readonly longRows = new Map<number, Map<number, number>>();

  constructor(nodeNames: readonly string[]) {
    this.nodeIndex.set('0', 0);
    for (const name of nodeNames) this.node(name);
  }

  node(name: string): number {
    const existing = this.nodeIndex.get(name);
    if (existing !== undefined) return existing;
    const index = this.unknowns.length;
    this.unknowns.push({ kind: 'node', name, label: 'node' });
    this.nodeIndex.set(name, index);
    return index;
  }

  hasNode(name: string): boolean {
    return this.nodeIndex.has(name);
  }

  internalNode(owner: string, label: string): number {
    const index = this.unknowns.length;
    this.unknowns.push({ kind: 'internal', name: owner, label });
    return index;
  }

  branch(owner: string): number {
    const index = this.unknowns.length;
    this.unknowns.push({ kind: 'branch', name: owner, label: 'current' });
    return index;
  }

  slot(row: number, column: number): number {
    if (row === 0 || column === 0) return 0;
    // Rows hold few entries: a short list of (column, slot) pairs, and a map once a row grows long.
    // Grow the row table densely (a sparse JS array would fall back to a slow dictionary).
    while (this.rowEntries.length <= row) this.rowEntries.push([]);
    const entries = this.rowEntries[row];
    if (entries.length <= 2 * SHORT_ROW_ENTRIES) {
      for (let i = 0; i < entries.length; i += 2) if (entries[i] === column) return entries[i + 1];
    } else {
      const existing = this.longRows.get(row)!.get(column);
      if (existing !== undefined) return existing;
    }
    const index = this.slotRows.length;
    this.slotRows.push(row);
    this.slotColumns.push(column);
    if (entries.length <= 2 * SHORT_ROW_ENTRIES) {
      entries.push(column, index);
      if (entries.length > 2 * SHORT_ROW_ENTRIES) {
        const map = new Map<number, number>();
        for (let i = 0; i < entries.length; i += 2) map.set(entries[i], entries[i + 1]);
        this.longRows.set(row, map);
      }
    } else {
      this.longRows.get(row)!.set(column, index);
      entries.push(column, index);
    }
    return index;
  }

  get size(): number {
    return this.unknowns.length;
  }

  get slotCount(): number {
    return this.slotRows.length;
  }

  /** Names of the netlist nodes with their unknown numbers. */
  nodeEntries(): [string, number][] {
    return [...this.nodeIndex.entries()];
  }
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
  readonly unknowns: Unknown[];
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

  constructor(
    builder: StructureBuilder,
    readonly devices: Device[],
    voltageDiagonals: Int32Array,
    floatingDiagonals: Int32Array,
    private readonly floatingConductance: number,
  ) {
    this.size = builder.size;
    this.unknowns = builder.unknowns;
    this.linearDevices = devices.filter((d) => d.linear);
    this.nonlinearDevices = devices.filter((d) => !d.linear);
    this.stamps = new Float64Array(builder.slotCount);
    this.linearStamps = new Float64Array(builder.slotCount);
    this.rhs = new Float64Array(this.size);
    this.linearRhs = new Float64Array(this.size);
    this.voltageDiagonals = voltageDiagonals;
    this.floatingDiagonals = floatingDiagonals;
    this.isCurrent = new Uint8Array(this.size);
    this.unknowns.forEach((u, i) => (this.isCurrent[i] = u.kind === 'branch' ? 1 : 0));
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
    const unknown = this.unknowns[i];
    if (!unknown) return `unknown ${i}`;
    if (unknown.kind === 'node') return `node ${unknown.name}`;
    if (unknown.kind === 'internal') return `the internal node of ${unknown.name} (${unknown.label})`;
    return `the current of ${unknown.name}`;
  }
}
