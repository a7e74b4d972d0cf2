// What the semiconductor devices share: the pn-junction equations and the Newton step
// limits of SPICE (Nagel, "SPICE2: A computer program to simulate semiconductor
// circuits", 1975; as in ngspice 39's devsup.c).
import { BOLTZMANN, BOLTZMANN_OVER_CHARGE, ELEMENTARY_CHARGE, EXPONENT_LIMIT, REFERENCE_TEMPERATURE } from '../constants.js';

/** e^x, continued along its tangent above EXPONENT_LIMIT so that no step overflows. */
export function limitedExp(x: number): number {
  if (x <= EXPONENT_LIMIT) return Math.exp(x);
  const edge = Math.exp(EXPONENT_LIMIT);
  return edge * (1 + (x - EXPONENT_LIMIT));
}

/** Derivative of limitedExp. */
export function limitedExpSlope(x: number): number {
  return Math.exp(Math.min(x, EXPONENT_LIMIT));
}

/** The limited result and whether the step was cut (which makes the iteration non-final). */
export interface Limited {
  value: number;
  limited: boolean;
}

/**
 * SPICE `pnjlim`: limits a junction voltage step so that the exponential grows at most
 * logarithmically per iteration (Nagel 1975), with ngspice's extra clamp on large
 * negative steps.
 */
export function limitJunctionVoltage(vNew: number, vOld: number, thermalVoltage: number, criticalVoltage: number): Limited {
  const value = limitJunction(vNew, vOld, thermalVoltage, criticalVoltage);
  return { value, limited: junctionLimiting.limited };
}

/** Whether the last limitJunction call cut its step (a module flag, so that the hot path allocates nothing). */
export const junctionLimiting = { limited: false };

/** limitJunctionVoltage without the result object: sets junctionLimiting.limited. */
export function limitJunction(vNew: number, vOld: number, thermalVoltage: number, criticalVoltage: number): number {
  if (vNew > criticalVoltage && Math.abs(vNew - vOld) > thermalVoltage + thermalVoltage) {
    junctionLimiting.limited = true;
    if (vOld > 0) {
      const arg = 1 + (vNew - vOld) / thermalVoltage;
      return arg > 0 ? vOld + thermalVoltage * Math.log(arg) : criticalVoltage;
    }
    return thermalVoltage * Math.log(vNew / thermalVoltage);
  }
  if (vNew < 0) {
    const floor = vOld > 0 ? -1 * vOld - 1 : 2 * vOld - 1;
    if (vNew < floor) {
      junctionLimiting.limited = true;
      return floor;
    }
  }
  junctionLimiting.limited = false;
  return vNew;
}

/** SPICE `fetlim`: limits a gate–source voltage step around the threshold (Nagel 1975). */
export function limitGateVoltage(vNew: number, vOld: number, threshold: number): number {
  const stepHigh = Math.abs(2 * (vOld - threshold)) + 2;
  const stepLow = stepHigh / 2 + 2;
  const wellOn = threshold + 3.5;
  const delta = vNew - vOld;
  if (vOld >= threshold) {
    if (vOld >= wellOn) {
      if (delta <= 0) {
        if (vNew >= wellOn) {
          if (-delta > stepLow) return vOld - stepLow;
        } else {
          return Math.max(vNew, threshold + 2);
        }
      } else if (delta >= stepHigh) {
        return vOld + stepHigh;
      }
      return vNew;
    }
    return delta <= 0 ? Math.max(vNew, threshold - 0.5) : Math.min(vNew, threshold + 4);
  }
  if (delta <= 0) {
    if (-delta > stepHigh) return vOld - stepHigh;
    return vNew;
  }
  const edge = threshold + 0.5;
  if (vNew <= edge) {
    if (delta > stepLow) return vOld + stepLow;
    return vNew;
  }
  return edge;
}

/** SPICE `limvds`: limits a drain–source voltage step (Nagel 1975). */
export function limitDrainVoltage(vNew: number, vOld: number): number {
  if (vOld >= 3.5) {
    if (vNew > vOld) return Math.min(vNew, 3 * vOld + 2);
    if (vNew < 3.5) return Math.max(vNew, 2);
    return vNew;
  }
  if (vNew > vOld) return Math.min(vNew, 4);
  return Math.max(vNew, -0.5);
}

/** Thermal voltage kT/q at `temperature` kelvin. */
export function thermalVoltage(temperature: number): number {
  return BOLTZMANN_OVER_CHARGE * temperature;
}

/** Critical voltage of a junction, where its current curve turns sharpest (Nagel 1975): vte·ln(vte/(√2·Is)). */
export function criticalVoltage(emissionThermalVoltage: number, saturationCurrent: number): number {
  // A junction with no saturation current never conducts: start it at zero rather than at infinity.
  if (!(saturationCurrent > 0) || !Number.isFinite(saturationCurrent)) return 0;
  return emissionThermalVoltage * Math.log(emissionThermalVoltage / (Math.SQRT2 * saturationCurrent));
}

/** Silicon band gap (eV) at `temperature` kelvin, the SPICE fit used for built-in potentials. */
export function siliconBandGap(temperature: number): number {
  return 1.16 - (7.02e-4 * temperature * temperature) / (temperature + 1108);
}

/** SPICE's built-in-potential temperature term (`pbfact`) at `temperature` kelvin. */
export function potentialTemperatureTerm(temperature: number): number {
  const vt = thermalVoltage(temperature);
  const arg = -siliconBandGap(temperature) / (2 * BOLTZMANN * temperature) + 1.1150877 / (BOLTZMANN * (REFERENCE_TEMPERATURE + REFERENCE_TEMPERATURE));
  return -2 * vt * (1.5 * Math.log(temperature / REFERENCE_TEMPERATURE) + ELEMENTARY_CHARGE * arg);
}

/**
 * A junction's current and conductance without breakdown, the SPICE level-1 form: Shockley
 * above −3·vte, and below it the smooth cubic approach to −Is of SPICE3 (Quarles 1989).
 */
export function junctionCurrent(voltage: number, saturationCurrent: number, emissionThermalVoltage: number): { current: number; conductance: number } {
  if (voltage >= -3 * emissionThermalVoltage) {
    const x = voltage / emissionThermalVoltage;
    const e = limitedExp(x);
    return { current: saturationCurrent * (e - 1), conductance: (saturationCurrent * limitedExpSlope(x)) / emissionThermalVoltage };
  }
  let arg = (3 * emissionThermalVoltage) / (voltage * Math.E);
  arg = arg * arg * arg;
  return { current: -saturationCurrent * (1 + arg), conductance: (saturationCurrent * 3 * arg) / voltage };
}
