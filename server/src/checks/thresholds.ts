// Thresholds the rules share. Each is a rule of thumb or a choice of ours, said beside it.
import type { CheckedDiode, DiodeAtCorner } from './context.js';

/** A diode carrying less than this forward current is not conducting (ours: well above gmin leakage, far below any indicator current). */
export const CONDUCTION_THRESHOLD = 10e-6;
/** A flipped diode carrying at least this would be doing a job: a plausible current (ours: a dim indicator LED still draws about 0.1 mA). */
export const PLAUSIBLE_CURRENT = 100e-6;
/** A diode carrying at least this through next to no resistance shorts a supply (ours; far above any indicator or signal current). */
export const SUPPLY_SHORT_CURRENT = 1;
/** Below this Thevenin resistance a diode's current is set by nothing but itself (ours). */
export const SUPPLY_SHORT_RESISTANCE = 1;
/**
 * The spread of an LED's forward voltage between parts and over temperature: about 0.1 V
 * (2 mV/K over 50 K; junction forward voltage falls about 2 mV per kelvin: common practice, no source).
 */
export const LED_FORWARD_VOLTAGE_SPREAD = 0.1;
/** An LED whose current would change by more than this fraction over that spread has no real current limit (ours). */
export const LED_CURRENT_CHANGE_LIMIT = 0.5;

/** The corner where `measure` is largest, with its value. */
export function worstCorner(diode: CheckedDiode, measure: (at: DiodeAtCorner) => number): { at: DiodeAtCorner; value: number } | undefined {
  let best: { at: DiodeAtCorner; value: number } | undefined;
  for (const at of diode.corners) {
    const value = measure(at);
    if (!best || value > best.value) best = { at, value };
  }
  return best;
}

export const forwardCurrent = (at: DiodeAtCorner) => at.point.current;
export const reverseVoltage = (at: DiodeAtCorner) => -at.point.voltage;
