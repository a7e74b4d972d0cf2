// The sparse LU on real MNA systems against the reference engine: random
// linear resistor networks with grounded and floating voltage sources and a
// current source, assembled here by modified nodal analysis (Ho, Ruehli and
// Brennan, 1975), solved by the algebra layer, and compared with ngspice 39's
// `.op` of the same netlist. Linear, so both sides are one exact solve and
// must agree to rounding, far inside ngspice's own tolerances.
import { describe, expect, it } from 'vitest';
import { SparseLU, SparseMatrix } from '../../server/src/sim/algebra/index.js';
import { declareNgspiceGate, runNgspiceOperatingPoint } from '../support/ngspice.js';

/**
 * Agreement with ngspice, relative to the largest node voltage. ngspice 39 prints 15 digits
 * (numdgt=15); both sides are exact solves up to rounding, seen here agreeing to about 5e-15.
 */
const VOLTAGE_AGREEMENT = 1e-11;
/** Agreement of source currents, relative to the largest source current. */
const CURRENT_AGREEMENT = 1e-11;

function randomSource(seed: number): () => number {
  let state = seed >>> 0 || 1;
  return () => {
    state ^= state << 13;
    state >>>= 0;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    return state / 4294967296;
  };
}

interface Network {
  nodes: number;
  netlist: string;
  resistors: { a: number; b: number; ohms: number }[];
  voltageSources: { name: string; plus: number; minus: number; volts: number }[];
  currentSources: { plus: number; minus: number; amperes: number }[];
}

/**
 * A connected network on nodes 1..nodes (0 is ground): a random spanning tree
 * of resistors plus extra random resistors, values log-uniform from 1 Ω to
 * 1 MΩ; a grounded supply, a floating source between two nodes, a 0 V ammeter
 * in series with one resistor, and a current source.
 */
function randomNetwork(nodes: number, extra: number, seed: number): Network {
  const random = randomSource(seed);
  const pick = (below: number) => Math.floor(random() * below);
  const ohms = () => Number((10 ** (6 * random())).toPrecision(6));
  const resistors: Network['resistors'] = [];
  for (let node = 1; node <= nodes; node++) resistors.push({ a: node, b: pick(node), ohms: ohms() });
  for (let k = 0; k < extra; k++) {
    const a = 1 + pick(nodes);
    const b = pick(nodes + 1);
    if (a !== b) resistors.push({ a, b, ohms: ohms() });
  }
  const floatingPlus = 2 + pick(nodes - 1);
  const floatingMinus = floatingPlus - 1;
  const ammeterNode = nodes + 1; // an extra node in series with the ammeter
  const voltageSources: Network['voltageSources'] = [
    { name: 'vsupply', plus: 1, minus: 0, volts: 12 },
    { name: 'vfloat', plus: floatingPlus, minus: floatingMinus, volts: 1.5 },
    { name: 'vammeter', plus: ammeterNode, minus: 1 + pick(nodes), volts: 0 },
  ];
  resistors.push({ a: 1 + pick(nodes), b: ammeterNode, ohms: ohms() });
  const currentSources: Network['currentSources'] = [{ plus: 0, minus: 1 + pick(nodes), amperes: 1e-3 }];
  const lines = [`random resistor network, ${nodes} nodes, seed ${seed}`];
  resistors.forEach((r, k) => lines.push(`R${k + 1} n${r.a} ${r.b ? `n${r.b}` : '0'} ${r.ohms}`));
  for (const v of voltageSources) lines.push(`${v.name} n${v.plus} ${v.minus ? `n${v.minus}` : '0'} DC ${v.volts}`);
  // SPICE current source: current flows from its first node through the source to its second.
  currentSources.forEach((i, k) => lines.push(`I${k + 1} ${i.plus ? `n${i.plus}` : '0'} n${i.minus} DC ${i.amperes}`));
  lines.push('.end');
  return { nodes: nodes + 1, netlist: lines.join('\n') + '\n', resistors, voltageSources, currentSources };
}

/** MNA: node voltages 1..nodes at 0..nodes−1, then one branch current per voltage source. */
function solveWithAlgebra(network: Network): Float64Array {
  const size = network.nodes + network.voltageSources.length;
  const matrix = new SparseMatrix(size);
  const stamps: [slot: number, value: number][] = [];
  const rhs = new Float64Array(size);
  const add = (row: number, column: number, value: number) => stamps.push([matrix.slot(row, column), value]);
  for (const { a, b, ohms } of network.resistors) {
    const g = 1 / ohms;
    if (a) add(a - 1, a - 1, g);
    if (b) add(b - 1, b - 1, g);
    if (a && b) {
      add(a - 1, b - 1, -g);
      add(b - 1, a - 1, -g);
    }
  }
  network.voltageSources.forEach(({ plus, minus, volts }, k) => {
    const branch = network.nodes + k;
    if (plus) { add(plus - 1, branch, 1); add(branch, plus - 1, 1); }
    if (minus) { add(minus - 1, branch, -1); add(branch, minus - 1, -1); }
    rhs[branch] = volts;
  });
  for (const { plus, minus, amperes } of network.currentSources) {
    // The current leaves node `plus` and enters node `minus`.
    if (plus) rhs[plus - 1] -= amperes;
    if (minus) rhs[minus - 1] += amperes;
  }
  matrix.finalize();
  for (const [slot, value] of stamps) matrix.values[slot] += value;
  const lu = new SparseLU(matrix);
  const result = lu.factor();
  expect(result).toEqual({ ok: true });
  const solution = new Float64Array(size);
  lu.solve(rhs, solution);
  return solution;
}

describe('SparseLU on MNA systems, against ngspice 39', () => {
  if (!declareNgspiceGate()) return;

  for (const [nodes, extra, seed] of [[12, 10, 3], [80, 90, 17], [400, 500, 29]] as const) {
    it(`solves a random resistor network of ${nodes} nodes as ngspice does`, () => {
      const network = randomNetwork(nodes, extra, seed);
      const solution = solveWithAlgebra(network);
      const vectors = [
        ...Array.from({ length: network.nodes }, (_, k) => `v(n${k + 1})`),
        ...network.voltageSources.map((v) => `i(${v.name})`),
      ];
      const run = runNgspiceOperatingPoint(network.netlist, { vectors, timeoutMilliseconds: 30_000 });
      expect(run.failure).toBeUndefined();
      let largestVoltage = 0;
      for (let k = 0; k < network.nodes; k++) largestVoltage = Math.max(largestVoltage, Math.abs(run.values.get(`v(n${k + 1})`) ?? NaN));
      for (let k = 0; k < network.nodes; k++) {
        const reference = run.values.get(`v(n${k + 1})`);
        expect(reference, `v(n${k + 1}) printed`).toBeTypeOf('number');
        expect(Math.abs(solution[k] - reference!) / largestVoltage, `v(n${k + 1})`).toBeLessThan(VOLTAGE_AGREEMENT);
      }
      const currents = network.voltageSources.map((v) => run.values.get(`i(${v.name})`));
      const largestCurrent = Math.max(...currents.map((c) => Math.abs(c ?? NaN)));
      network.voltageSources.forEach((v, k) => {
        expect(currents[k], `i(${v.name}) printed`).toBeTypeOf('number');
        // Both use SPICE's sign: the branch current flows from + through the source to −.
        expect(Math.abs(solution[network.nodes + k] - currents[k]!) / largestCurrent, `i(${v.name})`).toBeLessThan(CURRENT_AGREEMENT);
      });
    });
  }
});
