// `m=` on a diode line: that many parts in parallel (ngspice 39 manual, diode instance
// parameters). The solver treats it as m times the area, as ngspice does at level 1; the
// ratings of a part (IF, PD, IZK) apply to each part, so the checks compare the current and
// power per part. Expected currents come from ngspice 39 solving the same line with m=2.
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, diodeAt, findingsOf, ngspiceValue, problems } from './support.js';

const ngspiceRuns = declareNgspiceGate();

// A red LED, about 1.9 V at 5 mA (red about 1.8–2.0 V: common practice, no source).
const RED_LED = '.model LEDRED D(IS=2e-19 N=1.9 RS=3 BV=6 IBV=10u)';
// A silicon rectifier, about 0.7 V forward (common practice, no source).
const RECTIFIER = '.model RECT D(IS=10n N=1.8 RS=0.05 BV=100 IBV=5u)';
/** The trade's rule of thumb for an LED with no rating: 20 mA (common practice, no source). */
const LED_RULE_OF_THUMB_CURRENT = 0.02;

const pair = (resistor: number) => `Two LEDs written as one line, m=2
V1 v5 0 5
R1 v5 a ${resistor}
VAM a b 0
D1 b 0 LEDRED m=2
${RED_LED}
.end
`;
const atHighSupply = (netlist: string) => netlist.replace('V1 v5 0 5', `V1 v5 0 ${5 * 1.05}`); // 5 % default supply tolerance (common practice, no source)

describe.runIf(ngspiceRuns)('m= parts in parallel: ratings per part', () => {
  it('two LEDs on 100 Ω share 33 mA: 16.5 mA each is inside the 20 mA rule of thumb', () => {
    const result = check(pair(100));
    const total = ngspiceValue(atHighSupply(pair(100)), 'i(vam)'); // ngspice 39, with m=2
    expect(total).toBeGreaterThan(LED_RULE_OF_THUMB_CURRENT); // over the rating as a whole…
    expect(total / 2).toBeLessThan(LED_RULE_OF_THUMB_CURRENT); // …and within it per part
    // The solver's numbers are the whole line's, as ngspice's are.
    expect(diodeAt(result, 'D1', 'V1 max').current).toBeCloseTo(total, 7);
    expect(problems(result)).toEqual([]);
    const margin = result.diodes[0]!.corners.find((corner) => corner.corner === 'V1 max')!.margins.find((each) => each.key === 'if')!;
    expect(margin.used).toBeCloseTo(total / 2, 7);
  });

  it('two LEDs on 39 Ω: each part over 20 mA, said per part with m=2', () => {
    const result = check(pair(39));
    const total = ngspiceValue(atHighSupply(pair(39)), 'i(vam)'); // ngspice 39
    expect(total / 2).toBeGreaterThan(LED_RULE_OF_THUMB_CURRENT);
    const [finding] = findingsOf(result, 'led-current-unlimited');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain(`carries ${(total / 2 * 1e3).toPrecision(3)} mA per part, m=2 (${(total * 1e3).toPrecision(3)} mA in all)`);
  });

  const rectifiers = (multiplier: number) => `Rectifier pair written as one line
V1 vin 0 5
R1 vin a 2
VAM a b 0
D1 b 0 RECT m=${multiplier}
*pnlint: rating RECT if=1.5
${RECTIFIER}
.end
`;
  it('forward-overcurrent compares each part of an m= line with its IF', () => {
    const total = ngspiceValue(atHighSupply(rectifiers(2)), 'i(vam)'); // ngspice 39: about 2.2 A for the pair
    expect(total).toBeGreaterThan(1.5); // over one part's 1.5 A (the directive)…
    expect(total / 2).toBeLessThan(1.5); // …but not over each part's
    expect(findingsOf(check(rectifiers(2)), 'forward-overcurrent')).toEqual([]);
    // One part alone on the same 2 Ω carries more than 1.5 A: the rule still fires for it.
    const single = ngspiceValue(atHighSupply(rectifiers(1)), 'i(vam)');
    expect(single).toBeGreaterThan(1.5);
    expect(findingsOf(check(rectifiers(1)), 'forward-overcurrent')).toHaveLength(1);
  });
});
