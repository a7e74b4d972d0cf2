// `pnlint check --fix` on copies of the faulty circuits, as an engineer runs it before a
// review: every applied fix must leave a netlist that still parses, that the reference engine
// (ngspice 39) still solves, in which the finding is gone and nothing new appears; and the
// fixed circuit must really be safe by ngspice's numbers, not only by pnlint's.
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { declareNgspiceGate, runNgspiceOperatingPoint } from '../support/ngspice.js';
import {
  DEFAULT_SUPPLY_TOLERANCE,
  E24,
  LED_RULE_OF_THUMB_CURRENT,
  SETUP_TIMEOUT_MILLISECONDS,
  alarms,
  checkJson,
  copyOfCircuits,
  isE24,
  pnlint,
  readCircuit,
  referenceDiodeCurrent,
  referenceSolve,
  withLines,
  type CheckReport,
  type CliRun,
} from './support.js';

const HIGH = 1 + DEFAULT_SUPPLY_TOLERANCE;
const LOW = 1 - DEFAULT_SUPPLY_TOLERANCE;
/** reversed-diode.md: turned around, a diode that carries 100 µA or more carries a plausible current. */
const PLAUSIBLE_CURRENT = 100e-6;
/** A blocking diode leaks: well under a microampere for these models at these voltages (ngspice 39 shows nA). */
const BLOCKING_CURRENT = 1e-6;

/** Each faulty file whose finding has a preferred fix: the rule and element it targets. */
const FIXABLE: Record<string, { rule: string; element: string }> = {
  'b01-led-on-rail.cir': { rule: 'led-current-unlimited', element: 'DEYE' },
  'b02-led-small-resistor.cir': { rule: 'led-current-unlimited', element: 'DTACH' },
  'b03-led-reversed.cir': { rule: 'reversed-diode', element: 'DRDY' },
  'b04-led-npn-small-resistor.cir': { rule: 'led-current-unlimited', element: 'DFAULT' },
  'b05-led-reversed-npn.cir': { rule: 'reversed-diode', element: 'DBUSY' },
  'b06-clamp-reversed.cir': { rule: 'reversed-diode', element: 'DCLAMP' },
  'b07-freewheel-reversed.cir': { rule: 'reversed-diode', element: 'DFLY' },
  'b10-zener-starved-load.cir': { rule: 'zener-underbiased', element: 'DREF' },
  'b11-zener-starved-rail.cir': { rule: 'zener-underbiased', element: 'DBIAS' },
  'b12-zener-forward.cir': { rule: 'zener-forward', element: 'DREF' },
  'b28-ac-led-series-blocker.cir': { rule: 'reverse-overvoltage', element: 'DLED' },
  'b29-pin-clamp-reversed.cir': { rule: 'reversed-diode', element: 'DUP' },
  'b30-freewheel-reversed-switch-off.cir': { rule: 'reversed-diode', element: 'DFLY' },
  'b31-probed-pin-clamp-reversed.cir': { rule: 'reversed-diode', element: 'DUP' },
  'b40-rd-snubber-reversed.cir': { rule: 'reversed-diode', element: 'DSNUB' },
  'b41-infrared-led-on-pin.cir': { rule: 'led-current-unlimited', element: 'DOPTO' },
  'b33-led-on-logic-pin.cir': { rule: 'led-current-unlimited', element: 'DKEY' },
  'b35-reversed-led-subckt-twice.cir': { rule: 'reversed-diode', element: 'XFLOOR1.DLAMP' },
  'b37-pwm-led-overcurrent.cir': { rule: 'led-current-unlimited', element: 'DBL' },
  'b38-ripple-crest-led.cir': { rule: 'led-current-unlimited', element: 'DL' },
  'b42-current-sink-emitter-resistor-low.cir': { rule: 'led-current-unlimited', element: 'DRUN' },
  'b43-current-sink-string-set-high.cir': { rule: 'led-current-unlimited', element: 'D1' },
};

