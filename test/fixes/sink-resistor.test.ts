// Fixing an LED whose current sink is set too high: the sink's emitter (source) resistor is
// re-valued, not a resistor inserted in series (which would saturate the sink and leave the
// current to the supply). Expected values come from ngspice 39 (the smallest E24 value that
// holds the LED at the aimed current, found by solving each candidate), from the textbook
// op-amp result (negative feedback holds the source resistor at the reference: I = VREF / R),
// and from the IEC 60063 tables typed in support.ts. The aim is 70 % of the LED's 20 mA rule
// of thumb (keep power below about 50–70 % of a rating; common practice, no source); the
// supply corners are ±5 % (the default supply tolerance; common practice, no source).
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { checkWithFixes, E24_PUBLISHED, expectFixHolds, findingOf, MAIN_URI, ngspiceValue, ngspiceValues, preferredFix, roundUpIn, tableValuesBetween } from './support.js';
import { MOSFET_BEACON, NPN_SINK, shelfStrip } from '../support/led-sinks.js';

const ngspiceRuns = declareNgspiceGate();

const RATING = 20e-3; // rule of thumb for an LED with no rating (common practice, no source)
const AIMED = 0.7 * RATING; // 70 % margin (common practice, no source)
/** A small-signal bipolar transistor saturates at about 0.1–0.3 V collector to emitter (common practice, no source). */
const SATURATED_BELOW = 0.3;
/** A lit indicator draws at least about 0.1 mA (common practice, no source). */
const LIT = 100e-6;

/** The source's line rewritten to a DC value (`V9 v9 0 DC 9.45`), to ask ngspice for a corner. */
function atSource(netlist: string, source: string, value: number): string {
  return netlist.replace(new RegExp(`^(${source} \\S+ \\S+) DC \\S+`, 'm'), `$1 DC ${value}`);
}

/** "13.2 mA" → 0.0132; "5.03 V" → 5.03. */
function quantity(text: string, unit: 'mA' | 'V'): number {
  return Number(text) * (unit === 'mA' ? 1e-3 : 1);
}

/** The netlist with an ammeter in the LED's lead and the supply at `supply`, as ngspice 39 solves it: LED current and the sink's collector-emitter voltage. */
function sinkAt(netlist: string, supply: number): { current: number; collectorEmitter: number } {
  const deck = atSource(netlist, 'V9', supply).replace('DBLUE v9 k LEDBLUE', 'VAM v9 va DC 0\nDBLUE va k LEDBLUE');
  const values = ngspiceValues(deck, ['i(vam)', 'v(k)', 'v(e)']);
  return { current: values.get('i(vam)')!, collectorEmitter: values.get('v(k)')! - values.get('v(e)')! };
}

