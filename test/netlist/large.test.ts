// Large netlists: elaboration keeps every element and node however big the
// file is. Expected counts follow from how the netlists are built (the ladder
// generator in test/support/ladder.mjs, and the loops below), not from pnlint.
import { describe, expect, it } from 'vitest';
import { resistorDiodeLadder } from '../support/ladder.mjs';
import { element, elaborateText, problems } from './helpers.js';

/** Generous: a 20,000-section elaboration takes well under a second unloaded; the machine is shared. */
const LARGE_TIMEOUT_MS = 60_000;

describe('a 20,000-section resistor–diode ladder', () => {
  const sections = 20_000;

  it(
    'elaborates every element and node',
    () => {
      const circuit = elaborateText(resistorDiodeLadder(sections));
      expect(problems(circuit)).toEqual([]);
      // The generator writes V1, then one resistor and one diode per section.
      expect(circuit.elements).toHaveLength(1 + 2 * sections);
      // Nodes n0 … n20000, and ground.
      expect(circuit.nodes).toHaveLength(sections + 2);
      expect(circuit.nodes[0]).toBe('0');
      expect(new Set(circuit.nodes).size).toBe(circuit.nodes.length);
      expect(circuit.elements.filter((e) => e.type === 'R')).toHaveLength(sections);
      expect(circuit.elements.filter((e) => e.type === 'D')).toHaveLength(sections);
      // Section 1 is R1 n0 n1 with the generator's second series value, 12 Ω; the last diode sits on the last rung.
      const first = element(circuit, 'R1', 'R');
      expect(first.nodes).toEqual(['n0', 'n1']);
      expect(first.resistance).toBe(12);
      expect(element(circuit, `D${sections}`, 'D').nodes).toEqual([`n${sections}`, '0']);
      expect(element(circuit, `D${sections}`, 'D').model.name).toBe('DRUNG');
      // The element line keeps its own place: R20000 is line 2 + 2·20000 − 1 (0-based), after the title, comment and V1.
      expect(element(circuit, `R${sections}`, 'R').location.range.start.line).toBe(2 * sections + 1);
    },
    LARGE_TIMEOUT_MS,
  );

  it(
    'with an ammeter per diode, elaborates the extra sources and nodes',
    () => {
      const circuit = elaborateText(resistorDiodeLadder(sections, { ammeters: true }));
      expect(problems(circuit)).toEqual([]);
      // V1, then a resistor, a 0 V source and a diode per section.
      expect(circuit.elements).toHaveLength(1 + 3 * sections);
      // n0 … n20000, a1 … a20000, and ground.
      expect(circuit.nodes).toHaveLength(2 * sections + 2);
      expect(element(circuit, `VAM${sections}`, 'V').nodes).toEqual([`n${sections}`, `a${sections}`]);
    },
    LARGE_TIMEOUT_MS,
  );
});

describe('many subcircuit instances', () => {
  it(
    'flattens 5,000 instances with their own nodes and names',
    () => {
      const instances = 5_000;
      const lines = ['farm of cells', 'V1 n0 0 5', '.subckt cell in out', 'R1 in mid 100', 'D1 mid out DCELL', 'R2 mid 0 10k', '.ends'];
      for (let index = 1; index <= instances; index++) lines.push(`X${index} n${index - 1} n${index} cell`);
      lines.push('.model DCELL D(IS=1e-14)', '.end');
      const circuit = elaborateText(lines.join('\n'));
      expect(problems(circuit)).toEqual([]);
      // V1 and three elements per instance.
      expect(circuit.elements).toHaveLength(1 + 3 * instances);
      // Ground, n0 … n5000, and one X<k>.mid per instance.
      expect(circuit.nodes).toHaveLength(1 + (instances + 1) + instances);
      expect(element(circuit, `X${instances}.D1`, 'D').nodes).toEqual([`X${instances}.mid`, `n${instances}`]);
    },
    LARGE_TIMEOUT_MS,
  );
});

describe('a very long include', () => {
  it(
    'reads an included file of 130,000 lines (more statements than a call can take as arguments)',
    () => {
      // V8 rejects a call with more than about 125,000 arguments: spreading the statements would stop here.
      const lines: string[] = [];
      for (let index = 0; index < 130_000; index++) lines.push(`* note ${index}`);
      lines.push('R1 a 0 1k');
      const circuit = elaborateText('long include\n.include long.inc\nV1 a 0 1\n.end\n', { '/project/long.inc': lines.join('\n') });
      expect(problems(circuit)).toEqual([]);
      expect(circuit.elements.map((e) => e.name)).toEqual(['R1', 'V1']);
    },
    LARGE_TIMEOUT_MS,
  );
});
