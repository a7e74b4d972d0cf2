// LED strings and the current sinks that drive them. A string is the LEDs that one series
// chain carries: the same branch current flows through each, so one fault is one finding for
// all of them. A current sink (or source) is a transistor at the end of that chain, collector
// or drain towards the LEDs, whose emitter or source resistor carries the current to a rail:
// while the transistor stays in its active region, that resistor sets the current (the
// current is about the voltage across it over its value) and a resistor in series with the
// LEDs only eats headroom until the transistor saturates.
import type { Bjt, Diode, Element, Mosfet, Resistor } from '../netlist/circuit.js';
import { mosfetParameters } from '../sim/devices/mosfet.js';
import type { OperatingPoint } from '../sim/types.js';
import type { CheckContext, CheckedDiode, DiodeAtCorner } from './context.js';
import { joinedAt, otherNode, resistivePathEnd, seriesString, type Topology } from './topology.js';

/**
 * A bipolar transistor with less than this from collector to emitter is saturated and no
 * longer sets its current (a small-signal transistor saturates at about 0.1–0.3 V: common
 * practice, no source).
 */
export const SATURATION_VOLTAGE = 0.3;

/** The emitter (source) resistor must carry at least this share of the transistor's emitter current to be the one that sets it (ours: the rest is a bias or feedback leg). */
export const SETTING_CURRENT_SHARE = 0.9;

/** The resistor is moved by this fraction to measure the current's response to it (ours: small against the response, large against solver tolerances). */
export const SENSITIVITY_STEP = 0.1;

/**
 * A resistor sets the current when a 1 % larger value lowers the current by at least this
 * many per cent (ours: the emitter resistor of a sink whose base is held gives about 1 %, one
 * that only trims a transistor driven by its base current much less).
 */
export const SETTING_SENSITIVITY = 0.5;

/** Each check's LED strings, by member: a string is walked once, not once per LED (rules ask for every LED). */
const stringsOfCheck = new WeakMap<CheckContext, Map<Element, CheckedDiode[]>>();

/** The LEDs in series with `diode` (itself included), in the order they sit in the chain. */
export function ledString(context: CheckContext, diode: CheckedDiode): CheckedDiode[] {
  let known = stringsOfCheck.get(context);
  if (!known) stringsOfCheck.set(context, (known = new Map()));
  const found = known.get(diode.element);
  if (found) return found;
  const parts = seriesString(context.topology, diode.element).parts;
  const string = parts.flatMap((part) => {
    const checked = part.type === 'D' ? context.diodeOf(part) : undefined;
    return checked && checked.kind === 'led' ? [checked] : [];
  });
  for (const member of string) known.set(member.element, string);
  return string;
}

/** What sets an LED string's current: the transistor and the resistor from its emitter or source to a rail. */
export interface CurrentSetter {
  transistor: Bjt | Mosfet;
  resistor: Resistor;
  /** The voltage across the resistor at the corner it was found at (V). */
  resistorVoltage: number;
  /** d ln I / d ln R of the LED current to the resistor's value, measured by a re-solve (about −1 for a sink with its base held). */
  sensitivity: number;
  /** The corners (by name) at which the transistor is in its active region. */
  activeCorners: string[];
}

/**
 * The transistor that carries the LED's series current with its collector (drain) towards the
 * LED, in its active region at `at`, whose emitter (source) resistor carries the current and
 * sets it. A bipolar transistor ends the chain (its base is a third current path); a MOSFET
 * draws no gate current, so it sits inside the chain, its source resistor after it.
 */
export function currentSetterOf(context: CheckContext, diode: CheckedDiode, at: DiodeAtCorner): CurrentSetter | undefined {
  const planIndex = context.plans.indexOf(at.plan);
  const solved = context.solves[planIndex];
  if (!solved?.ok) return undefined;
  const point = solved.point;
  for (const transistor of transistorsInString(context.topology, diode.element)) {
    if (!transistorActive(transistor, point)) continue;
    const resistor = emitterResistor(context, transistor, point);
    if (!resistor) continue;
    const sensitivity = currentSensitivity(context, diode, at, planIndex, resistor);
    if (sensitivity === undefined || sensitivity > -SETTING_SENSITIVITY) continue;
    const activeCorners = context.plans.flatMap((plan, index) => {
      const result = context.solves[index];
      return result?.ok && transistorActive(transistor, result.point) ? [plan.corner.name] : [];
    });
    return { transistor, resistor, resistorVoltage: Math.abs(voltageAcross(point, resistor) ?? 0), sensitivity, activeCorners };
  }
  return undefined;
}

/** The transistors the element's series current flows through collector (drain) first: MOSFETs in the chain, a bipolar transistor at either end. */
function transistorsInString(topology: Topology, element: Element): (Bjt | Mosfet)[] {
  const string = seriesString(topology, element);
  const found: (Bjt | Mosfet)[] = [];
  const [anodeSide, cathodeSide] = [string.parts.slice(0, string.parts.indexOf(element)), string.parts.slice(string.parts.indexOf(element) + 1)];
  // Walking away from the LED, the drain is met before the source.
  let node = element.nodes[1]!;
  for (const part of cathodeSide) {
    if (part.type === 'M' && part.nodes[0] === node) found.push(part);
    node = otherNode(part, node) ?? node;
  }
  node = element.nodes[0]!;
  for (const part of [...anodeSide].reverse()) {
    if (part.type === 'M' && part.nodes[0] === node) found.push(part);
    node = otherNode(part, node) ?? node;
  }
  for (const [index, end] of string.ends.entries()) {
    if (topology.rails.has(end)) continue;
    const last = index === 0 ? string.parts[0]! : string.parts[string.parts.length - 1]!;
    const others = (topology.connections.get(end) ?? []).filter((each) => each !== last);
    const transistor = others.length === 1 ? others[0]! : undefined;
    if (transistor?.type === 'Q' && transistor.nodes[0] === end) found.push(transistor);
  }
  return found;
}

