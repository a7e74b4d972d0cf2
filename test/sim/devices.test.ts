// Device equations and corner handling, each against the definition it comes from.
import { describe, expect, it } from 'vitest';
import { solveCorners, sourceValueAt } from '../../server/src/sim/index.js';
import { circuitOf, expectKirchhoff, pointOf } from './helpers.js';

const TIGHT = '.options reltol=1e-9 vntol=1e-12 abstol=1e-18';

describe('level-1 diode', () => {
  it('the breakdown knee: the current at −BV equals IBV (ngspice 39 manual, diode BV and IBV)', () => {
    const text = `zener at its knee\nI1 0 k 1m\nD1 0 k DZ\n.model DZ D(IS=1e-14 BV=5.1 IBV=1m)\n${TIGHT}\n.end\n`;
    const point = pointOf(text);
    expect(point.nodes.k).toBeCloseTo(5.1, 6);
    expect(point.diodes.D1.region).toBe('breakdown');
    expect(point.diodes.D1.current).toBeCloseTo(-1e-3, 12);
    expectKirchhoff(text, point);
  });

  it('area scales IS but not IBV at level 1: ngspice 39 gives 5.017928194320773 V at 2 mA for area 2', () => {
    const text = `zener area 2\nI1 0 k 2m\nD1 0 k DZ area=2\n.model DZ D(IS=1e-14 BV=5 IBV=1m)\n${TIGHT}\n.end\n`;
    expect(pointOf(text).nodes.k).toBeCloseTo(5.017928194320773, 6); // ngspice 39
  });

  it('area divides RS: ngspice 39 gives 0.8063020460195978 V at 100 mA for RS = 1 Ω, area 2', () => {
    const text = `rs and area\nI1 0 a 100m\nD1 a 0 DR area=2\n.model DR D(IS=1e-14 RS=1)\n${TIGHT}\n.end\n`;
    expect(pointOf(text).nodes.a).toBeCloseTo(0.8063020460195978, 6); // ngspice 39
  });

  it('high injection (IKF) with area: ngspice 39 gives 0.9435714093593609 V at 50 mA', () => {
    const text = `knee current\nI1 0 a 50m\nD1 a 0 DK area=2\n.model DK D(IS=1e-14 N=1.2 IKF=10m RS=0.5)\n${TIGHT}\n.end\n`;
    expect(pointOf(text).nodes.a).toBeCloseTo(0.9435714093593609, 6); // ngspice 39
  });

  it('a silicon junction drops about 0.7 V at a few mA and about 2 mV less per kelvin (common practice, no source)', () => {
    const text = `silicon diode\nI1 0 a 5m\nD1 a 0 DSI\n.model DSI D(IS=1e-14)\n.end\n`;
    const cool = pointOf(text, { name: 'cool', temperature: 25 });
    const warm = pointOf(text, { name: 'warm', temperature: 75 });
    expect(cool.diodes.D1.voltage).toBeGreaterThan(0.6);
    expect(cool.diodes.D1.voltage).toBeLessThan(0.8);
    const perKelvin = (warm.diodes.D1.voltage - cool.diodes.D1.voltage) / 50;
    expect(perKelvin).toBeLessThan(-1.5e-3);
    expect(perKelvin).toBeGreaterThan(-2.5e-3);
  });

  it('reversed without breakdown it carries only about −IS (Shockley; SPICE3 reverse region)', () => {
    const text = `reverse bias\nV1 a 0 -10\nR1 a k 1k\nD1 k 0 DSI\n.model DSI D(IS=1e-14)\n.options gmin=0\n.end\n`;
    const point = pointOf(text);
    expect(point.diodes.D1.region).toBe('reverse');
    expect(point.diodes.D1.current).toBeCloseTo(-1e-14, 16);
  });
});

describe('linear elements and sources', () => {
  it('controlled sources E, G, F and H by their definitions, and SPICE current signs', () => {
    const text = [
      'controlled sources',
      'V1 in 0 2',
      'R1 in 0 1k',
      'E1 e 0 in 0 3', // v(e) = 3·2 = 6 V
      'RE e 0 1k',
      'G1 0 g in 0 1m', // 2 mA from 0 through G1 into g: v(g) = 2 mA · 1 kΩ = 2 V
      'RG g 0 1k',
      'VSENSE in s 0',
      'RS s 0 2k', // 1 mA through VSENSE
      'F1 0 f VSENSE 5', // 5 mA into f: v(f) = 5 V over 1 kΩ
      'RF f 0 1k',
      'H1 h 0 VSENSE 1k', // v(h) = 1 kΩ · 1 mA = 1 V
      'RH h 0 1k',
      '.end',
      '',
    ].join('\n');
    const point = pointOf(text);
    expect(point.nodes.e).toBeCloseTo(6, 9);
    expect(point.nodes.g).toBeCloseTo(2, 9);
    expect(point.nodes.f).toBeCloseTo(5, 9);
    expect(point.nodes.h).toBeCloseTo(1, 9);
    // V1 delivers 2 mA (R1) + 1 mA (VSENSE path): SPICE reports −3 mA for a delivering source.
    expect(point.branches.V1).toBeCloseTo(-3e-3, 12);
    expect(point.branches.VSENSE).toBeCloseTo(1e-3, 12);
    expectKirchhoff(text, point);
  });

  it('a 0 Ω resistor is solved as 1 mΩ: ngspice 39 draws 0.999000999000941 A from 1 V through 0 Ω + 1 Ω', () => {
    const point = pointOf(`zero ohms\nV1 a 0 1\nR1 a b 0\nR2 b 0 1\n${TIGHT}\n.end\n`);
    expect(point.branches.V1).toBeCloseTo(-0.999000999000941, 9); // ngspice 39
  });

  it('an inductor is a short at DC and a capacitor an open (SPICE3 user’s manual, .op)', () => {
    const text = 'reactive\nV1 a 0 10\nL1 a b 1m\nR1 b c 1k\nC1 c 0 1u\nR2 c 0 1k\n.end\n';
    const point = pointOf(text);
    expect(point.nodes.b).toBeCloseTo(10, 9);
    expect(point.nodes.c).toBeCloseTo(5, 9);
    expect(point.branches.L1).toBeCloseTo(5e-3, 12);
    expect(point.branches.C1).toBe(0);
  });
});

