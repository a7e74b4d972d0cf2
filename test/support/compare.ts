// Compares pnlint's DC operating point with ngspice's, and checks Kirchhoff's
// current law on pnlint's own branch currents. The tolerances are the issue's
// aim (issue 3: "1 µV + 1e-6 relative on voltages with ngspice at tight
// tolerances"); ngspice runs at reltol=1e-9, so its own error is far smaller.
import { GROUND, type Circuit, type Element } from '../../server/src/netlist/circuit.js';
import type { OperatingPoint } from '../../server/src/sim/types.js';
import { ngspiceBranchName, ngspiceNodeName } from './ngspice.js';

export interface Tolerance {
  absolute: number;
  relative: number;
}

/** Node voltages: 1 µV plus 1e-6 of the value (issue 3's aim). */
export const VOLTAGE_TOLERANCE: Tolerance = { absolute: 1e-6, relative: 1e-6 };

/**
 * Ammeter (diode) currents: 1 nA plus 1e-6 of the value. 1 nA is about what
 * a 1 µV difference drives through the 1 kΩ-scale resistors of these circuits,
 * so the current check is as strict as the voltage check, not stricter.
 */
export const CURRENT_TOLERANCE: Tolerance = { absolute: 1e-9, relative: 1e-6 };

/**
 * Kirchhoff's current law at a node: the sum of pnlint's branch currents
 * within 1 nA plus 1e-6 of the largest current at that node — the resolution
 * of the comparison with ngspice, so that a KCL error that the ngspice check
 * could see is also seen here.
 */
export const KIRCHHOFF_TOLERANCE: Tolerance = { absolute: 1e-9, relative: 1e-6 };

export function allowedDifference(reference: number, tolerance: Tolerance): number {
  return tolerance.absolute + tolerance.relative * Math.abs(reference);
}

export interface Disagreement {
  quantity: 'voltage' | 'current';
  /** ngspice's vector name. */
  name: string;
  ngspice: number;
  /** undefined when pnlint does not report it at all. */
  pnlint: number | undefined;
  allowed: number;
}

export interface Comparison {
  voltagesCompared: number;
  currentsCompared: number;
  disagreements: Disagreement[];
}

/** ngspice's vector for a branch current, e.g. `vam1#branch`, `v.x1.vam#branch`. */
const BRANCH_VECTOR = /#branch$/;

/**
 * Every value ngspice printed is looked up in pnlint's result: node voltages
 * by node name (case-insensitively: ngspice lower-cases names; subcircuit nodes
 * are `x1.a` in both), branch currents by element name (ngspice's `v.x1.vam`
 * is pnlint's `X1.VAM`). Any other vector (an internal node) is not compared.
 */
export function compareWithNgspice(reference: Map<string, number>, point: OperatingPoint): Comparison {
  const nodes = new Map<string, number>();
  for (const [name, voltage] of Object.entries(point.nodes)) nodes.set(ngspiceNodeName(name), voltage);
  const branches = new Map<string, number>();
  for (const [name, current] of Object.entries(point.branches)) branches.set(ngspiceBranchName(name), current);

  const comparison: Comparison = { voltagesCompared: 0, currentsCompared: 0, disagreements: [] };
  for (const [name, ngspice] of reference) {
    const isCurrent = BRANCH_VECTOR.test(name);
    if (!isCurrent && name.includes('#')) continue;
    const tolerance = isCurrent ? CURRENT_TOLERANCE : VOLTAGE_TOLERANCE;
    const pnlint = isCurrent ? branches.get(name) : nodes.get(name);
    const allowed = allowedDifference(ngspice, tolerance);
    if (isCurrent) comparison.currentsCompared++;
    else comparison.voltagesCompared++;
    if (pnlint === undefined || !(Math.abs(pnlint - ngspice) <= allowed)) {
      comparison.disagreements.push({ quantity: isCurrent ? 'current' : 'voltage', name, ngspice, pnlint, allowed });
    }
  }
  return comparison;
}

export function describeDisagreement(d: Disagreement): string {
  const unit = d.quantity === 'voltage' ? 'V' : 'A';
  if (d.pnlint === undefined) return `${d.name}: ngspice ${d.ngspice} ${unit}, missing from pnlint's result`;
  return `${d.name}: ngspice ${d.ngspice} ${unit}, pnlint ${d.pnlint} ${unit}, difference ${(d.pnlint - d.ngspice).toExponential(3)} (allowed ${d.allowed.toExponential(3)})`;
}

export interface KirchhoffResidual {
  node: string;
  /** Sum of the currents leaving the node through its elements (A). */
  residual: number;
  /** Largest single current at the node (A). */
  largest: number;
  allowed: number;
}

