// reversed-diode for clamps and freewheel diodes that a plain "never conducts" test misses:
// an upper pin clamp fitted with its anode on the rail (it conducts, but into the pin, against
// the pin's driver), and a freewheel diode fitted backwards across a coil whose transistor is
// off at DC (idle now; it shorts the supply once the transistor switches on). Near misses must
// stay quiet. Expected currents and voltages come from ngspice 39 solving the same circuit at
// the same corner; the on-state is ngspice solving the circuit with the switch replaced by a
// 0 V source, as the check takes it.
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, findingsOf, ngspiceValue, problems } from './support.js';

const ngspiceRuns = declareNgspiceGate();

// A silicon small-signal diode, about 0.7 V forward (common practice, no source).
const SILICON = '.model SIL D(IS=4n N=1.9 RS=0.6 BV=100 IBV=5u)';
const NPN = '.model NPNGEN NPN(IS=1e-14 BF=150 VAF=80)';
const SWITCH = '.model SWRELAY SW(RON=0.05 ROFF=10Meg VT=1.5 VH=0.1)';
/** reversed-diode.md: a diode carrying 100 µA or more carries a plausible current (ours). */
const PLAUSIBLE_CURRENT = 100e-6;
/** A diode carrying 1 A or more through next to nothing shorts a supply (ours, reversed-diode.md). */
const SUPPLY_SHORT_CURRENT = 1;
/** The default supply tolerance, 5 % (settings.ts; common practice, no source). */
const HIGH = 1.05;

/** The number printed after `words` in a message. */
function numberAfter(message: string, words: string): number {
  const match = new RegExp(`${words} ([\\d.]+)`).exec(message);
  if (!match) throw new Error(`no number after "${words}" in: ${message}`);
  return Number(match[1]);
}

/** A keypad input with a 1 kΩ series resistor and clamp diodes, written line by line. */
const keypad = (clampLines: string, key: number) => `Keypad input
V3V3 v3v3 0 DC 3.3
VKEY key 0 DC ${key}
RSER key pin 1k
${clampLines}
RIN pin 0 100k
${SILICON}
.end
`;

// The checks see each circuit as drawn; ngspice gets the same circuit with a 0 V ammeter in
// series with the diode (verification.md: an ammeter source, not @d[id]).
describe.runIf(ngspiceRuns)('an upper clamp fitted backwards', () => {
  const drawn = (key: number) => keypad('DUP v3v3 pin SIL', key);
  const backwards = (key: number) => keypad('VAM v3v3 up 0\nDUP up pin SIL', key);

  it('warns for a clamp with its anode on the 3.3 V rail: it holds the pin up against its driver', () => {
    const [finding, ...others] = findingsOf(check(drawn(0)), 'reversed-diode');
    expect(others).toEqual([]);
    expect(finding?.severity).toBe('warning');
    expect(finding?.element).toBe('DUP');
    expect(finding?.message).toContain('VKEY drives it to 0 V through RSER');
    // ngspice 39 at the high corner, where it carries most.
    const atHigh = backwards(0).replace('V3V3 v3v3 0 DC 3.3', `V3V3 v3v3 0 DC ${3.3 * HIGH}`);
    const current = ngspiceValue(atHigh, 'i(vam)');
    const pin = ngspiceValue(atHigh, 'v(pin)');
    expect(current).toBeGreaterThan(PLAUSIBLE_CURRENT);
    // The message prints three significant figures.
    expect(numberAfter(finding!.message, 'carries') * 1e-3).toBeCloseTo(current, 5);
    expect(finding?.message).toMatch(/carries [\d.]+ mA into pin/);
    expect(numberAfter(finding!.message, 'holding pin at')).toBeCloseTo(pin, 2);
    // At nominal ngspice 39 gives 2.67 mA and 2.64 V: the input always reads high.
    expect(ngspiceValue(backwards(0), 'v(pin)')).toBeGreaterThan(2.5);
  });

  it('still warns when a correct lower clamp sits beside it', () => {
    const both = keypad('DUP v3v3 pin SIL\nDDN 0 pin SIL', 0);
    expect(findingsOf(check(both), 'reversed-diode').map((finding) => finding.element)).toEqual(['DUP']);
  });

  it('leaves correctly placed clamps alone with the key low and high (ngspice: both idle)', () => {
    for (const key of [0, 3.3]) {
      expect(problems(check(keypad('DUP pin v3v3 SIL\nDDN 0 pin SIL', key)))).toEqual([]);
      const measured = keypad('VAM pin up 0\nDUP up v3v3 SIL\nVAMD dn pin 0\nDDN 0 dn SIL', key);
      expect(Math.abs(ngspiceValue(measured, 'i(vam)'))).toBeLessThan(PLAUSIBLE_CURRENT); // ngspice 39
      expect(Math.abs(ngspiceValue(measured, 'i(vamd)'))).toBeLessThan(PLAUSIBLE_CURRENT);
    }
  });

  it('leaves a series diode from the supply into its load alone (no other source drives the load)', () => {
    const feed = `Series diode feeding a load
V5 v5 0 DC 5
DFEED v5 load SIL
RLOAD load 0 1k
${SILICON}
.end
`;
    expect(problems(check(feed))).toEqual([]);
  });

  it('leaves a diode-OR of two supplies alone', () => {
    const or = `Diode-OR of a 5 V adapter and a 4.2 V cell into a resistive load
VADAPT adapt 0 DC 5
VCELL cell 0 DC 4.2
DADAPT adapt load SIL
DCELL cell load SIL
RLOAD load 0 470
${SILICON}
.end
`;
    expect(problems(check(or))).toEqual([]);
  });
});