let folder: string;
let files: string[];
let before: CheckReport;
let fixRun: CliRun;
let after: CheckReport;
beforeAll(() => {
  folder = copyOfCircuits('bad');
  files = readdirSync(folder).filter((name) => name.endsWith('.cir'));
  before = checkJson(files, folder);
  fixRun = pnlint(['check', ...files, '--fix'], folder);
  after = checkJson(files, folder);
}, SETUP_TIMEOUT_MILLISECONDS);

/** E24's tolerance (IEC 60063: the series is made for ±5 %). */
const E24_TOLERANCE = 0.05;

/** The largest E24 value (IEC 60063) that stays inside [low, high] at ±5 %: near the window's top, where the zener and the resistor dissipate least. */
function largestE24Inside(low: number, high: number): number {
  let best: number | undefined;
  for (let decade = 0.1; decade <= 1e5; decade *= 10) {
    for (const mantissa of E24) {
      const value = Number((mantissa * decade).toPrecision(6));
      if (value * (1 - E24_TOLERANCE) >= low && value * (1 + E24_TOLERANCE) <= high && (best === undefined || value > best)) best = value;
    }
  }
  if (best === undefined) throw new Error(`no E24 value inside ${low} Ω to ${high} Ω`);
  return best;
}

function fixedText(file: string): string {
  return readFileSync(join(folder, file), 'utf8');
}

/** The lines of the fixed file that are not in the original, in order. */
function changedLines(file: string): string[] {
  const original = new Set(readCircuit(`bad/${file}`).split('\n'));
  return fixedText(file)
    .split('\n')
    .filter((line) => !original.has(line));
}

/** The value of resistor `name` in the fixed file, in ohms (plain numbers or k only, as the fixes write them). */
function resistorValue(file: string, name: string): number {
  const line = fixedText(file)
    .split('\n')
    .find((candidate) => candidate.split(/\s+/)[0] === name);
  if (!line) throw new Error(`${file} has no resistor ${name}`);
  const value = line.split(/\s+/)[3];
  const match = /^(\d+(?:\.\d+)?)(k|meg)?$/i.exec(value);
  if (!match) throw new Error(`${file}: cannot read the value of ${line}`);
  return Number(match[1]) * (match[2] ? (match[2].toLowerCase() === 'k' ? 1e3 : 1e6) : 1);
}

describe('pnlint check --fix applies the preferred fixes and only those', () => {
  it('says which fixes it applied, one per fixable file', () => {
    for (const file of Object.keys(FIXABLE)) expect(fixRun.stderr).toContain(`fixed ${join(folder, file)}`);
  });

  it.each(Object.keys(FIXABLE))('%s: the finding is gone, nothing new at warning or error, edits minimal', (file) => {
    const { rule, element } = FIXABLE[file];
    expect(before.byFile.get(file)!.some((f) => f.rule === rule && f.element === element)).toBe(true);
    const remaining = after.byFile.get(file)!;
    expect(remaining.filter((f) => f.rule === rule && f.element === element)).toEqual([]);
    const earlier = new Set(before.byFile.get(file)!.map((f) => `${f.rule} ${f.element}`));
    expect(alarms(remaining).filter((f) => !earlier.has(`${f.rule} ${f.element}`))).toEqual([]);
    // Still parses: no syntax or netlist finding after the edit.
    expect(remaining.filter((f) => f.rule === 'syntax' || f.rule === 'netlist')).toEqual([]);
    // Minimal: one changed line, or one changed and one inserted (a new series resistor).
    expect(changedLines(file).length).toBeGreaterThanOrEqual(1);
    expect(changedLines(file).length).toBeLessThanOrEqual(2);
  });

  it('leaves the files with no preferred fix byte for byte as they were', () => {
    for (const file of files.filter((name) => !(name in FIXABLE))) expect(fixedText(file), file).toBe(readCircuit(`bad/${file}`));
  });
});