export interface KirchhoffCheck {
  residuals: KirchhoffResidual[];
  /** Nodes not checked because an element on them has no current in pnlint's result (e.g. a transistor without terminal currents). */
  skipped: { node: string; because: string }[];
}

/**
 * The current into `element` at each of its nodes: pnlint's per-terminal
 * currents when it reports them (transistors), else, for an element with one
 * port, its branch current in at its first node and out at its second.
 */
function terminalCurrents(element: Element, point: OperatingPoint): Map<string, number> | undefined {
  const currents = new Map<string, number>();
  const add = (node: string, value: number) => currents.set(node, (currents.get(node) ?? 0) + value);
  const terminals = point.terminals?.[element.name];
  if (terminals && terminals.length === element.nodes.length) {
    terminals.forEach((current, index) => add(element.nodes[index], current));
    return currents;
  }
  if (!PORT_ELEMENTS.has(element.type)) return undefined;
  const current =
    element.type === 'C' ? (point.branches[element.name] ?? 0) : (point.branches[element.name] ?? point.diodes[element.name]?.current);
  if (current === undefined) return undefined;
  add(element.nodes[0], current);
  add(element.nodes[1], -current);
  // The controlling pair of E, G and S draws no current.
  return currents;
}

const PORT_ELEMENTS = new Set(['R', 'C', 'L', 'V', 'I', 'E', 'F', 'G', 'H', 'S', 'W', 'D']);

/**
 * Kirchhoff's current law on pnlint's branch and terminal currents: at every
 * node the currents leaving through its elements sum to about zero. Ground is
 * not checked (it is the sum of all the others). A node touching an element
 * whose currents pnlint does not report is skipped, and listed as skipped.
 */
export function checkKirchhoff(circuit: Circuit, point: OperatingPoint): KirchhoffCheck {
  const sums = new Map<string, { sum: number; largest: number }>();
  const unknown = new Map<string, string>();
  for (const element of circuit.elements) {
    if (element.type === 'K') continue; // no current of its own
    const currents = terminalCurrents(element, point);
    if (!currents) {
      const because =
        element.type === 'Q' || element.type === 'M'
          ? `${element.name} is a transistor and pnlint's result has no terminal currents for it`
          : `${element.name} has no branch current in pnlint's result`;
      for (const node of element.nodes) if (!unknown.has(node)) unknown.set(node, because);
      continue;
    }
    for (const [node, current] of currents) {
      const entry = sums.get(node) ?? { sum: 0, largest: 0 };
      entry.sum += current;
      entry.largest = Math.max(entry.largest, Math.abs(current));
      sums.set(node, entry);
    }
  }
  const check: KirchhoffCheck = { residuals: [], skipped: [] };
  for (const [node, { sum, largest }] of sums) {
    if (node === GROUND) continue;
    const because = unknown.get(node);
    if (because) {
      check.skipped.push({ node, because });
      continue;
    }
    check.residuals.push({ node, residual: sum, largest, allowed: allowedDifference(largest, KIRCHHOFF_TOLERANCE) });
  }
  for (const [node, because] of unknown) {
    if (node !== GROUND && !sums.has(node)) check.skipped.push({ node, because });
  }
  return check;
}

export interface DiodeAmmeter {
  diode: string;
  ammeter: string;
  /** +1 when the ammeter's current is the diode's anode-to-cathode current, -1 when it is the opposite. */
  sign: 1 | -1;
}

/**
 * Pairs each diode with the 0 V ammeter source (named `VAM…`) that the
 * reference netlists put in series with it: the two share a node on which
 * nothing else sits.
 */
export function diodeAmmeters(circuit: Circuit): DiodeAmmeter[] {
  const elementsOnNode = new Map<string, Element[]>();
  for (const element of circuit.elements) {
    for (const node of new Set(element.nodes)) elementsOnNode.set(node, [...(elementsOnNode.get(node) ?? []), element]);
  }
  const pairs: DiodeAmmeter[] = [];
  for (const diode of circuit.elements) {
    if (diode.type !== 'D') continue;
    const [anode, cathode] = diode.nodes;
    for (const node of [anode, cathode]) {
      if (node === GROUND) continue;
      const others = (elementsOnNode.get(node) ?? []).filter((element) => element !== diode);
      const ammeter = others[0];
      const localName = ammeter?.name.split('.').pop() ?? '';
      if (others.length !== 1 || ammeter.type !== 'V' || ammeter.dc !== 0 || !/^vam/i.test(localName)) continue;
      // A source's current flows from its first node through it to its second (SPICE's convention).
      const intoAnode = node === anode && ammeter.nodes[1] === anode;
      const outOfCathode = node === cathode && ammeter.nodes[0] === cathode;
      pairs.push({ diode: diode.name, ammeter: ammeter.name, sign: intoAnode || outOfCathode ? 1 : -1 });
      break;
    }
  }
  return pairs;
}
