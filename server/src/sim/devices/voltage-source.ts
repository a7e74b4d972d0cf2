// The independent voltage source, and the inductor, which at DC is a 0 V source:
// both add a branch current unknown and the equation v(n+) − v(n−) = value.
import type { Inductor, VoltageSource } from '../../netlist/circuit.js';
import type { CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';

export class VoltageSourceDevice implements Device {
  readonly linear = true;
  private a = 0;
  private b = 0;
  /** The branch current unknown: from n+ through the source to n− (SPICE's sign). */
  branch = 0;
  private slots: number[] = [];
  private value = 0;

  constructor(readonly element: VoltageSource | Inductor) {}

  setup(context: SetupContext): void {
    this.a = context.terminal(0);
    this.b = context.terminal(1);
    this.branch = context.branch(this.element.name);
    const k = this.branch;
    this.slots = [context.slot(this.a, k), context.slot(this.b, k), context.slot(k, this.a), context.slot(k, this.b)];
  }

  prepare(conditions: CornerConditions): void {
    if (this.element.type === 'L') {
      this.value = 0;
      return;
    }
    this.value = conditions.sourceValue(this.element.name, this.element.dc) * conditions.scaleOf(this.element.name);
  }

  load(context: LoadContext): void {
    const m = context.matrix;
    const s = this.slots;
    m[s[0]] += 1;
    m[s[1]] -= 1;
    m[s[2]] += 1;
    m[s[3]] -= 1;
    context.rhs[this.branch] += this.value * context.sourceFactor;
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const current = solution[this.branch];
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current]);
  }
}
