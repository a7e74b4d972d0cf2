// Reading `.model` parameters with their SPICE defaults.
import type { Model } from '../../netlist/circuit.js';

/** The first of `names` (aliases, lower-case) that the model gives, else the SPICE default. */
export function modelParameter(model: Model, names: readonly string[], fallback: number): number {
  for (const name of names) {
    const value = model.params[name];
    if (typeof value === 'number' && Number.isFinite(value)) return value;
  }
  return fallback;
}

export function isGiven(model: Model, names: readonly string[]): boolean {
  return names.some((name) => typeof model.params[name] === 'number' && Number.isFinite(model.params[name]));
}
