// The pnlint core: pure functions from text (plus an injected file reader) to findings.
export * from './netlist/circuit.js';
export * from './netlist/index.js';
export * from './sim/types.js';
export * from './findings.js';
export * from './settings.js';
export * from './analysis.js';
export * from './sim/index.js';
