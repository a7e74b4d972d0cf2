// What a DC solve cannot see: a capacitor keeps its charge between the instants the
// quasi-static corners sample. For a capacitor beside a diode (a rectifier's filter, a clamp's
// coupling capacitor) pnlint solves the time-varying corners again with the capacitor held
// at its largest quasi-static voltage. That bounds the classic case from above: a half-wave
// rectifier with a filter capacitor sees about twice the peak in reverse (standard textbook
// result, e.g. Sedra & Smith). It is still quasi-static; the transient analysis will refine it.
import type { Capacitor, Circuit, VoltageSource } from '../netlist/circuit.js';
import type { SolveOptions, SolveResult } from '../sim/types.js';
import { freshName } from './context.js';
import type { CornerPlan } from './corners.js';
import type { Solver } from './solver.js';
import type { Topology } from './topology.js';

export interface HeldCharge {
  /** The capacitors held, with the voltage each was held at (first node minus second). */
  capacitors: { capacitor: Capacitor; voltage: number }[];
  /** The quasi-static corners, solved again with those capacitors held. */
  plans: CornerPlan[];
  results: SolveResult[];
}

export function solveWithHeldCharge(
  circuit: Circuit,
  topology: Topology,
  plans: readonly CornerPlan[],
  solves: readonly SolveResult[],
  solve: Solver,
  options: SolveOptions,
): HeldCharge | undefined {
  const quasiStatic = plans.filter((plan) => plan.quasiStatic);
  if (quasiStatic.length === 0) return undefined;
  const diodeNodes = new Set(circuit.elements.flatMap((element) => (element.type === 'D' ? element.nodes : [])));
  const held: { capacitor: Capacitor; voltage: number }[] = [];
  for (const element of circuit.elements) {
    if (element.type !== 'C') continue;
    const [first, second] = element.nodes as [string, string];
    if (!diodeNodes.has(first) && !diodeNodes.has(second)) continue; // no diode to charge it one way
    if (topology.rails.has(first) && topology.rails.has(second)) continue; // across a supply: the source holds it already
    let voltage = 0;
    for (const result of solves) {
      if (!result.ok) continue;
      const across = (result.point.nodes[first] ?? 0) - (result.point.nodes[second] ?? 0);
      if (Math.abs(across) > Math.abs(voltage)) voltage = across;
    }
    if (voltage !== 0) held.push({ capacitor: element, voltage });
  }
  if (held.length === 0) return undefined;
  let variant = circuit;
  for (const { capacitor, voltage } of held) {
    const source: VoltageSource = {
      type: 'V',
      name: freshName(variant, `Vheld_${capacitor.name.replace(/\./g, '_')}`),
      nodes: [capacitor.nodes[0]!, capacitor.nodes[1]!],
      dc: voltage,
      waveform: undefined,
      location: capacitor.location,
      instances: capacitor.instances,
    };
    variant = { ...variant, elements: variant.elements.map((element) => (element === capacitor ? source : element)) };
  }
  const results = solve(variant, quasiStatic.map((plan) => plan.corner), options);
  return { capacitors: held, plans: quasiStatic, results };
}
