// Each rule on circuits where it must fire and on near misses where it must not (issue 4).
// Expected currents and voltages come from ngspice 39 solving the same circuit at the
// corner in question; thresholds and ratings are the trade's rules of thumb (common
// practice, no source) or the directive's own numbers, as said beside each check.
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, diodeAt, findingsOf, ngspiceValue, problems } from './support.js';

const ngspiceRuns = declareNgspiceGate();

// A red indicator LED: about 1.9 V at 5 mA (red about 1.8–2.0 V: common practice, no source).
const RED_LED = '.model LEDRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)';
// A silicon small-signal diode: about 0.66 V at 5 mA (about 0.7 V for silicon: common practice, no source).
const SIGNAL = '.model SIG D(IS=2.5n N=1.75 RS=0.5 BV=100 IBV=5u)';
// A 5.1 V zener.
const ZENER = '.model Z5V1 D(IS=1e-14 N=1 RS=5 BV=5.1 IBV=1m)';

/** Replaces the value of V1 in a netlist, to ask ngspice for a corner. */
const atSupply = (netlist: string, volts: number) => netlist.replace(/^V1 (\S+) (\S+) \S+$/m, `V1 $1 $2 ${volts}`);

describe.runIf(ngspiceRuns)('led-current-unlimited', () => {
  const bare = `LED straight across a 5 V rail
V1 vcc 0 5
VAM vcc a 0
D1 a 0 LEDRED
${RED_LED}
.end
`;
  it('fires for an LED with no resistor, at the max corner, with the current ngspice finds there', () => {
    const result = check(bare);
    const [finding] = findingsOf(result, 'led-current-unlimited');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('V1 = 5.25 V (max corner)'); // 5 V + 5 % default supply tolerance (common practice, no source)
    expect(finding?.message).toContain('rating IF 20 mA (rule of thumb for LEDs)'); // common practice, no source
    const expected = ngspiceValue(atSupply(bare, 5.25), 'i(vam)'); // ngspice 39
    expect(diodeAt(result, 'D1', 'V1 max').current).toBeCloseTo(expected, 6);
  });

  const withResistor = `LED with a 220 ohm resistor on 5 V
V1 vcc 0 5
R1 vcc a 220
VAM a b 0
D1 b 0 LEDRED
${RED_LED}
.end
`;
  it('stays quiet for an LED with its resistor inside the rating at every corner', () => {
    const result = check(withResistor);
    expect(problems(result)).toEqual([]);
    // ngspice 39 at the max corner: about 14.9 mA, under the 20 mA rule of thumb.
    const expected = ngspiceValue(atSupply(withResistor, 5.25), 'i(vam)');
    expect(expected).toBeLessThan(20e-3);
    expect(diodeAt(result, 'D1', 'V1 max').current).toBeCloseTo(expected, 7);
  });

  it('fires when the resistor lets more than the rating through at the max corner', () => {
    const hot = withResistor.replace('R1 vcc a 220', 'R1 vcc a 150');
    const expected = ngspiceValue(atSupply(hot, 5.25), 'i(vam)'); // ngspice 39: above 20 mA
    expect(expected).toBeGreaterThan(20e-3);
    const nominal = ngspiceValue(hot, 'i(vam)'); // and below it at 5 V, so only the corner finds it
    expect(nominal).toBeLessThan(20e-3);
    const [finding] = findingsOf(check(hot), 'led-current-unlimited');
    expect(finding?.message).toMatch(/carries 2\d\.\d mA at V1 = 5\.25 V \(max corner\)/);
    expect(finding?.related.map((each) => each.message).join(' ')).toContain('R1');
  });

  it('uses a rating from a directive, and says where it came from', () => {
    const rated = withResistor.replace('.end', '*pnlint: rating LEDRED if=10m\n.end');
    const [finding] = findingsOf(check(rated), 'led-current-unlimited');
    expect(finding?.message).toContain('rating IF 10 mA from directive on line 7');
  });

  it('accepts an LED fed by a current source (its current is limited, whatever the voltage)', () => {
    const fed = `LED fed from a 10 mA current source
V1 vcc 0 12
I1 vcc a 10m
VAM a b 0
D1 b 0 LEDRED
${RED_LED}
.end
`;
    expect(findingsOf(check(fed), 'led-current-unlimited')).toEqual([]);
  });

  it('fires for an LED held by an ideal 1.95 V source: within its rating, but nothing sets its current', () => {
    const held = `LED on a bare 1.95 V source
V1 vcc 0 1.95
VAM vcc a 0
D1 a 0 LEDRED
${RED_LED}
.end
`;
    const [finding] = findingsOf(check(held, { settings: { supplyTolerance: 0 } }), 'led-current-unlimited');
    expect(finding?.message).toContain('has no current limit');
  });
});

