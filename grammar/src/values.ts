// One value reader for the whole project: how a SPICE engine reads a number.
// Scale factors from the SPICE3 user's manual (Quarles, 1989): T G MEG K MIL M U N P F,
// in any case; `M` is milli and `MEG` mega. Letters after the scale factor (units such
// as `Ohm`, `F`, `V`) are ignored, and so is everything else after the number — which
// is how `4k7` becomes 4 kΩ in a SPICE engine.

export const SCALE_FACTORS: Readonly<Record<string, number>> = {
  t: 1e12,
  g: 1e9,
  meg: 1e6,
  k: 1e3,
  mil: 25.4e-6,
  m: 1e-3,
  u: 1e-6,
  n: 1e-9,
  p: 1e-12,
  f: 1e-15,
};

export interface SpiceNumber {
  /** The value a SPICE engine reads. */
  value: number;
  /** The numeric part as written, e.g. `4.7`, `1e-3`. */
  mantissa: string;
  /** The scale factor as written (`k`, `Meg`, …), or empty. */
  scale: string;
  /** What follows, which engines ignore (`Ohm`, `F`, or `7` in `4k7`). */
  ignored: string;
}

const NUMBER_PREFIX = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/;

/** Powers of ten of the decimal scale factors, so that `10u` is exactly 1e-5 rather than 10 × 1e-6. */
const DECIMAL_EXPONENTS: Readonly<Record<string, number>> = { t: 12, g: 9, meg: 6, k: 3, m: -3, u: -6, n: -9, p: -12, f: -15 };

/** 10^0 … 10^22: the powers of ten that binary64 holds exactly. */
const EXACT_POWERS_OF_TEN: readonly number[] = Array.from({ length: 23 }, (_unused, power) => Number(`1e${power}`));

/**
 * The common case without building a string: digits × 10^k, with the digits (the first `length`
 * characters of `mantissa`) an integer of at most 15 figures and |k| ≤ 22, is one correctly
 * rounded multiplication or division of exact operands, so it gives the very value that
 * converting the decimal text gives. Undefined otherwise.
 */
function scaledExactly(mantissa: string, exponent: number, length = mantissa.length): number | undefined {
  let index = 0;
  let sign = 1;
  const first = mantissa.charCodeAt(0);
  if (first === 45 /* - */) {
    sign = -1;
    index = 1;
  } else if (first === 43 /* + */) index = 1;
  let digits = 0;
  let figures = 0;
  let fractionFigures = 0;
  let afterPoint = false;
  for (; index < length; index++) {
    const code = mantissa.charCodeAt(index);
    if (code === 46 /* . */) {
      afterPoint = true;
      continue;
    }
    if (code < 48 || code > 57) return undefined; // an exponent: the general path
    digits = digits * 10 + (code - 48);
    if (afterPoint) fractionFigures++;
    if (++figures > 15) return undefined;
  }
  const power = exponent - fractionFigures;
  if (power >= 0) return power <= 22 ? sign * digits * EXACT_POWERS_OF_TEN[power]! : undefined;
  return -power <= 22 ? (sign * digits) / EXACT_POWERS_OF_TEN[-power]! : undefined;
}

function scaled(mantissa: string, scale: string): number {
  if (scale === '') return Number(mantissa);
  const exponent = DECIMAL_EXPONENTS[scale];
  if (exponent === undefined) return Number(mantissa) * SCALE_FACTORS[scale]!;
  const exact = scaledExactly(mantissa, exponent);
  if (exact !== undefined) return exact;
  // Shift the decimal exponent in the text: one correctly rounded conversion, not two.
  const [digits, written = '0'] = mantissa.toLowerCase().split('e');
  return Number(`${digits}e${Number(written) + exponent}`);
}

