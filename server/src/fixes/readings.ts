// Reading the numbers a fix's title carries out of its re-check (so that the title states
// what the re-simulation found, not what the value was aimed at), and a few lookups that
// every fix shares.
import type { Circuit, Element } from '../netlist/circuit.js';
import type { CheckResult, CornerPlan, DiodeReport } from '../checks/index.js';
import type { SolveOptions } from '../sim/types.js';
import { nodeVoltage } from './probes.js';
import type { FixSession, Verified } from './verify.js';

/** Elements by lower-cased name, the first of each name (as a search from the top finds it), built once per circuit. */
const elementsByName = new WeakMap<Circuit, Map<string, Element>>();

export function elementNamed(circuit: Circuit, name: string): Element | undefined {
  let byName = elementsByName.get(circuit);
  if (!byName) {
    byName = new Map();
    for (const element of circuit.elements) {
      const key = element.name.toLowerCase();
      if (!byName.has(key)) byName.set(key, element);
    }
    elementsByName.set(circuit, byName);
  }
  return byName.get(name.toLowerCase());
}

/** A re-check's diode reports by lower-cased element name, built once per check (many fixes may share one re-check). */
const diodeReportsByName = new WeakMap<CheckResult, Map<string, DiodeReport>>();

function diodeReportOf(verified: Verified, name: string): DiodeReport | undefined {
  let byName = diodeReportsByName.get(verified.check);
  if (!byName) {
    byName = new Map();
    for (const report of verified.check.diodes) {
      const key = report.element.toLowerCase();
      if (!byName.has(key)) byName.set(key, report);
    }
    diodeReportsByName.set(verified.check, byName);
  }
  return byName.get(name.toLowerCase());
}

/** The factor a corner applies to an element's value (resistor tolerance corners). */
export function scaleAt(plan: CornerPlan, name: string): number {
  return plan.corner.scale?.[name] ?? 1;
}

/** The lowest factor any corner applies to an element's value. */
export function lowestScale(plans: readonly CornerPlan[], name: string): number {
  return Math.min(1, ...plans.map((plan) => scaleAt(plan, name)));
}

export function planNamed(plans: readonly CornerPlan[], name: string): CornerPlan | undefined {
  return plans.find((plan) => plan.corner.name === name) ?? plans[0];
}

export function solveOptionsOf(session: FixSession): SolveOptions {
  return session.options.cancellation ? { cancellation: session.options.cancellation } : {};
}

/** A diode's largest forward current and largest reverse voltage over the re-check's corners. */
export function diodeExtremes(verified: Verified, name: string): { forwardCurrent: number; reverseVoltage: number } | undefined {
  const report = diodeReportOf(verified, name);
  if (!report) return undefined;
  const points = report.corners.flatMap((corner) => (corner.point ? [corner.point] : []));
  if (points.length === 0) return undefined;
  return {
    forwardCurrent: Math.max(...points.map((point) => point.current)),
    reverseVoltage: Math.max(...points.map((point) => -point.voltage)),
  };
}

/** A diode's least and largest reverse current over the re-check's corners (a zener's range). */
export function reverseCurrentRange(verified: Verified, name: string): { least: number; largest: number } | undefined {
  const report = diodeReportOf(verified, name);
  const currents = (report?.corners ?? []).flatMap((corner) => (corner.point ? [-corner.point.current] : []));
  if (currents.length === 0) return undefined;
  return { least: Math.min(...currents), largest: Math.max(...currents) };
}

/** A resistor's largest power over the re-check's corners: its voltage times its current. */
export function resistorPower(verified: Verified, name: string): number | undefined {
  const resistor = elementNamed(verified.circuit, name);
  if (!resistor || resistor.type !== 'R') return undefined;
  let largest: number | undefined;
  for (const result of verified.check.solves) {
    if (!result.ok) continue;
    const first = nodeVoltage(result.point, resistor.nodes[0]!);
    const second = nodeVoltage(result.point, resistor.nodes[1]!);
    if (first === undefined || second === undefined) continue;
    const current = result.point.branches[resistor.name];
    // V²/R when the solver lists no branch current for a resistor.
    const power = current !== undefined ? Math.abs((first - second) * current) : ((first - second) ** 2) / resistor.resistance;
    largest = largest === undefined ? power : Math.max(largest, power);
  }
  return largest;
}
