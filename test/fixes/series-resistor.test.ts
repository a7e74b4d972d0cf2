// Limiting an LED's current: a series resistor inserted, or the one in series re-valued.
// Expected values are worked by hand beside each check: the LED's forward voltage at the
// aimed current from ngspice 39, Ohm's law, the textbook Thevenin equivalent of a divider,
// and the IEC 60063 tables typed in support.ts. The aimed current is 70 % of the LED's
// 20 mA rule-of-thumb rating (keep power below about 50–70 % of a rating; common practice,
// no source), and the supply's max corner is 5 % above nominal (the default supply
// tolerance; common practice, no source).
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import {
  atSource,
  checkWithFixes,
  E12_PUBLISHED,
  E24_PUBLISHED,
  E96_PUBLISHED,
  expectFixHolds,
  findingOf,
  MAIN_URI,
  ngspiceDiodeVoltage,
  ngspiceValue,
  preferredFix,
  roundUpIn,
  tableValues,
} from './support.js';

const ngspiceRuns = declareNgspiceGate();

// A red indicator LED: about 1.9–2.0 V at 10–20 mA (red about 1.8–2.0 V: common practice, no source).
const RED_LED = '.model LEDRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)';
const RATING = 20e-3; // rule of thumb for an LED with no rating (common practice, no source)
const AIMED = 0.7 * RATING; // 70 % margin (common practice, no source)

/** "13.7 mA" as the project's formatter writes three significant digits. */
const milli = (value: number, unit: string) => `${Number((value * 1e3).toPrecision(3))} m${unit}`;

describe.runIf(ngspiceRuns)('a series resistor for an LED with nothing limiting its current', () => {
  const bare = `LED straight across a 5 V rail
V1 vcc 0 5
VAM vcc a 0
D1 a 0 LEDRED ; the power lamp
${RED_LED}
.end
`;

  it('is valued from Voc − Vf over the aimed current (Rth = 0: an ideal source), rounded up in E24', () => {
    const checked = checkWithFixes(bare);
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    const fix = preferredFix(finding);
    // Ohm's law: R = (Voc − Vf(14 mA)) / 14 mA with Voc = 5.25 V (max corner); Vf from ngspice 39.
    const forward = ngspiceDiodeVoltage(RED_LED, AIMED);
    expect(forward).toBeGreaterThan(1.8); // a red LED (common practice, no source)
    const expected = roundUpIn(E24_PUBLISHED, (5.25 - forward) / AIMED); // IEC 60063 E24
    expect(fix.title).toMatch(new RegExp(`^Insert ${expected} Ω series resistor \\(LED [\\d.]+ mA, resistor [\\d.]+ mW\\)$`));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    // The edit: the LED's anode renamed on its line (its comment kept), the resistor right after it.
    expect(files[MAIN_URI]).toBe(bare.replace('D1 a 0 LEDRED ; the power lamp', `D1 D1_anode 0 LEDRED ; the power lamp\nR_D1 a D1_anode ${expected}`));
    // The title's numbers are what ngspice 39 finds in the fixed circuit at the max corner.
    const current = ngspiceValue(atSource(files[MAIN_URI]!, 'V1', 5.25), 'i(vam)');
    expect(current).toBeLessThan(RATING);
    expect(fix.title).toContain(`LED ${milli(current, 'A')}`);
    expect(fix.title).toContain(`resistor ${milli(current * current * expected, 'W')}`); // P = I²R
  });

  it('rounds within the preferred series the settings name (E12, E96)', () => {
    const forward = ngspiceDiodeVoltage(RED_LED, AIMED); // ngspice 39
    const least = (5.25 - forward) / AIMED; // Ohm's law
    for (const [series, table] of [['E12', E12_PUBLISHED], ['E96', E96_PUBLISHED]] as const) {
      const checked = checkWithFixes(bare, { settings: { preferredSeries: series } });
      const finding = findingOf(checked, 'led-current-unlimited', 'D1');
      const fix = preferredFix(finding);
      const expected = roundUpIn(table, least); // IEC 60063
      expect(fix.title, series).toMatch(new RegExp(`^Insert ${expected} Ω `));
      expectFixHolds(checked, finding, fix, ngspiceRuns);
    }
  });

  it('takes the circuit’s Thevenin resistance off: an LED on a divider (Voc = V·R2/(R1+R2), Rth = R1∥R2)', () => {
    const divider = `LED hung on a stiff divider
V1 vcc 0 12
R1 vcc a 100
R2 a 0 100
VAM a b 0
D1 b 0 LEDRED
${RED_LED}
.end
`;
    const checked = checkWithFixes(divider);
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    const fix = preferredFix(finding);
    // Textbook Thevenin equivalent at the max corner: Voc = 12.6 V · 100/200, Rth = 100 Ω ∥ 100 Ω.
    const openVoltage = (12.6 * 100) / 200;
    const theveninResistance = (100 * 100) / 200;
    const forward = ngspiceDiodeVoltage(RED_LED, AIMED); // ngspice 39
    const expected = roundUpIn(E24_PUBLISHED, (openVoltage - forward) / AIMED - theveninResistance); // Ohm's law, IEC 60063 E24
    expect(fix.title).toMatch(new RegExp(`^Insert ${expected} Ω series resistor`));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toContain(`D1 D1_anode 0 LEDRED\nR_D1 b D1_anode ${expected}\n`);
    expect(ngspiceValue(atSource(files[MAIN_URI]!, 'V1', 12.6), 'i(vam)')).toBeLessThan(RATING); // ngspice 39
  });

  it('steps up through the series until a transistor-driven LED is within its rating at every corner', () => {
    const driven = `LED switched by an NPN with no collector resistor
V1 vcc 0 12
VB ctl 0 5
RB ctl base 10k
VAM vcc a 0
D1 a c LEDRED
Q1 c base 0 NPNSW
.model NPNSW NPN(IS=1e-14 BF=100)
${RED_LED}
.end
`;
    const checked = checkWithFixes(driven);
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    // ngspice 39: the transistor lets β·Ib through, well above the rating.
    expect(ngspiceValue(atSource(driven, 'V1', 12.6), 'i(vam)')).toBeGreaterThan(RATING);
    const fix = preferredFix(finding);
    const value = Number(/^Insert (\d+) Ω/.exec(fix.title)?.[1]);
    expect(tableValues(E24_PUBLISHED)).toContain(value); // an IEC 60063 E24 value
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    for (const supply of [11.4, 12, 12.6]) expect(ngspiceValue(atSource(files[MAIN_URI]!, 'V1', supply), 'i(vam)')).toBeLessThan(RATING); // ngspice 39
  });
});

