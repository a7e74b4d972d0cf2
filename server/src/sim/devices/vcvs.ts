// E: voltage-controlled voltage source, v(n+, n−) = gain · v(nc+, nc−), with a branch current.
import type { Vcvs } from '../../netlist/circuit.js';
import type { CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';

export class VcvsDevice implements Device {
  readonly linear = true;
  branch = 0;
  private slots: number[] = [];
  private gain = 0;

  constructor(readonly element: Vcvs) {}

  setup(context: SetupContext): void {
    const [a, b, c, d] = [context.terminal(0), context.terminal(1), context.terminal(2), context.terminal(3)];
    const k = (this.branch = context.branch(this.element.name));
    this.slots = [context.slot(a, k), context.slot(b, k), context.slot(k, a), context.slot(k, b), context.slot(k, c), context.slot(k, d)];
  }

  prepare(conditions: CornerConditions): void {
    this.gain = this.element.gain * conditions.scaleOf(this.element.name);
  }

  load(context: LoadContext): void {
    const m = context.matrix;
    const s = this.slots;
    m[s[0]] += 1;
    m[s[1]] -= 1;
    m[s[2]] += 1;
    m[s[3]] -= 1;
    m[s[4]] -= this.gain;
    m[s[5]] += this.gain;
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const current = solution[this.branch];
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current, 0, 0]);
  }
}
