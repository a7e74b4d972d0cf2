// The resistor: a conductance between its two nodes.
import type { Resistor } from '../../netlist/circuit.js';
import { conductanceSlots, stampConductance, type CornerConditions, type Device, type DeviceResultSink, type LoadContext, type SetupContext } from '../mna.js';

/**
 * A zero resistance is solved as this many ohms (ngspice 39 does the same with a warning,
 * treating 0 Ω as 1 mΩ; from memory of its resistor setup).
 */
export const MINIMUM_RESISTANCE = 1e-3;

export class ResistorDevice implements Device {
  readonly linear = true;
  private a = 0;
  private b = 0;
  private slots = new Int32Array(4);
  private conductance = 0;

  constructor(readonly element: Resistor) {}

  setup(context: SetupContext): void {
    this.a = context.node(this.element.nodes[0]);
    this.b = context.node(this.element.nodes[1]);
    this.slots = conductanceSlots(context, this.a, this.b);
  }

  prepare(conditions: CornerConditions): void {
    let resistance = this.element.resistance * conditions.scaleOf(this.element.name);
    if (!Number.isFinite(resistance) || Math.abs(resistance) < MINIMUM_RESISTANCE) resistance = resistance < 0 ? -MINIMUM_RESISTANCE : MINIMUM_RESISTANCE;
    this.conductance = 1 / resistance;
  }

  load(context: LoadContext): void {
    stampConductance(context.matrix, this.slots, this.conductance);
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const current = (solution[this.a] - solution[this.b]) * this.conductance;
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current]);
  }
}
