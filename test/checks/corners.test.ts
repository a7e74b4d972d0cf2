// Corners (issue 4): nominal, each source at min and max (the supply directive, else the
// supply-tolerance setting, 5 % by default: common practice, no source), resistors at ±
// tolerance, temperatures, and time-varying sources at their extremes and breakpoints.
import { describe, expect, it } from 'vitest';
import { check } from './support.js';

const names = (text: string, settings = {}) => check(text, { settings }).cornerPlans.map((plan) => plan.corner.name);
const descriptions = (text: string) => check(text).cornerPlans.map((plan) => plan.description);

describe('corners', () => {
  it('puts a DC supply at ±5 % by default, and leaves a 0 V ammeter alone', () => {
    const text = 'divider\nV1 a 0 12\nVAM a b 0\nR1 b 0 1k\n.end\n';
    const result = check(text);
    expect(result.corners.map((corner) => corner.sources ?? {})).toEqual([{}, { V1: 12 * 0.95 }, { V1: 12 * 1.05 }]);
    expect(descriptions(text)).toEqual(['nominal values', 'V1 = 11.4 V (min corner)', 'V1 = 12.6 V (max corner)']);
  });
  it('takes min and max, or a tolerance, from a supply directive', () => {
    expect(check('d\nV1 a 0 5\nR1 a 0 1k\n*pnlint: supply V1 min=4.5 max=5.5\n.end\n').corners.map((corner) => corner.sources?.['V1'])).toEqual([undefined, 4.5, 5.5]);
    const tolerance = check('d\nV1 a 0 5\nR1 a 0 1k\n*pnlint: supply V1 tol=10%\n.end\n').corners.map((corner) => corner.sources?.['V1']);
    expect(tolerance[1]).toBeCloseTo(4.5, 12);
    expect(tolerance[2]).toBeCloseTo(5.5, 12);
  });
  it('orders a negative supply by magnitude: min is the smaller voltage', () => {
    const [, low, high] = check('d\nV1 a 0 -12\nR1 a 0 1k\n.end\n').cornerPlans;
    expect(low!.description).toBe('V1 = −11.4 V (min corner)');
    expect(high!.description).toBe('V1 = −12.6 V (max corner)');
  });
  it('combines the extremes of two supplies', () => {
    const text = 'two rails\nV1 a 0 5\nV2 b 0 12\nR1 a b 1k\n.end\n';
    expect(names(text)).toEqual(['nominal', 'V1 min', 'V1 max', 'V2 min', 'V2 max', 'V1 min, V2 min', 'V1 min, V2 max', 'V1 max, V2 min', 'V1 max, V2 max']);
  });
  it('takes a SIN source at offset ± amplitude, both PULSE levels and every PWL point, quasi-statically', () => {
    const sine = check('s\nV1 a 0 SIN(1 10 50)\nR1 a 0 1k\n.end\n', { settings: { supplyTolerance: 0 } }).cornerPlans;
    expect(sine.map((plan) => plan.corner.sources?.['V1'])).toEqual([undefined, -9, 11]);
    expect(sine[1]!.quasiStatic).toBe(true);
    expect(sine[1]!.description).toBe('V1 = −9 V (SIN trough, min corner)');
    const pulse = check('p\nV1 a 0 PULSE(0 5 1u 1n 1n 1u 2u)\nR1 a 0 1k\n.end\n', { settings: { supplyTolerance: 0 } });
    expect(pulse.corners.map((corner) => corner.sources?.['V1'])).toEqual([undefined, 0, 5]);
    const pwl = check('w\nV1 a 0 PWL(0 0 1m 3 2m 7 3m 1)\nR1 a 0 1k\n.end\n', { settings: { supplyTolerance: 0 } });
    expect(pwl.corners.map((corner) => corner.sources?.['V1'])).toEqual([undefined, 0, 7, 3, 1]);
  });
  it('scales resistors with a tolerance both ways, and adds the temperatures of the setting', () => {
    const text = 'd\nV1 a 0 5\nR1 a 0 1k\n*pnlint: rating R1 tol=1%\n.end\n';
    const result = check(text, { settings: { supplyTolerance: 0, temperatures: [85] } });
    expect(result.corners.map((corner) => corner.scale?.['R1'])).toEqual([undefined, 0.99, 1.01, undefined, 0.99, 1.01]);
    expect(result.corners.map((corner) => corner.temperature)).toEqual([undefined, undefined, undefined, 85, 85, 85]);
  });
  it('caps the corners and says how many were left out', () => {
    const points = Array.from({ length: 40 }, (_, index) => `${index}m ${index / 10}`).join(' ');
    const result = check(`long PWL\nV1 a 0 PWL(${points})\nR1 a 0 1k\n*pnlint: rating R1 tol=1%\n.end\n`, { settings: { temperatures: [0, 85] } });
    expect(result.corners.length).toBeLessThanOrEqual(96);
    const [note] = result.findings.filter((finding) => finding.message.includes('were left out'));
    expect(note?.severity).toBe('info');
  });
});
