// The level-1 MOSFET (Shichman–Hodges, as in the SPICE3 user's manual, Quarles 1989, and
// the ngspice 39 manual): square-law channel with VTO, KP, GAMMA, PHI, LAMBDA and W/L,
// source and drain swapped when vds < 0, bulk junctions to source and drain, optional RD
// and RS on internal nodes, NMOS and PMOS. Gate and overlap capacitances are transient
// effects: not read here.
import type { Mosfet } from '../../netlist/circuit.js';
import { ZERO_CELSIUS_IN_KELVIN } from '../constants.js';
import type { ConvergenceContext, CornerConditions, Device, DeviceResultSink, LoadContext, SetupContext } from '../mna.js';
import { limitDrainVoltage, limitGateVoltage, limitJunctionVoltage, limitedExp, limitedExpSlope, criticalVoltage, potentialTemperatureTerm, siliconBandGap, thermalVoltage } from './junction.js';
import { cachedByModel, isGiven, modelParameter } from './parameters.js';

/** Permittivity of silicon dioxide, F/m: 3.9 · ε0 (the value SPICE3 uses). */
const OXIDE_PERMITTIVITY = 3.9 * 8.854214871e-12;
/** Surface mobility when only TOX is given, cm²/V·s (SPICE3 default UO). */
const DEFAULT_SURFACE_MOBILITY = 600;

export interface MosfetParameters {
  polarity: 1 | -1;
  thresholdVoltage: number;
  transconductance: number;
  bodyEffect: number;
  surfacePotential: number;
  channelLengthModulation: number;
  drainResistance: number;
  sourceResistance: number;
  junctionSaturationCurrent: number;
  lateralDiffusion: number;
  nominalTemperatureCelsius: number | undefined;
}

/** Model parameters with the SPICE3 level-1 defaults. */
export function mosfetParameters(element: Mosfet): MosfetParameters {
  const model = element.model;
  let transconductance = modelParameter(model, ['kp'], 2e-5);
  if (!isGiven(model, ['kp']) && isGiven(model, ['tox'])) {
    const mobility = modelParameter(model, ['uo', 'u0'], DEFAULT_SURFACE_MOBILITY);
    transconductance = ((mobility * OXIDE_PERMITTIVITY) / modelParameter(model, ['tox'], 1e-7)) * 1e-4;
  }
  return {
    polarity: model.type === 'PMOS' ? -1 : 1,
    thresholdVoltage: modelParameter(model, ['vto', 'vt0'], 0),
    transconductance,
    bodyEffect: modelParameter(model, ['gamma'], 0),
    surfacePotential: modelParameter(model, ['phi'], 0.6),
    channelLengthModulation: modelParameter(model, ['lambda'], 0),
    drainResistance: modelParameter(model, ['rd'], 0),
    sourceResistance: modelParameter(model, ['rs'], 0),
    junctionSaturationCurrent: modelParameter(model, ['is'], 1e-14),
    lateralDiffusion: modelParameter(model, ['ld'], 0),
    nominalTemperatureCelsius: isGiven(model, ['tnom']) ? modelParameter(model, ['tnom'], 27) : undefined,
  };
}

interface ChannelState {
  /** Channel current d'→s' in the device's polarity, and its partials in vgs, vds, vbs. */
  current: number;
  byGate: number;
  byDrain: number;
  byBulk: number;
  /** Threshold at this bias (polarity space). */
  threshold: number;
  bulkSource: number;
  bulkSourceConductance: number;
  bulkDrain: number;
  bulkDrainConductance: number;
}

export class MosfetDevice implements Device {
  readonly linear = false;
  readonly parameters: MosfetParameters;
  private drain = 0;
  private gate = 0;
  private source = 0;
  private bulk = 0;
  private drainPrime = 0;
  private sourcePrime = 0;
  private slots: number[] = [];

  private vt = 0;
  private beta = 0;
  private phi = 0;
  private builtIn = 0;
  private thresholdAtZeroBias = 0;
  private drainSaturation = 0;
  private sourceSaturation = 0;
  private drainCritical = 0;
  private sourceCritical = 0;
  private drainConductance = 0;
  private sourceConductance = 0;
  private gmin = 0;

  private stateVgs = 0;
  private stateVds = 0;
  private stateVbs = 0;
  private stateThreshold = 0;
  private state: ChannelState = { current: 0, byGate: 0, byDrain: 0, byBulk: 0, threshold: 0, bulkSource: 0, bulkSourceConductance: 0, bulkDrain: 0, bulkDrainConductance: 0 };
  private warm = false;

