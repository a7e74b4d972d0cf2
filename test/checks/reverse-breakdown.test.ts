// reverse-overvoltage calls a diode "driven into reverse breakdown" only at or beyond the
// model's breakdown point: BV is the reverse voltage at which the current is IBV (SPICE3
// user's manual, Quarles 1989). Approaching the knee is judged against the derated rating.
// Expected voltages and currents come from ngspice 39 solving the same circuit.
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, diodeAt, findingsOf, ngspiceValue } from './support.js';

const ngspiceRuns = declareNgspiceGate();

// A red LED with BV 6 V at IBV 10 µA, and a silicon blocking diode (about 0.7 V: common practice, no source).
const MODELS = `.model LEDRED D(IS=2e-19 N=1.9 RS=3 BV=6 IBV=10u)
.model SIL D(IS=4n N=1.9 RS=0.6 BV=100 IBV=5u)`;

/** The derating margin's default: keep reverse voltage below 80 % of the rating (verification.md, common practice, no source). */
const DERATING = 0.8;

describe.runIf(ngspiceRuns)('reverse breakdown against the derating margin', () => {
  // The textbook way to run an LED on AC: a series blocking diode takes the negative half-wave.
  const blocker = (trough: string) => `AC pilot light
VAC ac 0 ${trough}
DBLK ac a SIL
RL a b 2.2k
VAM b c 0
DLED c 0 LEDRED
${MODELS}
.end
`;

  it('an LED behind a series blocking diode on AC nears its knee: a warning inside the margin, not breakdown', () => {
    const result = check(blocker('SIN(0 34 50)'));
    const findings = findingsOf(result, 'reverse-overvoltage');
    expect(findings).toHaveLength(1);
    const [finding] = findings;
    expect(finding?.severity).toBe('warning');
    expect(finding?.message).not.toMatch(/breakdown/);
    expect(finding?.message).toContain('above 80 % of its rating VRRM 6 V from BV');
    // ngspice 39 at the trough of the min corner (34 V + 5 % default supply tolerance, common practice, no source).
    const trough = -34 * 1.05;
    const reverse = -ngspiceValue(blocker(`DC ${trough}`), 'v(c)');
    const leakage = -ngspiceValue(blocker(`DC ${trough}`), 'i(vam)');
    expect(reverse).toBeGreaterThan(DERATING * 6);
    expect(reverse).toBeLessThan(6); // below BV…
    expect(leakage).toBeLessThan(10e-6); // …and below IBV: not in breakdown
    const point = diodeAt(result, 'DLED', 'VAC SIN trough, min');
    expect(-point.voltage).toBeCloseTo(reverse, 4);
    expect(finding?.message).toContain(`reaches ${reverse.toFixed(2)} V`);
  });

  // An LED fitted backwards behind 1 kΩ on 12 V, with a directive rating above its model's BV.
  const reversed = `LED reversed on 12 V
V1 vcc 0 12
R1 vcc a 1k
VAM a b 0
DLED 0 b LEDRED
*pnlint: rating DLED vrrm=10
${MODELS}
.end
`;
  it('a diode carrying more than IBV in reverse is in breakdown: an error, even below its directive rating', () => {
    const result = check(reversed);
    const [finding] = findingsOf(result, 'reverse-overvoltage');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('driven into reverse breakdown');
    // ngspice 39 at the min corner (12 V − 5 %): milliamperes in reverse, far beyond IBV 10 µA.
    const current = ngspiceValue(reversed.replace('V1 vcc 0 12', `V1 vcc 0 ${12 * 0.95}`), 'i(vam)');
    expect(current).toBeGreaterThan(10e-6);
    expect(-diodeAt(result, 'DLED', 'V1 min').current).toBeCloseTo(current, 7);
  });

  it('the same LED without a directive: above its BV rating is an error too', () => {
    const result = check(reversed.replace('*pnlint: rating DLED vrrm=10\n', ''));
    const [finding] = findingsOf(result, 'reverse-overvoltage');
    expect(finding?.severity).toBe('error');
    const reverse = ngspiceValue(reversed.replace('V1 vcc 0 12', `V1 vcc 0 ${12 * 1.05}`), 'v(b)'); // cathode to anode
    expect(reverse).toBeGreaterThan(6); // ngspice 39: beyond BV 6 V once the current passes IBV
  });
});
