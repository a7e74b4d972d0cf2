// H: current-controlled voltage source, v(n+, n−) = gain · i(controlling source), with a branch current.
import type { Ccvs } from '../../netlist/circuit.js';
import type { BindContext, CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';

export class CcvsDevice implements Device {
  readonly linear = true;
  branch = 0;
  private a = 0;
  private b = 0;
  private slots: number[] = [];
  private gain = 0;

  constructor(readonly element: Ccvs) {}

  setup(context: SetupContext): void {
    this.a = context.terminal(0);
    this.b = context.terminal(1);
    this.branch = context.branch(this.element.name);
  }

  bind(context: BindContext): void {
    const control = context.branchOf(this.element.controlSource) ?? 0;
    const s = context;
    const k = this.branch;
    this.slots = [s.slot(this.a, k), s.slot(this.b, k), s.slot(k, this.a), s.slot(k, this.b), s.slot(k, control)];
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
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const current = solution[this.branch];
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current]);
  }
}