  constructor(readonly element: Mosfet) {
    this.parameters = cachedByModel(mosfetParameters, element);
  }

  setup(context: SetupContext): void {
    const p = this.parameters;
    const [d, g, s, b] = [context.terminal(0), context.terminal(1), context.terminal(2), context.terminal(3)];
    this.drain = d;
    this.gate = g;
    this.source = s;
    this.bulk = b;
    this.drainPrime = p.drainResistance > 0 ? context.internalNode(this.element.name, 'drain side of RD') : d;
    this.sourcePrime = p.sourceResistance > 0 ? context.internalNode(this.element.name, 'source side of RS') : s;
    const dp = this.drainPrime;
    const sp = this.sourcePrime;
    const slot = (r: number, k: number) => context.slot(r, k);
    this.slots = [
      slot(d, d), slot(d, dp), slot(dp, d), slot(dp, dp), // RD
      slot(s, s), slot(s, sp), slot(sp, s), slot(sp, sp), // RS
      slot(dp, g), slot(dp, b), slot(dp, sp), // channel: d' row
      slot(sp, g), slot(sp, b), slot(sp, dp), // channel: s' row
      slot(b, b), slot(b, dp), slot(b, sp), // bulk row
    ];
  }

  prepare(conditions: CornerConditions): void {
    const p = this.parameters;
    const type = p.polarity;
    const temperature = conditions.temperature;
    const nominal = p.nominalTemperatureCelsius !== undefined ? p.nominalTemperatureCelsius + ZERO_CELSIUS_IN_KELVIN : conditions.nominalTemperature;
    this.vt = thermalVoltage(temperature);
    const ratio = temperature / nominal;
    // Temperature laws of SPICE3 level 1: KP ∝ T^−1.5, PHI and the built-in voltage through the band gap.
    const ratio4 = ratio * Math.sqrt(ratio);
    const gapNominal = siliconBandGap(nominal);
    const gap = siliconBandGap(temperature);
    const phiAtReference = (p.surfacePotential - potentialTemperatureTerm(nominal)) / (nominal / 300.15);
    this.phi = (temperature / 300.15) * phiAtReference + potentialTemperatureTerm(temperature);
    this.builtIn = p.thresholdVoltage - type * p.bodyEffect * Math.sqrt(p.surfacePotential) + 0.5 * (gapNominal - gap) + type * 0.5 * (this.phi - p.surfacePotential);
    this.thresholdAtZeroBias = this.builtIn + type * p.bodyEffect * Math.sqrt(this.phi);
    const multiplier = this.element.multiplier > 0 ? this.element.multiplier : 1;
    const effectiveLength = this.element.length - 2 * p.lateralDiffusion;
    this.beta = effectiveLength > 0 ? ((p.transconductance / ratio4) * multiplier * this.element.width) / effectiveLength : 0;
    const saturation = p.junctionSaturationCurrent * Math.exp(-gap / this.vt + gapNominal / thermalVoltage(nominal)) * multiplier;
    this.drainSaturation = saturation;
    this.sourceSaturation = saturation;
    this.drainCritical = saturation > 0 ? criticalVoltage(this.vt, saturation) : 0;
    this.sourceCritical = this.drainCritical;
    this.drainConductance = p.drainResistance > 0 ? multiplier / p.drainResistance : 0;
    this.sourceConductance = p.sourceResistance > 0 ? multiplier / p.sourceResistance : 0;
    this.gmin = conditions.gmin;
  }

  reset(): void {
    this.stateVgs = 0;
    this.stateVds = 0;
    this.stateVbs = 0;
    this.stateThreshold = 0;
    this.warm = false;
  }

  warmStart(solution: Float64Array): void {
    if (this.drainPrime !== this.drain) solution[this.drainPrime] = solution[this.drain];
    if (this.sourcePrime !== this.source) solution[this.sourcePrime] = solution[this.source];
    const type = this.parameters.polarity;
    this.stateVgs = type * (solution[this.gate] - solution[this.sourcePrime]);
    this.stateVds = type * (solution[this.drainPrime] - solution[this.sourcePrime]);
    this.stateVbs = type * (solution[this.bulk] - solution[this.sourcePrime]);
    this.stateThreshold = type * this.thresholdAtZeroBias;
    this.warm = true;
  }

