// When a diode is in reverse breakdown, for the rules. The solver's `region` marks a junction
// reversed near its BV whose current has left the leakage floor; that is a label of the
// operating point, not a verdict. A rule that calls a diode "driven into breakdown" needs the
// model's own definition of that point: BV is the reverse voltage at which the current is IBV
// (SPICE3 user's manual, Quarles 1989; ngspice 39 places its knee so that the current at −BV
// equals IBV). Below IBV the diode is only approaching its knee, which the derating margin
// speaks for.
import type { Diode } from '../netlist/circuit.js';
import type { DiodeOperatingPoint } from '../sim/types.js';

/** IBV when the model card gives none (SPICE3 user's manual, Quarles 1989: 1 mA; ngspice 39 the same). */
export const DEFAULT_BREAKDOWN_CURRENT = 1e-3;

/** The model's IBV (A). Not scaled by area or `m=`: ngspice 39 carries IBV at −BV whatever the area. */
export function breakdownCurrent(diode: Diode): number {
  const given = diode.model.params['ibv'];
  return given !== undefined && given > 0 ? given : DEFAULT_BREAKDOWN_CURRENT;
}

/** True when the diode is at or beyond its breakdown voltage: in the breakdown region, carrying at least IBV in reverse. */
export function inReverseBreakdown(diode: Diode, point: DiodeOperatingPoint): boolean {
  return point.region === 'breakdown' && -point.current >= breakdownCurrent(diode);
}
