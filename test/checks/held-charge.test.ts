// Capacitors holding their charge between the quasi-static instants (held-charge.ts): charge
// that one capacitor passes to the next (a voltage doubler, a Cockcroft–Walton multiplier)
// must reach the last one, and each diode's reverse voltage must match ngspice 39's settled
// transient. The quasi-static balance ignores ripple and gives each diode half the period to
// conduct instead of a short conduction angle, so its diode drops come out smaller: it reads
// a little above the transient, never below it (a lower figure could hide a fault).
import { describe, expect, it } from 'vitest';
import { cornerPlanning } from '../../server/src/checks/corners.js';
import { HELD_VOLTAGE_WORTH_NAMING, solveWithHeldCharge } from '../../server/src/checks/held-charge.js';
import { buildTopology } from '../../server/src/checks/topology.js';
import { elaborate } from '../../server/src/netlist/index.js';
import { DEFAULT_SETTINGS } from '../../server/src/settings.js';
import { solveCorners } from '../../server/src/sim/index.js';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, findingsOf, MAIN_URI, memoryReader } from './support.js';
import { transientMaxima, type TransientWindow } from './transient-reference.js';

const ngspice = declareNgspiceGate();

/**
 * How far above ngspice 39's settled transient peak the quasi-static figure may read, as a
 * fraction: about two diode drops and the ripple at tens of volts (ours; seen 2 % on a doubler).
 */
const ABOVE_TRANSIENT = 0.03;
/** 50 Hz: ten periods read after the capacitors have charged (seen settled to 1 µV with ngspice 39 at twice the time). */
const FIFTY_HERTZ: TransientWindow = { step: 20e-6, stop: 1, settledFrom: 0.8 };

const RECTIFIER = '*pnlint: rating RECT kind=rectifier vrrm=100 if=1\n.model RECT D(IS=10n N=1.9 RS=0.05)';
const NO_TOLERANCE = { settings: { supplyTolerance: 0 } };

/** The largest reverse voltage each diode sees over the held-charge corners. */
function heldReverse(text: string): Map<string, number> {
  const result = check(text, NO_TOLERANCE);
  return new Map(result.diodes.map((diode) => [diode.element, Math.max(...diode.heldCharge.map((corner) => -corner.point!.voltage))]));
}

function expectJustAbove(actual: number, transient: number) {
  expect(actual).toBeGreaterThanOrEqual(transient);
  expect(actual).toBeLessThanOrEqual(transient * (1 + ABOVE_TRANSIENT));
}

const DOUBLER = `half-wave voltage doubler
VS sec 0 SIN(0 30 50)
CP sec mid 100u
D1 0 mid RECT
D2 mid out RECT
CR out 0 220u
RL out 0 10k
${RECTIFIER}
.end
`;

describe.runIf(ngspice)('charge passed from capacitor to capacitor', () => {
  it('a half-wave doubler: both diodes see about 2·Vm, as in ngspice 39’s transient', () => {
    const reverse = heldReverse(DOUBLER);
    const transient = transientMaxima(DOUBLER, { clamp: 'v(mid)', pump: 'v(out)-v(mid)' }, FIFTY_HERTZ);
    // ngspice 39, settled transient: 58.2 V on the clamp diode, 58.1 V on the pump diode.
    expectJustAbove(reverse.get('D1')!, transient.get('clamp')!);
    expectJustAbove(reverse.get('D2')!, transient.get('pump')!);
    // Standard textbook result (Sedra & Smith): about 2·Vm, less the diode drops.
    expect(reverse.get('D2')!).toBeGreaterThan(2 * 30 - 2);
  });

  it('a half-wave doubler: the pump capacitor holds about −Vm and the reservoir about 2·Vm', () => {
    const held = contextHeld(DOUBLER);
    const transient = transientMaxima(DOUBLER, { reservoir: 'v(out)', pump: 'v(mid)-v(sec)' }, FIFTY_HERTZ);
    // ngspice 39: the reservoir peaks at 57.5 V, the pump capacitor at 29.3 V (second node up).
    expectJustAbove(held.get('CR')!, transient.get('reservoir')!);
    expectJustAbove(-held.get('CP')!, transient.get('pump')!);
  });

  it('a two-stage Cockcroft–Walton multiplier: each diode sees about 2·Vm, the output about 4·Vm', () => {
    const multiplier = `two-stage voltage multiplier
VS sec 0 SIN(0 30 50)
C1 sec n1 100u
D1 0 n1 RECT
D2 n1 n2 RECT
C2 n2 0 100u
C3 n1 n3 100u
D3 n2 n3 RECT
D4 n3 n4 RECT
C4 n4 n2 100u
RL n4 0 1Meg
${RECTIFIER}
.end
`;
    const reverse = heldReverse(multiplier);
    // Two seconds to charge (ngspice 39: the same peaks to 1 µV at twice the time).
    const window: TransientWindow = { step: 20e-6, stop: 3, settledFrom: 2.8 };
    const transient = transientMaxima(
      multiplier,
      { d1: 'v(n1)', d2: 'v(n2)-v(n1)', d3: 'v(n3)-v(n2)', d4: 'v(n4)-v(n3)', output: 'v(n4)' },
      window,
    );
    // ngspice 39: 59.3 V on each diode, 117.3 V out.
    for (const [diode, vector] of [['D1', 'd1'], ['D2', 'd2'], ['D3', 'd3'], ['D4', 'd4']] as const) {
      expectJustAbove(reverse.get(diode)!, transient.get(vector)!);
    }
    // Standard textbook result (Cockcroft–Walton): 2·N·Vm out of N stages, without load.
    const held = contextHeld(multiplier);
    expect(held.get('C2')! + held.get('C4')!).toBeGreaterThan(4 * 30 - 4);
    expect(held.get('C2')! + held.get('C4')!).toBeLessThanOrEqual(4 * 30);
  });
});

