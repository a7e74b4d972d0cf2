// The state rule shared by the voltage- and current-controlled switches, as ngspice 39
// applies it at a DC operating point: the first iteration takes the instance's ON/OFF
// flag (off when absent); later iterations switch on above threshold + hysteresis and off
// below threshold − hysteresis, holding their state in between. A negative hysteresis
// is ngspice's "switch on entering the band from below" variant. One difference between the
// two, measured on ngspice 39: S remembers its state from the last iteration, but W at DC
// remembers nothing (ngspice's current switch reads its previous state from the time step
// before, which at an operating point is "off"), so a W in its band is off whatever its flag.
import type { Model, NetlistDiagnostic, SourceLocation } from '../../netlist/circuit.js';
import { modelParameter } from './parameters.js';

/** A switch that flips this many times in one solve is frozen in its last state (ours: stops a relay that toggles its own control). */
export const MAXIMUM_SWITCH_CHANGES = 12;

const enum State {
  ReallyOff = 0,
  ReallyOn = 1,
  HysteresisOff = 2,
  HysteresisOn = 3,
}

export interface SwitchParameters {
  threshold: number;
  hysteresis: number;
  onResistance: number;
  offResistance: number;
}

/** SW / CSW model parameters; ngspice defaults: RON 1 Ω, ROFF 1/gmin, threshold and hysteresis 0. */
export function switchParameters(model: Model, thresholdName: 'vt' | 'it', hysteresisName: 'vh' | 'ih', gmin: number): SwitchParameters {
  return {
    threshold: modelParameter(model, [thresholdName], 0),
    hysteresis: modelParameter(model, [hysteresisName], 0),
    onResistance: Math.max(modelParameter(model, ['ron'], 1), 1e-12),
    offResistance: Math.max(modelParameter(model, ['roff'], 1 / gmin), 1e-12),
  };
}

export class SwitchState {
  private state = State.ReallyOff;
  private changes = 0;
  private frozen = false;
  private readonly warnings: NetlistDiagnostic[] = [];

  constructor(
    private readonly name: string,
    private readonly location: SourceLocation,
    private readonly initiallyOn: boolean | undefined,
    /** True for S (state kept between iterations), false for W (see above). */
    private readonly remembersState: boolean,
  ) {}

  reset(): void {
    this.changes = 0;
    this.frozen = false;
  }

  get on(): boolean {
    return this.state === State.ReallyOn || this.state === State.HysteresisOn;
  }

  /** Updates the state from the control value; returns true when it changed (the iteration is then not final). */
  update(control: number, parameters: SwitchParameters, first: boolean): boolean {
    const { threshold, hysteresis } = parameters;
    const previous = this.state;
    let next: State;
    if (first) {
      if (this.initiallyOn === true) {
        next = control > threshold + Math.abs(hysteresis) ? State.ReallyOn : State.HysteresisOn;
      } else {
        next = control < threshold - Math.abs(hysteresis) ? State.ReallyOff : State.HysteresisOff;
      }
      this.state = next;
      return false;
    }
    if (this.frozen) return false;
    const memory = this.remembersState ? previous : State.ReallyOff;
    if (hysteresis > 0) {
      if (control > threshold + hysteresis) next = State.ReallyOn;
      else if (control < threshold - hysteresis) next = State.ReallyOff;
      else next = memory;
    } else if (control > threshold - hysteresis) {
      next = State.ReallyOn;
    } else if (control < threshold + hysteresis) {
      next = State.ReallyOff;
    } else if (memory === State.HysteresisOff || memory === State.HysteresisOn) {
      next = memory;
    } else {
      next = memory === State.ReallyOn ? State.HysteresisOff : State.HysteresisOn;
    }
    if (next === previous) return false;
    const wasOn = this.on;
    this.state = next;
    if (wasOn === this.on) return false;
    this.changes++;
    if (this.changes >= MAXIMUM_SWITCH_CHANGES) {
      this.frozen = true;
      this.warnings.push({
        severity: 'warning',
        code: 'unsolved-circuit',
        message: `${this.name} keeps switching: its own output moves its control across the threshold; it was held ${this.on ? 'on' : 'off'} to solve the rest`,
        location: this.location,
      });
    }
    return true;
  }

  diagnostics(): NetlistDiagnostic[] {
    return this.warnings.length ? this.warnings.splice(0) : [];
  }
}
