// What every rule reads: the circuit, its corners and their solutions, each diode's kind,
// ratings and operating points, the topology, and a way to ask for counterfactual solves
// and for fixes. Built once per check by index.ts.
import type { Circuit, Diode, Element, SourceLocation, VoltageSource } from '../netlist/circuit.js';
import type { Finding, Fix } from '../findings.js';
import type { Settings } from '../settings.js';
import type { Corner, DiodeOperatingPoint, SolveResult } from '../sim/types.js';
import type { CornerPlan } from './corners.js';
import type { FixRequest, TheveninView } from './fix-request.js';
import type { ValueSource } from './provenance.js';
import type { DiodeRatings, ResistorRatings } from './ratings.js';
import { unusedName, type Regions } from './regions.js';
import type { Topology } from './topology.js';
import type { DiodeKind } from './vocabulary.js';

export interface DiodeAtCorner {
  plan: CornerPlan;
  point: DiodeOperatingPoint;
}

export interface CheckedDiode {
  element: Diode;
  kind: DiodeKind;
  /** Why it is that kind: "from directive on line 3", "forward voltage 1.92 V at 5 mA …". */
  kindReason: string;
  kindSource: ValueSource;
  ratings: DiodeRatings;
  /** Its operating point at every corner that solved. */
  corners: DiodeAtCorner[];
  /** Its operating point at the quasi-static corners with the capacitors beside diodes holding their charge. */
  heldCharge: DiodeAtCorner[];
  /** Why it was not checked at all (unsolved, next to an unmodeled element); rules skip it. */
  unchecked?: string;
  /** The honesty rule that reports `unchecked`: unknown-model, unmodeled-element or unsolved-circuit. */
  uncheckedRule?: 'unknown-model' | 'unmodeled-element' | 'unsolved-circuit';
}

export interface CheckContext {
  circuit: Circuit;
  settings: Settings;
  plans: readonly CornerPlan[];
  solves: readonly SolveResult[];
  diodes: readonly CheckedDiode[];
  resistors: ReadonlyMap<string, ResistorRatings>;
  topology: Topology;
  /** True when the circuit has capacitors or inductors, whose dynamics a DC solve leaves out. */
  hasReactiveElements: boolean;
  /** The capacitors held at their charge for `heldCharge` corners (names, with the voltage held). */
  heldCapacitors: { name: string; voltage: number }[];
  /** Solves a modified copy of the circuit at the given corners (a diode flipped, a probe inserted). */
  solveVariant(variant: Circuit, plans: readonly CornerPlan[]): SolveResult[];
  /**
   * Solves the circuit with some elements replaced (diodes flipped, a probe in a diode's place),
   * at corners of the base plans: `corner` is the full circuit's corner, `plan` the index of the
   * base plan whose solve holds the rails. Only the regions the replaced elements reach are
   * solved (regions.ts). Results line up with `corners`; undefined where nothing was solved
   * (the base corner did not solve, or the counterfactual budget is spent).
   */
  solveWithReplacements(replacements: ReadonlyMap<Element, Element>, corners: readonly { plan: number; corner: Corner }[]): (SolveResult | undefined)[];
  /** The rest of the circuit seen from a diode at one corner; undefined when it cannot be worked out. */
  theveninView(diode: CheckedDiode, at: DiodeAtCorner): TheveninView | undefined;
  /** Fixes for a finding, from the fix provider (verified by re-simulation there); records the request. */
  fixesFor(request: FixRequest, finding: Finding): Fix[];
  /** The first element of that name (exactly as written). */
  elementNamed(name: string): Element | undefined;
  /** The checked diode of a diode element, if it is one. */
  diodeOf(element: Element): CheckedDiode | undefined;
  /** Every resistor with a tolerance above zero (directive, pnlint.json or setting), by name. */
  resistorTolerances: ReadonlyMap<string, number>;
  /** The parts of the circuit that cannot see each other across the supply rails; undefined when the circuit does not fall apart. */
  regions: Regions | undefined;
  /** The circuit's element names, lower-cased (for names that collide with none). */
  takenNames: ReadonlySet<string>;
}

/** The probe step for a Thevenin view: small against a diode's forward voltage, large against solver tolerances (ours). */
export const THEVENIN_PROBE_STEP = 0.02;

/** The circuit with one element replaced (same nodes list: no new nodes). */
export function replaceElement(circuit: Circuit, original: Element, replacement: Element): Circuit {
  return { ...circuit, elements: circuit.elements.map((element) => (element === original ? replacement : element)) };
}

/** A name no element of the circuit has. */
export function freshName(circuit: Circuit, base: string): string {
  const taken = new Set(circuit.elements.map((element) => element.name.toLowerCase()));
  let name = base;
  for (let index = 2; taken.has(name.toLowerCase()); index++) name = `${base}${index}`;
  return name;
}

/**
 * The diode replaced by an ideal voltage source across its terminals (anode +), for probing the
 * rest of the circuit. `taken`: the circuit's lower-cased element names, when already at hand.
 */
export function probeSource(circuit: Circuit, diode: Diode, voltage: number, taken?: ReadonlySet<string>): VoltageSource {
  const base = `Vprobe_${diode.name.replace(/\./g, '_')}`;
  return {
    type: 'V',
    name: taken ? unusedName(base, taken) : freshName(circuit, base),
    nodes: [diode.nodes[0]!, diode.nodes[1]!],
    dc: voltage,
    waveform: undefined,
    location: diode.location,
    instances: diode.instances,
  };
}

/** "at V1 = 5.25 V (max corner)", with a quasi-static note when the corner is an instant of a waveform. */
export function atCorner(plan: CornerPlan): string {
  const where = plan.corner.name === 'nominal' ? 'at nominal values' : `at ${plan.description}`;
  return plan.quasiStatic ? `${where}, quasi-static` : where;
}

export function relatedElement(element: Element, message: string): { location: SourceLocation; message: string } {
  return { location: element.location, message };
}