/** "current sink" for an NPN or N-channel transistor (below its load), "current source" for a PNP or P-channel one (above it). */
export function sinkWord(transistor: Bjt | Mosfet): string {
  return transistor.model.type === 'PNP' || transistor.model.type === 'PMOS' ? 'current source' : 'current sink';
}

/** "emitter" for a bipolar transistor, "source" for a MOSFET. */
export function emitterWord(transistor: Bjt | Mosfet): string {
  return transistor.type === 'Q' ? 'emitter' : 'source';
}

/**
 * Whether the transistor is in its active region (a MOSFET: saturation) at this operating
 * point: a bipolar one with its collector at least SATURATION_VOLTAGE from its emitter, the
 * right way round; a MOSFET with its drain-source voltage at least its gate overdrive
 * (Shichman–Hodges level 1, SPICE3 user's manual, Quarles 1989; body effect left out). A
 * transistor that is off (no gate overdrive) is not active. Undefined when not solved.
 */
export function transistorActive(transistor: Element, point: OperatingPoint): boolean | undefined {
  if (transistor.type === 'Q') {
    const voltage = collectorEmitterVoltage(transistor, point);
    return voltage === undefined ? undefined : voltage >= SATURATION_VOLTAGE;
  }
  if (transistor.type === 'M') {
    const [drain, gate, source] = [0, 1, 2].map((index) => nodeAt(point, transistor.nodes[index]!));
    if (drain === undefined || gate === undefined || source === undefined) return undefined;
    const { polarity, thresholdVoltage } = mosfetParameters(transistor);
    const overdrive = polarity * (gate - source) - polarity * thresholdVoltage;
    return overdrive > 0 && polarity * (drain - source) >= overdrive;
  }
  return undefined;
}

/** Collector to emitter (V), positive the way the transistor conducts (emitter to collector for a PNP). */
export function collectorEmitterVoltage(transistor: Bjt, point: OperatingPoint): number | undefined {
  const collector = nodeAt(point, transistor.nodes[0]!);
  const emitter = nodeAt(point, transistor.nodes[2]!);
  if (collector === undefined || emitter === undefined) return undefined;
  const polarity = transistor.model.type === 'PNP' ? -1 : 1;
  return polarity * (collector - emitter);
}

/** Drain to source (V) in the MOSFET's own polarity. */
export function drainSourceVoltage(transistor: Mosfet, point: OperatingPoint): number | undefined {
  const drain = nodeAt(point, transistor.nodes[0]!);
  const source = nodeAt(point, transistor.nodes[2]!);
  if (drain === undefined || source === undefined) return undefined;
  return mosfetParameters(transistor).polarity * (drain - source);
}

function nodeAt(point: OperatingPoint, node: string): number | undefined {
  return node === '0' ? 0 : point.nodes[node];
}

function voltageAcross(point: OperatingPoint, element: Element): number | undefined {
  const first = nodeAt(point, element.nodes[0]!);
  const second = nodeAt(point, element.nodes[1]!);
  return first === undefined || second === undefined ? undefined : first - second;
}

/** The resistor at the emitter (source) that carries most of its current on to a rail. */
function emitterResistor(context: CheckContext, transistor: Bjt | Mosfet, point: OperatingPoint): Resistor | undefined {
  const emitter = transistor.nodes[2]!;
  if (context.topology.rails.has(emitter)) return undefined; // no degeneration: nothing but the transistor sets it
  const emitterCurrent = point.terminals?.[transistor.name]?.[2];
  if (emitterCurrent === undefined || emitterCurrent === 0) return undefined;
  for (const { element } of joinedAt(context.topology, emitter, transistor)) {
    if (element.type !== 'R') continue;
    const path = resistivePathEnd(context.topology, element, emitter);
    if (!path || !context.topology.rails.has(path.end)) continue;
    const voltage = voltageAcross(point, element);
    const current = point.branches[element.name] ?? (voltage !== undefined ? voltage / element.resistance : undefined);
    if (current === undefined) continue;
    if (Math.abs(current) >= SETTING_CURRENT_SHARE * Math.abs(emitterCurrent)) return element;
  }
  return undefined;
}

/** How the LED's current responds to the resistor's value at that corner: d ln I / d ln R, from one re-solve. */
function currentSensitivity(context: CheckContext, diode: CheckedDiode, at: DiodeAtCorner, planIndex: number, resistor: Resistor): number | undefined {
  const moved: Resistor = { ...resistor, resistance: resistor.resistance * (1 + SENSITIVITY_STEP) };
  const [result] = context.solveWithReplacements(new Map([[resistor, moved]]), [{ plan: planIndex, corner: at.plan.corner }]);
  const current = result?.ok ? result.point.diodes[diode.element.name]?.current : undefined;
  if (current === undefined || !(current > 0) || !(at.point.current > 0)) return undefined;
  return Math.log(current / at.point.current) / Math.log(1 + SENSITIVITY_STEP);
}

/** The diode elements of a string, for messages: "D1, D2, D3". */
export function namesOf(diodes: readonly { element: Diode }[]): string {
  return diodes.map((diode) => diode.element.name).join(', ');
}
