// The netlist module: from syntax trees to the elaborated circuit.
export * from './circuit.js';
export { elaborate, DEFAULT_TEMPERATURE, MAXIMUM_ELEMENTS, MAXIMUM_INCLUDE_DEPTH, MAXIMUM_SUBCIRCUIT_DEPTH, type ElaborateOptions } from './elaborate.js';
export { evaluateExpression, BUILTIN_FUNCTIONS, FAILED, type EvaluationContext, type ExpressionScope, type UserFunction } from './expressions.js';
export { ParameterScope, ParameterEvaluation } from './parameters.js';
export { readElement, RESISTANCE_WITHOUT_VALUE, REACTANCE_WITHOUT_VALUE, DEFAULT_MOSFET_WIDTH, DEFAULT_MOSFET_LENGTH, type ElementContext } from './elements.js';
export { readModel, describeModelType, isSimulatedModel, MODEL_TYPES_BY_LETTER, SIMULATED_MOSFET_LEVEL } from './models.js';
export { buildWaveform, valueAtTimeZero, TIMES_WITHOUT_TRANSIENT, type TransientTimes } from './waveforms.js';
export { formatSpiceNumber, unitOfElement } from './format.js';
export { DiagnosticSink } from './diagnostics.js';
export { isWithin } from './paths.js';