describe.runIf(ngspiceRuns)('an LED whose current sink is set too high', () => {
  it('gets its emitter resistor re-valued: the smallest E24 value that ngspice 39 shows holding the aim at the high corner', () => {
    const checked = checkWithFixes(NPN_SINK);
    const finding = findingOf(checked, 'led-current-unlimited', 'DBLUE');
    const fix = preferredFix(finding);
    const match = /^Change RS from 18 Ω to (\d+) Ω \(LED ([\d.]+) mA, resistor [\d.]+ mW, Q1 collector-emitter ([\d.]+) V or more\)$/.exec(fix.title);
    expect(match, fix.title).not.toBeNull();
    // The oracle: ngspice 39 at 9.45 V for each E24 value from 18 Ω up; the first at or under 14 mA.
    const expected = tableValuesBetween(E24_PUBLISHED, 18, 200).find((value) => sinkAt(NPN_SINK.replace('RS e 0 18', `RS e 0 ${value}`), 9 * 1.05).current <= AIMED);
    expect(Number(match![1])).toBe(expected);
    // No resistor inserted in series with the LED: a one-word edit of RS's line.
    expect(finding.fixes.some((each) => each.title.startsWith('Insert'))).toBe(false);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(NPN_SINK.replace('RS e 0 18', `RS e 0 ${expected}`));
    // ngspice 39 on the fixed circuit at every corner: lit, under the aim, and the sink still out of saturation.
    const corners = [9 * 0.95, 9, 9 * 1.05].map((supply) => sinkAt(files[MAIN_URI]!, supply));
    for (const corner of corners) {
      expect(corner.current).toBeLessThanOrEqual(AIMED);
      expect(corner.current).toBeGreaterThan(LIT);
      expect(corner.collectorEmitter).toBeGreaterThan(SATURATED_BELOW);
    }
    // The title's numbers are ngspice's: the LED at the high corner, the least headroom at the low corner.
    expect(Math.abs(quantity(match![2]!, 'mA') - corners[2]!.current)).toBeLessThanOrEqual(0.01 * corners[2]!.current);
    expect(Math.abs(quantity(match![3]!, 'V') - corners[0]!.collectorEmitter)).toBeLessThanOrEqual(0.01 * corners[0]!.collectorEmitter);
  });

  it('would lose its regulation to a series resistor: the one that holds 14 mA saturates the sink (ngspice 39)', () => {
    // Why no series resistor is offered: the smallest E24 resistor in series with the LED that
    // brings it to the aim at 9.45 V leaves the transistor below its saturation voltage.
    const withSeries = (value: number) => NPN_SINK.replace('DBLUE v9 k LEDBLUE', `RSER v9 vs ${value}\nDBLUE vs k LEDBLUE`);
    const at = (value: number) => {
      const values = ngspiceValues(atSource(withSeries(value), 'V9', 9 * 1.05), ['v(v9)', 'v(vs)', 'v(k)', 'v(e)']);
      return { current: (values.get('v(v9)')! - values.get('v(vs)')!) / value, collectorEmitter: values.get('v(k)')! - values.get('v(e)')! };
    };
    const value = tableValuesBetween(E24_PUBLISHED, 10, 10e3).find((candidate) => at(candidate).current <= AIMED)!;
    expect(at(value).collectorEmitter).toBeLessThan(SATURATED_BELOW);
  });

  it('an amplifier-regulated N-MOSFET sink: the source resistor becomes VREF / 14 mA rounded up in E24', () => {
    const netlist = MOSFET_BEACON;
    const checked = checkWithFixes(netlist);
    const finding = findingOf(checked, 'led-current-unlimited', 'DAMB');
    const fix = preferredFix(finding);
    // Negative feedback holds the source at VREF: R = 0.5 V / 14 mA = 35.7 Ω, rounded up in E24 (IEC 60063).
    const expected = roundUpIn(E24_PUBLISHED, 0.5 / AIMED);
    expect(fix.title).toMatch(new RegExp(`^Change RSNS from 10 Ω to ${expected} Ω \\(LED [\\d.]+ mA, resistor [\\d.]+ mW, M1 drain-source [\\d.]+ V or more\\)$`));
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    for (const supply of [12 * 0.95, 12, 12 * 1.05]) {
      // ngspice 39: the LED under the aim, and the MOSFET in saturation (VDS ≥ VGS − VTO, Shichman–Hodges; VTO 1.5 V from the model).
      const deck = atSource(files[MAIN_URI]!, 'V12', supply).replace('DAMB v12 k LEDAMB', 'VAM v12 va DC 0\nDAMB va k LEDAMB');
      expect(ngspiceValue(deck, 'i(vam)')).toBeLessThanOrEqual(AIMED);
      const values = ngspiceValues(deck, ['v(k)', 'v(g)', 'v(s)']);
      const [drain, gate, source] = ['v(k)', 'v(g)', 'v(s)'].map((vector) => values.get(vector)!);
      expect(drain! - source!).toBeGreaterThanOrEqual(gate! - source! - 1.5);
    }
  });
});

describe.runIf(ngspiceRuns)('a sink whose string barely fits its supply', () => {
  // Five white LEDs (about 3.5 V each at 30 mA) and a 2.6 V emitter drop on a 20 V adapter:
  // at 19 V (the low corner) the sink has no headroom left, at 21 V it regulates.
  const netlist = `Display case: five white LEDs in a zener-referenced sink on a 20 V adapter
V20 v20 0 DC 20
RZ v20 ref 4.7k
DZ 0 ref ZREF
QS s5 ref e NPNSMALL
RSET e 0 82
D1 v20 s1 LEDW
D2 s1 s2 LEDW
D3 s2 s3 LEDW
D4 s3 s4 LEDW
D5 s4 s5 LEDW
.model LEDW D(IS=1e-26 N=2.3 RS=6)
.model ZREF D(IS=1e-14 N=1 RS=5 BV=3.3 IBV=1m)
.model NPNSMALL NPN(IS=1e-14 BF=150 VAF=80)
.end
`;
  const headroom = (text: string, supply: number) => {
    const values = ngspiceValues(atSource(text, 'V20', supply), ['v(s5)', 'v(e)']);
    return values.get('v(s5)')! - values.get('v(e)')!;
  };

  it('still gets its emitter resistor re-valued: saturated where it already was, regulating where it did, and the title says so', () => {
    // ngspice 39 before the fix: saturated at the low corner, regulating at the high one.
    expect(headroom(netlist, 20 * 0.95)).toBeLessThan(SATURATED_BELOW);
    expect(headroom(netlist, 20 * 1.05)).toBeGreaterThan(SATURATED_BELOW);
    const checked = checkWithFixes(netlist);
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    expect(finding.message).toMatch(/the current sink QS sets it with its emitter resistor RSET/);
    const fix = preferredFix(finding);
    expect(fix.title).toMatch(/^Change RSET from 82 Ω to \d+ Ω \(LED [\d.]+ mA, resistor [\d.]+ mW, QS collector-emitter [\d.]+ m?V or more, saturated at 1 of 3 corners, as before\)$/);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    // ngspice 39 after the fix: still out of saturation at the high corner, saturated at the low one as the title says, and the LEDs under the aim.
    expect(headroom(files[MAIN_URI]!, 20 * 1.05)).toBeGreaterThan(SATURATED_BELOW);
    expect(headroom(files[MAIN_URI]!, 20 * 0.95)).toBeLessThan(SATURATED_BELOW);
    const deck = atSource(files[MAIN_URI]!, 'V20', 20 * 1.05).replace('D1 v20 s1 LEDW', 'VAM v20 va DC 0\nD1 va s1 LEDW');
    expect(ngspiceValue(deck, 'i(vam)')).toBeLessThanOrEqual(AIMED);
  });
});

