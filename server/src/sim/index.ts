// The DC circuit solver: compile a circuit once, solve it at as many corners as asked.
export { compileCircuit, FLOATING_NODE_CONDUCTANCE, type CompiledCircuit } from './compile.js';
export { solveOperatingPoint, solveCorners, NOMINAL_CORNER } from './op.js';
export { sourceValueAt } from './waveforms.js';
export { kirchhoffCurrentResiduals } from './kirchhoff.js';
export { BREAKDOWN_VOLTAGE_FRACTION, BREAKDOWN_CURRENT_OVER_SATURATION, OFF_BIAS_THERMAL_VOLTAGES } from './devices/diode.js';
export * from './constants.js';
