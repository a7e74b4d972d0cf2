// Where a rating, a kind or a supply range came from, so that every message can say it
// ("VRRM 25 V from directive on line 3"). Later sources override earlier ones.
import { readSpiceNumber } from '@pnlint/grammar';
import type { SourceLocation } from '../netlist/circuit.js';
import type { RatingKey } from './vocabulary.js';

export type Origin =
  | 'library' // the generic part-class library: typical values, from memory
  | 'rule-of-thumb' // a trade rule of thumb (common practice, no source)
  | 'model' // the `.model` card (its BV)
  | 'config' // pnlint.json
  | 'directive' // a `*pnlint:` directive in the netlist
  | 'setting' // a pnlint setting (e.g. the default resistor power)
  | 'classification'; // worked out from the model by solving it

export interface ValueSource {
  origin: Origin;
  /** How a message says it: "from directive on line 3", "rule of thumb for LEDs". */
  description: string;
  location?: SourceLocation;
}

/** `line 3`, or `line 3 of parts.lib` when the place is in another file than `mainUri`. */
export function describeLine(location: SourceLocation, mainUri: string): string {
  const line = `line ${location.range.start.line + 1}`;
  if (location.uri === mainUri) return line;
  const file = location.uri.split(/[\\/]/).pop() ?? location.uri;
  return `${line} of ${file}`;
}

/**
 * Reads a rating value written in a directive or pnlint.json: a SPICE number with optional
 * unit letters (`20m`, `20mA`, `0.25W`), or for `tol` a percentage (`5%`) or a fraction (`0.05`).
 * Returns a message instead when it cannot be read.
 */
export function readRatingValue(key: RatingKey | 'min' | 'max', written: string | number): { value: number } | { problem: string } {
  if (typeof written === 'number') {
    if (!Number.isFinite(written)) return { problem: `${key} must be a finite number` };
    return checkRange(key, written);
  }
  const text = written.trim();
  if (key === 'tol') {
    const percent = /^(\d+(?:\.\d*)?|\.\d+)\s*%$/.exec(text);
    if (percent) return checkRange(key, Number(percent[1]) / 100);
  }
  const reading = readSpiceNumber(text);
  if (!reading) return { problem: `'${text}' is not a number` };
  if (/\d/.test(reading.ignored) || /[^a-zA-ZΩµ]/.test(reading.ignored)) {
    return { problem: `'${text}' is not a plain value (a SPICE engine would read it as ${reading.mantissa}${reading.scale})` };
  }
  return checkRange(key, reading.value);
}

/** A bare tolerance above this is almost surely a percentage written without `%`. */
const LARGEST_FRACTIONAL_TOLERANCE = 0.5;

function checkRange(key: RatingKey | 'min' | 'max', value: number): { value: number } | { problem: string } {
  if (key === 'min' || key === 'max') return { value };
  if (key === 'tol') {
    if (value < 0) return { problem: 'tol cannot be negative' };
    if (value > LARGEST_FRACTIONAL_TOLERANCE) return { problem: `tol=${value} reads as ${value * 100} %: write it as a percentage (5%) or a fraction (0.05)` };
    return { value };
  }
  if (!(value > 0)) return { problem: `${key} must be greater than zero` };
  return { value };
}
