// Turning a diode around, and guarding an LED with an anti-parallel diode. Expected
// currents and voltages come from ngspice 39 solving the fixed netlists; the guard's
// forward voltage is the trade's figure for a silicon diode (about 0.7 V; common practice,
// no source).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { GUARD_DIODE_PARAMETERS } from '../../server/src/fixes/index.js';
import { atSource, checkWithFixes, expectFixHolds, findingOf, MAIN_URI, ngspiceDiodeVoltage, ngspiceValue, preferredFix } from './support.js';

const ngspiceRuns = declareNgspiceGate();

const RED_LED = '.model LEDRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)';
const ZENER = '.model Z5V1 D(IS=1e-14 N=1 RS=5 BV=5.1 IBV=1m)';

describe.runIf(ngspiceRuns)('turning a diode around', () => {
  it('swaps only the two node words of a reversed LED, and the title carries its new current', () => {
    const lamp = `reversed panel lamp
V1 vcc 0 5
R1 vcc a 220
VAM a b 0
D1 0 b LEDRED
${RED_LED}
.end
`;
    const checked = checkWithFixes(lamp);
    const finding = findingOf(checked, 'reversed-diode', 'D1');
    const fix = preferredFix(finding);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(lamp.replace('D1 0 b LEDRED', 'D1 b 0 LEDRED'));
    const current = ngspiceValue(atSource(files[MAIN_URI]!, 'V1', 5.25), 'i(vam)'); // ngspice 39, max corner
    expect(fix.title).toBe(`Turn D1 around (anode to b, cathode to 0; it then carries ${Number((current * 1e3).toPrecision(3))} mA)`);
  });

  it('swaps node words written across a continuation line', () => {
    const split = `reversed lamp written on two lines
V1 vcc 0 5
R1 vcc a 220
D1 0
+ a LEDRED ; panel
${RED_LED}
.end
`;
    const checked = checkWithFixes(split);
    const finding = findingOf(checked, 'reversed-diode', 'D1');
    const { files } = expectFixHolds(checked, finding, preferredFix(finding), ngspiceRuns);
    expect(files[MAIN_URI]).toBe(split.replace('D1 0\n+ a LEDRED', 'D1 a\n+ 0 LEDRED'));
  });

  it('turns the bundled relay clamp diode around', () => {
    const text = readFileSync(new URL('../../server/examples/relay-clamp-reversed.cir', import.meta.url), 'utf8');
    const checked = checkWithFixes(text);
    const finding = findingOf(checked, 'reversed-diode', 'DCLAMP');
    const fix = preferredFix(finding);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(text.replace('DCLAMP vcc coil SIGNAL', 'DCLAMP coil vcc SIGNAL'));
    expect(fix.title).toMatch(/^Turn DCLAMP around \(anode to coil, cathode to vcc; it then blocks [\d.]+ m?V\)$/);
  });

  it('turns a zener placed forward into its regulating position', () => {
    const forward = `zener placed forward
V1 vin 0 12
R1 vin z 680
D1 z 0 Z5V1
RL z 0 2k
*pnlint: rating Z5V1 kind=zener vz=5.1 izk=1m pd=500m
${ZENER}
.end
`;
    const checked = checkWithFixes(forward);
    const finding = findingOf(checked, 'zener-forward', 'D1');
    const { files } = expectFixHolds(checked, finding, preferredFix(finding), ngspiceRuns);
    expect(files[MAIN_URI]).toBe(forward.replace('D1 z 0 Z5V1', 'D1 0 z Z5V1'));
    // ngspice 39: the zener now holds about its 5.1 V rating.
    expect(ngspiceValue(files[MAIN_URI]!, 'v(z)')).toBeCloseTo(5.1, 0);
  });
});

describe.runIf(ngspiceRuns)('an anti-parallel diode across an LED that sees reverse voltage', () => {
  // An indicator on a 12 V AC winding: at the negative peak the LED alone would take the whole reverse voltage.
  const ac = `indicator LED on a 12 V AC winding
V1 line 0 SIN(0 12 50)
R1 line a 1k
D1 a 0 LEDRED
${RED_LED}
.end
`;

  it('is inserted right after the LED line with its own model, and the LED then sees only its forward voltage', () => {
    const checked = checkWithFixes(ac);
    const finding = findingOf(checked, 'reverse-overvoltage', 'D1');
    const fix = preferredFix(finding);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(ac.replace('D1 a 0 LEDRED\n', `D1 a 0 LEDRED\nD1_GUARD 0 a SI_GUARD_D1\n.model SI_GUARD_D1 D(${GUARD_DIODE_PARAMETERS})\n`));
    // ngspice 39 at the negative peak (12 V amplitude + 5 % default tolerance; common practice, no source).
    const reverse = -ngspiceValue(files[MAIN_URI]!.replace('SIN(0 12 50)', '-12.6'), 'v(a)');
    expect(reverse).toBeGreaterThan(0.5);
    expect(reverse).toBeLessThan(1); // about 0.7 V for a silicon junction (common practice, no source)
    expect(fix.title).toMatch(new RegExp(`^Add anti-parallel diode D1_GUARD across D1 \\(LED reverse voltage [\\d.]+ V → ${Number((reverse * 1e3).toPrecision(3))} mV\\)$`));
  });

  it('uses a guard model that is a silicon small-signal diode: about 0.7 V at a few mA', () => {
    const forward = ngspiceDiodeVoltage(`.model GUARD D(${GUARD_DIODE_PARAMETERS})`, 5e-3); // ngspice 39
    expect(forward).toBeGreaterThan(0.6); // about 0.7 V for silicon (common practice, no source)
    expect(forward).toBeLessThan(0.8);
  });

  it('is not offered where the guard would short an ideal source', () => {
    const stiff = `LED reversed straight across a 12 V rail
V1 vcc 0 12
D1 0 vcc LEDRED
${RED_LED}
.end
`;
    const checked = checkWithFixes(stiff);
    const finding = findingOf(checked, 'reverse-overvoltage', 'D1');
    expect(finding.fixes.filter((fix) => fix.title.startsWith('Add anti-parallel'))).toEqual([]);
  });
});
