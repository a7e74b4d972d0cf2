// The independent current source: its value flows from n+ through the source to n−.
import type { CurrentSource } from '../../netlist/circuit.js';
import type { CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';

export class CurrentSourceDevice implements Device {
  readonly linear = true;
  private a = 0;
  private b = 0;
  private value = 0;
  private factor = 1;

  constructor(readonly element: CurrentSource) {}

  setup(context: SetupContext): void {
    this.a = context.terminal(0);
    this.b = context.terminal(1);
  }

  prepare(conditions: CornerConditions): void {
    this.value = conditions.sourceValue(this.element.name, this.element.dc) * conditions.scaleOf(this.element.name);
  }

  load(context: LoadContext): void {
    const current = this.value * context.sourceFactor;
    this.factor = context.sourceFactor;
    context.rhs[this.a] -= current;
    context.rhs[this.b] += current;
  }

  report(_solution: Float64Array, sink: DeviceResultSink): void {
    const current = this.value * this.factor;
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current]);
  }
}
