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
/** The last reading handed out: consecutive instances usually share a model, and this skips two WeakMap lookups for them (it keeps that one model alive until another is read). */
let last: { model: Model; read: object; value: unknown } | undefined;

/**
 * Model-derived parameters depend only on the `.model` card, so instances sharing a model
 * share one reading (thousands of identical diodes are common in generated netlists).
 */
export function cachedByModel<E extends { model: Model }, P>(read: (element: E) => P, element: E): P {
  const model = element.model;
  if (last && last.model === model && last.read === read) return last.value as P;
  let byReader = cache.get(model);
  if (!byReader) cache.set(model, (byReader = new WeakMap()));
  let value = byReader.get(read) as P | undefined;
  if (value === undefined) byReader.set(read, (value = read(element)));
  last = { model, read, value };
  return value;
}
