// S: the voltage-controlled switch (SW model): RON or ROFF between n+ and n−,
// chosen from v(nc+, nc−) by the rule in switch-state.ts.
import type { NetlistDiagnostic, VoltageSwitch } from '../../netlist/circuit.js';
import { conductanceSlots, stampConductance, type CornerConditions, type Device, type DeviceResultSink, type LoadContext, type SetupContext } from '../mna.js';
import { SwitchState, switchParameters, type SwitchParameters } from './switch-state.js';

export class VoltageSwitchDevice implements Device {
  readonly linear = false;
  private nodes: number[] = [];
  private slots: number[] = [];
  private parameters: SwitchParameters = { threshold: 0, hysteresis: 0, onResistance: 1, offResistance: 1e12 };
  private readonly state: SwitchState;

  constructor(readonly element: VoltageSwitch) {
    this.state = new SwitchState(element.name, element.location, element.initiallyOn, true);
  }

  setup(context: SetupContext): void {
    this.nodes = [context.terminal(0), context.terminal(1), context.terminal(2), context.terminal(3)];
    this.slots = conductanceSlots(context, this.nodes[0], this.nodes[1]);
  }

  prepare(conditions: CornerConditions): void {
    this.parameters = switchParameters(this.element.model, 'vt', 'vh', conditions.gmin);
  }

  reset(): void {
    this.state.reset();
  }

  load(context: LoadContext): void {
    const x = context.solution;
    const control = x[this.nodes[2]] - x[this.nodes[3]];
    if (this.state.update(control, this.parameters, context.initializeJunctions)) context.nonConvergent++;
    stampConductance(context.matrix, this.slots, 1 / (this.state.on ? this.parameters.onResistance : this.parameters.offResistance));
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const conductance = 1 / (this.state.on ? this.parameters.onResistance : this.parameters.offResistance);
    const current = (solution[this.nodes[0]] - solution[this.nodes[1]]) * conductance;
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current, 0, 0]);
  }

  solveDiagnostics(): NetlistDiagnostic[] {
    return this.state.diagnostics();
  }
}
