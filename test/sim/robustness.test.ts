// Circuits that cannot be solved, or only in part, get a diagnostic that says why; nothing
// hangs or throws. Expected behaviour: MNA is singular for a loop of voltage-defined branches
// and for a node with no DC path to ground (Ho, Ruehli and Brennan 1975); the rest are our rules.
import { describe, expect, it } from 'vitest';
import type { Circuit } from '../../server/src/netlist/circuit.js';
import { compileCircuit, solveOperatingPoint } from '../../server/src/sim/index.js';
import { resistorDiodeLadder } from '../support/ladder.mjs';
import { circuitOf, expectKirchhoff, pointOf, solveText } from './helpers.js';

function codes(result: { diagnostics: { code: string }[] }): string[] {
  return result.diagnostics.map((d) => d.code);
}

function messageOf(result: { diagnostics: { code: string; message: string }[] }, code: string): string {
  return result.diagnostics.filter((d) => d.code === code).map((d) => d.message).join(' | ');
}

describe('loops of voltage sources and inductors', () => {
  it('two sources in parallel: unsolved-circuit naming both', () => {
    const result = solveText('parallel supplies\nV1 a 0 5\nV2 a 0 3\nR1 a 0 1k\n.end\n');
    expect(result.ok).toBe(false);
    const message = messageOf(result, 'unsolved-circuit');
    expect(message).toMatch(/V2/);
    expect(message).toMatch(/V1/);
    expect(message).toMatch(/loop/);
  });

  it('an inductor across a source is a DC short: unsolved-circuit naming the loop', () => {
    const result = solveText('choke across supply\nV1 a 0 5\nL1 a 0 1m\nR1 a 0 1k\n.end\n');
    expect(result.ok).toBe(false);
    expect(messageOf(result, 'unsolved-circuit')).toMatch(/L1.*V1|V1.*L1/);
  });

  it('a loop through three sources and an E output', () => {
    const result = solveText('ring\nV1 a 0 1\nV2 b a 1\nE1 b 0 c 0 2\nR1 c 0 1k\nV3 c 0 1\n.end\n');
    expect(result.ok).toBe(false);
    expect(messageOf(result, 'unsolved-circuit')).toMatch(/loop/);
  });
});

describe('nodes with no DC path to ground', () => {
  const text = 'coupled through capacitors\nV1 a 0 5\nR1 a b 1k\nR3 b 0 1k\nC1 b c 1u\nR2 c d 1k\nC2 d 0 1u\n.end\n';

  it('floating-node names the nodes and their elements, and the rest is still solved', () => {
    const result = solveText(text);
    expect(codes(result)).toContain('floating-node');
    const message = messageOf(result, 'floating-node');
    expect(message).toMatch(/\bc\b/);
    expect(message).toMatch(/\bd\b/);
    expect(message).toMatch(/C1/);
    expect(message).toMatch(/R2/);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    // A 1k/1k divider from 5 V (Ohm's law).
    expect(result.point.nodes.b).toBeCloseTo(2.5, 6);
    expect(compileCircuit(circuitOf(text)).floatingNodes).toEqual(new Set(['c', 'd']));
  });

  it('a current source into a capacitor-only node: floating-node says there is no operating point there', () => {
    const result = solveText('charging forever\nI1 0 x 1m\nC1 x 0 1u\nV1 a 0 5\nR1 a 0 1k\n.end\n');
    expect(messageOf(result, 'floating-node')).toMatch(/I1 drives current into it.*no DC operating point/);
  });

  it('a MOSFET gate tied to nothing else is floating', () => {
    const result = solveText('open gate\nV1 d 0 5\nM1 d g 0 0 NM\n.model NM NMOS(VTO=1 KP=1m)\n.end\n');
    expect(messageOf(result, 'floating-node')).toMatch(/node g\b/);
  });
});

