// What kind of diode a model is, when no directive says: from its forward voltage at a few
// milliamperes (solved, not re-derived: the diode's physics lives in the solver), from its
// BV together with how the circuit uses it, then from its name. The reason is kept, for the
// hover and `pnlint op`, so that the user can correct it with `kind=`.
import type { Circuit, CurrentSource, Diode } from '../netlist/circuit.js';
import type { SolveOptions } from '../sim/types.js';
import { formatQuantity } from '../units.js';
import { partsInParallel } from './ratings.js';
import type { Solver } from './solver.js';
import type { DiodeKind } from './vocabulary.js';

/** "A few mA": the current at which forward voltages are compared (common practice, no source). */
export const CLASSIFICATION_CURRENT = 5e-3;
/**
 * Above this forward voltage at a few mA a diode is an LED. Visible LEDs drop about 1.8 V (red)
 * to over 3 V (blue, white), infrared emitters about 1.1–1.4 V; a silicon junction about 0.7 V
 * (product.md; common practice, no source). 1 V keeps infrared emitters among the LEDs with
 * room to spare above silicon.
 */
export const LED_FORWARD_VOLTAGE_THRESHOLD = 1.0;
/** Below this a diode is a Schottky (product.md; Schottky about 0.4 V, silicon about 0.7 V: common practice, no source). */
export const SCHOTTKY_FORWARD_VOLTAGE_THRESHOLD = 0.45;
/** A BV below this that the circuit drives into breakdown marks a zener ("tens of volts or less", product.md; rectifiers start at 50 V, common practice). */
export const ZENER_LARGEST_BREAKDOWN = 50;

export interface Classification {
  kind: DiodeKind;
  reason: string;
  /** The solved forward voltage at CLASSIFICATION_CURRENT, when the probe solved. */
  forwardVoltage?: number;
}

const NAME_HINTS: readonly { pattern: RegExp; kind: DiodeKind; words: string }[] = [
  { pattern: /led/i, kind: 'led', words: 'LED' },
  { pattern: /zen|^dz|^z\d/i, kind: 'zener', words: 'zener' },
  { pattern: /schottky|^sch/i, kind: 'schottky', words: 'Schottky' },
  { pattern: /rect|bridge/i, kind: 'rectifier', words: 'rectifier' },
];

/** Solves the model alone, forced by a current source, and reads its forward voltage. */
export function probeForwardVoltage(
  circuit: Circuit,
  diode: Diode,
  solve: Solver,
  options: SolveOptions | undefined,
): number | undefined {
  const place = { location: diode.location, instances: [] };
  const source: CurrentSource = { type: 'I', name: 'Iprobe', nodes: ['0', 'anode'], dc: CLASSIFICATION_CURRENT, waveform: undefined, ...place };
  // One part of an `m=` line: the forward voltage at a few mA is a property of the part.
  const probe: Diode = { ...diode, name: 'Dprobe', nodes: ['anode', '0'], off: false, instances: [], area: diode.area / partsInParallel(diode), multiplier: 1 };
  const probeCircuit: Circuit = {
    uri: circuit.uri,
    title: undefined,
    elements: [source, probe],
    models: new Map([[diode.model.name.toLowerCase(), diode.model]]),
    nodes: ['0', 'anode'],
    temperature: circuit.temperature,
    options: circuit.options,
    directives: [],
    files: new Map(),
    diagnostics: [],
  };
  const [result] = solve(probeCircuit, [{ name: 'classification' }], options);
  if (!result || !result.ok) return undefined;
  return result.point.diodes['Dprobe']?.voltage;
}

export function classifyDiode(diode: Diode, forwardVoltage: number | undefined, usedInBreakdown: boolean): Classification {
  const atCurrent = `at ${formatQuantity(CLASSIFICATION_CURRENT, 'A')}`;
  const model = diode.model;
  const base = forwardVoltage === undefined ? {} : { forwardVoltage };
  if (forwardVoltage !== undefined) {
    const vf = formatQuantity(forwardVoltage, 'V');
    if (forwardVoltage > LED_FORWARD_VOLTAGE_THRESHOLD) {
      return { kind: 'led', reason: `model ${model.name} has a forward voltage of ${vf} ${atCurrent}, above ${LED_FORWARD_VOLTAGE_THRESHOLD} V: an LED`, ...base };
    }
    if (forwardVoltage < SCHOTTKY_FORWARD_VOLTAGE_THRESHOLD) {
      return { kind: 'schottky', reason: `model ${model.name} has a forward voltage of ${vf} ${atCurrent}, below ${SCHOTTKY_FORWARD_VOLTAGE_THRESHOLD} V: a Schottky diode`, ...base };
    }
  }
  const hint = NAME_HINTS.find((each) => each.pattern.test(model.name));
  if (hint && hint.kind !== 'zener') {
    return { kind: hint.kind, reason: `the model's name ${model.name} suggests a ${hint.words} diode`, ...base };
  }
  const breakdown = model.params['bv'];
  if (breakdown !== undefined && breakdown < ZENER_LARGEST_BREAKDOWN && (usedInBreakdown || hint?.kind === 'zener')) {
    const why = usedInBreakdown ? 'and the circuit drives it into breakdown' : `and its name ${model.name} suggests a zener`;
    return { kind: 'zener', reason: `model ${model.name} has BV = ${formatQuantity(breakdown, 'V')} ${why}: a zener diode`, ...base };
  }
  if (hint) return { kind: hint.kind, reason: `the model's name ${model.name} suggests a ${hint.words} diode`, ...base };
  const vf = forwardVoltage === undefined ? '' : ` (forward voltage ${formatQuantity(forwardVoltage, 'V')} ${atCurrent})`;
  return {
    kind: 'signal',
    reason: `model ${model.name} looks like a silicon junction diode${vf} with no other hint: taken as a small-signal diode (say kind=rectifier in a rating directive for a power rectifier)`,
    ...base,
  };
}