  private bulkJunction(v: number, saturation: number): { current: number; conductance: number } {
    const vt = this.vt;
    if (v <= -3 * vt) return { current: this.gmin * v - saturation, conductance: this.gmin };
    const x = v / vt;
    return { current: saturation * (limitedExp(x) - 1) + this.gmin * v, conductance: (saturation * limitedExpSlope(x)) / vt + this.gmin };
  }

  /** Channel and junction currents at (vgs, vds, vbs) in the device's polarity. */
  private evaluate(vgs: number, vds: number, vbs: number): ChannelState {
    const p = this.parameters;
    const vbd = vbs - vds;
    const vgd = vgs - vds;
    const bs = this.bulkJunction(vbs, this.sourceSaturation);
    const bd = this.bulkJunction(vbd, this.drainSaturation);
    const normal = vds >= 0;
    // In reverse mode the drain acts as the source: evaluate with vgd, −vds, vbd.
    const vb = normal ? vbs : vbd;
    const vg = normal ? vgs : vgd;
    const vd = normal ? vds : -vds;
    let root: number;
    if (vb <= 0) root = Math.sqrt(this.phi - vb);
    else {
      root = Math.sqrt(this.phi);
      root = Math.max(0, root - vb / (root + root));
    }
    const threshold = this.builtIn * p.polarity + p.bodyEffect * root;
    const overdrive = vg - threshold;
    const bodySlope = root <= 0 ? 0 : p.bodyEffect / (root + root);
    let current = 0;
    let gm = 0;
    let gds = 0;
    let gmbs = 0;
    if (overdrive > 0) {
      const lambda = p.channelLengthModulation;
      const betaEffective = this.beta * (1 + lambda * vd);
      if (overdrive <= vd) {
        current = betaEffective * overdrive * overdrive * 0.5;
        gm = betaEffective * overdrive;
        gds = lambda * this.beta * overdrive * overdrive * 0.5;
      } else {
        current = betaEffective * vd * (overdrive - 0.5 * vd);
        gm = betaEffective * vd;
        gds = betaEffective * (overdrive - vd) + lambda * this.beta * vd * (overdrive - 0.5 * vd);
      }
      gmbs = gm * bodySlope;
    }
    // Partials of the d'→s' current in (vgs, vds, vbs).
    const state: ChannelState = normal
      ? { current, byGate: gm, byDrain: gds, byBulk: gmbs, threshold, bulkSource: bs.current, bulkSourceConductance: bs.conductance, bulkDrain: bd.current, bulkDrainConductance: bd.conductance }
      : { current: -current, byGate: -gm, byDrain: gm + gds + gmbs, byBulk: -gmbs, threshold, bulkSource: bs.current, bulkSourceConductance: bs.conductance, bulkDrain: bd.current, bulkDrainConductance: bd.conductance };
    return state;
  }