describe('elements the solver does not simulate', () => {
  const text = 'jfet stage\nV1 a 0 12\nR1 a d 1k\nJ1 d g 0 JN\nR2 g 0 1meg\nR3 a x 1k\nD1 x 0 DS\n.model JN NJF\n.model DS D\n.end\n';

  it('unmodeled-element names it, the rest is solved with it open, and its nodes are marked', () => {
    const result = solveText(text);
    expect(messageOf(result, 'unmodeled-element')).toMatch(/J1/);
    expect(result.ok).toBe(true);
    const compiled = compileCircuit(circuitOf(text));
    expect([...compiled.unmodeledNodes].sort()).toEqual(['d', 'g']);
    if (result.ok) {
      // With J1 open no current flows in R1 (Ohm's law): d sits at the supply.
      expect(result.point.nodes.d).toBeCloseTo(12, 9);
      expect(result.point.diodes.D1.region).toBe('forward');
    }
  });
});

describe('budgets, iteration caps and cancellation', () => {
  const text = 'stiff chain\nV1 in 0 30\nR1 in a 10\nD1 a b DP\nD2 b c DP\nD3 c 0 DP\nR2 b 0 100\n.model DP D(IS=1e-15 N=1 RS=0.1)\n.end\n';

  it('a cap of 2 Newton iterations per attempt ends in unsolved-circuit, quickly', () => {
    const started = performance.now();
    const result = solveText(text, undefined, { iterationLimit: 2 });
    expect(result.ok).toBe(false);
    expect(messageOf(result, 'unsolved-circuit')).toMatch(/iterations/);
    expect(performance.now() - started).toBeLessThan(5000);
  });

  it('a zero budget stops at once with a message naming the budget', () => {
    const result = solveText(text, undefined, { budgetMilliseconds: 0 });
    expect(result.ok).toBe(false);
    expect(messageOf(result, 'unsolved-circuit')).toMatch(/budget of 0 ms/);
  });

  it('a cancelled token stops the solve, even one cancelled part-way', () => {
    const before = solveText(text, undefined, { cancellation: { isCancellationRequested: true } });
    expect(before.ok).toBe(false);
    expect(messageOf(before, 'unsolved-circuit')).toMatch(/cancelled/);
    let checks = 0;
    const later = solveText(text, undefined, { cancellation: { get isCancellationRequested() { return ++checks > 2; } } });
    expect(later.ok).toBe(false);
    expect(messageOf(later, 'unsolved-circuit')).toMatch(/cancelled/);
  });

  it('when plain Newton runs out of iterations, gmin stepping still reaches the reference answer', () => {
    // A 50-section ladder needs about a dozen plain iterations; 8 per attempt forces gmin stepping.
    const ladder = resistorDiodeLadder(50).replace('.end', '.options reltol=1e-9 vntol=1e-12 abstol=1e-18\n.end');
    const point = pointOf(ladder, undefined, { iterationLimit: 8 });
    expect(point.method).toBe('gmin-stepping');
    expect(point.nodes.n1).toBeCloseTo(1.002841333084583, 9); // ngspice 39
    expect(point.nodes.n50).toBeCloseTo(5.353822400180083e-1, 9); // ngspice 39
  });

  it('without limits the same circuit solves and obeys KCL', () => {
    expectKirchhoff(text, pointOf(text));
  });
});

describe('switches that would toggle for ever', () => {
  it('a switch that opens its own control is held after a few changes, with a warning', () => {
    // Off: b rises to 5 V, above VT, so it closes; on: b falls to ~5 mV, below VT, so it opens.
    const text = 'self-interrupting contact\nV1 a 0 5\nR1 a b 1k\nS1 b 0 b 0 SW1\n.model SW1 SW(VT=2.5 VH=0 RON=1 ROFF=1meg)\n.end\n';
    const started = performance.now();
    const result = solveText(text);
    expect(performance.now() - started).toBeLessThan(5000);
    expect(messageOf(result, 'unsolved-circuit')).toMatch(/S1 keeps switching/);
  });
});