/** Reads `text` as a SPICE number; undefined when it does not start with one. */
export function readSpiceNumber(text: string): SpiceNumber | undefined {
  const match = NUMBER_PREFIX.exec(text);
  if (!match) return undefined;
  const mantissa = match[0];
  let rest = text.slice(mantissa.length);
  let scale = '';
  const lower = rest.toLowerCase();
  if (lower.startsWith('meg')) scale = rest.slice(0, 3);
  else if (lower.startsWith('mil')) scale = rest.slice(0, 3);
  else if (rest.length > 0 && 'tgkmunpf'.includes(lower[0]!)) scale = rest.slice(0, 1);
  rest = rest.slice(scale.length);
  return { value: scaled(mantissa, scale.toLowerCase()), mantissa, scale, ignored: rest };
}

const SCALE_EXPONENT_BY_LETTER: Readonly<Record<string, number>> = { t: 12, g: 9, k: 3, m: -3, u: -6, n: -9, p: -12, f: -15 };

/**
 * `readSpiceNumber(text)?.value`, without building the parts: the parser calls it for every
 * number of a file. Mantissas with an exponent, and `meg`/`mil`, take the full reader.
 */
export function readSpiceValue(text: string): number | undefined {
  let index = 0;
  let code = text.charCodeAt(0);
  if (code === 43 || code === 45) code = text.charCodeAt(++index);
  let digitsSeen = false;
  while (code >= 48 && code <= 57) {
    digitsSeen = true;
    code = text.charCodeAt(++index);
  }
  if (code === 46) {
    code = text.charCodeAt(++index);
    while (code >= 48 && code <= 57) {
      digitsSeen = true;
      code = text.charCodeAt(++index);
    }
  }
  if (!digitsSeen) return undefined;
  if (Number.isNaN(code)) return Number(text);
  const lower = code | 0x20;
  if (lower === 101 /* e */) return readSpiceNumber(text)?.value;
  const exponent = SCALE_EXPONENT_BY_LETTER[String.fromCharCode(lower)];
  if (exponent === undefined) return Number(text.slice(0, index));
  if (lower === 109 /* m */) {
    const next = text.charCodeAt(index + 1) | 0x20;
    if (next === 101 /* e */ || next === 105 /* i */) return readSpiceNumber(text)?.value; // meg, mil
  }
  // The mantissa is the first `index` characters: read in place, cut out only on the general path.
  return scaledExactly(text, exponent, index) ?? scaled(text.slice(0, index), String.fromCharCode(lower));
}

/**
 * True when the ignored tail holds a digit: `4k7`, `2R2`, `22x0k`. The engine's reading
 * then differs from what the writer most likely meant.
 */
export function isAmbiguousNumber(reading: SpiceNumber): boolean {
  return /\d/.test(reading.ignored);
}

// IEC 60062 marking code: the letter stands where the decimal point goes.
// Resistors: R (×1), K (×1e3), M (×1e6), G (×1e9), T (×1e12).
// Capacitors: p, n, u/µ, m (lower case m is milli here).
const RESISTOR_MARKING: Readonly<Record<string, number>> = { r: 1, k: 1e3, m: 1e6, g: 1e9, t: 1e12 };
const CAPACITOR_MARKING: Readonly<Record<string, number>> = { p: 1e-12, n: 1e-9, u: 1e-6, µ: 1e-6, m: 1e-3 };

/**
 * Reads `text` as an IEC 60062 marking code (`4k7` = 4.7e3, `R47` = 0.47, `4n7` = 4.7e-9).
 * `elementLetter` picks the resistor or capacitor letters; undefined when it is not a code.
 */
export function readMarkingCode(text: string, elementLetter: string): number | undefined {
  const match = /^(\d*)([a-zµ])(\d+)$/i.exec(text.replace(/(ohm|Ω|f)$/i, ''));
  if (!match) return undefined;
  const [, whole, letter, fraction] = match;
  const table = elementLetter.toUpperCase() === 'C' ? CAPACITOR_MARKING : RESISTOR_MARKING;
  const factor = table[letter!.toLowerCase()];
  if (factor === undefined) return undefined;
  return Number(`${whole || '0'}.${fraction}`) * factor;
}
