// The SPICE level-1 diode (SPICE3 user's manual, Quarles 1989; ngspice 39 manual, diode
// chapter): Shockley junction with emission coefficient, series resistance on an internal
// node, reverse breakdown with the knee placed so that the current at −BV equals IBV,
// saturation-current temperature law with EG and XTI, gmin across the junction, and ngspice
// 39's floor under a card's saturation current (MINIMUM_SATURATION_CURRENT).
// CJO, VJ, M, TT, FC are read and kept for the transient analysis; they do nothing at DC.
import type { Diode as DiodeElement, NetlistDiagnostic } from '../../netlist/circuit.js';
import { DEFAULT_TEMPERATURE_CELSIUS, ZERO_CELSIUS_IN_KELVIN } from '../constants.js';
import type { ConvergenceContext, CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';
import { criticalVoltage, junctionLimiting, limitJunction, limitedExp, limitedExpSlope, thermalVoltage } from './junction.js';
import { cachedByModel, isGiven, modelParameter } from './parameters.js';

/** A diode is in breakdown when its junction is reversed beyond this fraction of BV… (ours, no source) */
export const BREAKDOWN_VOLTAGE_FRACTION = 0.9;
/** …and its reverse current exceeds the saturation current by this factor, i.e. breakdown current dominates leakage (ours, no source). */
export const BREAKDOWN_CURRENT_OVER_SATURATION = 10;
/**
 * Within ± this many emission thermal voltages (N·kT/q) of zero bias the junction is `off`:
 * the same 3·vte edge at which SPICE3 switches its reverse formula (Quarles 1989).
 */
export const OFF_BIAS_THERMAL_VOLTAGES = 3;
const NO_DIAGNOSTICS: NetlistDiagnostic[] = [];
/**
 * The smallest saturation current that ngspice 39 gives a diode model by default: a card's IS
 * below it (LED cards reach 1e-30 to 1e-40) is raised to it, before the area and temperature
 * scaling. Found by experiment with ngspice 39: `showmod` prints IS = 1e-28 for a card with
 * IS=1e-30, and its operating points follow Shockley with IS = 1e-28 (to 1e-11 V over IS
 * 1e-29…1e-40, N 1…4, RS 0 and 5 Ω, −40…125 °C). Its `.options epsmin` sets the floor
 * instead (showmod then prints max(IS, epsmin), for epsmin 1e-40, 1e-26 and 0 alike); the
 * corner conditions carry it (minimumSaturationCurrent). A rule of that engine, not an
 * inaccuracy: its users compare with it, so pnlint follows it.
 */
export const MINIMUM_SATURATION_CURRENT = 1e-28;
/** ngspice's bisection of the breakdown knee stops after this many iterations (ngspice 39 diotemp.c). */
const BREAKDOWN_KNEE_ITERATIONS = 25;

export interface DiodeParameters {
  /** IS as the model card writes it; the solver uses effectiveSaturationCurrent of it. */
  saturationCurrent: number;
  emissionCoefficient: number;
  seriesResistance: number;
  /** Infinity when the model gives no BV. */
  breakdownVoltage: number;
  breakdownCurrent: number;
  breakdownEmissionCoefficient: number;
  forwardKneeCurrent: number;
  activationEnergy: number;
  saturationCurrentExponent: number;
  nominalTemperatureCelsius: number | undefined;
  junctionCapacitance: number;
  junctionPotential: number;
  gradingCoefficient: number;
  transitTime: number;
  depletionCapacitanceCoefficient: number;
}

/** The model card's parameters with SPICE defaults (SPICE3 user's manual, ngspice 39 manual). */
export function diodeParameters(element: DiodeElement): DiodeParameters {
  const model = element.model;
  const emissionCoefficient = modelParameter(model, ['n'], 1);
  return {
    saturationCurrent: modelParameter(model, ['is', 'js'], 1e-14),
    emissionCoefficient,
    seriesResistance: modelParameter(model, ['rs'], 0),
    breakdownVoltage: isGiven(model, ['bv']) ? Math.abs(modelParameter(model, ['bv'], Infinity)) : Infinity,
    breakdownCurrent: modelParameter(model, ['ibv'], 1e-3),
    breakdownEmissionCoefficient: modelParameter(model, ['nbv'], emissionCoefficient),
    forwardKneeCurrent: modelParameter(model, ['ikf', 'ik'], 0),
    activationEnergy: Math.max(0.1, modelParameter(model, ['eg'], 1.11)),
    saturationCurrentExponent: modelParameter(model, ['xti'], 3),
    nominalTemperatureCelsius: isGiven(model, ['tnom']) ? modelParameter(model, ['tnom'], DEFAULT_TEMPERATURE_CELSIUS) : undefined,
    junctionCapacitance: modelParameter(model, ['cjo', 'cj0', 'cj'], 0),
    junctionPotential: modelParameter(model, ['vj', 'pb'], 1),
    gradingCoefficient: Math.min(0.9, modelParameter(model, ['m', 'mj'], 0.5)),
    transitTime: modelParameter(model, ['tt'], 0),
    depletionCapacitanceCoefficient: Math.min(0.95, modelParameter(model, ['fc'], 0.5)),
  };
}

/**
 * The model's saturation current as the solver uses it: raised to `minimum` (ngspice 39's
 * epsmin floor) as ngspice 39 does, a negative (mistyped) IS included. IS = 0 alone stays as
 * written, an open junction with only gmin across it, where ngspice 39 would use the floor too.
 */
export function effectiveSaturationCurrent(modelSaturationCurrent: number, minimum: number = MINIMUM_SATURATION_CURRENT): number {
  return modelSaturationCurrent === 0 ? 0 : Math.max(modelSaturationCurrent, minimum);
}

/** A diode model's values at one temperature and area, as the Newton loads use them. */
interface DiodeAtTemperature {
  temperature: number;
  nominalTemperature: number;
  area: number;
  gmin: number;
  relativeTolerance: number;
  minimumSaturationCurrent: number;
  saturationCurrent: number;
  emissionThermalVoltage: number;
  breakdownThermalVoltage: number;
  criticalVoltage: number;
  /** Junction voltage magnitude at which breakdown current equals Is (ngspice's shifted BV); Infinity without BV. */
  knee: number;
  /** False when the knee's bisection ran out of iterations (the closest fit is used). */
  kneeMatched: boolean;
  seriesConductance: number;
  forwardKneeCurrent: number;
}

/** ngspice's placement of the breakdown knee: the shifted voltage at which the current at −BV equals IBV (ngspice 39 diotemp.c). */
function breakdownKnee(
  breakdownVoltage: number,
  breakdownCurrent: number,
  saturation: number,
  breakdownThermalVoltage: number,
  vt: number,
  relativeTolerance: number,
): { knee: number; matched: boolean } {
  const nbvVt = breakdownThermalVoltage;
  if (breakdownCurrent < (saturation * breakdownVoltage) / vt) return { knee: breakdownVoltage, matched: true };
  const tolerance = relativeTolerance * breakdownCurrent;
  let knee = breakdownVoltage - nbvVt * Math.log(1 + breakdownCurrent / saturation);
  for (let i = 0; i < BREAKDOWN_KNEE_ITERATIONS; i++) {
    knee = breakdownVoltage - nbvVt * Math.log(breakdownCurrent / saturation + 1 - knee / vt);
    const current = saturation * (Math.exp((breakdownVoltage - knee) / nbvVt) - 1 + knee / vt);
    if (Math.abs(current - breakdownCurrent) <= tolerance) return { knee, matched: true };
  }
  return { knee, matched: false };
}

/** The last values computed per model: thousands of diodes of one model at one corner share them (no exp or log per instance). */
const lastValues = new WeakMap<DiodeParameters, DiodeAtTemperature>();

function diodeAtTemperature(p: DiodeParameters, area: number, temperature: number, nominalTemperature: number, conditions: CornerConditions): DiodeAtTemperature {
  const last = lastValues.get(p);
  if (
    last &&
    last.temperature === temperature &&
    last.nominalTemperature === nominalTemperature &&
    last.area === area &&
    last.gmin === conditions.gmin &&
    last.relativeTolerance === conditions.relativeTolerance &&
    last.minimumSaturationCurrent === conditions.minimumSaturationCurrent
  ) {
    return last;
  }
  const vt = thermalVoltage(temperature);
  const vte = p.emissionCoefficient * vt;
  const breakdownThermalVoltage = p.breakdownEmissionCoefficient * vt;
  const ratio = temperature / nominalTemperature;
  // Saturation current's temperature law (SPICE3 user's manual): Is(T) = Is·(T/Tnom)^(XTI/N)·exp((T/Tnom − 1)·EG/(N·Vt)).
  const saturationCurrent =
    effectiveSaturationCurrent(p.saturationCurrent, conditions.minimumSaturationCurrent) *
    area *
    Math.exp(((ratio - 1) * p.activationEnergy) / vte + (p.saturationCurrentExponent / p.emissionCoefficient) * Math.log(ratio));
  // IBV is not scaled by area at level 1 (ngspice 39: an area-2 diode still carries IBV at −BV).
  const knee = Number.isFinite(p.breakdownVoltage)
    ? breakdownKnee(p.breakdownVoltage, p.breakdownCurrent, saturationCurrent, breakdownThermalVoltage, vt, conditions.relativeTolerance)
    : { knee: Infinity, matched: true };
  const values: DiodeAtTemperature = {
    temperature,
    nominalTemperature,
    area,
    gmin: conditions.gmin,
    relativeTolerance: conditions.relativeTolerance,
    minimumSaturationCurrent: conditions.minimumSaturationCurrent,
    saturationCurrent,
    emissionThermalVoltage: vte,
    breakdownThermalVoltage,
    criticalVoltage: criticalVoltage(vte, saturationCurrent),
    knee: knee.knee,
    kneeMatched: knee.matched,
    seriesConductance: p.seriesResistance > 0 ? area / p.seriesResistance : 0,
    forwardKneeCurrent: p.forwardKneeCurrent * area,
  };
  lastValues.set(p, values);
  return values;
}

export class DiodeDevice implements Device {
  readonly linear = false;
  readonly parameters: DiodeParameters;
  private anode = 0;
  private cathode = 0;
  /** The junction's anode side: the internal node when RS > 0, else the anode. */
  private junctionAnode = 0;
  // Matrix slots as fields, not an array: one object fewer to fetch per Newton load.
  private slotAnodeAnode = 0;
  private slotCathodeCathode = 0;
  private slotJunctionJunction = 0;
  private slotAnodeJunction = 0;
  private slotCathodeJunction = 0;
  private slotJunctionAnode = 0;
  private slotJunctionCathode = 0;

  // Temperature-adjusted values at the present corner.
  private temperature = 0;
  private saturationCurrent = 0;
  private emissionThermalVoltage = 0;
  private breakdownThermalVoltage = 0;
  private criticalVoltage = 0;
  private knee = Infinity; // junction voltage magnitude at which breakdown current equals Is (ngspice's shifted BV)
  private seriesConductance = 0;
  private forwardKneeCurrent = 0;
  private gmin = 0;
  private warnings: NetlistDiagnostic[] | undefined;

  // Iteration state: the last junction voltage loaded, its current and conductance.
  private stateVoltage = 0;
  private stateCurrent = 0;
  private stateConductance = 0;
  private warm = false;

  // Read once from the element: circuits mix element shapes, so property reads on them are slow in hot loops.
  private readonly name: string;
  private readonly area: number;
  private readonly instanceTemperature: number | undefined;
  private readonly off: boolean;

  constructor(readonly element: DiodeElement) {
    this.parameters = cachedByModel(diodeParameters, element);
    this.name = element.name;
    this.area = element.area > 0 ? element.area : 1;
    this.instanceTemperature = element.temperature;
    this.off = element.off;
  }

  setup(context: SetupContext): void {
    this.anode = context.terminal(0);
    this.cathode = context.terminal(1);
    this.junctionAnode = this.parameters.seriesResistance > 0 ? context.internalNode(this.element.name, 'junction side of RS') : this.anode;
    const a = this.anode;
    const k = this.cathode;
    const j = this.junctionAnode;
    this.slotAnodeAnode = context.slot(a, a);
    this.slotCathodeCathode = context.slot(k, k);
    this.slotJunctionJunction = context.slot(j, j);
    this.slotAnodeJunction = context.slot(a, j);
    this.slotCathodeJunction = context.slot(k, j);
    this.slotJunctionAnode = context.slot(j, a);
    this.slotJunctionCathode = context.slot(j, k);
  }

  prepare(conditions: CornerConditions): void {
    const p = this.parameters;
    const temperature = this.instanceTemperature !== undefined ? this.instanceTemperature + ZERO_CELSIUS_IN_KELVIN : conditions.temperature;
    const nominal = p.nominalTemperatureCelsius !== undefined ? p.nominalTemperatureCelsius + ZERO_CELSIUS_IN_KELVIN : conditions.nominalTemperature;
    const values = diodeAtTemperature(p, this.area, temperature, nominal, conditions);
    this.temperature = temperature;
    this.saturationCurrent = values.saturationCurrent;
    this.emissionThermalVoltage = values.emissionThermalVoltage;
    this.breakdownThermalVoltage = values.breakdownThermalVoltage;
    this.criticalVoltage = values.criticalVoltage;
    this.knee = values.knee;
    this.seriesConductance = values.seriesConductance;
    this.forwardKneeCurrent = values.forwardKneeCurrent;
    this.gmin = conditions.gmin;
    if (!values.kneeMatched) {
      (this.warnings ??= []).push({
        severity: 'info',
        code: 'unsolved-circuit',
        message: `${this.name}: the breakdown knee could not be matched to BV = ${p.breakdownVoltage} V and IBV = ${p.breakdownCurrent} A; the closest fit is used`,
        location: this.element.location,
      });
    }
  }

  reset(): void {
    this.stateVoltage = 0;
    this.stateCurrent = 0;
    this.stateConductance = 0;
    this.warm = false;
  }

  warmStart(solution: Float64Array): void {
    // The internal node is not among the caller's node names: start it at the anode.
    if (this.junctionAnode !== this.anode) solution[this.junctionAnode] = solution[this.anode];
    this.stateVoltage = solution[this.junctionAnode] - solution[this.cathode];
    this.warm = true;
  }

  /** Junction current and conductance at junction voltage v, including gmin: left in `current` and `conductance` (no allocation per call). */
  private current = 0;
  private conductance = 0;
  private evaluate(v: number): void {
    const vte = this.emissionThermalVoltage;
    const saturation = this.saturationCurrent;
    let current: number;
    let conductance: number;
    if (v >= -3 * vte) {
      // Shockley (SPICE3 forward region).
      const x = v / vte;
      current = saturation * (limitedExp(x) - 1);
      conductance = (saturation * limitedExpSlope(x)) / vte;
      if (this.forwardKneeCurrent > 0 && current > 1e-18) {
        // High injection (ngspice's IKF): i / (1 + sqrt(i / IKF)).
        const ikf = this.forwardKneeCurrent;
        const root = Math.sqrt(current / ikf);
        conductance = ((1 + root) * conductance - (current * conductance) / (2 * root * ikf)) / (1 + 2 * root + current / ikf);
        current = current / (1 + root);
      }
    } else if (v >= -this.knee) {
      // SPICE3 reverse region: a smooth cubic approach to −Is.
      let arg = (3 * vte) / (v * Math.E);
      arg = arg * arg * arg;
      current = -saturation * (1 + arg);
      conductance = (saturation * 3 * arg) / v;
    } else {
      // Breakdown: an exponential from the shifted knee.
      const x = -(this.knee + v) / this.breakdownThermalVoltage;
      current = -saturation * limitedExp(x);
      conductance = (saturation * limitedExpSlope(x)) / this.breakdownThermalVoltage;
    }
    this.current = current + this.gmin * v;
    this.conductance = conductance + this.gmin;
  }

  load(context: LoadContext): void {
    const x = context.solution;
    let v: number;
    if (context.initializeJunctions && !this.warm) {
      v = this.off ? 0 : this.criticalVoltage;
    } else {
      v = x[this.junctionAnode] - x[this.cathode];
      const breakdownLimitEdge = Math.min(0, -this.knee + 10 * this.breakdownThermalVoltage);
      if (Number.isFinite(this.knee) && v < breakdownLimitEdge) {
        // Limit the step of the breakdown exponential as if it were a forward junction.
        const limited = limitJunction(-(v + this.knee), -(this.stateVoltage + this.knee), this.breakdownThermalVoltage, this.criticalVoltage);
        v = -(limited + this.knee);
      } else {
        v = limitJunction(v, this.stateVoltage, this.emissionThermalVoltage, this.criticalVoltage);
      }
      if (junctionLimiting.limited) context.nonConvergent++;
    }
    this.warm = false;
    this.evaluate(v);
    const current = this.current;
    const conductance = this.conductance;
    this.stateVoltage = v;
    this.stateCurrent = current;
    this.stateConductance = conductance;

    const equivalent = current - conductance * v;
    context.rhs[this.cathode] += equivalent;
    context.rhs[this.junctionAnode] -= equivalent;
    const m = context.matrix;
    const gs = this.seriesConductance;
    if (gs > 0) {
      m[this.slotAnodeAnode] += gs;
      m[this.slotJunctionJunction] += conductance + gs;
      m[this.slotAnodeJunction] -= gs;
      m[this.slotJunctionAnode] -= gs;
    } else {
      m[this.slotJunctionJunction] += conductance;
    }
    m[this.slotCathodeCathode] += conductance;
    m[this.slotCathodeJunction] -= conductance;
    m[this.slotJunctionCathode] -= conductance;
  }

  converged(context: ConvergenceContext): boolean {
    const x = context.solution;
    const v = x[this.junctionAnode] - x[this.cathode];
    const predicted = this.stateCurrent + this.stateConductance * (v - this.stateVoltage);
    const tolerance = context.relativeTolerance * Math.max(Math.abs(predicted), Math.abs(this.stateCurrent)) + context.currentTolerance;
    return Math.abs(predicted - this.stateCurrent) <= tolerance;
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const junctionVoltage = solution[this.junctionAnode] - solution[this.cathode];
    const voltage = solution[this.anode] - solution[this.cathode];
    this.evaluate(junctionVoltage);
    const current = this.current;
    sink.branch(this.name, current);
    sink.terminals(this.name, [current, -current]);
    sink.diode(this.name, { voltage, current, power: voltage * current, region: this.region(junctionVoltage, current) });
  }

  /** forward / off / reverse by the junction voltage against ±3·N·kT/q; breakdown as the constants above say. */
  private region(junctionVoltage: number, current: number): 'forward' | 'reverse' | 'breakdown' | 'off' {
    const breakdownVoltage = this.parameters.breakdownVoltage;
    if (
      Number.isFinite(breakdownVoltage) &&
      junctionVoltage <= -BREAKDOWN_VOLTAGE_FRACTION * breakdownVoltage &&
      -current > BREAKDOWN_CURRENT_OVER_SATURATION * this.saturationCurrent
    ) {
      return 'breakdown';
    }
    const edge = OFF_BIAS_THERMAL_VOLTAGES * this.emissionThermalVoltage;
    if (junctionVoltage >= edge) return 'forward';
    if (junctionVoltage <= -edge) return 'reverse';
    return 'off';
  }

  solveDiagnostics(): NetlistDiagnostic[] {
    return this.warnings?.length ? this.warnings.splice(0) : NO_DIAGNOSTICS;
  }

  /** Temperature-adjusted values at the last prepared corner, for the checks and tests. */
  get adjusted(): { temperature: number; saturationCurrent: number; breakdownKnee: number; emissionThermalVoltage: number } {
    return { temperature: this.temperature, saturationCurrent: this.saturationCurrent, breakdownKnee: this.knee, emissionThermalVoltage: this.emissionThermalVoltage };
  }
}