const ngspice = declareNgspiceGate();

describe.runIf(ngspice)('the fixed circuits by the reference engine', () => {
  it.each(Object.keys(FIXABLE))('%s: ngspice 39 still solves it', (file) => {
    const run = runNgspiceOperatingPoint(fixedText(file));
    expect(run.ok, `${run.failure}\n${run.deck}`).toBe(true);
  });

  it('b01: the inserted resistor is an E24 value and holds the LED under 20 mA at 5.25 V', () => {
    const inserted = changedLines('b01-led-on-rail.cir').find((line) => /^R/i.test(line))!;
    expect(inserted).toBeDefined();
    expect(isE24(resistorValue('b01-led-on-rail.cir', inserted.split(/\s+/)[0]))).toBe(true); // IEC 60063
    const current = referenceDiodeCurrent(fixedText('b01-led-on-rail.cir'), 'DEYE', { V5: `V5 v5 0 DC ${5 * HIGH}` });
    expect(current).toBeLessThanOrEqual(LED_RULE_OF_THUMB_CURRENT); // rule of thumb, common practice
    expect(current).toBeGreaterThan(PLAUSIBLE_CURRENT); // and still lights
  });

  it('b02: the new RTACH is E24 and the LED and the resistor are inside their ratings at 12.6 V', () => {
    const file = 'b02-led-small-resistor.cir';
    const value = resistorValue(file, 'RTACH');
    expect(isE24(value)).toBe(true); // IEC 60063
    const netlist = withLines(fixedText(file), { V12: 'V12 v12 0 DC 12.6' });
    const nodes = referenceSolve(netlist, ['v(v12)', 'v(anode)']);
    const current = (nodes.get('v(v12)')! - nodes.get('v(anode)')!) / value;
    expect(current).toBeLessThanOrEqual(LED_RULE_OF_THUMB_CURRENT);
    expect(current * current * value).toBeLessThanOrEqual(0.25); // default resistor power, settings.ts (common practice)
  });

  it('b04: the new RFAULT is E24 and the LED stays under 20 mA with both supplies high', () => {
    const file = 'b04-led-npn-small-resistor.cir';
    expect(isE24(resistorValue(file, 'RFAULT'))).toBe(true); // IEC 60063
    const current = referenceDiodeCurrent(fixedText(file), 'DFAULT', { V5: `V5 v5 0 DC ${5 * HIGH}`, VGPIO: `VGPIO gpio 0 DC ${3.3 * HIGH}` });
    expect(current).toBeLessThanOrEqual(LED_RULE_OF_THUMB_CURRENT);
  });

  it('b03 and b05: the LEDs turned around now conduct at nominal values', () => {
    expect(referenceDiodeCurrent(fixedText('b03-led-reversed.cir'), 'DRDY')).toBeGreaterThan(PLAUSIBLE_CURRENT);
    expect(referenceDiodeCurrent(fixedText('b05-led-reversed-npn.cir'), 'DBUSY')).toBeGreaterThan(PLAUSIBLE_CURRENT);
  });

  it('b06 and b07: the clamp and the freewheel diode turned around now block at the high corner', () => {
    expect(Math.abs(referenceDiodeCurrent(fixedText('b06-clamp-reversed.cir'), 'DCLAMP', { V3V3: `V3V3 v3v3 0 DC ${3.3 * HIGH}` }))).toBeLessThan(BLOCKING_CURRENT);
    const freewheel = referenceDiodeCurrent(fixedText('b07-freewheel-reversed.cir'), 'DFLY', {
      V24: `V24 v24 0 DC ${24 * HIGH}`,
      VCTRL: `VCTRL ctrl 0 DC ${3.3 * HIGH}`,
    });
    expect(Math.abs(freewheel)).toBeLessThan(BLOCKING_CURRENT);
  });

  it('b29 and b30: the clamp turned around idles with the key low, the freewheel diode with the transistor on', () => {
    // ngspice 39, at the high corner.
    expect(Math.abs(referenceDiodeCurrent(fixedText('b29-pin-clamp-reversed.cir'), 'DUP', { V3V3: `V3V3 v3v3 0 DC ${3.3 * HIGH}` }))).toBeLessThan(BLOCKING_CURRENT);
    const onState = referenceDiodeCurrent(fixedText('b30-freewheel-reversed-switch-off.cir'), 'DFLY', {
      V24: `V24 v24 0 DC ${24 * HIGH}`,
      QVALVE: 'VCLOSED coil_low 0 DC 0',
    });
    expect(Math.abs(onState)).toBeLessThan(BLOCKING_CURRENT);
  });

  it('b10: the new feed resistor is the largest E24 value inside the textbook window, and the zener holds IZK to PD/VZ at every corner', () => {
    const file = 'b10-zener-starved-load.cir';
    const value = resistorValue(file, 'RFEED');
    // Textbook zener window: Rmax = (Vs,min − Vz)/(Iz,min + IL,max), Rmin = (Vs,max − Vz)/Iz,max,
    // with Iz,max = PD/VZ = 0.5 W / 5.1 V (the directive's ratings).
    const rmax = (7.5 - 5.1) / (1e-3 + 5.1 / 680);
    const rmin = (9.6 - 5.1) / (0.5 / 5.1);
    expect(value).toBe(largestE24Inside(rmin, rmax));
    // ngspice 39 at the battery's ends and nominal: the zener line is anode first, so its reverse current is minus the probe.
    for (const battery of [7.5, 9, 9.6]) {
      const current = -referenceDiodeCurrent(fixedText(file), 'DREF', { VBAT: `VBAT vbat 0 DC ${battery}` });
      expect(current).toBeGreaterThanOrEqual(1e-3); // IZK, the directive
      expect(current).toBeLessThanOrEqual(0.5 / 5.1); // PD / VZ, the directive
    }
  });

  it('b11: the new bias resistor is the largest E24 value inside the textbook window, and the zener holds IZK to PD/VZ at every corner', () => {
    const file = 'b11-zener-starved-rail.cir';
    // Textbook zener window, as above; no PD in the directive, so the typical 500 mW of a small zener (typical value, from memory).
    const rmax = (5 * LOW - 3.3) / (1e-3 + 3.3 / 4700);
    const rmin = (5 * HIGH - 3.3) / (0.5 / 3.3);
    expect(resistorValue(file, 'RBIAS')).toBe(largestE24Inside(rmin, rmax));
    for (const supply of [5 * LOW, 5, 5 * HIGH]) {
      const current = -referenceDiodeCurrent(fixedText(file), 'DBIAS', { V5: `V5 v5 0 DC ${supply}` }); // ngspice 39
      expect(current).toBeGreaterThanOrEqual(1e-3); // IZK, the directive
      expect(current).toBeLessThanOrEqual(0.5 / 3.3); // typical PD / VZ
      // An engineer's choice near the window's top (x07 offered 43 Ω): a few mA, not tens.
      expect(current).toBeLessThanOrEqual(5e-3); // IZT 5 mA, the directive
    }
  });

  it('b28: with its anti-parallel guard the LED sees under 80 % of its 6 V rating at the AC trough', () => {
    const netlist = withLines(fixedText('b28-ac-led-series-blocker.cir'), { VAC: `VAC ac 0 DC ${-34 * HIGH}` });
    const reverse = -referenceSolve(netlist, ['v(b)']).get('v(b)')!;
    expect(reverse).toBeLessThan(0.8 * 6); // derating, common practice, no source; BV 6 V of model LEDRED
  });

  it('b12: the zener turned around regulates near its 5.1 V', () => {
    const node = referenceSolve(fixedText('b12-zener-forward.cir'), ['v(ref)']).get('v(ref)')!;
    // VZ 5.1 V (the model's BV) plus the drop on its 5 Ω RS at a few mA.
    expect(node).toBeGreaterThan(5.0);
    expect(node).toBeLessThan(5.2);
  });
});

