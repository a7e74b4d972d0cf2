// LED strings and current sinks in led-current-unlimited (and the string in overdissipation):
// a sink's LED current is named with the transistor and the emitter (source) resistor that
// set it, the LEDs of one series string are one finding, and a saturated switch is no sink.
// Expected numbers come from ngspice 39 on the same netlists (an ammeter source in the LED's
// lead, as verification.md says), from the textbook op-amp result (negative feedback holds the
// source resistor at the reference voltage), or from a stated rule of thumb.
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, findingsOf, ngspiceValue, problems } from './support.js';
import { MOSFET_BEACON, NPN_SINK, shelfStrip } from '../support/led-sinks.js';

const ngspiceRuns = declareNgspiceGate();

/** The LED rule of thumb with no rating: 20 mA continuous (common practice, no source). */
const LED_RULE_OF_THUMB = 20e-3;
/** The default supply tolerance: 5 % (common practice, no source; settings.ts). */
const HIGH = 1.05;
/** Messages print three significant digits: rounding moves a value by up to 0.5 % (units.ts), so 1 % leaves room for both solvers. */
const PRINTED = 0.01;
/** A small-signal bipolar transistor saturates at about 0.1–0.3 V collector to emitter (common practice, no source). */
const SATURATED_BELOW = 0.3;

const SCALE: Record<string, number> = { n: 1e-9, µ: 1e-6, u: 1e-6, m: 1e-3, '': 1, k: 1e3 };

/** The first quantity in `unit` after the words `after`: "carries 30.1 mA" → 0.0301. */
function quantityAfter(text: string, after: string, unit: string): number {
  const match = new RegExp(`${after}\\s*(-?\\d+(?:\\.\\d+)?)\\s*([nµumk]?)${unit}`).exec(text);
  if (!match) throw new Error(`no ${unit} after "${after}" in: ${text}`);
  return Number(match[1]) * SCALE[match[2]!]!;
}

const near = (actual: number, expected: number, relative = PRINTED) => Math.abs(actual - expected) <= relative * Math.abs(expected);

/** The netlist with one line replaced (by its first word), for a corner or an ammeter. */
function withLine(netlist: string, name: string, replacement: string): string {
  const lines = netlist.split('\n');
  const index = lines.findIndex((line) => line.split(/\s+/)[0]!.toLowerCase() === name.toLowerCase());
  if (index < 0) throw new Error(`no line ${name}`);
  lines[index] = replacement;
  return lines.join('\n');
}