describe('switches (ngspice 39 hysteresis rule)', () => {
  const text = (control: number, flag: string) =>
    `switch in its band\nVC c 0 ${control}\nV1 a 0 5\nR1 a b 1k\nS1 b 0 c 0 SMOD ${flag}\n.model SMOD SW(VT=2.5 VH=0.5 RON=10 ROFF=1e6)\n.end\n`;
  // ngspice 39 results for these netlists: off 4.995004995004996 V, on 0.04950495049504951 V.
  it.each([
    [2.7, '', 4.995004995004996],
    [2.7, 'ON', 0.04950495049504951],
    [2.7, 'OFF', 4.995004995004996],
    [3.5, '', 0.04950495049504951],
    [1.5, 'ON', 4.995004995004996],
  ])('control %s V, flag "%s": v(b) = %s V (ngspice 39)', (control, flag, expected) => {
    expect(pointOf(text(control, flag)).nodes.b).toBeCloseTo(expected, 9);
  });
});

describe('current-controlled switches (ngspice 39 rule: at DC a W in its band is off, whatever its flag)', () => {
  const text = (control: string, flag: string) =>
    `current switch\nIC 0 c ${control}\nVS c 0 0\nV1 a 0 5\nR1 a b 1k\nW1 b 0 VS WMOD ${flag}\n.model WMOD CSW(IT=1m IH=0.2m RON=5 ROFF=1e5)\n.end\n`;
  // ngspice 39 results for these netlists: off 4.95049504950495 V, on 0.02487562189054726 V.
  it.each([
    ['1.1m', '', 4.95049504950495],
    ['1.1m', 'ON', 4.95049504950495],
    ['1.5m', '', 0.02487562189054726],
    ['1.5m', 'ON', 0.02487562189054726],
  ])('control %s A, flag "%s": v(b) = %s V (ngspice 39)', (control, flag, expected) => {
    expect(pointOf(text(control, flag)).nodes.b).toBeCloseTo(expected, 9);
  });
});

describe('transistors by their defining equations', () => {
  it('NPN: with no Early effect or high injection, Ic = BF·Ib (Gummel–Poon, SPICE3 user’s manual)', () => {
    const text = `common emitter\nIB 0 b 10u\nVC c 0 5\nQ1 c b 0 QN\n.model QN NPN(IS=1e-15 BF=100)\n${TIGHT}\n.end\n`;
    const point = pointOf(text);
    expect(point.branches.Q1 / 10e-6).toBeCloseTo(100, 4);
    expect(point.nodes.b).toBeGreaterThan(0.5);
    expectKirchhoff(text, point);
  });

  it('PNP mirrors the NPN: the collector current flows out', () => {
    const text = `pnp\nVE e 0 5\nIB b 0 10u\nVC c 0 0\nQ1 c b e QP\n.model QP PNP(IS=1e-15 BF=50)\n${TIGHT}\n.end\n`;
    const point = pointOf(text);
    expect(point.branches.Q1 / -10e-6).toBeCloseTo(50, 4);
    expectKirchhoff(text, point);
  });

  it('NMOS in saturation: Id = KP/2·(W/L)·(Vgs − VTO)² (Shichman–Hodges; SPICE3 level 1)', () => {
    const text = `nmos\nVG g 0 3\nVD d 0 5\nM1 d g 0 0 NM W=20u L=10u\n.model NM NMOS(VTO=1 KP=1m)\n${TIGHT}\n.end\n`;
    const point = pointOf(text);
    // 1 mA/V² / 2 · 2 · (3 − 1)² = 4 mA
    expect(point.branches.M1).toBeCloseTo(4e-3, 9);
    expectKirchhoff(text, point);
  });

  it('NMOS in the linear region: Id = KP·(W/L)·(Vgs − VTO − Vds/2)·Vds', () => {
    const text = `nmos linear\nVG g 0 5\nVD d 0 1\nM1 d g 0 0 NM W=10u L=10u\n.model NM NMOS(VTO=1 KP=1m)\n${TIGHT}\n.end\n`;
    // 1 mA/V² · (5 − 1 − 0.5) · 1 = 3.5 mA
    expect(pointOf(text).branches.M1).toBeCloseTo(3.5e-3, 9);
  });

  it('PMOS in saturation carries the mirrored current', () => {
    const text = `pmos\nVS s 0 5\nVG g 0 2\nM1 0 g s s PM W=10u L=10u\n.model PM PMOS(VTO=-1 KP=1m)\n${TIGHT}\n.end\n`;
    // |Vgs| = 3 V: 1 mA/V² / 2 · (3 − 1)² = 2 mA, flowing out of the drain terminal
    expect(pointOf(text).branches.M1).toBeCloseTo(-2e-3, 9);
  });
});

