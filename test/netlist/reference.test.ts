// Elaboration checked against the reference engine, ngspice 39: the same
// netlist is elaborated by pnlint and run by ngspice, and every resistance
// (after parameters, subcircuit overrides, `.func`, `.if` and `m=`) and every
// source's operating-point value must agree. Runs wherever ngspice is on PATH.
import { describe, expect, test } from 'vitest';
import { declareNgspiceGate, runNgspiceOperatingPoint } from '../support/ngspice.js';
import { elaborateText, problems } from './helpers.js';

/** pnlint's `XP.X1.R1` is ngspice's `@r.xp.x1.r1[resistance]` (seen with ngspice 39). */
function ngspiceResistance(name: string): string {
  const parts = name.toLowerCase().split('.');
  const local = parts[parts.length - 1]!;
  return parts.length === 1 ? `@${local}[resistance]` : `@${local[0]}.${parts.join('.')}[resistance]`;
}

/** Both sides print 15 digits; agreement to 1e-12 relative is exact for these values. */
const RELATIVE_TOLERANCE = 1e-12;

const PANEL = [
  'status panel variants',
  '.param vsupply=5 rled={(vsupply-2)/10m} rpull=4.7k variant=2',
  '.func half(x) = {x/2}',
  '.subckt led_branch top bottom rser=1k',
  'R1 top mid {rser}',
  'R2 mid bottom {half(rser)}',
  '.ends',
  '.subckt panel supply ret count=2',
  'X1 supply ret led_branch rser={rled*count}',
  'X2 supply ret led_branch',
  'R9 supply ret {rpull}',
  '.ends',
  'V1 in 0 {vsupply}',
  'XP in 0 panel count=3',
  'XQ in 0 panel',
  '.if (variant == 2)',
  'R20 in 0 {2k*variant}',
  '.else',
  'R20 in 0 1k',
  '.endif',
  'VS1 s1 0 SIN(1.5 2 1k 1m 0 30)',
  'RS1 s1 0 1k',
  'VS2 s2 0 PULSE 0.7 5 1m',
  'RS2 s2 0 1k',
  'VS3 s3 0 PWL(1m 2.5 2m 3)',
  'RS3 s3 0 1k',
  'VS4 s4 0 dc 1.25 ac 1',
  'RS4 s4 0 1k',
  'VS5 s5 0 EXP(0.3 4 1m 1m 2m 1m)',
  'RS5 s5 0 1k',
  'VM m 0 1',
  'RM m 0 1k m=4',
  'RA a 0 4k7',
  'VA a 0 1',
  '.end',
].join('\n');

describe('elaborated values against ngspice 39', () => {
  if (!declareNgspiceGate()) return;
  const circuit = elaborateText(PANEL);
  const resistors = circuit.elements.filter((e) => e.type === 'R' && e.name !== 'RM');
  const sources = circuit.elements.filter((e) => e.type === 'V' && e.name.startsWith('VS'));
  const run = runNgspiceOperatingPoint(PANEL, {
    vectors: [...resistors.map((r) => ngspiceResistance(r.name)), ...sources.map((s) => `v(${s.nodes[0]})`), 'i(vm)'],
  });

  test('ngspice solved the deck', () => {
    expect(run.failure).toBeUndefined();
    expect(run.ok).toBe(true);
  });

  test('every resistance agrees (parameters, overrides, .func, .if; 4k7 on an element line read as 4k)', () => {
    expect(resistors.length).toBe(17);
    for (const r of resistors) {
      if (r.type !== 'R') continue;
      const reference = run.values.get(ngspiceResistance(r.name));
      expect(reference, r.name).toBeDefined();
      expect(Math.abs(r.resistance - reference!) / Math.abs(reference!), r.name).toBeLessThan(RELATIVE_TOLERANCE);
    }
  });

  test('every source takes the value ngspice uses at the operating point', () => {
    for (const s of sources) {
      if (s.type !== 'V') continue;
      const reference = run.values.get(`v(${s.nodes[0]})`);
      expect(reference, s.name).toBeDefined();
      expect(Math.abs(s.dc - reference!), s.name).toBeLessThan(1e-12);
    }
  });

  test('m=4 puts four resistors in parallel', () => {
    const rm = circuit.elements.find((e) => e.name === 'RM');
    if (rm?.type !== 'R') throw new Error('RM missing');
    // VM delivers 1 V; ngspice's source current is negative when it delivers power.
    expect(Math.abs(1 / rm.resistance + run.values.get('i(vm)')!)).toBeLessThan(1e-12);
  });

  test('the only diagnostic is the ambiguous 4k7', () => {
    expect(problems(circuit).map((d) => d.code)).toEqual(['ambiguous-value']);
  });
});
