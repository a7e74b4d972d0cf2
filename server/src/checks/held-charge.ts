// What a DC solve cannot see: a capacitor keeps its charge between the instants the
// quasi-static corners sample. For each capacitor beside a diode (a rectifier's filter, a
// doubler's pump and reservoir, a clamp's coupling capacitor) pnlint finds the voltage it
// settles at over the sampled instants, then solves those instants again with every such
// capacitor holding that charge.
//
// The settled voltage is a charge balance: held at voltage V, the capacitor takes current
// i_k(V) at each instant k, and in steady state the charge it gains over a period equals the
// charge it loses, Σ i_k(V) = 0, each sampled instant counted as an equal share of the period.
// Capacitors charge one another (a doubler's pump capacitor charges its reservoir), so the
// balances are solved in turn, each with the others held, until none moves (a fixed point).
// Why a balance and not each capacitor's largest open-circuit voltage: a node left floating
// between two blocking diodes takes whatever voltage their leakage gives it, which means
// nothing; such an instant carries almost no current and so has no say in the balance.
// It bounds the textbook cases closely: about 2·Vm in reverse across a half-wave rectifier
// with a filter capacitor and across each diode of a half-wave voltage doubler (standard
// textbook result, e.g. Sedra & Smith), less the diode drops. It is still quasi-static: it
// ignores ripple, and the transient analysis will refine it.
import type { Capacitor, Circuit, Element, VoltageSource } from '../netlist/circuit.js';
import type { Corner, SolveOptions, SolveResult } from '../sim/types.js';
import { freshName } from './context.js';
import type { CornerPlan } from './corners.js';
import type { Solver } from './solver.js';
import type { Topology } from './topology.js';

/** Rounds of balancing every capacitor in turn before the estimate is taken as it stands (ours; a doubler settles in about five). */
export const MAXIMUM_HELD_CHARGE_ROUNDS = 24;
/** The held voltages have settled when a round moves none by more than this (V; ours, below the 3 figures a message shows). */
export const HELD_CHARGE_SETTLED = 0.002;
/** One balance is solved to this width (V; ours, a tenth of the settling step). */
export const HELD_CHARGE_RESOLUTION = 0.0002;
/** The first step in from the edge of a balance's bracket (V; ours, a small part of a diode drop). */
export const FIRST_BALANCE_STEP = 0.01;
/** Solves of one balance at most: growing steps across kilovolts, then halvings to HELD_CHARGE_RESOLUTION (ours). */
export const MAXIMUM_BALANCE_STEPS = 80;
/** Corner solves all balances may take together; past it the estimate is taken as it stands (ours, keeps a board under a second). */
export const MAXIMUM_HELD_CHARGE_SOLVES = 6000;
/** A held capacitor is named in messages only above this (V; ours: below it the charge changes no reverse voltage worth a digit). */
export const HELD_VOLTAGE_WORTH_NAMING = 0.01;

export interface HeldCapacitor {
  capacitor: Capacitor;
  /** First node minus second (V): across the corners' groups, the one of largest magnitude. */
  voltage: number;
}

export interface HeldCharge {
  /** The capacitors worth naming (held above HELD_VOLTAGE_WORTH_NAMING), with the voltage each was held at. */
  capacitors: HeldCapacitor[];
  /** Every capacitor held, named or not, with the voltage it was held at for each plan (plans[i] → held[i]). */
  held: Map<Capacitor, number>[];
  /** The quasi-static corners, solved again with those capacitors held. */
  plans: CornerPlan[];
  results: SolveResult[];
  /** True when every balance settled within the round and solve limits. */
  settled: boolean;
}

export function solveWithHeldCharge(
  circuit: Circuit,
  topology: Topology,
  plans: readonly CornerPlan[],
  _solves: readonly SolveResult[],
  solve: Solver,
  options: SolveOptions,
): HeldCharge | undefined {
  const quasiStatic = plans.filter((plan) => plan.quasiStatic);
  if (quasiStatic.length === 0) return undefined;
  const capacitors = heldCandidates(circuit, topology);
  if (capacitors.length === 0) return undefined;

  const balancer = new ChargeBalance(circuit, solve, options);
  const heldByPlan = new Map<CornerPlan, Map<Capacitor, number>>();
  const results = new Map<CornerPlan, SolveResult>();
  for (const group of groupsOfInstants(quasiStatic)) {
    const corners = group.map((plan) => plan.corner);
    const estimate = balancer.settle(capacitors, corners);
    const solved = solve(holding(circuit, estimate), corners, options);
    group.forEach((plan, index) => {
      heldByPlan.set(plan, estimate);
      results.set(plan, solved[index]!);
    });
  }

  const named = new Map<Capacitor, number>();
  for (const estimate of heldByPlan.values()) {
    for (const [capacitor, voltage] of estimate) {
      if (Math.abs(voltage) < HELD_VOLTAGE_WORTH_NAMING) continue;
      if (Math.abs(voltage) > Math.abs(named.get(capacitor) ?? 0)) named.set(capacitor, voltage);
    }
  }
  return {
    capacitors: capacitors.filter((capacitor) => named.has(capacitor)).map((capacitor) => ({ capacitor, voltage: named.get(capacitor)! })),
    held: quasiStatic.map((plan) => heldByPlan.get(plan)!),
    plans: quasiStatic,
    results: quasiStatic.map((plan) => results.get(plan)!),
    settled: balancer.settled,
  };
}

