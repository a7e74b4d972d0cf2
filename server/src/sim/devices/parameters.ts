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

const cache = new WeakMap<Model, WeakMap<object, unknown>>();

/**
 * Model-derived parameters depend only on the `.model` card, so instances sharing a model
 * share one reading (thousands of identical diodes are common in generated netlists).
 */
export function cachedByModel<E extends { model: Model }, P>(read: (element: E) => P, element: E): P {
  let byReader = cache.get(element.model);
  if (!byReader) cache.set(element.model, (byReader = new WeakMap()));
  let value = byReader.get(read) as P | undefined;
  if (value === undefined) byReader.set(read, (value = read(element)));
  return value;
}
