// Preferred numbers for resistors and capacitors: the E series of IEC 60063.
// The tables are the standard's published values (which depart from the rounded
// geometric series in places, e.g. 2.7…4.7 in E24 and 9.20 in E192), so they are
// written out rather than computed.
import type { PreferredSeries } from './settings.js';

/** IEC 60063, E24 (±5 %); E12 and E6 are every second and every fourth of it. */
const E24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1];

/** IEC 60063, E192 (±0.5 %); E96 and E48 are every second and every fourth of it. */
const E192 = [
  1.0, 1.01, 1.02, 1.04, 1.05, 1.06, 1.07, 1.09, 1.1, 1.11, 1.13, 1.14, 1.15, 1.17, 1.18, 1.2,
  1.21, 1.23, 1.24, 1.26, 1.27, 1.29, 1.3, 1.32, 1.33, 1.35, 1.37, 1.38, 1.4, 1.42, 1.43, 1.45,
  1.47, 1.49, 1.5, 1.52, 1.54, 1.56, 1.58, 1.6, 1.62, 1.64, 1.65, 1.67, 1.69, 1.72, 1.74, 1.76,
  1.78, 1.8, 1.82, 1.84, 1.87, 1.89, 1.91, 1.93, 1.96, 1.98, 2.0, 2.03, 2.05, 2.08, 2.1, 2.13,
  2.15, 2.18, 2.21, 2.23, 2.26, 2.29, 2.32, 2.34, 2.37, 2.4, 2.43, 2.46, 2.49, 2.52, 2.55, 2.58,
  2.61, 2.64, 2.67, 2.71, 2.74, 2.77, 2.8, 2.84, 2.87, 2.91, 2.94, 2.98, 3.01, 3.05, 3.09, 3.12,
  3.16, 3.2, 3.24, 3.28, 3.32, 3.36, 3.4, 3.44, 3.48, 3.52, 3.57, 3.61, 3.65, 3.7, 3.74, 3.79,
  3.83, 3.88, 3.92, 3.97, 4.02, 4.07, 4.12, 4.17, 4.22, 4.27, 4.32, 4.37, 4.42, 4.48, 4.53, 4.59,
  4.64, 4.7, 4.75, 4.81, 4.87, 4.93, 4.99, 5.05, 5.11, 5.17, 5.23, 5.3, 5.36, 5.42, 5.49, 5.56,
  5.62, 5.69, 5.76, 5.83, 5.9, 5.97, 6.04, 6.12, 6.19, 6.26, 6.34, 6.42, 6.49, 6.57, 6.65, 6.73,
  6.81, 6.9, 6.98, 7.06, 7.15, 7.23, 7.32, 7.41, 7.5, 7.59, 7.68, 7.77, 7.87, 7.96, 8.06, 8.16,
  8.25, 8.35, 8.45, 8.56, 8.66, 8.76, 8.87, 8.98, 9.09, 9.2, 9.31, 9.42, 9.53, 9.65, 9.76, 9.88,
];

const everyNth = (values: readonly number[], step: number) => values.filter((_, index) => index % step === 0);

/** The values of one decade, from 1 up to (not including) 10. */
export const SERIES: Readonly<Record<PreferredSeries, readonly number[]>> = {
  E6: everyNth(E24, 4),
  E12: everyNth(E24, 2),
  E24,
  E48: everyNth(E192, 4),
  E96: everyNth(E192, 2),
  E192,
};

/** The tolerance each series is made for (IEC 60063): neighbours overlap at this spread. */
export const SERIES_TOLERANCE: Readonly<Record<PreferredSeries, number>> = {
  E6: 0.2,
  E12: 0.1,
  E24: 0.05,
  E48: 0.02,
  E96: 0.01,
  E192: 0.005,
};

export type Rounding = 'nearest' | 'up' | 'down';

/**
 * The preferred value of `series` nearest to `value` (on a logarithmic scale, as the
 * series are spaced), or the next one at or above / at or below it. Undefined for a
 * value that is not a positive finite number.
 */
export function preferredValue(value: number, series: PreferredSeries, rounding: Rounding = 'nearest'): number | undefined {
  if (!(value > 0) || !Number.isFinite(value)) return undefined;
  const decade = Math.floor(Math.log10(value));
  // Candidates from the decade below to the decade above cover every rounding.
  const candidates: number[] = [];
  for (let power = decade - 1; power <= decade + 1; power++) {
    for (const mantissa of SERIES[series]) candidates.push(cleanProduct(mantissa, power));
  }
  // A value equal to a preferred one (within float noise) is that value.
  const exact = candidates.find((candidate) => Math.abs(candidate - value) <= candidate * 1e-9);
  if (exact !== undefined) return exact;
  if (rounding === 'up') return candidates.find((candidate) => candidate >= value);
  if (rounding === 'down') return [...candidates].reverse().find((candidate) => candidate <= value);
  let best = candidates[0]!;
  for (const candidate of candidates) {
    if (Math.abs(Math.log(candidate / value)) < Math.abs(Math.log(best / value))) best = candidate;
  }
  return best;
}

/** Every preferred value of `series` within [low, high], ascending. */
export function preferredValuesBetween(low: number, high: number, series: PreferredSeries): number[] {
  if (!(low > 0) || !(high >= low) || !Number.isFinite(high)) return [];
  const values: number[] = [];
  for (let power = Math.floor(Math.log10(low)); power <= Math.floor(Math.log10(high)); power++) {
    for (const mantissa of SERIES[series]) {
      const candidate = cleanProduct(mantissa, power);
      if (candidate >= low * (1 - 1e-9) && candidate <= high * (1 + 1e-9)) values.push(candidate);
    }
  }
  return values;
}

/** mantissa × 10^power without float dust (4.7 × 100 = 470, not 470.00000000000006). */
function cleanProduct(mantissa: number, power: number): number {
  return Number((mantissa * 10 ** power).toPrecision(12));
}