/**
 * Capacitors with a diode at one of their nodes (something to charge them one way), not
 * straight across a supply (the source holds those already), nearest the time-varying
 * sources first: charge flows outward from the source, so the balances settle in fewer rounds.
 */
function heldCandidates(circuit: Circuit, topology: Topology): Capacitor[] {
  const diodeNodes = new Set(circuit.elements.flatMap((element) => (element.type === 'D' ? element.nodes : [])));
  const candidates = circuit.elements.filter((element): element is Capacitor => {
    if (element.type !== 'C') return false;
    const [first, second] = element.nodes as [string, string];
    if (!diodeNodes.has(first) && !diodeNodes.has(second)) return false;
    return !(topology.rails.has(first) && topology.rails.has(second));
  });
  const distance = distanceFromVaryingSources(circuit, topology);
  const reach = (capacitor: Capacitor) => Math.min(...capacitor.nodes.map((node) => distance.get(node) ?? Number.POSITIVE_INFINITY));
  return candidates.map((capacitor, index) => ({ capacitor, index, reach: reach(capacitor) })).sort((a, b) => a.reach - b.reach || a.index - b.index).map((each) => each.capacitor);
}

/** Elements between each node and the nearest time-varying source, not passing through a rail (every node is one step from ground). */
function distanceFromVaryingSources(circuit: Circuit, topology: Topology): Map<string, number> {
  const neighbours = new Map<string, Set<string>>();
  for (const element of circuit.elements) {
    for (const node of element.nodes) {
      let set = neighbours.get(node);
      if (!set) neighbours.set(node, (set = new Set()));
      for (const other of element.nodes) if (other !== node) set.add(other);
    }
  }
  const distance = new Map<string, number>();
  let frontier: string[] = [];
  for (const element of circuit.elements) {
    if ((element.type === 'V' || element.type === 'I') && element.waveform && element.waveform.shape !== 'dc') {
      for (const node of element.nodes) if (!distance.has(node)) (distance.set(node, 0), frontier.push(node));
    }
  }
  for (let step = 1; frontier.length > 0; step++) {
    const next: string[] = [];
    for (const node of frontier) {
      if (step > 1 && topology.rails.has(node)) continue;
      for (const other of neighbours.get(node) ?? []) if (!distance.has(other)) (distance.set(other, step), next.push(other));
    }
    frontier = next;
  }
  return distance;
}

/**
 * The instants of one period: quasi-static corners that differ only in the levels of
 * time-varying sources. Corners that differ in anything else (a DC supply's extreme, resistor
 * tolerance, temperature) are other conditions, each with a balance of its own.
 */
function groupsOfInstants(plans: readonly CornerPlan[]): CornerPlan[][] {
  const groups = new Map<string, CornerPlan[]>();
  for (const plan of plans) {
    const fixed = plan.levels.filter((level) => !level.quasiStatic).map((level) => [level.source, level.value]);
    const key = JSON.stringify([fixed, plan.corner.scale ?? null, plan.corner.temperature ?? null]);
    const group = groups.get(key);
    if (group) group.push(plan);
    else groups.set(key, [plan]);
  }
  return [...groups.values()];
}

/** The circuit with each capacitor in `held` replaced by an ideal source at its voltage (first node +). */
function holding(circuit: Circuit, held: ReadonlyMap<Capacitor, number>): Circuit {
  if (held.size === 0) return circuit;
  const replacements = new Map<Element, VoltageSource>();
  for (const [capacitor, voltage] of held) {
    replacements.set(capacitor, {
      type: 'V',
      name: heldSourceName(circuit, capacitor),
      nodes: [capacitor.nodes[0]!, capacitor.nodes[1]!],
      dc: voltage,
      waveform: undefined,
      location: capacitor.location,
      instances: capacitor.instances,
    });
  }
  return { ...circuit, elements: circuit.elements.map((element) => replacements.get(element) ?? element) };
}

/** Per circuit, the name of the source that holds each capacitor. */
const sourceNames = new WeakMap<Circuit, Map<Capacitor, string>>();
/** The name of the source that holds `capacitor`: unused in the circuit and by any other held capacitor. */
function heldSourceName(circuit: Circuit, capacitor: Capacitor): string {
  let names = sourceNames.get(circuit);
  if (!names) sourceNames.set(circuit, (names = new Map()));
  let name = names.get(capacitor);
  if (name) return name;
  const used = new Set([...names.values()].map((each) => each.toLowerCase()));
  const base = `Vheld_${capacitor.name.replace(/\./g, '_')}`;
  name = freshName(circuit, base);
  for (let index = 2; used.has(name.toLowerCase()); index++) name = freshName(circuit, `${base}_${index}`);
  names.set(capacitor, name);
  return name;
}

