// G: voltage-controlled current source, i(n+ → n−) = gain · v(nc+, nc−).
import type { Vccs } from '../../netlist/circuit.js';
import type { CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';

export class VccsDevice implements Device {
  readonly linear = true;
  private nodes: number[] = [];
  private slots: number[] = [];
  private gain = 0;

  constructor(readonly element: Vccs) {}

  setup(context: SetupContext): void {
    const [a, b, c, d] = [context.terminal(0), context.terminal(1), context.terminal(2), context.terminal(3)];
    this.nodes = [a, b, c, d];
    this.slots = [context.slot(a, c), context.slot(a, d), context.slot(b, c), context.slot(b, d)];
  }

  prepare(conditions: CornerConditions): void {
    this.gain = this.element.gain * conditions.scaleOf(this.element.name);
  }

  load(context: LoadContext): void {
    const m = context.matrix;
    const s = this.slots;
    m[s[0]] += this.gain;
    m[s[1]] -= this.gain;
    m[s[2]] -= this.gain;
    m[s[3]] += this.gain;
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const current = this.gain * (solution[this.nodes[2]] - solution[this.nodes[3]]);
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current, 0, 0]);
  }
}