describe.runIf(ngspiceRuns)('a series string with one resistor', () => {
  it('gets a resistor within one E24 step of the smallest that holds the aim (ngspice 39), though one LED alone sees too much voltage', () => {
    const netlist = shelfStrip('if=20m');
    const checked = checkWithFixes(netlist);
    const fix = preferredFix(findingOf(checked, 'led-current-unlimited', 'D1'));
    const match = /^Change RLIM from 47 Ω to (\d+) Ω/.exec(fix.title);
    expect(match, fix.title).not.toBeNull();
    const currentWith = (value: number) => {
      const values = ngspiceValues(atSource(netlist.replace('RLIM v12 a 47', `RLIM v12 a ${value}`), 'V12', 12 * 1.05), ['v(v12)', 'v(a)']);
      return (values.get('v(v12)')! - values.get('v(a)')!) / value;
    };
    const values = tableValuesBetween(E24_PUBLISHED, 47, 1e3);
    const smallest = values.findIndex((value) => currentWith(value) <= AIMED);
    const chosen = values.indexOf(Number(match![1]));
    expect(chosen).toBeGreaterThanOrEqual(smallest);
    expect(chosen).toBeLessThanOrEqual(smallest + 1);
  });
});

describe.runIf(ngspiceRuns)('a board of many sinks set too high', () => {
  it('gets every emitter-resistor fix within the default budget, the searches sharing their re-checks', () => {
    // Forty copies of the aquarium hood's channel on one 9 V rail: the rail and ground hold them apart.
    const channels = 40;
    const body = NPN_SINK.split('\n').filter((line) => /^(RB|DB1|DB2|Q1|RS|DBLUE) /.test(line));
    const lines = ['forty sink channels', 'V9 v9 0 DC 9'];
    for (let channel = 1; channel <= channels; channel++) {
      for (const line of body) lines.push(line.replace(/^(\S+)/, `$1_${channel}`).replace(/\b([bmke])\b/g, `$1${channel}`));
    }
    const models = NPN_SINK.split('\n').filter((line) => line.startsWith('.model'));
    const board = [...lines, ...models, '.end', ''].join('\n');
    const checked = checkWithFixes(board);
    const found = checked.findings.filter((each) => each.rule === 'led-current-unlimited');
    expect(found).toHaveLength(channels);
    const titles = found.map((finding) => finding.fixes.find((fix) => fix.preferred)?.title);
    expect(titles.every((title) => title?.startsWith('Change RS_'))).toBe(true);
    expect(checked.statistics.verifications).toBeLessThanOrEqual(6);
    // The first, applied alone: under the aim at the max corner in ngspice 39.
    const { files } = expectFixHolds(checked, found[0]!, found[0]!.fixes.find((fix) => fix.preferred)!, ngspiceRuns);
    const probed = files[MAIN_URI]!.replace('V9 v9 0 DC 9', 'V9 v9 0 DC 9.45').replace(/^DBLUE_1 v9 k1 LEDBLUE$/m, 'VAM v9 va 0\nDBLUE_1 va k1 LEDBLUE');
    expect(probed).toContain('VAM v9 va 0');
    expect(ngspiceValue(probed, 'i(vam)')).toBeLessThanOrEqual(AIMED * 1.001);
  });
});