describe('odd inputs never throw', () => {
  it('an empty circuit', () => {
    const circuit: Circuit = {
      uri: '/empty.cir', title: 'empty', elements: [], models: new Map(), nodes: ['0'], temperature: 27, options: {}, directives: [], files: new Map(), diagnostics: [],
    };
    const result = solveOperatingPoint(compileCircuit(circuit));
    expect(result.ok).toBe(true);
  });

  it('values that are not numbers leave their element open with a diagnostic, and the rest solves', () => {
    const circuit = circuitOf('broken values\nV1 a 0 5\nR1 a b 1k\nR2 b 0 1k\nR3 a c 1k\nV2 c 0 1\n.end\n');
    const elements = circuit.elements.map((e) => (e.name === 'R3' ? { ...e, resistance: Number.NaN } : e.name === 'V2' ? { ...e, dc: Number.NaN } : e));
    const result = solveOperatingPoint(compileCircuit({ ...circuit, elements } as Circuit));
    expect(messageOf(result, 'unmodeled-element')).toMatch(/R3.*not a finite number/);
    expect(messageOf(result, 'unmodeled-element')).toMatch(/V2/);
    expect(result.ok).toBe(true);
    if (result.ok) expect(result.point.nodes.b).toBeCloseTo(2.5, 9); // 1k/1k divider (Ohm's law)
  });

  it('a malformed circuit object (an element without nodes) yields diagnostics, not an exception', () => {
    const circuit = circuitOf('fine\nV1 a 0 5\nR1 a 0 1k\n.end\n');
    const broken = { ...circuit, elements: [...circuit.elements, { ...circuit.elements[1], name: 'R9', nodes: undefined }] } as unknown as Circuit;
    const result = solveOperatingPoint(compileCircuit(broken));
    expect(result.diagnostics.length).toBeGreaterThan(0);
  });

  it('a diode model with IS = 0 solves as an open junction, without NaN', () => {
    const point = pointOf('dead junction\nV1 a 0 5\nR1 a b 1k\nD1 b 0 DNONE\nR2 b 0 1k\n.model DNONE D(IS=0)\n.end\n');
    expect(point.nodes.b).toBeCloseTo(2.5, 6); // only gmin across D1: the 1k/1k divider (Ohm's law)
  });

  it('random resistor, diode and source networks: each solves with KCL holding, or says why not', () => {
    let seed = 12345;
    const random = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const pick = <T,>(items: T[]) => items[Math.floor(random() * items.length)];
    let solved = 0;
    for (let trial = 0; trial < 60; trial++) {
      const nodes = ['0', 'n1', 'n2', 'n3', 'n4', 'n5'];
      const lines = [`random network ${trial}`, 'V1 n1 0 ' + (1 + Math.floor(random() * 20))];
      const count = 3 + Math.floor(random() * 8);
      for (let i = 0; i < count; i++) {
        const a = pick(nodes);
        let b = pick(nodes);
        if (b === a) b = a === '0' ? 'n2' : '0';
        const kind = random();
        if (kind < 0.45) lines.push(`R${i} ${a} ${b} ${pick(['1', '47', '1k', '22k', '1meg'])}`);
        else if (kind < 0.8) lines.push(`D${i} ${a} ${b} ${pick(['DA', 'DZ', 'DL'])}`);
        else if (kind < 0.9) lines.push(`I${i} ${a} ${b} ${pick(['1m', '10u'])}`);
        else lines.push(`V${i + 2} ${a} ${b} ${pick(['0.5', '3'])}`);
      }
      lines.push('.model DA D(IS=1e-14 RS=0.5)', '.model DZ D(IS=1e-14 BV=5.1 IBV=1m)', '.model DL D(IS=1e-20 N=1.9 RS=3)', '.end', '');
      const text = lines.join('\n');
      const result = solveText(text, undefined, { budgetMilliseconds: 2000 });
      if (result.ok) {
        solved++;
        const floating = compileCircuit(circuitOf(text)).floatingNodes;
        if (floating.size === 0) expectKirchhoff(text, result.point, 1e-6, 1e-9);
      } else {
        expect(codes(result)).toContain('unsolved-circuit');
      }
    }
    // Most random networks are solvable (loops of sources are the usual exception).
    expect(solved).toBeGreaterThan(30);
  });
});
