// Re-valuing a starved zener's feed resistor inside the textbook shunt-regulator window
// (e.g. Sedra & Smith, Microelectronic Circuits): Rmax = (Vs,min − Vz)/(Iz,min + IL,max),
// Rmin = (Vs,max − Vz)/(Iz,max + IL,min), with IL = Vz/RL for a resistive load (Ohm's law)
// and the zener's own voltage at Iz,min and at Iz,max from ngspice 39. Iz,max = PD/VZ from
// the directive's ratings. The value picked is the IEC 60063 E24 value nearest the window's
// geometric middle (ours: the most margin on both limits).
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

/** The E24 value nearest the window's geometric middle (log scale). */
function nearestMiddle(low: number, high: number): number {
  const middle = Math.sqrt(low * high);
  const inside = tableValuesBetween(E24_PUBLISHED, low, high); // IEC 60063 E24
  return inside.reduce((best, value) => (Math.abs(Math.log(value / middle)) < Math.abs(Math.log(best / middle)) ? value : best));
}

describe.runIf(ngspiceRuns)('a zener starved at low supply', () => {
  // 11 V ± 5 % (default supply tolerance; common practice, no source), 2 kΩ load, 1.8 kΩ feed.
  const starved = regulator(11, 1800, 2000, 'vz=5.1 izk=1m pd=500m');
  const load = 2000;
  const maximumCurrent = 0.5 / 5.1; // IZM = PD / VZ

  it('gets a resistor value inside the textbook window, the window in its title', () => {
    const checked = checkWithFixes(starved);
    const finding = findingOf(checked, 'zener-underbiased', 'D1');
    const fix = preferredFix(finding);
    const atKnee = -ngspiceDiodeVoltage(ZENER, -KNEE); // ngspice 39: the zener's voltage at Iz,min
    const atMaximum = -ngspiceDiodeVoltage(ZENER, -maximumCurrent); // ngspice 39: at Iz,max
    // Textbook window, IL = Vz / RL at each end.
    const largest = (11 * 0.95 - atKnee) / (KNEE + atKnee / load);
    const least = (11 * 1.05 - atMaximum) / (maximumCurrent + atMaximum / load);
    expect(fix.title).toContain(`window ${ohms(least)} to ${ohms(largest)}`);
    const chosen = nearestMiddle(least, largest);
    expect(fix.title).toMatch(new RegExp(`^Change R1 from 1.8 kΩ to ${ohms(chosen)} \\(zener [\\d.]+ mA to [\\d.]+ mA, resistor [\\d.]+ mW`));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(starved.replace('R1 vin z 1800', `R1 vin z ${chosen}`));
    // ngspice 39 at both supply corners: the zener regulates at the low one and stays under IZM at the high one.
    expect(ngspiceValue(atSource(files[MAIN_URI]!, 'V1', 11 * 0.95), 'i(vam)')).toBeGreaterThan(KNEE);
    expect(ngspiceValue(atSource(files[MAIN_URI]!, 'V1', 11 * 1.05), 'i(vam)')).toBeLessThan(maximumCurrent);
  });

  it('says that no value can help when the supply range is too wide, and offers only the ignore fix', () => {
    // 7 V to 24 V with IZM = 100 mW / 5.1 V: Rmax ≈ (7 − 5.1)/(1 mA + 2.55 mA) ≈ 533 Ω is below
    // Rmin ≈ (24 − Vz)/(19.6 mA + IL) ≈ 850 Ω (textbook window): there is no window.
    const wide = regulator(11, 1800, 2000, 'vz=5.1 izk=1m pd=100m', '*pnlint: supply V1 min=7 max=24\n');
    const checked = checkWithFixes(wide);
    const finding = findingOf(checked, 'zener-underbiased', 'D1');
    expect(finding.fixes.filter((fix) => !fix.title.startsWith('Ignore'))).toEqual([]);
    expect(finding.fixes.every((fix) => !fix.preferred)).toBe(true);
    const atKnee = -ngspiceDiodeVoltage(ZENER, -KNEE); // ngspice 39
    const highCurrent = 0.1 / 5.1;
    const atMaximum = -ngspiceDiodeVoltage(ZENER, -highCurrent); // ngspice 39
    const largest = (7 - atKnee) / (KNEE + atKnee / load);
    const least = (24 - atMaximum) / (highCurrent + atMaximum / load);
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
    expect(fix.title).toMatch(/^Change RFEED from 680 Ω to /);
    expectFixHolds(checked, finding, fix, ngspiceRuns);
  });
});