describe('capacitors named in the message', () => {
  it('a capacitor that never charges is held but not named', () => {
    // CIDLE sits behind D2, which nothing ever drives forward: its node stays at 0 V.
    const text = `half-wave rectifier beside an idle clamp
VS sec 0 SIN(0 30 50)
D1 sec out RECT
CF out 0 470u
RL out 0 1k
D2 0 idle RECT
CIDLE idle 0 1u
RIDLE idle 0 100k
*pnlint: rating RECT kind=rectifier vrrm=50 if=1
.model RECT D(IS=10n N=1.9 RS=0.05)
.end
`;
    const result = check(text, NO_TOLERANCE);
    const [finding] = findingsOf(result, 'reverse-overvoltage');
    // Half-wave with a filter capacitor: about 2·Vm = 60 V over the 50 V rating (standard textbook result).
    expect(finding?.severity).toBe('error');
    expect(finding?.message).toContain('CF holding its charge');
    expect(finding?.message).not.toContain('CIDLE');
    expect(finding?.related?.map((each) => each.message).join(' ')).not.toContain('CIDLE');
    const held = contextHeld(text);
    expect(Math.abs(held.get('CIDLE')!)).toBeLessThan(HELD_VOLTAGE_WORTH_NAMING);
  });

  it('a circuit without time-varying sources holds nothing', () => {
    const text = `DC rectifier with a filter capacitor\nV1 a 0 12\nD1 a out RECT\nC1 out 0 100u\nRL out 0 1k\n${RECTIFIER}\n.end\n`;
    expect(contextHeld(text).size).toBe(0);
  });
});

describe('budgets', () => {
  it('a cancelled check balances nothing and does not hang', () => {
    const started = performance.now();
    const result = check(DOUBLER, { ...NO_TOLERANCE, check: { cancellation: { isCancellationRequested: true } } });
    expect(performance.now() - started).toBeLessThan(5_000);
    expect(result).toBeDefined();
  });

  it('a board of doublers too big for the balance\'s solve budget says that its held charge did not settle', () => {
    // Sixty doublers on one winding: more balancing than MAXIMUM_HELD_CHARGE_SOLVES allows (ours).
    const stages = Array.from({ length: 60 }, (_, index) => `CP${index} sec m${index} 100u\nDA${index} 0 m${index} RECT\nDB${index} m${index} o${index} RECT\nCR${index} o${index} 0 220u\nRL${index} o${index} 0 10k`);
    const text = `sixty doublers\nVS sec 0 SIN(0 30 50)\n${stages.join('\n')}\n${RECTIFIER}\n.end\n`;
    const notes = check(text, NO_TOLERANCE).findings.filter((finding) => finding.rule === 'unsolved-circuit');
    expect(notes.map((finding) => finding.message)).toEqual([expect.stringContaining('did not settle within the solve limits')]);
    // The twenty of the case below settle: nothing said there.
    const twenty = `twenty doublers\nVS sec 0 SIN(0 30 50)\n${stages.slice(0, 20).join('\n')}\n${RECTIFIER}\n.end\n`;
    expect(check(twenty, NO_TOLERANCE).findings.filter((finding) => finding.rule === 'unsolved-circuit')).toEqual([]);
  });

  it('twenty doublers on one winding settle within the solve budget', () => {
    const stages = Array.from({ length: 20 }, (_, index) => `CP${index} sec m${index} 100u\nDA${index} 0 m${index} RECT\nDB${index} m${index} o${index} RECT\nCR${index} o${index} 0 220u\nRL${index} o${index} 0 10k`);
    const text = `twenty doublers\nVS sec 0 SIN(0 30 50)\n${stages.join('\n')}\n${RECTIFIER}\n.end\n`;
    const started = performance.now();
    const reverse = heldReverse(text);
    // ours: a board this size checks in seconds, not minutes, on a shared machine.
    expect(performance.now() - started).toBeLessThan(30_000);
    // Each is the doubler above: about 2·Vm across the pump diode (standard textbook result).
    expect(reverse.get('DB0')!).toBeGreaterThan(2 * 30 - 2);
  });
});

/** Every held capacitor's voltage (named or not), by name: the held-charge solve run on its own, without supply tolerance. */
function contextHeld(text: string): Map<string, number> {
  const held = new Map<string, number>();
  const result = heldChargeOf(text);
  for (const each of result?.held ?? []) for (const [capacitor, voltage] of each) held.set(capacitor.name, voltage);
  return held;
}

function heldChargeOf(text: string) {
  const circuit = elaborate(MAIN_URI, text, memoryReader());
  const settings = { ...DEFAULT_SETTINGS, supplyTolerance: 0 };
  const { plans } = cornerPlanning(circuit, settings, [], new Map());
  const solves = solveCorners(circuit, plans.map((plan) => plan.corner));
  return solveWithHeldCharge(circuit, buildTopology(circuit), plans, solves, solveCorners, {});
}
