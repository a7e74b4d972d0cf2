// The resistor: a conductance between its two nodes.
import type { Resistor } from '../../netlist/circuit.js';
import { type CornerConditions, type Device, type DeviceResultSink, type LoadContext, type SetupContext } from '../mna.js';

/** A resistance of exactly 0 Ω is solved as this many ohms, as ngspice 39 does (measured: 1 V across 0 Ω + 1 Ω draws 0.999001 A). */
export const ZERO_RESISTANCE_SUBSTITUTE = 1e-3;

export class ResistorDevice implements Device {
  readonly linear = true;
  private a = 0;
  private b = 0;
  // Matrix slots as fields, not an array: one object fewer per resistor.
  private slotAA = 0;
  private slotAB = 0;
  private slotBA = 0;
  private slotBB = 0;
  private conductance = 0;

  // Read once from the element: circuits mix element shapes, so property reads on them are slow in hot loops.
  private readonly name: string;
  private readonly resistance: number;

  constructor(readonly element: Resistor) {
    this.name = element.name;
    this.resistance = element.resistance;
  }

  setup(context: SetupContext): void {
    this.a = context.terminal(0);
    this.b = context.terminal(1);
    this.slotAA = context.slot(this.a, this.a);
    this.slotAB = context.slot(this.a, this.b);
    this.slotBA = context.slot(this.b, this.a);
    this.slotBB = context.slot(this.b, this.b);
  }

  prepare(conditions: CornerConditions): void {
    let resistance = this.resistance * conditions.scaleOf(this.name);
    if (resistance === 0) resistance = ZERO_RESISTANCE_SUBSTITUTE;
    // An infinite (or unreadable) resistance is an open circuit.
    this.conductance = Number.isFinite(resistance) ? 1 / resistance : 0;
  }

  load(context: LoadContext): void {
    const m = context.matrix;
    const g = this.conductance;
    m[this.slotAA] += g;
    m[this.slotAB] -= g;
    m[this.slotBA] -= g;
    m[this.slotBB] += g;
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const current = (solution[this.a] - solution[this.b]) * this.conductance;
    sink.branch(this.name, current);
    sink.terminals(this.name, [current, -current]);
  }
}