describe('corners', () => {
  const text = 'divider\nV1 in 0 10\nR1 in out 1k\nR2 out 0 1k\n.end\n';

  it('a source override and an element scaling (Ohm’s law)', () => {
    expect(pointOf(text, { name: 'high', sources: { V1: 12 } }).nodes.out).toBeCloseTo(6, 9);
    // R1 at +10 %: 10 · 1000 / 2100
    expect(pointOf(text, { name: 'r1 high', scale: { R1: 1.1 } }).nodes.out).toBeCloseTo(10000 / 2100, 9);
  });

  it('one compiled circuit, several corners, each with its own numbers (names matched case-insensitively)', () => {
    const results = solveCorners(circuitOf(text), [
      { name: 'low', sources: { v1: 9.5 } },
      { name: 'nominal' },
      { name: 'high', sources: { V1: 10.5 }, scale: { r2: 2 } },
    ]);
    const out = results.map((r) => (r.ok ? r.point.nodes.out : Number.NaN));
    expect(out[0]).toBeCloseTo(4.75, 9); // Ohm's law
    expect(out[1]).toBeCloseTo(5, 9);
    expect(out[2]).toBeCloseTo(7, 9); // 10.5 · 2k / 3k
    expect(results.map((r) => (r.ok ? r.point.corner : r.corner))).toEqual(['low', 'nominal', 'high']);
  });
});

describe('source waveforms at a time (SPICE3 user’s manual definitions)', () => {
  it('SIN: offset before the delay, a crest a quarter period after it', () => {
    const sin = { shape: 'sin' as const, offset: 1, amplitude: 2, frequency: 50, delay: 0.01, damping: 0, phase: 0 };
    expect(sourceValueAt(sin, 0)).toBe(1);
    expect(sourceValueAt(sin, 0.01 + 0.005)).toBeCloseTo(3, 12);
    expect(sourceValueAt({ ...sin, phase: 90 }, 0)).toBeCloseTo(3, 12);
  });

  it('PULSE: the levels, mid-edge averages and the period', () => {
    const pulse = { shape: 'pulse' as const, initial: 0, pulsed: 5, delay: 1, rise: 1, fall: 2, width: 3, period: 10 };
    expect(sourceValueAt(pulse, 0.5)).toBe(0);
    expect(sourceValueAt(pulse, 1.5)).toBeCloseTo(2.5, 12);
    expect(sourceValueAt(pulse, 3)).toBe(5);
    expect(sourceValueAt(pulse, 6)).toBeCloseTo(2.5, 12);
    expect(sourceValueAt(pulse, 8)).toBe(0);
    expect(sourceValueAt(pulse, 13)).toBe(5);
  });

  it('PWL: linear between points, held outside them', () => {
    const pwl = { shape: 'pwl' as const, points: [{ time: 1, value: 0 }, { time: 2, value: 4 }, { time: 4, value: -4 }] };
    expect(sourceValueAt(pwl, 0)).toBe(0);
    expect(sourceValueAt(pwl, 1.5)).toBeCloseTo(2, 12);
    expect(sourceValueAt(pwl, 3)).toBeCloseTo(0, 12);
    expect(sourceValueAt(pwl, 9)).toBe(-4);
  });

  it('EXP: 1 − 1/e of the step one time constant after the rise delay', () => {
    const exp = { shape: 'exp' as const, initial: 0, pulsed: 1, riseDelay: 1, riseTau: 2, fallDelay: 100, fallTau: 1 };
    expect(sourceValueAt(exp, 0.5)).toBe(0);
    expect(sourceValueAt(exp, 3)).toBeCloseTo(1 - Math.exp(-1), 12);
  });

  it('SFFM: offset + amplitude·sin(2π·fc·t + mdi·sin(2π·fs·t))', () => {
    const sffm = { shape: 'sffm' as const, offset: 0, amplitude: 1, carrier: 1, modulationIndex: 0, signal: 1 };
    expect(sourceValueAt(sffm, 0.25)).toBeCloseTo(1, 12);
    expect(sourceValueAt({ ...sffm, modulationIndex: Math.PI / 2, signal: 0.25 }, 1)).toBeCloseTo(Math.sin(2 * Math.PI + Math.PI / 2), 12);
  });
});
