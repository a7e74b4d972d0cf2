// Each fault told once (server/src/checks/told-once.ts). The circuits' facts are Ohm's law and
// the LED rule of thumb of 20 mA (common practice, no source); the currents are ngspice 39's.
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, findingsOf, ngspiceValue } from './support.js';

const ngspiceRuns = declareNgspiceGate();
const RED = '.model DRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)';

/** Two channels of one subcircuit, each LED on its own `rlim`. */
function channels(first: string, second: string): string {
  return [
    'two indicator channels from one subcircuit',
    'V1 vcc 0 DC 5',
    '.subckt CHANNEL top params: rlim=47',
    'RL top a {rlim}',
    'DL a 0 DRED',
    '.ends',
    `X1 vcc CHANNEL rlim=${first}`,
    `X2 vcc CHANNEL rlim=${second}`,
    RED,
    '.end',
    '',
  ].join('\n');
}

describe.runIf(ngspiceRuns)('the instances of one subcircuit line', () => {
  it('fare alike: one finding, about the first, naming the other', () => {
    const result = check(channels('47', '47'));
    const found = findingsOf(result, 'led-current-unlimited');
    expect(found.map((finding) => finding.element)).toEqual(['X1.DL']);
    expect(found[0]!.message).toContain('The same holds for X2.DL');
    // ngspice 39 at 5.25 V: far over 20 mA through 47 Ω.
    const current = ngspiceValue('one channel\nV1 vcc 0 DC 5.25\nRL vcc a 47\nVAM a m 0\nDL m 0 DRED\n' + RED + '\n.end\n', 'i(vam)');
    expect(current).toBeGreaterThan(0.02);
  });

  it('fare differently (other parameters, other currents): a finding each', () => {
    const found = findingsOf(check(channels('47', '68')), 'led-current-unlimited');
    expect(found.map((finding) => finding.element).sort()).toEqual(['X1.DL', 'X2.DL']);
    expect(found.every((finding) => !finding.message.includes('The same holds'))).toBe(true);
  });
});

describe.runIf(ngspiceRuns)('what a reversed diode causes', () => {
  it('a reversed LED in reverse breakdown: the breakdown finding points at the reversal and offers no guard diode', () => {
    // 12 V through 1 kΩ onto an LED drawn backwards, BV 5 V: in breakdown (ngspice 39 below).
    const text = ['lamp drawn backwards', 'V1 vcc 0 DC 12', 'R1 vcc a 1k', 'D1 0 a DRED', RED, '.end', ''].join('\n');
    expect(ngspiceValue(text, 'v(a)')).toBeGreaterThan(5);
    const result = check(text);
    expect(findingsOf(result, 'reversed-diode').map((finding) => finding.element)).toEqual(['D1']);
    const breakdown = findingsOf(result, 'reverse-overvoltage');
    expect(breakdown).toHaveLength(1);
    expect(breakdown[0]!.message).toContain('D1 is reversed (reversed-diode)');
    expect(result.fixRequests.filter(({ finding, request }) => finding === breakdown[0] && request.kind !== 'ignore')).toEqual([]);
  });
});