  load(context: LoadContext): void {
    const type = this.parameters.polarity;
    const x = context.solution;
    let vgs: number;
    let vds: number;
    let vbs: number;
    if (context.initializeJunctions && !this.warm) {
      if (this.element.off) {
        vgs = 0;
        vds = 0;
        vbs = 0;
      } else {
        vbs = -1;
        vgs = type * this.thresholdAtZeroBias;
        vds = 0;
      }
    } else {
      vgs = type * (x[this.gate] - x[this.sourcePrime]);
      vds = type * (x[this.drainPrime] - x[this.sourcePrime]);
      vbs = type * (x[this.bulk] - x[this.sourcePrime]);
      // SPICE's limiting of the gate, drain and junction steps.
      let vgd = vgs - vds;
      const threshold = this.stateThreshold;
      if (this.stateVds >= 0) {
        vgs = limitGateVoltage(vgs, this.stateVgs, threshold);
        vds = vgs - vgd;
        vds = limitDrainVoltage(vds, this.stateVds);
      } else {
        vgd = limitGateVoltage(vgd, this.stateVgs - this.stateVds, threshold);
        vds = vgs - vgd;
        vds = -limitDrainVoltage(-vds, -this.stateVds);
        vgs = vgd + vds;
      }
      if (vds >= 0) {
        const limited = limitJunctionVoltage(vbs, this.stateVbs, this.vt, this.sourceCritical);
        vbs = limited.value;
        if (limited.limited) context.nonConvergent++;
      } else {
        const limited = limitJunctionVoltage(vbs - vds, this.stateVbs - this.stateVds, this.vt, this.drainCritical);
        vbs = limited.value + vds;
        if (limited.limited) context.nonConvergent++;
      }
    }
    this.warm = false;
    const f = this.evaluate(vgs, vds, vbs);
    this.stateVgs = vgs;
    this.stateVds = vds;
    this.stateVbs = vbs;
    this.stateThreshold = f.threshold;
    this.state = f;
    const vbd = vbs - vds;

    const rhs = context.rhs;
    const channelEquivalent = type * (f.current - f.byGate * vgs - f.byDrain * vds - f.byBulk * vbs);
    const sourceJunctionEquivalent = type * (f.bulkSource - f.bulkSourceConductance * vbs);
    const drainJunctionEquivalent = type * (f.bulkDrain - f.bulkDrainConductance * vbd);
    rhs[this.drainPrime] += -channelEquivalent + drainJunctionEquivalent;
    rhs[this.sourcePrime] += channelEquivalent + sourceJunctionEquivalent;
    rhs[this.bulk] -= sourceJunctionEquivalent + drainJunctionEquivalent;

    const m = context.matrix;
    const s = this.slots;
    const gd = this.drainConductance;
    const gs = this.sourceConductance;
    if (gd > 0) { m[s[0]] += gd; m[s[1]] -= gd; m[s[2]] -= gd; m[s[3]] += gd; }
    if (gs > 0) { m[s[4]] += gs; m[s[5]] -= gs; m[s[6]] -= gs; m[s[7]] += gs; }
    const byGate = f.byGate;
    const byDrain = f.byDrain;
    const byBulk = f.byBulk;
    const bySource = -(byGate + byDrain + byBulk);
    const gbs = f.bulkSourceConductance;
    const gbd = f.bulkDrainConductance;
    // d' row: channel current out of d', minus the drain junction's current into d'.
    m[s[8]] += byGate;
    m[s[9]] += byBulk - gbd;
    m[s[10]] += bySource;
    m[s[3]] += byDrain + gbd;
    // s' row: the channel current arrives, the source junction's leaves.
    m[s[11]] -= byGate;
    m[s[12]] -= byBulk + gbs;
    m[s[13]] -= byDrain;
    m[s[7]] -= bySource - gbs;
    // bulk row.
    m[s[14]] += gbs + gbd;
    m[s[15]] -= gbd;
    m[s[16]] -= gbs;
  }

  converged(context: ConvergenceContext): boolean {
    const type = this.parameters.polarity;
    const x = context.solution;
    const vgs = type * (x[this.gate] - x[this.sourcePrime]);
    const vds = type * (x[this.drainPrime] - x[this.sourcePrime]);
    const vbs = type * (x[this.bulk] - x[this.sourcePrime]);
    const dGs = vgs - this.stateVgs;
    const dDs = vds - this.stateVds;
    const dBs = vbs - this.stateVbs;
    const dBd = dBs - dDs;
    const f = this.state;
    const drainNow = f.current - f.bulkDrain;
    const drainPredicted = drainNow + f.byGate * dGs + f.byDrain * dDs + f.byBulk * dBs - f.bulkDrainConductance * dBd;
    const bulkNow = f.bulkSource + f.bulkDrain;
    const bulkPredicted = bulkNow + f.bulkSourceConductance * dBs + f.bulkDrainConductance * dBd;
    const within = (predicted: number, actual: number) =>
      Math.abs(predicted - actual) <= context.relativeTolerance * Math.max(Math.abs(predicted), Math.abs(actual)) + context.currentTolerance;
    return within(drainPredicted, drainNow) && within(bulkPredicted, bulkNow);
  }

  report(solution: Float64Array, sink: DeviceResultSink): void {
    const type = this.parameters.polarity;
    const vgs = type * (solution[this.gate] - solution[this.sourcePrime]);
    const vds = type * (solution[this.drainPrime] - solution[this.sourcePrime]);
    const vbs = type * (solution[this.bulk] - solution[this.sourcePrime]);
    const f = this.evaluate(vgs, vds, vbs);
    const drain = type * (f.current - f.bulkDrain);
    const source = type * (-f.current - f.bulkSource);
    const bulk = type * (f.bulkSource + f.bulkDrain);
    sink.branch(this.element.name, drain);
    sink.terminals(this.element.name, [drain, 0, source, bulk]);
  }
}
