// The one engineering-notation formatter: every number a user reads goes through here,
// so that "13.8 mA" looks the same in a message, a hover and the CLI.

/** SI prefixes from femto to tera, by power of a thousand (SI brochure, BIPM). */
const PREFIXES: readonly { exponent: number; symbol: string }[] = [
  { exponent: -15, symbol: 'f' },
  { exponent: -12, symbol: 'p' },
  { exponent: -9, symbol: 'n' },
  { exponent: -6, symbol: 'µ' },
  { exponent: -3, symbol: 'm' },
  { exponent: 0, symbol: '' },
  { exponent: 3, symbol: 'k' },
  { exponent: 6, symbol: 'M' },
  { exponent: 9, symbol: 'G' },
  { exponent: 12, symbol: 'T' },
];

/** Three significant digits: enough to compare with a datasheet, few enough to read. */
export const SIGNIFICANT_DIGITS = 3;

/**
 * Formats `value` with an SI prefix and `unit`: `formatQuantity(1.38e-2, 'A')` → `13.8 mA`,
 * `formatQuantity(150, 'Ω')` → `150 Ω`, `formatQuantity(4700, 'Ω')` → `4.7 kΩ`.
 * Trailing zeros are dropped; values outside femto..tera use an exponent.
 */
export function formatQuantity(value: number, unit: string, digits: number = SIGNIFICANT_DIGITS): string {
  const space = unit === '' ? '' : ' ';
  if (!Number.isFinite(value)) return `${Number.isNaN(value) ? 'not a number' : value > 0 ? '∞' : '−∞'}${space}${unit}`;
  if (value === 0) return `0${space}${unit}`;
  const sign = value < 0 ? '−' : '';
  const magnitude = asWritten(Math.abs(value));
  // Round first, so that 999.96 becomes 1 k rather than 1000.
  const rounded = Number(magnitude.toPrecision(digits));
  const exponent = Math.floor(Math.log10(rounded) / 3) * 3;
  const prefix = PREFIXES.find((candidate) => candidate.exponent === exponent);
  if (!prefix) return `${sign}${trimZeros(rounded.toExponential(digits - 1))}${space}${unit}`;
  const scaled = rounded / 10 ** exponent;
  return `${sign}${trimZeros(scaled.toPrecision(digits))}${space}${prefix.symbol}${unit}`;
}

/**
 * A value nudged up by a few units in the last place. A decimal such as 3.135 (3.3 V less 5 %)
 * is held in binary as 3.13499999…, which would round to 3.13; a person rounds the decimal
 * half up, to 3.14. The nudge is far below any digit shown, so it changes nothing else.
 */
function asWritten(magnitude: number): number {
  return magnitude * (1 + 4 * Number.EPSILON);
}

/** A fraction as a percentage: 0.8 → `80 %`, 0.0525 → `5.25 %`. */
export function formatPercent(fraction: number): string {
  return `${trimZeros((fraction * 100).toPrecision(SIGNIFICANT_DIGITS))} %`;
}

/** A temperature: 27 → `27 °C`. */
export function formatTemperature(celsius: number): string {
  return `${trimZeros(celsius.toPrecision(SIGNIFICANT_DIGITS))} °C`;
}

function trimZeros(text: string): string {
  if (text.includes('e')) {
    const [mantissa, power] = text.split('e');
    return `${trimZeros(mantissa!)}e${power}`;
  }
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}