describe.runIf(ngspiceRuns)('an LED in the collector of a current sink', () => {
  it('names the transistor and its emitter resistor as what sets the current, with ngspice 39 numbers', () => {
    const [finding, ...more] = findingsOf(check(NPN_SINK), 'led-current-unlimited');
    expect(more).toEqual([]);
    expect(finding!.element).toBe('DBLUE');
    expect(finding!.severity).toBe('error');
    expect(finding!.message).toMatch(/the current sink Q1 sets it with its emitter resistor RS \(18 Ω, [\d.]+ mV across it\), so RS is the value to change/);
    // ngspice 39 at the high corner (9 V + 5 %): the LED's current through an ammeter, and the emitter voltage.
    const deck = withLine(withLine(NPN_SINK, 'V9', `V9 v9 0 DC ${9 * HIGH}`), 'DBLUE', 'VAM v9 va DC 0\nDBLUE va k LEDBLUE');
    const current = ngspiceValue(deck, 'i(vam)');
    expect(current).toBeGreaterThan(LED_RULE_OF_THUMB);
    expect(near(quantityAfter(finding!.message, 'carries', 'A'), current)).toBe(true);
    expect(near(quantityAfter(finding!.message, '18 Ω,', 'V'), ngspiceValue(deck, 'v(e)'))).toBe(true);
    // The transistor and the resistor are related locations (file lines 6 and 7; ranges count from 0).
    const lines = finding!.related.map((each) => `${each.location.range.start.line + 1} ${each.message}`);
    expect(lines).toContain('6 Q1, the current sink');
    expect(lines).toContain('7 RS (18 Ω), which sets the current');
  });

  it('says nothing when the emitter resistor holds the LED within its rating (47 Ω: ngspice 39 under 20 mA at 9.45 V)', () => {
    const good = withLine(NPN_SINK, 'RS', 'RS e 0 47');
    const deck = withLine(withLine(good, 'V9', `V9 v9 0 DC ${9 * HIGH}`), 'DBLUE', 'VAM v9 va DC 0\nDBLUE va k LEDBLUE');
    expect(ngspiceValue(deck, 'i(vam)')).toBeLessThan(LED_RULE_OF_THUMB);
    expect(problems(check(good))).toEqual([]);
  });

  it('an N-MOSFET sink regulated by an amplifier: the source resistor, at the reference voltage over its value', () => {
    const netlist = MOSFET_BEACON;
    const [finding] = findingsOf(check(netlist), 'led-current-unlimited');
    expect(finding!.element).toBe('DAMB');
    expect(finding!.message).toMatch(/the current sink M1 sets it with its source resistor RSNS \(10 Ω, 500 mV across it\)/);
    // Negative feedback holds the source at VREF: I = 0.5 V / 10 Ω = 50 mA (textbook op-amp result); ngspice 39 agrees.
    expect(near(quantityAfter(finding!.message, 'carries', 'A'), 0.5 / 10)).toBe(true);
    const deck = withLine(netlist, 'DAMB', 'VAM v12 va DC 0\nDAMB va k LEDAMB');
    expect(near(ngspiceValue(deck, 'i(vam)'), 0.5 / 10)).toBe(true);
    // The source resistor is named once, as what sets the current, not also as a resistor in series.
    expect(finding!.related.filter((each) => each.message.startsWith('RSNS'))).toHaveLength(1);
  });

  it('a PNP current source above the LED is called a current source', () => {
    const netlist = `Door chime light: red LED below a PNP current source
V5 v5 0 DC 5
RE v5 e 22
Q2 c b e PNPSMALL
DB1 v5 m SIG
DB2 m b SIG
RB b 0 2.2k
DRED c 0 LEDRED
.model SIG D(IS=2n N=1.8 RS=0.5)
.model LEDRED D(IS=1e-20 N=1.8 RS=2)
.model PNPSMALL PNP(IS=2e-14 BF=180 VAF=50)
.end
`;
    const [finding] = findingsOf(check(netlist), 'led-current-unlimited');
    expect(finding!.message).toMatch(/the current source Q2 sets it with its emitter resistor RE \(22 Ω/);
    const deck = withLine(withLine(netlist, 'V5', `V5 v5 0 DC ${5 * HIGH}`), 'DRED', 'VAM c ca DC 0\nDRED ca 0 LEDRED');
    expect(near(quantityAfter(finding!.message, 'carries', 'A'), ngspiceValue(deck, 'i(vam)'))).toBe(true);
  });

  it('a switch driven hard into saturation is no sink, even with an emitter resistor', () => {
    const netlist = `Fault lamp: red LED switched by an NPN driven hard, with a small emitter resistor
V5 v5 0 DC 5
VDRV drv 0 DC 5
RBASE drv b 1k
Q3 k b e NPNSMALL
REM e 0 10
RC v5 a 47
DLAMP a k LEDRED
.model LEDRED D(IS=1e-20 N=1.8 RS=2)
.model NPNSMALL NPN(IS=2e-14 BF=200 VAF=60)
.end
`;
    // ngspice 39 at nominal values: the transistor is saturated, so the collector resistor sets the current.
    const nodes = ['v(k)', 'v(e)'].map((vector) => ngspiceValue(netlist, vector));
    expect(nodes[0]! - nodes[1]!).toBeLessThan(SATURATED_BELOW);
    const [finding] = findingsOf(check(netlist), 'led-current-unlimited');
    expect(finding!.element).toBe('DLAMP');
    expect(finding!.message).not.toMatch(/current sink/);
    expect(finding!.related.map((each) => each.message)).toContain('RC (47 Ω) in series');
  });
});

describe.runIf(ngspiceRuns)('LEDs in one series string', () => {
  const STRING = shelfStrip('if=20m pd=60m');

  it('are one over-current finding and one power finding, on the first LED, naming the others', () => {
    const result = check(STRING);
    const [current, ...moreCurrent] = findingsOf(result, 'led-current-unlimited');
    const [power, ...morePower] = findingsOf(result, 'overdissipation');
    expect(moreCurrent).toEqual([]);
    expect(morePower).toEqual([]);
    for (const finding of [current!, power!]) {
      expect(finding.element).toBe('D1');
      expect(finding.severity).toBe('error'); // ratings from a directive
      expect(finding.message).toMatch(/^LEDs D1, D2, D3 in series /);
      const related = finding.related.map((each) => `${each.location.range.start.line + 1} ${each.message}`);
      expect(related).toContain('5 D2, in series with D1: the same current');
      expect(related).toContain('6 D3, in series with D1: the same current');
    }
    // ngspice 39 at the high corner (12.6 V): the string's current by Ohm's law on RLIM, and D1's power.
    const deck = withLine(STRING, 'V12', `V12 v12 0 DC ${12 * HIGH}`);
    const [supply, anode, middle] = ['v(v12)', 'v(a)', 'v(s1)'].map((vector) => ngspiceValue(deck, vector));
    const stringCurrent = (supply! - anode!) / 47;
    expect(stringCurrent).toBeGreaterThan(20e-3); // IF 20 mA, the directive
    expect(near(quantityAfter(current!.message, 'carry', 'A'), stringCurrent)).toBe(true);
    const ledPower = (anode! - middle!) * stringCurrent;
    expect(ledPower).toBeGreaterThan(60e-3); // PD 60 mW, the directive
    expect(near(quantityAfter(power!.message, 'each dissipate', 'W'), ledPower)).toBe(true);
  });

  it('a tap between two LEDs splits the string: D1 alone, D2 and D3 together, each with its own current', () => {
    // RTAP draws current from the node between D1 and D2, so D1 carries more than D2 and D3.
    const tapped = STRING.replace('D3 s2 0 LEDW', 'D3 s2 0 LEDW\nRTAP s1 0 1k');
    const findings = findingsOf(check(tapped), 'led-current-unlimited');
    expect(findings.map((finding) => finding.element)).toEqual(['D1', 'D2']);
    expect(findings[0]!.message).toMatch(/^LED D1 carries /);
    expect(findings[1]!.message).toMatch(/^LEDs D2, D3 in series carry /);
    // ngspice 39 at 12.6 V: D1's current by Ohm's law on RLIM, the lower string's through an ammeter.
    const deck = withLine(withLine(tapped, 'V12', `V12 v12 0 DC ${12 * HIGH}`), 'D2', 'VAM s1 s1a DC 0\nD2 s1a s2 LEDW');
    const [supply, anode] = ['v(v12)', 'v(a)'].map((vector) => ngspiceValue(deck, vector));
    expect(near(quantityAfter(findings[0]!.message, 'carries', 'A'), (supply! - anode!) / 47)).toBe(true);
    expect(near(quantityAfter(findings[1]!.message, 'carry', 'A'), ngspiceValue(deck, 'i(vam)'))).toBe(true);
  });
});
