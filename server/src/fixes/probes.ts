// What a fix's value rests on, measured with the project's solver on modified copies of
// the circuit (never by re-deriving a device equation here): the circuit's Thevenin view
// of a diode (open-circuit voltage with the diode removed, short-circuit current with it
// shorted), a diode's own voltage at a given current, and how a diode's current held at a
// fixed voltage responds to the value of one resistor.
import type { Circuit, CurrentSource, Diode, Element, Resistor, VoltageSource } from '../netlist/circuit.js';
import { GROUND } from '../netlist/circuit.js';
import { freshName, replaceElement } from '../checks/context.js';
import { solveCorners } from '../sim/index.js';
import type { Corner, OperatingPoint, SolveOptions, SolveResult } from '../sim/types.js';

/**
 * A removed element is replaced by this resistance rather than deleted, so that its nodes
 * stay in the circuit (ours: far above any board-level resistance, so the open-circuit
 * voltage it reads is off by less than Rth / 1 TΩ).
 */
export const OPEN_CIRCUIT_RESISTANCE = 1e12;

/** The rest of the circuit seen from a diode's terminals at one corner, anode to cathode. */
export interface TheveninMeasurement {
  /** Open-circuit voltage with the diode removed (V). */
  openVoltage: number;
  /** Short-circuit current with the diode shorted, anode to cathode (A); infinite when an ideal source holds the terminals. */
  shortCircuitCurrent: number;
  /** openVoltage / shortCircuitCurrent (Ω); 0 when an ideal source holds the terminals. */
  resistance: number;
}

export function nodeVoltage(point: OperatingPoint, node: string): number | undefined {
  return node === GROUND ? 0 : point.nodes[node];
}

/** An element standing in for a removed one: a very large resistor across the same nodes. */
function openCircuit(circuit: Circuit, element: Element, base: string): Resistor {
  return { type: 'R', name: freshName(circuit, base), nodes: [element.nodes[0]!, element.nodes[1]!], resistance: OPEN_CIRCUIT_RESISTANCE, location: element.location, instances: element.instances };
}

/** An ideal voltage source across an element's first two nodes (first node +). */
function heldAt(circuit: Circuit, element: Element, voltage: number, base: string): VoltageSource {
  return { type: 'V', name: freshName(circuit, base), nodes: [element.nodes[0]!, element.nodes[1]!], dc: voltage, waveform: undefined, location: element.location, instances: element.instances };
}

const closesSourceLoop = (result: SolveResult | undefined) => result !== undefined && !result.ok && result.diagnostics.some((each) => each.code === 'unsolved-circuit');

/** Voc with the diode removed, Isc with it shorted, both solved at `corner`. */
export function measureThevenin(circuit: Circuit, diode: Diode, corner: Corner, options: SolveOptions): TheveninMeasurement | undefined {
  const open = openCircuit(circuit, diode, `Ropen_${diode.name.replace(/\./g, '_')}`);
  const [opened] = solveCorners(replaceElement(circuit, diode, open), [corner], options);
  if (!opened?.ok) return undefined;
  const anode = nodeVoltage(opened.point, diode.nodes[0]!);
  const cathode = nodeVoltage(opened.point, diode.nodes[1]!);
  if (anode === undefined || cathode === undefined) return undefined;
  const openVoltage = anode - cathode;

  const short = heldAt(circuit, diode, 0, `Vshort_${diode.name.replace(/\./g, '_')}`);
  const [shorted] = solveCorners(replaceElement(circuit, diode, short), [corner], options);
  if (closesSourceLoop(shorted)) return { openVoltage, shortCircuitCurrent: Number.POSITIVE_INFINITY, resistance: 0 };
  if (!shorted?.ok) return undefined;
  const shortCircuitCurrent = shorted.point.branches[short.name];
  if (shortCircuitCurrent === undefined) return undefined;
  const resistance = shortCircuitCurrent > 0 ? openVoltage / shortCircuitCurrent : Number.POSITIVE_INFINITY;
  return { openVoltage, shortCircuitCurrent, resistance };
}

/**
 * The diode's own voltage (anode to cathode) when it carries `current` (A; negative for a
 * reverse current, as a zener's), solved for the model alone driven by a current source.
 */