describe.runIf(ngspiceRuns)('reversed-diode', () => {
  it('fires for an indicator LED turned around, with the current ngspice gives the flipped circuit', () => {
    const reversed = `indicator turned around
V1 vcc 0 5
R1 vcc a 220
VAM a b 0
D1 0 b LEDRED
${RED_LED}
.end
`;
    const [finding] = findingsOf(check(reversed), 'reversed-diode');
    expect(finding?.severity).toBe('error'); // product.md: error for LEDs
    const flipped = atSupply(reversed.replace('D1 0 b LEDRED', 'D1 b 0 LEDRED'), 5.25);
    const expected = ngspiceValue(flipped, 'i(vam)'); // ngspice 39
    expect(finding?.message).toContain(`would carry ${(expected * 1e3).toPrecision(3)} mA`);
  });

  it('leaves a correctly placed freewheel diode alone, and fires when it is turned around', () => {
    const relay = (diode: string) => `relay coil switched low side, with its diode
V1 vcc 0 12
L1 vcc m 10m
RC m c 400
S1 c 0 ctl 0 SWITCH
VCTL ctl 0 5
${diode}
.model SWITCH SW(RON=1 ROFF=1meg VT=2.5)
${SIGNAL}
.end
`;
    expect(problems(check(relay('D1 c vcc SIG')))).toEqual([]);
    const [finding] = findingsOf(check(relay('D1 vcc c SIG')), 'reversed-diode');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('across the coil L1');
  });

  it('leaves a diode-OR alone: the lower supply diode never conducts, but turned around it would short two supplies', () => {
    const diodeOr = `two supplies into one load through a diode-OR
V1 a 0 5
V2 b 0 3.3
D1 a out SIG
D2 b out SIG
RL out 0 1k
${SIGNAL}
.end
`;
    expect(findingsOf(check(diodeOr), 'reversed-diode')).toEqual([]);
  });

  it('leaves a diode-OR with resistive sources alone (the other diode feeds the load)', () => {
    const diodeOr = `battery backup through a diode-OR, each source with some resistance
V1 a 0 5
RS1 a a2 2
V2 b 0 3.3
RS2 b b2 10
D1 a2 out SIG
D2 b2 out SIG
RL out 0 1k
${SIGNAL}
.end
`;
    expect(findingsOf(check(diodeOr), 'reversed-diode')).toEqual([]);
  });

  it('leaves a shunt polarity-protection diode alone, and fires when it shorts the supply', () => {
    const shunt = (diode: string) => `shunt polarity protection across the input
V1 vcc 0 12
${diode}
RL vcc 0 100
${SIGNAL}
.end
`;
    expect(problems(check(shunt('D1 0 vcc SIG')))).toEqual([]);
    const shorted = findingsOf(check(shunt('D1 vcc 0 SIG')), 'reversed-diode');
    expect(shorted[0]?.message).toContain('shorts the supply');
  });

  it('warns for a series diode turned around (it blocks its own supply)', () => {
    const series = `series diode feeding a load, turned around
V1 vin 0 9
D1 out vin SIG
RL out 0 1k
${SIGNAL}
.end
`;
    const [finding] = findingsOf(check(series), 'reversed-diode');
    expect(finding?.severity).toBe('warning'); // product.md: warning for non-LED diodes
  });
});

