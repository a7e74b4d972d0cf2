// The matrix structure the compiler builds (mna.ts StructureBuilder): what the rest of the
// solver relies on, stated in mna.ts and the algebra's SparseMatrix.slot contract — slot 0 is
// the discard for anything touching ground, each (row, column) gets one slot however often it
// is asked for, new slots are numbered 1, 2, 3, … in registration order, and unknowns are
// numbered netlist nodes first, then internal nodes and branches as devices add them.
import { describe, expect, it } from 'vitest';
import { StructureBuilder } from '../../server/src/sim/mna.js';
import { compileCircuit } from '../../server/src/sim/index.js';
import { circuitOf, pointOf } from './helpers.js';

describe('StructureBuilder', () => {
  it('numbers netlist nodes first, ground 0, then internal nodes and branches', () => {
    const builder = new StructureBuilder(['a', 'b']);
    expect(builder.node('0')).toBe(0);
    expect([builder.node('a'), builder.node('b')]).toEqual([1, 2]);
    expect(builder.internalNode('D1', 'junction side of RS')).toBe(3);
    expect(builder.branch('V1')).toBe(4);
    expect(builder.node('a')).toBe(1); // asked again: the same number
    expect(builder.unknown(3)).toEqual({ kind: 'internal', name: 'D1', label: 'junction side of RS' });
    expect(builder.unknown(4)).toEqual({ kind: 'branch', name: 'V1', label: 'current' });
    expect(builder.isBranch(4)).toBe(true);
    expect(builder.isBranch(1)).toBe(false);
    expect(builder.unknown(5)).toBeUndefined();
  });

  it('gives ground entries the discard slot 0, and one slot per entry in registration order, past every table growth', () => {
    // A star (one hub, many leaves) and a chain, far beyond the initial table size, so that the table is rebuilt many times.
    const leaves = 5000;
    const builder = new StructureBuilder(Array.from({ length: leaves + 1 }, (_, i) => `n${i}`), 4);
    expect(builder.slot(0, 3)).toBe(0);
    expect(builder.slot(3, 0)).toBe(0);
    const expected = new Map<string, number>();
    const wrong: string[] = [];
    let next = 1;
    for (let leaf = 2; leaf <= leaves + 1; leaf++) {
      for (const [row, column] of [[1, 1], [1, leaf], [leaf, 1], [leaf, leaf], [leaf - 1, leaf]]) {
        const key = `${row},${column}`;
        const slot = builder.slot(row, column);
        if (!expected.has(key)) expected.set(key, next++);
        if (slot !== expected.get(key)) wrong.push(`(${key}) got ${slot}, expected ${expected.get(key)}`);
      }
    }
    expect(builder.slotCount).toBe(next);
    // Asked again after all growth: the same slots, and each slot knows its row and column.
    for (const [key, slot] of expected) {
      const [row, column] = key.split(',').map(Number);
      if (builder.slot(row, column) !== slot) wrong.push(`(${key}) asked again got ${builder.slot(row, column)}, expected ${slot}`);
      if (builder.slotRow(slot) !== row || builder.slotColumn(slot) !== column) wrong.push(`slot ${slot} says (${builder.slotRow(slot)}, ${builder.slotColumn(slot)}), not (${key})`);
    }
    expect(wrong.slice(0, 5)).toEqual([]);
    expect(builder.slotCount).toBe(next);
  });

  it('hands a device only the nodes of its own element', () => {
    const builder = new StructureBuilder(['a', 'b', 'c']);
    builder.beginElement(Int32Array.from([3, 1, 2]), 1, 2);
    expect([builder.terminal(0), builder.terminal(1)]).toEqual([1, 2]);
    expect(() => builder.terminal(2)).toThrow();
  });
});

describe('compiling with the one numbering pass', () => {
  it('numbers every netlist node once, ground spelled 0 or gnd alike', () => {
    const compiled = compileCircuit(circuitOf('divider\nV1 top gnd 10\nR1 top mid 1k\nR2 mid 0 1k\nD1 mid GND DX\n.model DX D(RS=1)\n.end\n'));
    expect(compiled.nodeIndex.get('0')).toBe(0);
    expect(new Set(compiled.nodeIndex.values()).size).toBe(compiled.nodeIndex.size);
    expect([...compiled.nodeIndex.keys()].sort()).toEqual(['0', 'mid', 'top']);
  });

  it('solves a divider with its ground written gnd as one written 0 (Ohm’s law: 10 V over two equal resistors gives 5 V)', () => {
    const point = pointOf('divider\nV1 top gnd 10\nR1 top mid 1k\nR2 mid 0 1k\n.end\n');
    expect(point.nodes.mid).toBeCloseTo(5, 9); // Ohm's law
    expect(point.branches.V1).toBeCloseTo(-5e-3, 12); // SPICE's sign: a source delivering power has negative current
  });
});
