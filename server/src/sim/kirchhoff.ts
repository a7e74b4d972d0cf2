// Kirchhoff's current law over a solved operating point: the sum of the currents that
// the elements draw from each node. Used by tests to check every solved circuit.
import type { Circuit } from '../netlist/circuit.js';
import { GROUND } from '../netlist/circuit.js';
import type { OperatingPoint } from './types.js';

/**
 * Node name → net current (A) drawn from it by all elements, from the point's terminal
 * currents. Nodes touching an element without terminal currents (unmodeled) are left out.
 */
export function kirchhoffCurrentResiduals(circuit: Circuit, point: OperatingPoint): Record<string, number> {
  const sums = new Map<string, number>();
  const unknown = new Set<string>();
  for (const element of circuit.elements) {
    const currents = point.terminals?.[element.name];
    if (element.type === 'K') continue;
    element.nodes.forEach((node, i) => {
      if (node === GROUND || node.toLowerCase() === 'gnd') return;
      if (!currents) {
        unknown.add(node);
        return;
      }
      sums.set(node, (sums.get(node) ?? 0) + (currents[i] ?? 0));
    });
  }
  const residuals: Record<string, number> = {};
  for (const [node, sum] of sums) if (!unknown.has(node)) residuals[node] = sum;
  return residuals;
}
