// The bipolar transistor, Gummel–Poon DC model as SPICE3 defines it (Quarles 1989; ngspice 39
// manual, BJT chapter): forward and reverse transport currents with their emission
// coefficients, Early voltages VAF/VAR and knee currents IKF/IKR through the base charge qb,
// base–emitter and base–collector leakage ISE/NE and ISC/NC, and RB (modulated between RB
// and RBM by qb, or by IRB when given, as SPICE does), RC and RE on internal nodes.
// Junction capacitances and transit times are transient effects: not read here.
import type { Bjt } from '../../netlist/circuit.js';
import { ZERO_CELSIUS_IN_KELVIN } from '../constants.js';
import type { ConvergenceContext, CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';
import { criticalVoltage, junctionCurrent, limitJunctionVoltage, thermalVoltage } from './junction.js';
import { cachedByModel, isGiven, modelParameter } from './parameters.js';

export interface BjtParameters {
  polarity: 1 | -1;
  saturationCurrent: number;
  forwardBeta: number;
  reverseBeta: number;
  forwardEmission: number;
  reverseEmission: number;
  /** 1/VAF and 1/VAR; 0 when not given (no Early effect). */
  inverseEarlyForward: number;
  inverseEarlyReverse: number;
  /** 1/IKF and 1/IKR; 0 when not given (no high injection). */
  inverseKneeForward: number;
  inverseKneeReverse: number;
  baseEmitterLeakage: number;
  baseEmitterLeakageEmission: number;
  baseCollectorLeakage: number;
  baseCollectorLeakageEmission: number;
  baseResistance: number;
  minimumBaseResistance: number;
  /** Current where RB falls halfway to RBM; 0 when not given. */
  baseHalfResistanceCurrent: number;
  collectorResistance: number;
  emitterResistance: number;
  activationEnergy: number;
  saturationCurrentExponent: number;
  betaExponent: number;
  nominalTemperatureCelsius: number | undefined;
}

function inverse(value: number): number {
  return value !== 0 && Number.isFinite(value) ? 1 / value : 0;
}

/** Model parameters with ngspice 39's defaults. */
export function bjtParameters(element: Bjt): BjtParameters {
  const model = element.model;
  const baseResistance = modelParameter(model, ['rb'], 0);
  return {
    polarity: model.type === 'PNP' ? -1 : 1,
    saturationCurrent: modelParameter(model, ['is'], 1e-16),
    forwardBeta: modelParameter(model, ['bf'], 100),
    reverseBeta: modelParameter(model, ['br'], 1),
    forwardEmission: modelParameter(model, ['nf'], 1),
    reverseEmission: modelParameter(model, ['nr'], 1),
    inverseEarlyForward: inverse(modelParameter(model, ['vaf', 'va'], 0)),
    inverseEarlyReverse: inverse(modelParameter(model, ['var', 'vb'], 0)),
    inverseKneeForward: inverse(modelParameter(model, ['ikf', 'ik'], 0)),
    inverseKneeReverse: inverse(modelParameter(model, ['ikr'], 0)),
    baseEmitterLeakage: modelParameter(model, ['ise'], 0),
    baseEmitterLeakageEmission: modelParameter(model, ['ne'], 1.5),
    baseCollectorLeakage: modelParameter(model, ['isc'], 0),
    baseCollectorLeakageEmission: modelParameter(model, ['nc'], 2),
    baseResistance,
    minimumBaseResistance: isGiven(model, ['rbm']) ? modelParameter(model, ['rbm'], baseResistance) : baseResistance,
    baseHalfResistanceCurrent: modelParameter(model, ['irb'], 0),
    collectorResistance: modelParameter(model, ['rc'], 0),
    emitterResistance: modelParameter(model, ['re'], 0),
    activationEnergy: modelParameter(model, ['eg'], 1.11),
    saturationCurrentExponent: modelParameter(model, ['xti'], 3),
    betaExponent: modelParameter(model, ['xtb'], 0),
    nominalTemperatureCelsius: isGiven(model, ['tnom']) ? modelParameter(model, ['tnom'], 27) : undefined,
  };
}

interface BjtCurrents {
  collector: number;
  base: number;
  /** Partial derivatives in SPICE's names: ∂ic/∂vbe = gm + go, ∂ic/∂vbc = −(go + gmu), ∂ib/∂vbe = gpi, ∂ib/∂vbc = gmu. */
  gm: number;
  go: number;
  gpi: number;
  gmu: number;
  /** Base spreading conductance at this bias (0 when RB = 0). */
  baseConductance: number;
}

export class BjtDevice implements Device {
  readonly linear = false;
  readonly parameters: BjtParameters;
  private collector = 0;
  private base = 0;
  private emitter = 0;
  private collectorPrime = 0;
  private basePrime = 0;
  private emitterPrime = 0;
  private slots: number[] = [];

  private vt = 0;
  private saturationCurrent = 0;
  private forwardBeta = 0;
  private reverseBeta = 0;
  private baseEmitterLeakage = 0;
  private baseCollectorLeakage = 0;
  private criticalVoltage = 0;
  private collectorConductance = 0;
  private emitterConductance = 0;
  private gmin = 0;

  private stateVbe = 0;
  private stateVbc = 0;
  private state: BjtCurrents = { collector: 0, base: 0, gm: 0, go: 0, gpi: 0, gmu: 0, baseConductance: 0 };
  private warm = false;

  constructor(readonly element: Bjt) {
    this.parameters = cachedByModel(bjtParameters, element);
  }

  setup(context: SetupContext): void {
    const p = this.parameters;
    const [c, b, e] = [context.terminal(0), context.terminal(1), context.terminal(2)];
    this.collector = c;
    this.base = b;
    this.emitter = e;
    this.collectorPrime = p.collectorResistance > 0 ? context.internalNode(this.element.name, 'collector side of RC') : c;
    this.basePrime = p.baseResistance > 0 ? context.internalNode(this.element.name, 'base side of RB') : b;
    this.emitterPrime = p.emitterResistance > 0 ? context.internalNode(this.element.name, 'emitter side of RE') : e;
    const cp = this.collectorPrime;
    const bp = this.basePrime;
    const ep = this.emitterPrime;
    const s = (r: number, k: number) => context.slot(r, k);
    this.slots = [
      // Series resistances: RC (c, c'), RB (b, b'), RE (e, e').
      s(c, c), s(c, cp), s(cp, c), s(cp, cp),
      s(b, b), s(b, bp), s(bp, b), s(bp, bp),
      s(e, e), s(e, ep), s(ep, e), s(ep, ep),
      // The intrinsic transistor's Jacobian: rows c', b', e' × columns b', c', e'.
      s(cp, bp), s(cp, ep), s(bp, cp), s(bp, ep), s(ep, cp), s(ep, bp),
      s(cp, cp), s(bp, bp), s(ep, ep),
    ];
  }

  prepare(conditions: CornerConditions): void {
    const p = this.parameters;
    const area = this.element.area > 0 ? this.element.area : 1;
    const temperature = conditions.temperature;
    const nominal = p.nominalTemperatureCelsius !== undefined ? p.nominalTemperatureCelsius + ZERO_CELSIUS_IN_KELVIN : conditions.nominalTemperature;
    const vt = (this.vt = thermalVoltage(temperature));
    // Temperature laws of SPICE3 (Quarles 1989): IS with EG and XTI, betas with XTB, leakages with NE and NC.
    const ratioLog = Math.log(temperature / nominal);
    const factorLog = ((temperature / nominal - 1) * p.activationEnergy) / vt + p.saturationCurrentExponent * ratioLog;
    const betaFactor = Math.exp(ratioLog * p.betaExponent);
    this.saturationCurrent = p.saturationCurrent * Math.exp(factorLog) * area;
    this.forwardBeta = p.forwardBeta * betaFactor;
    this.reverseBeta = p.reverseBeta * betaFactor;
    this.baseEmitterLeakage = ((p.baseEmitterLeakage * Math.exp(factorLog / p.baseEmitterLeakageEmission)) / betaFactor) * area;
    this.baseCollectorLeakage = ((p.baseCollectorLeakage * Math.exp(factorLog / p.baseCollectorLeakageEmission)) / betaFactor) * area;
    this.criticalVoltage = criticalVoltage(vt, this.saturationCurrent);
    this.collectorConductance = p.collectorResistance > 0 ? area / p.collectorResistance : 0;
    this.emitterConductance = p.emitterResistance > 0 ? area / p.emitterResistance : 0;
    this.gmin = conditions.gmin;
  }

  reset(): void {
    this.stateVbe = 0;
    this.stateVbc = 0;
    this.warm = false;
  }

  warmStart(solution: Float64Array): void {
    if (this.collectorPrime !== this.collector) solution[this.collectorPrime] = solution[this.collector];
    if (this.basePrime !== this.base) solution[this.basePrime] = solution[this.base];
    if (this.emitterPrime !== this.emitter) solution[this.emitterPrime] = solution[this.emitter];
    const type = this.parameters.polarity;
    this.stateVbe = type * (solution[this.basePrime] - solution[this.emitterPrime]);
    this.stateVbc = type * (solution[this.basePrime] - solution[this.collectorPrime]);
    this.warm = true;
  }

  /** Terminal currents (in the transistor's own polarity) and their derivatives at vbe, vbc. */
  private evaluate(vbe: number, vbc: number): BjtCurrents {
    const p = this.parameters;
    const vt = this.vt;
    const saturation = this.saturationCurrent;
    const forward = junctionCurrent(vbe, saturation, vt * p.forwardEmission);
    const reverse = junctionCurrent(vbc, saturation, vt * p.reverseEmission);
    const leakBE = this.baseEmitterLeakage > 0 ? junctionCurrent(vbe, this.baseEmitterLeakage, vt * p.baseEmitterLeakageEmission) : { current: 0, conductance: 0 };
    const leakBC = this.baseCollectorLeakage > 0 ? junctionCurrent(vbc, this.baseCollectorLeakage, vt * p.baseCollectorLeakageEmission) : { current: 0, conductance: 0 };
    const cbe = forward.current;
    const gbe = forward.conductance;
    const cbc = reverse.current;
    const gbc = reverse.conductance;
    const cben = leakBE.current + this.gmin * vbe;
    const gben = leakBE.conductance + this.gmin;
    const cbcn = leakBC.current + this.gmin * vbc;
    const gbcn = leakBC.conductance + this.gmin;

    // Normalised base charge qb (Gummel–Poon).
    const q1 = 1 / (1 - p.inverseEarlyForward * vbc - p.inverseEarlyReverse * vbe);
    let qb: number;
    let dqbdve: number;
    let dqbdvc: number;
    if (p.inverseKneeForward === 0 && p.inverseKneeReverse === 0) {
      qb = q1;
      dqbdve = q1 * qb * p.inverseEarlyReverse;
      dqbdvc = q1 * qb * p.inverseEarlyForward;
    } else {
      const q2 = p.inverseKneeForward * cbe + p.inverseKneeReverse * cbc;
      const arg = Math.max(0, 1 + 4 * q2);
      const root = arg !== 0 ? Math.sqrt(arg) : 1;
      qb = (q1 * (1 + root)) / 2;
      dqbdve = q1 * (qb * p.inverseEarlyReverse + (p.inverseKneeForward * gbe) / root);
      dqbdvc = q1 * (qb * p.inverseEarlyForward + (p.inverseKneeReverse * gbc) / root);
    }
    const collector = (cbe - cbc) / qb - cbc / this.reverseBeta - cbcn;
    const base = cbe / this.forwardBeta + cben + cbc / this.reverseBeta + cbcn;
    const go = (gbc + ((cbe - cbc) * dqbdvc) / qb) / qb;
    const gm = (gbe - ((cbe - cbc) * dqbdve) / qb) / qb - go;
    const gpi = gbe / this.forwardBeta + gben;
    const gmu = gbc / this.reverseBeta + gbcn;

    let baseConductance = 0;
    if (p.baseResistance > 0) {
      const area = this.element.area > 0 ? this.element.area : 1;
      const rbMinimum = p.minimumBaseResistance / area;
      const rbModulated = p.baseResistance / area - rbMinimum;
      let resistance = rbMinimum + rbModulated / qb;
      if (p.baseHalfResistanceCurrent > 0) {
        // SPICE's IRB form of base-resistance modulation.
        const x = Math.max(base / (p.baseHalfResistanceCurrent * area), 1e-9);
        const z = (-1 + Math.sqrt(1 + 14.59025 * x)) / 2.4317 / Math.sqrt(x);
        const t = Math.tan(z);
        resistance = rbMinimum + (3 * rbModulated * (t - z)) / z / t / t;
      }
      baseConductance = resistance > 0 ? 1 / resistance : 0;
    }
    return { collector, base, gm, go, gpi, gmu, baseConductance };
  }

  load(context: LoadContext): void {
    const type = this.parameters.polarity;
    const x = context.solution;
    let vbe: number;
    let vbc: number;
    if (context.initializeJunctions && !this.warm) {
      vbe = this.element.off ? 0 : this.criticalVoltage;
      vbc = 0;
    } else {
      vbe = type * (x[this.basePrime] - x[this.emitterPrime]);
      vbc = type * (x[this.basePrime] - x[this.collectorPrime]);
      const limitedBe = limitJunctionVoltage(vbe, this.stateVbe, this.vt, this.criticalVoltage);
      const limitedBc = limitJunctionVoltage(vbc, this.stateVbc, this.vt, this.criticalVoltage);
      vbe = limitedBe.value;
      vbc = limitedBc.value;
      if (limitedBe.limited || limitedBc.limited) context.nonConvergent++;
    }
    this.warm = false;
    const f = this.evaluate(vbe, vbc);
    this.stateVbe = vbe;
    this.stateVbc = vbc;
    this.state = f;

    const { gm, go, gpi, gmu } = f;
    // Equivalent currents: i − J·v at the linearisation point, in circuit polarity.
    const collectorEquivalent = type * (f.collector - (gm + go) * vbe + (go + gmu) * vbc);
    const baseEquivalent = type * (f.base - gpi * vbe - gmu * vbc);
    const rhs = context.rhs;
    rhs[this.collectorPrime] -= collectorEquivalent;
    rhs[this.basePrime] -= baseEquivalent;
    rhs[this.emitterPrime] += collectorEquivalent + baseEquivalent;

    const m = context.matrix;
    const s = this.slots;
    const gc = this.collectorConductance;
    const gx = f.baseConductance;
    const ge = this.emitterConductance;
    if (gc > 0) { m[s[0]] += gc; m[s[1]] -= gc; m[s[2]] -= gc; m[s[3]] += gc; }
    if (gx > 0) { m[s[4]] += gx; m[s[5]] -= gx; m[s[6]] -= gx; m[s[7]] += gx; }
    if (ge > 0) { m[s[8]] += ge; m[s[9]] -= ge; m[s[10]] -= ge; m[s[11]] += ge; }
    m[s[12]] += gm - gmu; // c' row, b' column
    m[s[13]] -= gm + go; // c' row, e' column
    m[s[14]] -= gmu; // b' row, c' column
    m[s[15]] -= gpi; // b' row, e' column
    m[s[16]] -= go; // e' row, c' column
    m[s[17]] -= gm + gpi; // e' row, b' column
    m[s[18]] += go + gmu; // c' c'
    m[s[19]] += gpi + gmu; // b' b'
    m[s[20]] += gm + go + gpi; // e' e'
  }

  converged(context: ConvergenceContext): boolean {
    const type = this.parameters.polarity;
    const x = context.solution;
    const deltaBe = type * (x[this.basePrime] - x[this.emitterPrime]) - this.stateVbe;
    const deltaBc = type * (x[this.basePrime] - x[this.collectorPrime]) - this.stateVbc;
    const f = this.state;
    const collectorPredicted = f.collector + (f.gm + f.go) * deltaBe - (f.go + f.gmu) * deltaBc;
    const basePredicted = f.base + f.gpi * deltaBe + f.gmu * deltaBc;
    const within = (predicted: number, actual: number) =>
      Math.abs(predicted - actual) <= context.relativeTolerance * Math.max(Math.abs(predicted), Math.abs(actual)) + context.currentTolerance;
    return within(collectorPredicted, f.collector) && within(basePredicted, f.base);
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const type = this.parameters.polarity;
    const vbe = type * (solution[this.basePrime] - solution[this.emitterPrime]);
    const vbc = type * (solution[this.basePrime] - solution[this.collectorPrime]);
    const f = this.evaluate(vbe, vbc);
    const collector = type * f.collector;
    const base = type * f.base;
    sink.branch(this.element.name, collector);
    const currents = [collector, base, -(collector + base)];
    if (this.element.nodes.length > 3) currents.push(0);
    sink.terminals(this.element.name, currents);
  }
}
