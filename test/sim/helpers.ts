// Shared by the solver tests: netlist text → elaborated circuit → solved operating point.
import { elaborate, type Circuit } from '../../server/src/netlist/index.js';
import { compileCircuit, kirchhoffCurrentResiduals, solveOperatingPoint } from '../../server/src/sim/index.js';
import type { Corner, OperatingPoint, SolveOptions, SolveResult } from '../../server/src/sim/types.js';

const NO_FILES = { read: () => undefined, resolve: (_from: string, path: string) => path };

export function circuitOf(text: string): Circuit {
  const circuit = elaborate('/test/circuit.cir', text, NO_FILES);
  const errors = circuit.diagnostics.filter((d) => d.severity === 'error');
  if (errors.length) throw new Error(`test netlist does not elaborate: ${errors.map((e) => e.message).join('; ')}`);
  return circuit;
}

export function solveText(text: string, corner?: Corner, options?: SolveOptions): SolveResult {
  return solveOperatingPoint(compileCircuit(circuitOf(text)), corner, options);
}

/**
 * Solves and insists on success; the message carries the diagnostics otherwise. Every point
 * solved this way is also checked against Kirchhoff's current law (see expectKirchhoff) at
 * the circuit's own reltol (SPICE3 default 1e-3) of the largest current at each node, plus 1 nA.
 */
export function pointOf(text: string, corner?: Corner, options?: SolveOptions): OperatingPoint {
  const result = solveText(text, corner, options);
  if (!result.ok) throw new Error(`did not solve: ${result.diagnostics.map((d) => `${d.code}: ${d.message}`).join('; ')}`);
  const circuit = circuitOf(text);
  expectKirchhoff(text, result.point, circuit.options.reltol ?? 1e-3, 1e-9, false);
  return result.point;
}

/**
 * Kirchhoff's current law at every node, to `absolute` amperes plus `relative` of the largest
 * current meeting at that node (the Newton tolerances bound how far a converged solution may miss).
 */
export function expectKirchhoff(text: string, point: OperatingPoint, relative = 1e-6, absolute = 1e-9, requireNodes = true): void {
  const circuit = circuitOf(text);
  const residuals = kirchhoffCurrentResiduals(circuit, point);
  // Floating nodes are tied down by the solver's own shunt, which no element reports.
  for (const node of compileCircuit(circuit).floatingNodes) delete residuals[node];
  const scale = new Map<string, number>();
  for (const element of circuit.elements) {
    element.nodes.forEach((node, i) => {
      const current = Math.abs(point.terminals?.[element.name]?.[i] ?? 0);
      scale.set(node, Math.max(scale.get(node) ?? 0, current));
    });
  }
  const nodes = Object.keys(residuals);
  if (nodes.length === 0 && requireNodes) throw new Error('no node to check');
  for (const node of nodes) {
    const limit = absolute + relative * (scale.get(node) ?? 0);
    if (!(Math.abs(residuals[node]) <= limit)) throw new Error(`KCL fails at node ${node}: residual ${residuals[node]} A > ${limit} A`);
  }
}
