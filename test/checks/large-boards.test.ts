// What the checks do to stay fast on large boards must not change what they find: each
// diode is still judged as if it alone were turned around, corners started from the nominal
// solution still land where a cold solve (ngspice 39's) lands, and every budget ends in a
// diagnostic, never a hang. Expected currents come from ngspice 39 solving the same circuit.
import { describe, expect, it } from 'vitest';
import { elaborate } from '../../server/src/netlist/index.js';
import { buildRegions } from '../../server/src/checks/regions.js';
import { buildTopology } from '../../server/src/checks/topology.js';
import { solveCorners } from '../../server/src/sim/index.js';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, diodeAt, findingsOf, MAIN_URI, memoryReader, ngspiceValue } from './support.js';

const ngspiceRuns = declareNgspiceGate();

// A red indicator LED, about 1.9 V at 5 mA (red about 1.8–2.0 V: common practice, no source),
// and a silicon protection diode, about 0.7 V (common practice, no source).
const MODELS = ['.model DPROT D(IS=2.5e-9 N=1.75 RS=0.5 BV=75 IBV=5u)', '.model DRED D(IS=1e-20 N=1.8 RS=2.5)'];

/** Indicators on a 5 V rail: a protection diode, a resistor and an LED each; `reversed` LEDs are wired backwards. */
function indicators(count: number, reversed: (index: number) => boolean, ammeter?: number): string {
  const lines = [`${count} indicators on 5 V`, 'V1 vcc 0 5'];
  for (let index = 1; index <= count; index++) {
    lines.push(`DP${index} vcc p${index} DPROT`);
    if (index === ammeter) lines.push(`R${index} p${index} m${index} 390`, `VAM m${index} a${index} 0`);
    else lines.push(`R${index} p${index} a${index} 390`);
    lines.push(reversed(index) ? `DL${index} 0 a${index} DRED` : `DL${index} a${index} 0 DRED`);
  }
  lines.push(...MODELS, '.end', '');
  return lines.join('\n');
}

describe.runIf(ngspiceRuns)('reversed-diode on a board of many indicators', () => {
  it('finds every reversed LED behind its series protection diode, with the current ngspice finds when that LED alone is turned around', () => {
    // Twelve suspects (six LEDs and six protection diodes that carry nothing): more than any
    // small number that could be flipped one at a time, so the flips are shared between solves.
    const board = indicators(6, () => true);
    const result = check(board);
    const reversed = findingsOf(result, 'reversed-diode');
    expect(reversed.map((finding) => finding.element).sort()).toEqual(['DL1', 'DL2', 'DL3', 'DL4', 'DL5', 'DL6']);
    // ngspice 39: the same board with only DL3 turned back, at the max corner (5 V + 5 %, the
    // default supply tolerance: common practice, no source).
    const fixedThird = indicators(6, (index) => index !== 3, 3).replace('V1 vcc 0 5', 'V1 vcc 0 5.25');
    const expected = ngspiceValue(fixedThird, 'i(vam)');
    const message = reversed.find((finding) => finding.element === 'DL3')!.message;
    expect(message).toContain('V1 = 5.25 V (max corner)');
    expect(message).toContain(`would carry ${(expected * 1e3).toFixed(2)} mA`);
  });

  it('leaves the correctly placed LEDs on the same board alone', () => {
    const board = indicators(8, (index) => index % 2 === 0);
    const reversed = findingsOf(check(board), 'reversed-diode').map((finding) => finding.element);
    expect(reversed.sort()).toEqual(['DL2', 'DL4', 'DL6', 'DL8']);
  });

  it('solves the corners from the nominal solution to where ngspice solves them cold', () => {
    const board = indicators(4, () => false, 2);
    const result = check(board);
    for (const [corner, volts] of [
      ['V1 min', 4.75],
      ['V1 max', 5.25],
    ] as const) {
      const expected = ngspiceValue(board.replace('V1 vcc 0 5', `V1 vcc 0 ${volts}`), 'i(vam)'); // ngspice 39
      expect(diodeAt(result, 'DL2', corner).current).toBeCloseTo(expected, 7);
    }
  });
});

describe('regions of a circuit', () => {
  const regionsOf = (text: string) => {
    const circuit = elaborate(MAIN_URI, text, memoryReader());
    return { circuit, regions: buildRegions(circuit, buildTopology(circuit)) };
  };

  it('splits a board at its supply rail: each indicator is a region of its own', () => {
    const { regions } = regionsOf(indicators(3, () => false));
    expect(regions).toBeDefined();
    const [first, second] = [regions!.regionOf('a1'), regions!.regionOf('a2')];
    expect(first).toBeDefined();
    expect(regions!.regionOf('p1')).toBe(first);
    expect(second).not.toBe(first);
    expect(regions!.regionOf('vcc')).toBeUndefined(); // held by V1 to ground
  });

  it('keeps a transistor and the node that drives its base together', () => {
    const { regions } = regionsOf(`driver
V1 vcc 0 5
R1 vcc b 10k
Q1 c b 0 QN
R2 vcc c 330
.model QN NPN(BF=100)
.end
`);
    expect(regions!.regionOf('b')).toBe(regions!.regionOf('c'));
  });

  it('does not split a circuit whose current-controlled source senses the supply', () => {
    const { regions } = regionsOf(`mirror of the supply current
V1 vcc 0 5
R1 vcc a 1k
D1 a 0 DRED
F1 0 b V1 0.5
R2 b 0 1k
${MODELS[1]}
.end
`);
    expect(regions).toBeUndefined();
  });
});

describe('corner budgets', () => {
  it('reports every corner left unsolved when the budget for all of them is spent, without throwing', () => {
    const circuit = elaborate(MAIN_URI, indicators(3, () => false), memoryReader());
    const corners = [{ name: 'nominal' }, { name: 'low', sources: { V1: 4.75 } }];
    const results = solveCorners(circuit, corners, { totalBudgetMilliseconds: 0 });
    expect(results.map((result) => result.ok)).toEqual([false, false]);
    for (const result of results) {
      expect(result.diagnostics.some((diagnostic) => diagnostic.code === 'unsolved-circuit' && diagnostic.message.includes('budget'))).toBe(true);
    }
  });

  it('stops at once when the check is cancelled before it starts', () => {
    const result = check(indicators(20, () => true), { check: { cancellation: { isCancellationRequested: true } } });
    expect(findingsOf(result, 'reversed-diode')).toEqual([]);
    expect(result.solves.every((each) => !each.ok)).toBe(true);
  });
});
