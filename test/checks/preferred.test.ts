// IEC 60063 preferred numbers. The E96 and E48 tables below are typed from the standard's
// published tables independently of the E192 table in the code, so a typo in either shows.
import { describe, expect, it } from 'vitest';
import { preferredValue, preferredValuesBetween, SERIES, SERIES_TOLERANCE } from '../../server/src/preferred.js';

// IEC 60063, E96 (three digits, ×10⁻²).
const E96_PUBLISHED = [
  100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158, 162, 165, 169, 174,
  178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309,
  316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549,
  562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976,
];
// IEC 60063, E48.
const E48_PUBLISHED = [
  100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215, 226, 237, 249, 261, 274, 287, 301,
  316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536, 562, 590, 619, 649, 681, 715, 750, 787, 825, 866, 909, 953,
];
// IEC 60063, E12 and E6 (two digits, ×10⁻¹).
const E12_PUBLISHED = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82];
const E6_PUBLISHED = [10, 15, 22, 33, 47, 68];

const asInteger = (values: readonly number[], factor: number) => values.map((value) => Math.round(value * factor));

describe('IEC 60063 tables', () => {
  it('hold 6, 12, 24, 48, 96 and 192 values per decade (IEC 60063)', () => {
    expect(SERIES.E6).toHaveLength(6);
    expect(SERIES.E12).toHaveLength(12);
    expect(SERIES.E24).toHaveLength(24);
    expect(SERIES.E48).toHaveLength(48);
    expect(SERIES.E96).toHaveLength(96);
    expect(SERIES.E192).toHaveLength(192);
  });
  it('match the published E96, E48, E12 and E6 tables (IEC 60063)', () => {
    expect(asInteger(SERIES.E96, 100)).toEqual(E96_PUBLISHED);
    expect(asInteger(SERIES.E48, 100)).toEqual(E48_PUBLISHED);
    expect(asInteger(SERIES.E12, 10)).toEqual(E12_PUBLISHED);
    expect(asInteger(SERIES.E6, 10)).toEqual(E6_PUBLISHED);
  });
  it('keep the E24 values that depart from the rounded geometric series (IEC 60063)', () => {
    // The geometric series would give 2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6 and 8.3; the standard keeps older values.
    for (const value of [2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2]) expect(SERIES.E24).toContain(value);
    expect(SERIES.E192).toContain(9.2); // IEC 60063: 920, where the formula gives 919
  });
  it('lie within each series tolerance of the geometric sequence 10^(i/n) (IEC 60063 construction)', () => {
    for (const [name, values] of Object.entries(SERIES) as [keyof typeof SERIES, readonly number[]][]) {
      values.forEach((value, index) => {
        const geometric = 10 ** (index / values.length);
        expect(Math.abs(value / geometric - 1)).toBeLessThan(SERIES_TOLERANCE[name]);
      });
    }
  });
});

describe('preferredValue', () => {
  it('rounds to the nearest value on a logarithmic scale', () => {
    expect(preferredValue(145, 'E24')).toBe(150); // E24 neighbours 130 and 150 (IEC 60063)
    expect(preferredValue(4650, 'E12')).toBe(4700); // E12: 3.9 k, 4.7 k
    expect(preferredValue(1000, 'E6')).toBe(1000);
    expect(preferredValue(0.0477, 'E24')).toBe(0.047);
  });
  it('rounds up and down across decades', () => {
    expect(preferredValue(92, 'E24', 'up')).toBe(100); // after 91 comes 100 (IEC 60063)
    expect(preferredValue(9.95e3, 'E96', 'up')).toBe(10e3);
    expect(preferredValue(101, 'E12', 'down')).toBe(100);
    expect(preferredValue(99, 'E12', 'down')).toBe(82);
    expect(preferredValue(150, 'E24', 'up')).toBe(150); // a preferred value is itself
  });
  it('refuses what is not a positive number', () => {
    expect(preferredValue(0, 'E24')).toBeUndefined();
    expect(preferredValue(-10, 'E24')).toBeUndefined();
    expect(preferredValue(Number.NaN, 'E24')).toBeUndefined();
  });
  it('lists the values inside a window', () => {
    expect(preferredValuesBetween(100, 200, 'E12')).toEqual([100, 120, 150, 180]); // IEC 60063 E12
    expect(preferredValuesBetween(300, 310, 'E12')).toEqual([]);
  });
});
