// Re-valuing a starved zener's feed resistor inside the textbook shunt-regulator window
// (e.g. Sedra & Smith, Microelectronic Circuits): Rmax = (Vs,min − Vz)/(Iz,min + IL,max),
// Rmin = (Vs,max − Vz)/Iz,max (the light-load end with the load taken away), with
// IL = Vz/RL for a resistive load (Ohm's law), Iz,max = PD/VZ from the ratings, and Vz the
// zener's own voltage at Iz,min from ngspice 39. The value picked is the largest IEC 60063
// E24 value that stays inside the window at its ±5 % tolerance (IEC 60063: E24 is made for
// ±5 %): near the top of the window, where the zener and the resistor dissipate least.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import {
  atSource,
  checkWithFixes,
  E24_PUBLISHED,
  expectFixHolds,
  findingOf,
  MAIN_URI,
  ngspiceDiodeVoltage,
  ngspiceValue,
  preferredFix,
  tableValuesBetween,
} from './support.js';

const ngspiceRuns = declareNgspiceGate();

const ZENER = '.model Z5V1 D(IS=1e-14 N=1 RS=5 BV=5.1 IBV=1m)';
const KNEE = 1e-3; // IZK from the directive

const regulator = (supply: number, series: number, load: number, ratings: string, extra = '') => `5.1 V zener shunt regulator
V1 vin 0 ${supply}
R1 vin z ${series}
VAM z zk 0
D1 0 zk Z5V1
RL z 0 ${load}
*pnlint: rating Z5V1 kind=zener ${ratings}
${extra}${ZENER}
.end
`;

/** Ohms as the project's formatter writes them, three significant digits: `57.9 Ω`, `1.5 kΩ`. */
const ohms = (value: number) => (value >= 1000 ? `${Number((value / 1000).toPrecision(3))} kΩ` : `${Number(value.toPrecision(3))} Ω`);

/** A resistance as a SPICE line spells it (`1.3k`, `750`), as the fixes write it (`M` would be milli, so no megohms here). */
const spiceOhms = (value: number) => (value >= 1000 ? `${Number((value / 1000).toPrecision(6))}k` : `${value}`);

/** The netlist with one element line's value replaced; fails when the line is not there as written. */
function withValue(netlist: string, line: string, value: number): string {
  expect(netlist).toContain(line);
  return netlist.replace(line, `${line.split(' ').slice(0, 3).join(' ')} ${value}`);
}

/** The largest E24 value (IEC 60063) whose ±tolerance stays inside [low, high]. */
function largestInside(low: number, high: number, tolerance: number): number {
  const inside = tableValuesBetween(E24_PUBLISHED, low / (1 - tolerance), high / (1 + tolerance));
  expect(inside.length, `no E24 value inside ${low} Ω to ${high} Ω at ±${tolerance}`).toBeGreaterThan(0);
  return inside[inside.length - 1]!;
}

/** The zener's reverse current by ngspice 39 at one supply voltage (the ammeter VAM sits on its cathode side, so it reads the reverse current). */
const zenerCurrentAt = (netlist: string, supply: number) => ngspiceValue(atSource(netlist, 'V1', supply), 'i(vam)');

/** E24's tolerance (IEC 60063). */
const E24_TOLERANCE = 0.05;

