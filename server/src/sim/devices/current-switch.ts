// W: the current-controlled switch (CSW model): RON or ROFF between n+ and n−,
// chosen from the current through its controlling source by the rule in switch-state.ts.
import type { CurrentSwitch, NetlistDiagnostic } from '../../netlist/circuit.js';
import { conductanceSlots, stampConductance, type BindContext, type CornerConditions, type Device, type DeviceResultSink, type LoadContext, type SetupContext } from '../mna.js';
import { SwitchState, switchParameters, type SwitchParameters } from './switch-state.js';

export class CurrentSwitchDevice implements Device {
  readonly linear = false;
  private a = 0;
  private b = 0;
  private control = 0;
  private slots: number[] = [];
  private parameters: SwitchParameters = { threshold: 0, hysteresis: 0, onResistance: 1, offResistance: 1e12 };
  private readonly state: SwitchState;

  constructor(readonly element: CurrentSwitch) {
    this.state = new SwitchState(element.name, element.location, element.initiallyOn, false);
  }

  setup(context: SetupContext): void {
    this.a = context.terminal(0);
    this.b = context.terminal(1);
    this.slots = conductanceSlots(context, this.a, this.b);
  }

  bind(context: BindContext): void {
    this.control = context.branchOf(this.element.controlSource) ?? 0;
  }

  prepare(conditions: CornerConditions): void {
    this.parameters = switchParameters(this.element.model, 'it', 'ih', conditions.gmin);
  }

  reset(): void {
    this.state.reset();
  }

  load(context: LoadContext): void {
    const control = context.solution[this.control];
    if (this.state.update(control, this.parameters, context.initializeJunctions)) context.nonConvergent++;
    stampConductance(context.matrix, this.slots, 1 / (this.state.on ? this.parameters.onResistance : this.parameters.offResistance));
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const conductance = 1 / (this.state.on ? this.parameters.onResistance : this.parameters.offResistance);
    const current = (solution[this.a] - solution[this.b]) * conductance;
    sink.branch(this.element.name, current);
    sink.terminals(this.element.name, [current, -current]);
  }

  solveDiagnostics(): NetlistDiagnostic[] {
    return this.state.diagnostics();
  }
}
