// F: current-controlled current source, i(n+ → n−) = gain · i(controlling source).
import type { Cccs } from '../../netlist/circuit.js';
import type { BindContext, CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';

export class CccsDevice implements Device {
  readonly linear = true;
  private a = 0;
  private b = 0;
  private control = 0;
  private slots: number[] = [];
  private gain = 0;

  constructor(readonly element: Cccs) {}

  setup(context: SetupContext): void {
    this.a = context.terminal(0);
    this.b = context.terminal(1);
  }

  bind(context: BindContext): void {
    this.control = context.branchOf(this.element.controlSource) ?? 0;
    this.slots = [context.slot(this.a, this.control), context.slot(this.b, this.control)];
  }

  prepare(conditions: CornerConditions): void {
    this.gain = this.element.gain * conditions.scaleOf(this.element.name);
  }

  load(context: LoadContext): void {
    context.matrix[this.slots[0]] += this.gain;
    context.matrix[this.slots[1]] -= this.gain;
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const current = this.gain * solution[this.control];
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current]);
  }
}