/** A small-signal bipolar transistor saturates at about 0.1–0.3 V collector to emitter (common practice, no source). */
const SATURATED_BELOW = 0.3;
/** The fixes aim an LED at 70 % of its rating (keep power below about 50–70 % of a rating; common practice, no source). */
const AIMED = 0.7 * LED_RULE_OF_THUMB_CURRENT;

describe.runIf(ngspice)('the current sinks re-set by their emitter resistor (b42, b43)', () => {
  const sinks = [
    { file: 'b42-current-sink-emitter-resistor-low.cir', resistor: 'RE', supply: 'V12', volts: 12, led: 'DRUN', collector: 'cath' },
    { file: 'b43-current-sink-string-set-high.cir', resistor: 'RSET', supply: 'V24', volts: 24, led: 'D1', collector: 's5' },
  ];

  it.each(sinks)('$file: only $resistor changed, to the smallest E24 value that ngspice 39 shows holding the LED at 14 mA at the high corner', ({ file, resistor, supply, volts, led }) => {
    expect(changedLines(file)).toHaveLength(1);
    expect(changedLines(file)[0]).toMatch(new RegExp(`^${resistor} `));
    const value = resistorValue(file, resistor);
    expect(isE24(value)).toBe(true); // IEC 60063
    // The oracle: each E24 value from the original up, solved by ngspice 39 at the supply's high corner.
    const original = readCircuit(`bad/${file}`);
    const originalValue = Number(original.split('\n').find((line) => line.startsWith(`${resistor} `))!.split(/\s+/)[3]);
    const candidates = E24.flatMap((mantissa) => [mantissa, mantissa * 10]).filter((each) => each > originalValue).sort((a, b) => a - b);
    const smallest = candidates.find((candidate) => {
      const netlist = withLines(original, { [resistor]: `${resistor} emit 0 ${candidate}`, [supply]: `${supply} ${supply.toLowerCase()} 0 DC ${volts * HIGH}` });
      return referenceDiodeCurrent(netlist, led) <= AIMED;
    });
    expect(value).toBe(smallest);
  });

  it.each(sinks)('$file: at every supply corner the LED is lit and under 14 mA, and the sink stays out of saturation (ngspice 39)', ({ file, supply, volts, led, collector }) => {
    for (const level of [volts * LOW, volts, volts * HIGH]) {
      const netlist = withLines(fixedText(file), { [supply]: `${supply} ${supply.toLowerCase()} 0 DC ${level}` });
      const current = referenceDiodeCurrent(netlist, led);
      expect(current).toBeLessThanOrEqual(AIMED);
      expect(current).toBeGreaterThan(PLAUSIBLE_CURRENT);
      const nodes = referenceSolve(netlist, [`v(${collector})`, 'v(emit)']);
      expect(nodes.get(`v(${collector})`)! - nodes.get('v(emit)')!).toBeGreaterThan(SATURATED_BELOW);
    }
  });

  it('b42: the series resistor the old fix inserted (750 Ω) saturates the sink at 12.6 V (ngspice 39: 71 mV): why it is not offered', () => {
    const original = readCircuit('bad/b42-current-sink-emitter-resistor-low.cir');
    const netlist = withLines(original, { DRUN: 'RSER v12 ser 750\nDRUN ser cath LEDGRN', V12: `V12 v12 0 DC ${12 * HIGH}` });
    const nodes = referenceSolve(netlist, ['v(cath)', 'v(emit)']);
    expect(nodes.get('v(cath)')! - nodes.get('v(emit)')!).toBeLessThan(SATURATED_BELOW);
  });
});