describe.runIf(ngspiceRuns)('reverse-overvoltage', () => {
  const rectifier = (peak: number, rating: number) => `half-wave rectifier on a ${peak} V peak winding
V1 ac 0 SIN(0 ${peak} 50)
D1 ac out RECT
RL out 0 1k
*pnlint: rating RECT kind=rectifier vrrm=${rating} if=1
.model RECT D(IS=10n N=1.9 RS=0.05)
.end
`;
  it('errors above the rating, at the SIN trough, saying quasi-static', () => {
    const [finding] = findingsOf(check(rectifier(30, 25)), 'reverse-overvoltage');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('SIN trough');
    expect(finding?.message).toContain('quasi-static');
    expect(finding?.message).toContain('VRRM 25 V from directive on line 5');
    // At the trough the diode blocks the whole winding voltage less the load's leakage: ngspice 39.
    const trough = ngspiceValue(rectifier(30, 25).replace('SIN(0 30 50)', `${-30 * 1.05}`), 'v(ac)') - ngspiceValue(rectifier(30, 25).replace('SIN(0 30 50)', `${-30 * 1.05}`), 'v(out)');
    expect(finding?.message).toContain(`${(-trough).toPrecision(3)} V`);
  });
  it('warns inside the 80 % derating margin, and is quiet below it', () => {
    // 30 V × 1.05 = 31.5 V peak reverse: above 80 % of 35 V (28 V), below 35 V (derating: common practice, no source).
    expect(findingsOf(check(rectifier(30, 35)), 'reverse-overvoltage')[0]?.severity).toBe('warning');
    expect(findingsOf(check(rectifier(30, 50)), 'reverse-overvoltage')).toEqual([]);
  });
  it('uses the model BV as the reverse limit when no rating is given', () => {
    const text = `series diode blocking a reversed 60 V input
V1 vin 0 -60
D1 vin out BIG
RL out 0 10k
.model BIG D(IS=10n N=1.9 RS=0.05 BV=50 IBV=5u)
.end
`;
    const [finding] = findingsOf(check(text), 'reverse-overvoltage');
    expect(finding?.message).toContain('from BV of model BIG');
  });
});

describe.runIf(ngspiceRuns)('zener rules', () => {
  const regulator = (supply: number, series: number, load: number) => `5.1 V zener shunt regulator
V1 vin 0 ${supply}
R1 vin z ${series}
VAM z zk 0
D1 0 zk Z5V1
RL z 0 ${load}
*pnlint: rating Z5V1 kind=zener izk=1m pd=500m
${ZENER}
.end
`;
  it('stays quiet inside the textbook window', () => {
    // Rmax = (Vs,min − Vz)/(Iz,min + IL,max) = (11.4 − 5.1)/(1 mA + 2.55 mA) ≈ 1.77 kΩ (standard textbook result);
    // 680 Ω is well inside it.
    expect(problems(check(regulator(12, 680, 2000)))).toEqual([]);
  });
  it('warns when the low-supply corner starves it, with the current ngspice finds there', () => {
    // (10.45 − 5.1)/(1 mA + 2.55 mA) ≈ 1.5 kΩ: a 1.8 kΩ resistor is above Rmax (standard textbook result).
    const text = regulator(11, 1800, 2000);
    const result = check(text);
    const [finding] = findingsOf(result, 'zener-underbiased');
    expect(finding?.message).toContain('V1 = 10.5 V (min corner)'); // 11 V less 5 % is 10.45 V: three digits, half up
    const expected = ngspiceValue(atSupply(text, 11 * 0.95), 'i(vam)'); // ngspice 39: the ammeter carries the current into the cathode
    expect(expected).toBeLessThan(1e-3);
    expect(-diodeAt(result, 'D1', 'V1 min').current).toBeCloseTo(expected, 8);
    expect(finding?.message).toContain(`${(expected * 1e6).toPrecision(3)} µA`);
  });
  it('warns for a zener placed forward, which clamps near 0.7 V', () => {
    const text = regulator(12, 680, 2000).replace('D1 0 zk Z5V1', 'D1 zk 0 Z5V1');
    const result = check(text);
    const [finding] = findingsOf(result, 'zener-forward');
    expect(finding?.severity).toBe('warning');
    const clamp = ngspiceValue(atSupply(text, 12.6), 'v(zk)'); // ngspice 39
    expect(clamp).toBeLessThan(1); // about 0.7 V for a forward junction (common practice, no source)
    // Its IZK is declared, yet a zener fitted forward is reported once: its reverse current is not what is wrong.
    expect(findingsOf(result, 'zener-underbiased')).toEqual([]);
  });
  it('leaves back-to-back zeners (an AC clamp) alone', () => {
    const text = `back-to-back zeners clamping a line
V1 vin 0 12
R1 vin a 1k
D1 b a Z5V1
D2 b 0 Z5V1
*pnlint: rating Z5V1 kind=zener
${ZENER}
.end
`;
    expect(findingsOf(check(text), 'zener-forward')).toEqual([]);
  });
});