export function diodeVoltageAt(circuit: Circuit, diode: Diode, current: number, corner: Corner, options: SolveOptions): number | undefined {
  const place = { location: diode.location, instances: [] };
  // A current source drives from its first node through itself to its second.
  const nodes = current >= 0 ? [GROUND, 'anode'] : ['anode', GROUND];
  const source: CurrentSource = { type: 'I', name: 'Idrive', nodes, dc: Math.abs(current), waveform: undefined, ...place };
  const alone: Diode = { ...diode, name: 'Dalone', nodes: ['anode', GROUND], off: false, instances: [] };
  const probe: Circuit = {
    uri: circuit.uri,
    title: undefined,
    elements: [source, alone],
    models: new Map([[diode.model.name.toLowerCase(), diode.model]]),
    nodes: [GROUND, 'anode'],
    temperature: circuit.temperature,
    options: circuit.options,
    directives: [],
    files: new Map(),
    diagnostics: [],
  };
  const probeCorner: Corner = corner.temperature === undefined ? { name: 'diode alone' } : { name: 'diode alone', temperature: corner.temperature };
  const [result] = solveCorners(probe, [probeCorner], options);
  return result?.ok ? result.point.diodes['Dalone']?.voltage : undefined;
}

/**
 * With the diode held at `voltage` (anode to cathode) by an ideal source, the diode's current
 * as a function of one resistor's value R, at one corner. With the diode held, the rest is
 * linear (for a linear rest), so superposition gives I(R) = base + share · portVoltage / (R + portResistance).
 * The resistor is replaced by a test current source (a short would close a loop of ideal
 * sources wherever the supply and the held diode are ideal): at 0 A it gives `base` and the
 * port's open voltage, at `testCurrent` the port's resistance and the diode's share.
 */
export interface ResistorResponse {
  /** The diode's forward current (A) with the resistor open. */
  base: number;
  /** The share of the resistor's current (first node to second) that the diode's forward current gains: −1 for a plain feed into a zener's cathode. */
  share: number;
  /** The voltage across the resistor's terminals with it open, first node to second (V). */
  portVoltage: number;
  /** Resistance the resistor sees (Ω). */
  portResistance: number;
}

export function measureResistorResponse(
  circuit: Circuit,
  diode: Diode,
  voltage: number,
  resistor: Resistor,
  testCurrent: number,
  corners: readonly Corner[],
  options: SolveOptions,
): (ResistorResponse | undefined)[] {
  const held = heldAt(circuit, diode, voltage, `Vhold_${diode.name.replace(/\./g, '_')}`);
  const withHold = replaceElement(circuit, diode, held);
  // The open resistor keeps the port's nodes defined; the test source drives the port as the resistor would (first node to second).
  const open = openCircuit(withHold, resistor, `Ropen_${resistor.name.replace(/\./g, '_')}`);
  const withOpen = replaceElement(withHold, resistor, open);
  const test: CurrentSource = {
    type: 'I',
    name: freshName(withOpen, `Itest_${resistor.name.replace(/\./g, '_')}`),
    nodes: [resistor.nodes[0]!, resistor.nodes[1]!],
    dc: 0,
    waveform: undefined,
    location: resistor.location,
    instances: resistor.instances,
  };
  const variant: Circuit = { ...withOpen, elements: [...withOpen.elements, test] };
  const atZero = solveCorners(variant, [...corners], options);
  const atTest = solveCorners(variant, corners.map((corner) => ({ ...corner, sources: { ...(corner.sources ?? {}), [test.name]: testCurrent } })), options);
  return corners.map((_, index) => {
    const zero = atZero[index];
    const driven = atTest[index];
    if (!zero?.ok || !driven?.ok) return undefined;
    const portVoltage = portVoltageOf(zero.point, resistor);
    const drivenPortVoltage = portVoltageOf(driven.point, resistor);
    const base = zero.point.branches[held.name];
    const drivenCurrent = driven.point.branches[held.name];
    if (portVoltage === undefined || drivenPortVoltage === undefined || base === undefined || drivenCurrent === undefined) return undefined;
    const portResistance = (portVoltage - drivenPortVoltage) / testCurrent;
    // The share of the resistor's current that reaches the diode: 1 for a plain series feed.
    const share = (drivenCurrent - base) / testCurrent;
    return { base, share, portVoltage, portResistance };
  });
}

function portVoltageOf(point: OperatingPoint, element: Element): number | undefined {
  const first = nodeVoltage(point, element.nodes[0]!);
  const second = nodeVoltage(point, element.nodes[1]!);
  return first === undefined || second === undefined ? undefined : first - second;
}