describe.runIf(ngspiceRuns)('a freewheel diode fitted backwards across a coil switched off at DC', () => {
  const valve = (diodeLine: string, control: number) => `Valve relay
V24 v24 0 DC 24
VCTRL ctrl 0 DC ${control}
RB ctrl b 1k
QVALVE coil_low b 0 NPNGEN
LCOIL v24 coil_mid 80m
RCOIL coil_mid coil_low 480
${diodeLine}
${SILICON}
${NPN}
.end
`;

  it('errors for the anode on the supply side, with the current the on-state would carry', () => {
    const backwards = valve('VAM v24 fly 0\nDFLY fly coil_low SIL', 0);
    const result = check(valve('DFLY v24 coil_low SIL', 0));
    const [finding] = findingsOf(result, 'reversed-diode');
    expect(finding?.severity).toBe('error');
    expect(finding?.element).toBe('DFLY');
    expect(finding?.message).toContain('once QVALVE switches on');
    // ngspice 39: idle as drawn (transistor off)…
    expect(Math.abs(ngspiceValue(backwards, 'i(vam)'))).toBeLessThan(PLAUSIBLE_CURRENT);
    // …and with QVALVE closed (a 0 V source from collector to emitter) at the high corner, a supply short.
    const closed = backwards.replace('QVALVE coil_low b 0 NPNGEN', 'VCLOSED coil_low 0 DC 0').replace('V24 v24 0 DC 24', `V24 v24 0 DC ${24 * HIGH}`);
    const onState = ngspiceValue(closed, 'i(vam)');
    expect(onState).toBeGreaterThan(SUPPLY_SHORT_CURRENT);
    expect(finding?.message).toContain(`forward with ${onState.toPrecision(3)} A`);
  });

  it('leaves a correctly placed freewheel diode alone with the transistor off and on', () => {
    for (const control of [0, 3.3]) expect(problems(check(valve('DFLY coil_low v24 SIL', control)))).toEqual([]);
  });

  // A high-side switch: the coil hangs from the switched node to ground.
  const highSide = (diodeLine: string) => `Solenoid on a high-side switch
V12 v12 0 DC 12
VCTRL ctrl 0 DC 0
SHIGH v12 sw ctrl 0 SWRELAY
LSOL sw sol_mid 20m
RSOL sol_mid 0 60
${diodeLine}
${SILICON}
${SWITCH}
.end
`;
  it('errors for a high-side coil whose freewheel diode has its anode on the switched end', () => {
    const [finding] = findingsOf(check(highSide('DSOL sw 0 SIL')), 'reversed-diode');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('once SHIGH switches on');
    // ngspice 39 with the switch closed: the 12.6 V supply straight into the diode.
    const closed = highSide('VAM sw fly 0\nDSOL fly 0 SIL').replace('SHIGH v12 sw ctrl 0 SWRELAY', 'VCLOSED v12 sw DC 0').replace('V12 v12 0 DC 12', `V12 v12 0 DC ${12 * HIGH}`);
    expect(ngspiceValue(closed, 'i(vam)')).toBeGreaterThan(SUPPLY_SHORT_CURRENT);
  });
  it('leaves the high-side coil alone with its freewheel diode anode to ground', () => {
    expect(problems(check(highSide('DSOL 0 sw SIL')))).toEqual([]);
  });
});