describe.runIf(ngspiceRuns)('forward-overcurrent and overdissipation', () => {
  it('errors when a rated diode carries more than its IF', () => {
    const text = `signal diode on a 2 ohm load
V1 vin 0 5
D1 vin out SIG
RL out 0 10
*pnlint: rating SIG if=200m
${SIGNAL}
.end
`;
    const [finding] = findingsOf(check(text), 'forward-overcurrent');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('rating IF 200 mA from directive');
  });
  it('errors for the resistor in series with an LED that burns more than its power rating', () => {
    const text = `power LED from 12 V through a small resistor
V1 vcc 0 12
R1 vcc a 30
D1 a 0 WHITE
*pnlint: rating WHITE kind=led if=350m pd=1.2
.model WHITE D(IS=1e-22 N=2.2 RS=0.5)
.end
`;
    const [finding] = findingsOf(check(text), 'overdissipation');
    expect(finding?.element).toBe('R1');
    expect(finding?.message).toContain('rating P 250 mW (default resistor power rating (setting))'); // 0.25 W default (common practice, no source)
    // P = (V(vcc) − V(a))² / R, from ngspice 39's node voltages at the max corner.
    const high = text.replace('V1 vcc 0 12', 'V1 vcc 0 12.6');
    const drop = ngspiceValue(high, 'v(vcc)') - ngspiceValue(high, 'v(a)');
    expect(finding?.message).toContain(`${((drop * drop) / 30).toPrecision(3)} W`);
  });
});

describe.runIf(ngspiceRuns)('shared-led-resistor', () => {
  it('warns for two LEDs in parallel on one resistor, and not for two LEDs each with their own', () => {
    const shared = `two indicators on one resistor
V1 vcc 0 5
R1 vcc a 100
D1 a 0 LEDRED
D2 a 0 LEDRED
${RED_LED}
.end
`;
    const [finding] = findingsOf(check(shared), 'shared-led-resistor');
    expect(finding?.message).toContain('(R1)');
    expect(findingsOf(check(shared), 'led-current-unlimited')).toEqual([]);
    const separate = `two indicators, each with its own resistor
V1 vcc 0 5
R1 vcc a 220
R2 vcc b 220
D1 a 0 LEDRED
D2 b 0 LEDRED
${RED_LED}
.end
`;
    expect(problems(check(separate))).toEqual([]);
  });
});