describe.runIf(ngspiceRuns)('re-valuing the resistor in series with an LED that carries too much', () => {
  const hot = `LED with too small a resistor on 5 V
V1 vcc 0 5
R1 vcc a 150
VAM a b 0
D1 b 0 LEDRED
${RED_LED}
.end
`;
  it('changes only the value word, to (Voc − Vf)/I with the resistor itself counted out of Rth', () => {
    // ngspice 39: above the rating at the max corner.
    expect(ngspiceValue(atSource(hot, 'V1', 5.25), 'i(vam)')).toBeGreaterThan(RATING);
    const checked = checkWithFixes(hot);
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    const fix = preferredFix(finding);
    // Ohm's law: the loop needs (5.25 V − Vf(14 mA)) / 14 mA in all, and R1 is all of it.
    const expected = roundUpIn(E24_PUBLISHED, (5.25 - ngspiceDiodeVoltage(RED_LED, AIMED)) / AIMED); // IEC 60063 E24
    expect(fix.title).toMatch(new RegExp(`^Change R1 from 150 Ω to ${expected} Ω \\(LED [\\d.]+ mA, resistor [\\d.]+ mW\\)$`));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(hot.replace('R1 vcc a 150', `R1 vcc a ${expected}`));
  });

  it('writes the value through an m= multiplier and keeps the rest of the line', () => {
    const paralleled = hot.replace('R1 vcc a 150', 'R1 vcc a 300 m=2 ; two in parallel');
    const checked = checkWithFixes(paralleled);
    const fix = preferredFix(findingOf(checked, 'led-current-unlimited', 'D1'));
    const expected = roundUpIn(E24_PUBLISHED, (5.25 - ngspiceDiodeVoltage(RED_LED, AIMED)) / AIMED); // Ohm's law, IEC 60063 E24
    const { files } = expectFixHolds(checked, findingOf(checked, 'led-current-unlimited', 'D1'), fix, ngspiceRuns);
    // SPICE divides the written value by m (ngspice 39 manual): write 2·R.
    expect(files[MAIN_URI]).toContain(`R1 vcc a ${2 * expected} m=2 ; two in parallel\n`);
  });

  it('writes large values in SPICE notation, never M (which SPICE reads as milli)', () => {
    const faint = `LED on a high-voltage rail through a resistor that lets too much through
V1 vcc 0 400
R1 vcc a 10k
VAM a b 0
D1 b 0 LEDRED
*pnlint: rating LEDRED if=300u
${RED_LED}
.end
`;
    const checked = checkWithFixes(faint, { settings: { defaultResistorPower: 2 } });
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    const fix = preferredFix(finding);
    // (420 V − Vf(210 µA)) / 210 µA ≈ 1.99 MΩ → 2 MΩ (Ohm's law, IEC 60063 E24): written 2Meg.
    const expected = roundUpIn(E24_PUBLISHED, (420 - ngspiceDiodeVoltage(RED_LED, 0.7 * 300e-6)) / (0.7 * 300e-6));
    expect(expected).toBeGreaterThanOrEqual(1e6);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toContain(`R1 vcc a ${expected / 1e6}Meg\n`);
  });
});