/** Solves the balances in turn, counting the corner solves they take. */
class ChargeBalance {
  private solvesLeft = MAXIMUM_HELD_CHARGE_SOLVES;
  settled = true;

  constructor(
    private readonly circuit: Circuit,
    private readonly solve: Solver,
    private readonly options: SolveOptions,
  ) {}

  /** Each capacitor's held voltage over the instants `corners`, the others held at theirs. */
  settle(capacitors: readonly Capacitor[], corners: readonly Corner[]): Map<Capacitor, number> {
    // Not yet balanced is open, as in the DC solve: the first round charges outward from the source.
    const estimate = new Map<Capacitor, number>();
    for (let round = 0; round < MAXIMUM_HELD_CHARGE_ROUNDS; round++) {
      let largestMove = 0;
      for (const capacitor of capacitors) {
        const before = estimate.get(capacitor);
        const voltage = this.balance(capacitor, estimate, corners);
        if (voltage === undefined) {
          this.settled = false;
          if (before === undefined) continue; // never balanced: it stays open
          return estimate;
        }
        estimate.set(capacitor, voltage);
        largestMove = Math.max(largestMove, before === undefined ? Number.POSITIVE_INFINITY : Math.abs(voltage - before));
      }
      if (largestMove <= HELD_CHARGE_SETTLED) return estimate;
    }
    this.settled = false;
    return estimate;
  }

  /**
   * The voltage where `capacitor`'s charge balances over `corners`, with the capacitors in
   * `estimate` held. Undefined when a solve fails or the solve budget is spent.
   */
  private balance(capacitor: Capacitor, estimate: ReadonlyMap<Capacitor, number>, corners: readonly Corner[]): number | undefined {
    const others = new Map(estimate);
    others.delete(capacitor);
    const name = heldSourceName(this.circuit, capacitor);
    const charging = (voltage: number): number | undefined => {
      const held = this.solveAll(holding(this.circuit, new Map(others).set(capacitor, voltage)), corners);
      // The held source's current runs into the capacitor's first node: it charges the capacitor up.
      return held?.reduce((sum, point) => sum + (point.branches[name] ?? 0), 0);
    };
    // The balance lies between `below` (charging current > 0) and `above` (≤ 0). Far from it a
    // held voltage drives some diode hard forward (hundreds of amperes), where a solve may fail:
    // walk in from a known side in growing steps, then halve.
    let below = Number.NEGATIVE_INFINITY;
    let above = Number.POSITIVE_INFINITY;
    let side: 'below' | 'above' = 'below';
    // Settled before: the balance has moved a little, so walk from there towards it.
    const previous = estimate.get(capacitor);
    const current = previous === undefined ? undefined : charging(previous);
    const warm = previous !== undefined && current !== undefined;
    if (warm) {
      if (current > 0) below = previous;
      else above = previous;
      side = current > 0 ? 'below' : 'above';
    } else {
      // Open, it takes no current at an instant at its voltage there: the balance lies between these.
      const open = this.solveAll(holding(this.circuit, others), corners);
      if (!open) return undefined;
      const [first, second] = capacitor.nodes as [string, string];
      const across = open.map((point) => (point.nodes[first] ?? 0) - (point.nodes[second] ?? 0));
      below = Math.min(...across);
      above = Math.max(...across);
    }
    const steps = { below: FIRST_BALANCE_STEP, above: FIRST_BALANCE_STEP };
    const blocked = { below: false, above: false };
    let narrowed = false;
    for (let step = 0; step < MAXIMUM_BALANCE_STEPS && above - below > HELD_CHARGE_RESOLUTION; step++) {
      let voltage = side === 'below' ? below + steps[side] : above - steps[side];
      if (narrowed || voltage >= above || voltage <= below) {
        narrowed = true;
        voltage = (below + above) / 2;
      } else steps[side] *= 2;
      const current = charging(voltage);
      if (current === undefined) {
        if (narrowed) break; // within one step of the balance already
        blocked[side] = true;
        side = side === 'below' ? 'above' : 'below';
        if (blocked[side] || warm) return undefined;
        continue;
      }
      // The walker stepped over the balance: it lies within the last step.
      if ((current > 0) !== (side === 'below')) narrowed = true;
      if (current > 0) below = voltage;
      else above = voltage;
      const other = side === 'below' ? 'above' : 'below';
      if (!warm && !narrowed && !blocked[other]) side = other;
    }
    return Number.isFinite(below) && Number.isFinite(above) ? (below + above) / 2 : undefined;
  }

  private solveAll(circuit: Circuit, corners: readonly Corner[]) {
    if (this.solvesLeft < corners.length || this.options.cancellation?.isCancellationRequested) return undefined;
    this.solvesLeft -= corners.length;
    const results = this.solve(circuit, corners, this.options);
    const points = [];
    for (const result of results) {
      if (!result.ok) return undefined;
      points.push(result.point);
    }
    return points;
  }
}