describe.runIf(ngspiceRuns)('reverse voltage with a filter capacitor holding its charge', () => {
  const rated = '*pnlint: rating RECT kind=rectifier vrrm=50 if=1\n.model RECT D(IS=10n N=1.9 RS=0.05)';
  it('finds about twice the peak across a half-wave rectifier with a filter capacitor (standard textbook result, Sedra & Smith)', () => {
    const text = `half-wave rectifier with a filter capacitor\nV1 ac 0 SIN(0 30 50)\nD1 ac out RECT\nC1 out 0 1000u\nRL out 0 1k\n${rated}\n.end\n`;
    const result = check(text, { settings: { supplyTolerance: 0 } });
    const held = result.diodes[0]!.heldCharge.map((corner) => -corner.point!.voltage);
    const peakInverse = Math.max(...held);
    // PIV ≈ 2·Vm less the diode's forward drop at the crest (standard textbook result).
    expect(peakInverse).toBeGreaterThan(2 * 30 - 1.5);
    expect(peakInverse).toBeLessThanOrEqual(2 * 30);
    const [finding] = findingsOf(result, 'reverse-overvoltage');
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('C1 holding its charge');
  });
  it('finds about the peak across a bridge with a filter capacitor (standard textbook result), and stays quiet', () => {
    const text = `bridge rectifier with a filter capacitor
V1 a b SIN(0 30 50)
RG b 0 1meg
D1 a p RECT
D2 b p RECT
D3 0 a RECT
D4 0 b RECT
C1 p 0 1000u
RL p 0 1k
${rated}
.end
`;
    const result = check(text, { settings: { supplyTolerance: 0 } });
    const peakInverse = Math.max(...result.diodes.flatMap((diode) => diode.heldCharge.map((corner) => -corner.point!.voltage)));
    expect(peakInverse).toBeGreaterThan(30 - 1.5); // PIV ≈ Vm for a bridge (standard textbook result)
    expect(peakInverse).toBeLessThanOrEqual(30);
    expect(findingsOf(result, 'reverse-overvoltage')).toEqual([]);
  });
});

describe.runIf(ngspiceRuns)('near misses with a transistor driver', () => {
  it('leaves a transistor-driven LED with its resistor alone, with the current ngspice finds', () => {
    const text = `fault LED switched by an NPN transistor
V1 vcc 0 5
VLOGIC ctl 0 3.3
RB ctl b 10k
Q1 k b 0 NPNSMALL
R1 vcc a 220
VAM a an 0
D1 an k LEDRED
.model NPNSMALL NPN(IS=1e-14 BF=200 VAF=100)
${RED_LED}
.end
`;
    const result = check(text);
    expect(problems(result)).toEqual([]);
    const expected = ngspiceValue(text, 'i(vam)'); // ngspice 39, nominal
    expect(diodeAt(result, 'D1', 'nominal').current).toBeCloseTo(expected, 6);
  });
});

describe.runIf(ngspiceRuns)('zener-underbiased follows the textbook window', () => {
  // Rmax = (Vs,min − Vz) / (Iz,min + IL,max) (standard textbook result). Vs = 12 V − 5 %, Vz = 5.1 V,
  // Iz,min = IZK = 1 mA, IL,max = Vz / RL = 5.1 V / 2 kΩ. The model's knee is not ideal, so the
  // check is made 15 % either side of Rmax.
  const rmax = (12 * 0.95 - 5.1) / (1e-3 + 5.1 / 2000);
  const regulator = (series: number) => `zener regulator
V1 vin 0 12
R1 vin z ${series}
D1 0 z Z5V1
RL z 0 2k
*pnlint: rating Z5V1 kind=zener izk=1m
${ZENER}
.end
`;
  it(`stays quiet below Rmax ≈ ${rmax.toFixed(0)} Ω and warns above it`, () => {
    expect(findingsOf(check(regulator(rmax * 0.85)), 'zener-underbiased')).toEqual([]);
    expect(findingsOf(check(regulator(rmax * 1.15)), 'zener-underbiased')).toHaveLength(1);
  });
});