describe.runIf(ngspiceRuns)('a zener starved at low supply', () => {
  // 11 V ± 5 % (default supply tolerance; common practice, no source), 2 kΩ load, 1.8 kΩ feed.
  const starved = regulator(11, 1800, 2000, 'vz=5.1 izk=1m pd=500m');
  const load = 2000;
  const maximumCurrent = 0.5 / 5.1; // IZM = PD / VZ (the directive's ratings)

  it('gets the largest E24 value inside the textbook window, the window in its title', () => {
    const checked = checkWithFixes(starved);
    const finding = findingOf(checked, 'zener-underbiased', 'D1');
    const fix = preferredFix(finding);
    const zenerVoltage = -ngspiceDiodeVoltage(ZENER, -KNEE); // ngspice 39: the zener's voltage at Iz,min
    // Textbook window: IL,max = Vz / RL at the low end; no load at the high end.
    const largest = (11 * 0.95 - zenerVoltage) / (KNEE + zenerVoltage / load);
    const least = (11 * 1.05 - zenerVoltage) / maximumCurrent;
    expect(fix.title).toContain(`window ${ohms(least)} to ${ohms(largest)})`);
    const chosen = largestInside(least, largest, E24_TOLERANCE);
    expect(fix.title).toMatch(new RegExp(`^Change R1 from 1.8 kΩ to ${ohms(chosen)} \\(zener [\\d.]+ mA to [\\d.]+ mA, resistor [\\d.]+ mW`));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(starved.replace('R1 vin z 1800', `R1 vin z ${spiceOhms(chosen)}`));
    // ngspice 39 at every supply corner: the zener regulates and stays under IZM.
    for (const supply of [11 * 0.95, 11, 11 * 1.05]) {
      const current = zenerCurrentAt(files[MAIN_URI]!, supply);
      expect(current).toBeGreaterThanOrEqual(KNEE);
      expect(current).toBeLessThanOrEqual(maximumCurrent);
    }
  });

  it('keeps a rated tolerance inside the window at both ends, with the load at its low tolerance', () => {
    // 1 % resistors (a setting): the window's top with the load 1 % low, the value 1 % high.
    const tolerance = 0.01;
    const checked = checkWithFixes(starved, { settings: { resistorTolerance: tolerance } });
    const finding = findingOf(checked, 'zener-underbiased', 'D1');
    const fix = preferredFix(finding);
    const zenerVoltage = -ngspiceDiodeVoltage(ZENER, -KNEE); // ngspice 39
    const largest = (11 * 0.95 - zenerVoltage) / (KNEE + zenerVoltage / (load * (1 - tolerance))); // textbook window
    const least = (11 * 1.05 - zenerVoltage) / maximumCurrent;
    expect(fix.title).toContain(`window ${ohms(least)} to ${ohms(largest)})`);
    const chosen = largestInside(least, largest, tolerance);
    expect(fix.title).toMatch(new RegExp(`^Change R1 from 1.8 kΩ to ${ohms(chosen)} `));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    // ngspice 39 at the worst corner: low supply, feed 1 % high, load 1 % low.
    const fitted = `R1 vin z ${spiceOhms(chosen)}`;
    const worst = withValue(withValue(files[MAIN_URI]!, fitted, chosen * (1 + tolerance)), `RL z 0 ${load}`, load * (1 - tolerance));
    expect(zenerCurrentAt(worst, 11 * 0.95)).toBeGreaterThanOrEqual(KNEE);
    // And at the high corner with the feed 1 % low: under IZM.
    const hottest = withValue(files[MAIN_URI]!, fitted, chosen * (1 - tolerance));
    expect(zenerCurrentAt(hottest, 11 * 1.05)).toBeLessThanOrEqual(maximumCurrent);
  });

  it('says which bound rests on a typical value when the part gives no PD or IZK', () => {
    // IZT only: IZK and PD come from the library's small-zener class (typical values, from memory: 1 mA, 500 mW).
    const typical = regulator(11, 1800, 2000, 'vz=5.1 izt=5m');
    const checked = checkWithFixes(typical);
    const finding = findingOf(checked, 'zener-underbiased', 'D1');
    const fix = preferredFix(finding);
    const zenerVoltage = -ngspiceDiodeVoltage(ZENER, -KNEE); // ngspice 39
    const largest = (11 * 0.95 - zenerVoltage) / (KNEE + zenerVoltage / load); // textbook window
    const least = (11 * 1.05 - zenerVoltage) / (0.5 / 5.1);
    expect(fix.title).toContain(`window ${ohms(least)} to ${ohms(largest)}, lower bound from a typical PD of 500 mW, upper bound from a typical IZK of 1 mA)`);
    expect(fix.title).toContain(`to ${ohms(largestInside(least, largest, E24_TOLERANCE))} (`);
    expectFixHolds(checked, finding, fix, ngspiceRuns);
  });

  it('says that no value can help when the supply range is too wide, and offers only the ignore fix', () => {
    // 7 V to 24 V with IZM = 100 mW / 5.1 V: Rmax ≈ (7 − 5.1)/(1 mA + 2.55 mA) ≈ 533 Ω is below
    // Rmin ≈ (24 − 5.1)/19.6 mA ≈ 964 Ω (textbook window): there is no window.
    const wide = regulator(11, 1800, 2000, 'vz=5.1 izk=1m pd=100m', '*pnlint: supply V1 min=7 max=24\n');
    const checked = checkWithFixes(wide);
    const finding = findingOf(checked, 'zener-underbiased', 'D1');
    expect(finding.fixes.filter((fix) => !fix.title.startsWith('Ignore'))).toEqual([]);
    expect(finding.fixes.every((fix) => !fix.preferred)).toBe(true);
    const zenerVoltage = -ngspiceDiodeVoltage(ZENER, -KNEE); // ngspice 39
    const largest = (7 - zenerVoltage) / (KNEE + zenerVoltage / load);
    const least = (24 - zenerVoltage) / (0.1 / 5.1);
    expect(largest).toBeLessThan(least);
    expect(finding.message).toContain('No value of R1 can fix this');
    expect(finding.message).toContain(`needs at most ${ohms(largest)}`);
    expect(finding.message).toContain(`needs at least ${ohms(least)}`);
    expect(finding.message).toContain('the supply range is too wide for this zener and load');
  });

  it('says so when even no resistance would bias it: the supply is below the zener voltage', () => {
    const low = regulator(11, 1800, 2000, 'vz=5.1 izk=1m pd=500m', '*pnlint: supply V1 min=4.5 max=12\n');
    const checked = checkWithFixes(low);
    const finding = findingOf(checked, 'zener-underbiased', 'D1');
    expect(finding.fixes.filter((fix) => !fix.title.startsWith('Ignore'))).toEqual([]);
    expect(finding.message).toContain('the supply is too low for it');
  });

  it('fixes the bundled starved-zener demo', () => {
    const text = readFileSync(new URL('../../server/examples/starved-zener.cir', import.meta.url), 'utf8');
    const checked = checkWithFixes(text);
    const finding = findingOf(checked, 'zener-underbiased', 'DREF');
    const fix = preferredFix(finding);
    // The demo's own values: 7.2 V to 9.6 V, a 2 kΩ sensor, IZK 1 mA, PD 500 mW, VZ 5.1 V; the zener's voltage at IZK from ngspice 39.
    const zenerVoltage = -ngspiceDiodeVoltage('.model ZREF D(IS=1e-14 N=1 RS=8 BV=5.1 IBV=1m)', -KNEE);
    const largest = (7.2 - zenerVoltage) / (KNEE + zenerVoltage / 2000); // textbook window
    const least = (9.6 - zenerVoltage) / (0.5 / 5.1);
    const chosen = largestInside(least, largest, E24_TOLERANCE);
    expect(fix.title).toMatch(new RegExp(`^Change RFEED from 680 Ω to ${ohms(chosen)} .*window ${ohms(least)} to ${ohms(largest)}\\)$`));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    // ngspice 39 at both battery ends and nominal: IZK ≤ Iz ≤ PD/VZ, read by a 0 V ammeter on the cathode side.
    expect(files[MAIN_URI]).toContain('DREF 0 ref ZREF');
    const probed = files[MAIN_URI]!.replace('DREF 0 ref ZREF', 'VAM ref zk 0\nDREF 0 zk ZREF');
    for (const battery of [7.2, 9, 9.6]) {
      const current = ngspiceValue(atSource(probed, 'VBAT', battery), 'i(vam)');
      expect(current).toBeGreaterThanOrEqual(KNEE);
      expect(current).toBeLessThanOrEqual(0.5 / 5.1);
    }
  });
});
