// Checks of the comparison itself, on hand-made operating points: that a
// difference just outside the stated tolerance is caught, one inside is not,
// names are matched as ngspice writes them, and a KCL violation is seen.
// The expected outcomes follow from the tolerance definitions in compare.ts.
import { describe, expect, test } from 'vitest';
import type { Circuit, Element, Model, SourceLocation } from '../../server/src/netlist/circuit.js';
import type { OperatingPoint } from '../../server/src/sim/types.js';
import { checkKirchhoff, compareWithNgspice } from './compare.js';

const here: SourceLocation = { uri: 'memory:test.cir', range: { start: { line: 1, column: 1 }, end: { line: 1, column: 2 } } } as SourceLocation;

function point(nodes: Record<string, number>, branches: Record<string, number>): OperatingPoint {
  return { corner: 'nominal', nodes, branches, diodes: {}, method: 'newton', iterations: 1, milliseconds: 0 };
}

describe('compareWithNgspice', () => {
  test('a voltage 0.5 µV off at 1 V passes, 2.5 µV off fails (tolerance 1 µV + 1e-6 relative = 2 µV)', () => {
    const reference = new Map([['a', 1]]);
    expect(compareWithNgspice(reference, point({ A: 1 + 0.5e-6 }, {})).disagreements).toEqual([]);
    expect(compareWithNgspice(reference, point({ A: 1 + 2.5e-6 }, {})).disagreements).toHaveLength(1);
  });

  test('a current 1.5 nA off at 0.1 mA fails (tolerance 1 nA + 1e-6 relative = 1.1 nA); subcircuit names map', () => {
    const reference = new Map([
      ['v.x1.vam#branch', 1e-4],
      ['x1.k', 0.7],
    ]);
    const good = compareWithNgspice(reference, point({ 'X1.k': 0.7 }, { 'X1.VAM': 1e-4 + 0.5e-9 }));
    expect(good.disagreements).toEqual([]);
    expect(good.currentsCompared).toBe(1);
    expect(good.voltagesCompared).toBe(1);
    expect(compareWithNgspice(reference, point({ 'X1.k': 0.7 }, { 'X1.VAM': 1e-4 + 1.5e-9 })).disagreements).toHaveLength(1);
  });

  test('a value that pnlint does not report is a disagreement', () => {
    const result = compareWithNgspice(new Map([['b', 2]]), point({}, {}));
    expect(result.disagreements).toEqual([expect.objectContaining({ name: 'b', pnlint: undefined })]);
  });
});

describe('checkKirchhoff', () => {
  const model: Model = { name: 'DX', type: 'D', params: {}, location: here };
  const base = { location: here, instances: [] };
  const elements: Element[] = [
    { ...base, type: 'V', name: 'V1', nodes: ['in', '0'], dc: 5, waveform: undefined },
    { ...base, type: 'R', name: 'R1', nodes: ['in', 'a'], resistance: 1000 },
    { ...base, type: 'D', name: 'D1', nodes: ['a', '0'], model, area: 1, off: false, temperature: undefined },
  ];
  const circuit = { elements } as unknown as Circuit;

  test('currents that balance pass; a 1 µA imbalance at a 4 mA node fails (allowed 1 nA + 4 nA)', () => {
    // A source delivering power carries a negative current (SPICE convention).
    const balanced = checkKirchhoff(circuit, point({}, { V1: -4e-3, R1: 4e-3, D1: 4e-3 }));
    expect(balanced.residuals.every((node) => Math.abs(node.residual) <= node.allowed)).toBe(true);
    expect(balanced.residuals.map((node) => node.node).sort()).toEqual(['a', 'in']);
    const unbalanced = checkKirchhoff(circuit, point({}, { V1: -4e-3, R1: 4e-3, D1: 4e-3 + 1e-6 }));
    expect(unbalanced.residuals.filter((node) => Math.abs(node.residual) > node.allowed).map((node) => node.node)).toEqual(['a']);
  });
});
