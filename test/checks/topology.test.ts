// The DC topology the rules read: which nodes are rails, and what is joined at a node.
// Expected facts are circuit theory: an ideal voltage source fixes the voltage between its
// nodes whatever it carries, so a node it ties to a rail is a rail too; a 0 V source with no
// time behaviour (an ammeter) is a wire at DC.
import { describe, expect, it } from 'vitest';
import { elaborate } from '../../server/src/netlist/index.js';
import { buildTopology, isAmmeter, joinedAt } from '../../server/src/checks/topology.js';
import { MAIN_URI, memoryReader } from './support.js';

function topologyOf(text: string) {
  const circuit = elaborate(MAIN_URI, text, memoryReader());
  expect(circuit.diagnostics.filter((diagnostic) => diagnostic.severity === 'error')).toEqual([]);
  const element = (name: string) => circuit.elements.find((each) => each.name === name)!;
  return { topology: buildTopology(circuit), element };
}

describe('rails', () => {
  it('a node tied to ground through a chain of voltage sources is a rail; one behind a resistor is not', () => {
    const { topology } = topologyOf(
      ['stacked supplies', 'V1 v1 0 DC 5', 'V2 v2 v1 DC 7', 'VPROBE v2 v2_meas 0', 'R1 v2_meas out 1k', 'R2 out 0 1k', 'VFLOAT out out2 DC 1', 'R3 out2 0 1k', '.end'].join('\n'),
    );
    for (const node of ['0', 'v1', 'v2', 'v2_meas']) expect(topology.rails.has(node), node).toBe(true);
    // `out` hangs on resistors, and VFLOAT's other end only on `out`: neither is held.
    for (const node of ['out', 'out2']) expect(topology.rails.has(node), node).toBe(false);
  });
});

describe('what is joined at a node', () => {
  const text = [
    'probed clamp',
    'V1 vcc 0 DC 3.3',
    'R1 in pin 1k',
    'V2 in 0 DC 1',
    'VPROBE pin probe 0',
    'D1 probe vcc DX',
    'RLOAD pin 0 10k',
    '.model DX D',
    '.end',
  ].join('\n');

  it('looks through an ammeter to what hangs on its far side, each at the node it is attached at', () => {
    const { topology, element } = topologyOf(text);
    const joined = joinedAt(topology, 'probe', element('D1'));
    expect(joined.map(({ element: each, node }) => [each.name, node]).sort()).toEqual([
      ['R1', 'pin'],
      ['RLOAD', 'pin'],
    ]);
  });

  it('an ammeter is a 0 V source with no time behaviour; a 0 V source with one is not', () => {
    const { element } = topologyOf(`${text.replace('.end', '')}VPULSE x 0 DC 0 PULSE(0 1 0 1n 1n 1u 2u)\nRX x 0 1k\n.end`);
    expect(isAmmeter(element('VPROBE'))).toBe(true);
    expect(isAmmeter(element('V1'))).toBe(false);
    expect(isAmmeter(element('VPULSE'))).toBe(false);
  });
});
