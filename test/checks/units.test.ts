// The engineering-notation formatter. Expected strings follow the SI prefixes
// (SI brochure, BIPM) at three significant digits, and product.md's examples.
import { describe, expect, it } from 'vitest';
import { formatPercent, formatQuantity } from '../../server/src/units.js';

describe('formatQuantity', () => {
  it('writes the examples of product.md and issue 4', () => {
    expect(formatQuantity(1.38e-2, 'A')).toBe('13.8 mA'); // product.md
    expect(formatQuantity(150, 'Ω')).toBe('150 Ω'); // product.md
    expect(formatQuantity(0.029, 'W')).toBe('29 mW'); // product.md
    expect(formatQuantity(5.25, 'V')).toBe('5.25 V'); // issue 4
  });
  it('picks the SI prefix by powers of a thousand (SI brochure, BIPM)', () => {
    expect(formatQuantity(4700, 'Ω')).toBe('4.7 kΩ');
    expect(formatQuantity(2.2e6, 'Ω')).toBe('2.2 MΩ');
    expect(formatQuantity(1e-6, 'A')).toBe('1 µA');
    expect(formatQuantity(3.3e-9, 'F')).toBe('3.3 nF');
    expect(formatQuantity(1e-12, 'A')).toBe('1 pA');
    expect(formatQuantity(-0.0125, 'V')).toBe('−12.5 mV');
  });
  it('rounds a decimal half up as a person does, whatever its binary form', () => {
    // 3.3 V less 5 % is 3.135 V (arithmetic), held in binary as 3.13499…: read as 3.14 V.
    expect(formatQuantity(3.3 * 0.95, 'V')).toBe('3.14 V');
    expect(formatQuantity(-3.3 * 0.95, 'V')).toBe('−3.14 V');
    // Just below the half stays below it.
    expect(formatQuantity(3.1349, 'V')).toBe('3.13 V');
  });
  it('rounds before choosing the prefix, so 999.96 is 1 k, not 1000', () => {
    expect(formatQuantity(999.96, 'Ω')).toBe('1 kΩ');
    expect(formatQuantity(0.99996, 'A')).toBe('1 A');
  });
  it('handles zero, infinities and values beyond tera', () => {
    expect(formatQuantity(0, 'V')).toBe('0 V');
    expect(formatQuantity(Infinity, 'A')).toBe('∞ A');
    expect(formatQuantity(3e15, 'Ω')).toBe('3e+15 Ω');
  });
  it('writes percentages', () => {
    expect(formatPercent(0.8)).toBe('80 %');
    expect(formatPercent(0.05)).toBe('5 %');
  });
});