describe.runIf(ngspiceRuns)('fix requests', () => {
  it("hand the fixes module the LED's Thevenin view: the supply and the series resistance (Thevenin's theorem)", () => {
    const text = `LED on a 100 ohm resistor
V1 vcc 0 5
R1 vcc a 100
D1 a 0 LEDRED
${RED_LED}
.end
`;
    const requests: unknown[] = [];
    const result = check(text, { check: { fixProvider: (request) => (requests.push(request), []) } });
    expect(findingsOf(result, 'led-current-unlimited')).toHaveLength(1);
    const [request] = result.fixRequests.map((entry) => entry.request);
    expect(requests).toEqual([request]);
    expect(request).toMatchObject({ kind: 'limit-current', diode: 'D1', seriesResistors: ['R1'], maximumCurrent: 0.02, governingCorner: 'V1 max' });
    // Seen from the LED: 5.25 V behind 100 Ω.
    if (request?.kind !== 'limit-current') throw new Error('expected a limit-current request');
    expect(request.thevenin?.resistance).toBeCloseTo(100, 3);
    expect(request.thevenin?.voltage).toBeCloseTo(5.25, 4);
  });
});

describe.runIf(ngspiceRuns)('zener-underbiased at the worst corner: low supply, heaviest load', () => {
  // Iz = (Vs,min − Vz)/R − Vz/RL (the textbook shunt regulator). With 5 % resistors, R = 1.69 kΩ and
  // RL = 2 kΩ from 12 V − 5 %: all resistors high gives Iz ≈ 1.12 mA and all low ≈ 1.25 mA, both above
  // IZK = 1 mA; the feed resistor high with the load low gives ≈ 0.87 mA, below it.
  const text = `zener regulator with 5 % resistors
V1 vin 0 12
R1 vin z 1.69k
D1 0 z Z5V1
RL z 0 2k
*pnlint: rating Z5V1 kind=zener izk=1m
${ZENER}
.end
`;
  it('finds the corner where the feed resistor is high and the load resistor low', () => {
    const [finding] = findingsOf(check(text, { settings: { resistorTolerance: 0.05 } }), 'zener-underbiased');
    expect(finding?.message).toContain('R1 at +tolerance, other resistors at −tolerance');
    const textbook = (12 * 0.95 - 5.1) / (1690 * 1.05) - 5.1 / (2000 * 0.95); // standard textbook result
    const reported = Number(/carries only ([\d.]+) µA/.exec(finding!.message)?.[1]) * 1e-6;
    expect(Math.abs(reported - textbook)).toBeLessThan(0.05e-3); // the model's knee moves Vz by a few mV
  });
});

describe.runIf(ngspiceRuns)('typical ratings are not datasheets', () => {
  it('only warns when a guessed class’s typical reverse rating is exceeded', () => {
    const text = `a junction diode with no BV and no rating blocking 100 V
V1 vin 0 -100
D1 vin out JUNCTION
RL out 0 10k
.model JUNCTION D(IS=5n N=1.8 RS=0.05)
.end
`;
    const [finding] = findingsOf(check(text), 'reverse-overvoltage');
    expect(finding?.severity).toBe('warning');
    expect(finding?.message).toContain('typical value for a small-signal diode'); // 75 V: typical value, from memory
    expect(finding?.message).toContain('vrrm=');
  });
});

describe.runIf(ngspiceRuns)('a diode that cannot be checked says why', () => {
  it('notes a rectifier with no reverse rating blocking 60 V', () => {
    const text = `rectifier with no BV and no rating
V1 vin 0 -60
D1 vin out PLAIN
RL out 0 10k
*pnlint: rating PLAIN kind=rectifier
.model PLAIN D(IS=5n N=1.8 RS=0.05)
.end
`;
    const [finding] = findingsOf(check(text), 'reverse-overvoltage');
    expect(finding?.severity).toBe('info');
    expect(finding?.message).toContain('no reverse rating is known');
  });
});
