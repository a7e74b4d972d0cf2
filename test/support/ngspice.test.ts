// Checks of the reference-engine harness itself: that it builds the deck as
// verification.md describes, reads ngspice's numbers correctly, and counts a
// failed solve as failed (ngspice exits 0 even then).
import { describe, expect, test } from 'vitest';
import {
  buildOperatingPointDeck,
  ngspiceBranchName,
  declareNgspiceGate,
  readPrintedValues,
  runNgspiceOperatingPoint,
} from './ngspice.js';

describe('deck building', () => {
  test('the .end card is replaced by the tight options and a control block; .ends is kept', () => {
    const deck = buildOperatingPointDeck('title\n.subckt a p q\nR1 p q 1\n.ends\nX1 1 0 a\nV1 1 0 1\n.END\n');
    const lines = deck.split('\n');
    expect(lines).toContain('.ends');
    expect(lines).not.toContain('.END');
    // verification.md: the options and the control-block commands, in this order
    expect(deck).toContain('.options reltol=1e-9 abstol=1e-18 vntol=1e-12\n.control\nset numdgt=15\nop\nlet pnlint_padding = 0\necho @@BEGIN\nprint all\necho @@END\nquit\n.endc\n.end\n');
  });

  test('a netlist without .end still gets the control block, and a tolerance can be overridden', () => {
    const deck = buildOperatingPointDeck('title\nV1 1 0 1\nR1 1 0 1', { vectors: ['v(1)', 'i(v1)'], tolerances: { abstol: 1e-15 } });
    expect(deck).toContain('R1 1 0 1\n.options reltol=1e-9 abstol=1e-15 vntol=1e-12\n');
    expect(deck).toContain('print v(1) i(v1)');
  });

  test('the values between the markers are read, names lower-cased', () => {
    const values = readPrintedValues('noise\n@@BEGIN\nVCC = 5.000000000000000e+00\nv1#branch = -1.99877486490608e-02\n@@END\nafter = 1\n');
    expect([...(values ?? new Map())]).toEqual([
      ['vcc', 5],
      ['v1#branch', -1.99877486490608e-2],
    ]);
    expect(readPrintedValues('@@BEGIN\nno end marker')).toBeUndefined();
  });

  test('element names inside subcircuits map to ngspice vector names', () => {
    // Seen with ngspice 39: `VAM` inside instance X1 prints as `v.x1.vam#branch`.
    expect(ngspiceBranchName('VAM1')).toBe('vam1#branch');
    expect(ngspiceBranchName('X1.VAM')).toBe('v.x1.vam#branch');
    expect(ngspiceBranchName('X2.X1.VAMG')).toBe('v.x2.x1.vamg#branch');
  });
});

const ngspiceRuns = declareNgspiceGate();

describe.runIf(ngspiceRuns)('running ngspice', () => {
  test('a divider of two equal resistors halves its source (Ohm\'s law)', () => {
    const run = runNgspiceOperatingPoint('divider\nV1 top 0 10\nR1 top mid 1k\nR2 mid 0 1k\n.end\n');
    expect(run.failure).toBeUndefined();
    expect(run.values.get('mid')).toBeCloseTo(5, 12); // Ohm's law: 10 V · 1k / 2k
    // A source's current is negative when it delivers power (verification.md): 10 V / 2 kΩ.
    expect(run.values.get('v1#branch')).toBeCloseTo(-5e-3, 15);
  });

  test('a circuit with a single node reports it by name (print all of one vector says `all`)', () => {
    const run = runNgspiceOperatingPoint('one node\nI1 0 a 1m\nR1 a 0 2k\n.end\n');
    expect([...run.values.keys()]).toEqual(['a']);
    expect(run.values.get('a')).toBeCloseTo(2, 12); // Ohm's law: 1 mA · 2 kΩ
  });

  test('a current source into a diode gives the Shockley voltage plus the gmin leak', () => {
    // Shockley: V = N·Vt·ln(1 + I/IS) (SPICE3 user's manual, Quarles 1989), with
    // ngspice's constants k = 1.38064852e-23, q = 1.6021766208e-19, T = 300.15 K and
    // gmin = 1e-12 S across the junction (verification.md). The gmin share of 1 mA
    // is about 1e-12 · 0.6 A, far below the check's resolution.
    const thermalVoltage = (1.38064852e-23 * 300.15) / 1.6021766208e-19;
    const expected = 1 * thermalVoltage * Math.log(1 + 1e-3 / 1e-14);
    const run = runNgspiceOperatingPoint('one diode\nI1 0 a 1m\nD1 a 0 DX\n.model DX D(IS=1e-14 N=1)\n.end\n');
    expect(run.failure).toBeUndefined();
    expect(Math.abs((run.values.get('a') ?? NaN) - expected)).toBeLessThan(1e-9);
  });

  test('a loop of two voltage sources is a failed run, not numbers', () => {
    const run = runNgspiceOperatingPoint('loop\nV1 a 0 5\nV2 a 0 3\nR1 a b 1k\nR2 b 0 1k\n.end\n');
    expect(run.ok).toBe(false);
    expect(run.failure).toMatch(/aborted|failed|Error/);
  });

  test('a missing model is a failed run', () => {
    const run = runNgspiceOperatingPoint('no model\nV1 a 0 5\nR1 a b 1k\nD1 b 0 DNOWHERE\n.end\n');
    expect(run.ok).toBe(false);
  });

  test('a vector asked for and not printed is a failed run', () => {
    const run = runNgspiceOperatingPoint('divider\nV1 top 0 10\nR1 top 0 1k\n.end\n', { vectors: ['v(top)', 'v(nowhere)'] });
    expect(run.ok).toBe(false);
  });

  test('included files are written beside the netlist', () => {
    const run = runNgspiceOperatingPoint('included\n.include lib/r.inc\nV1 a 0 2\n.end\n', {
      includes: { 'lib/r.inc': 'R1 a b 1k\nR2 b 0 3k\n' },
    });
    expect(run.failure).toBeUndefined();
    expect(run.values.get('b')).toBeCloseTo(1.5, 12); // Ohm's law: 2 V · 3k / 4k
  });
});
