// Times the sparse LU on the MNA matrix of a resistor–diode ladder, the shape
// the DC solver meets: factor (ordering chosen), refactor (ordering reused, as
// on every later Newton iteration) and solve. Run `npx tsc -b` first.
//   node test/bench/sparse.mjs [sections…]        (default: 2000 20000)
// Wall-clock times, as the lines `sparse-<n>: …`; on a shared machine they swing
// with the load, so a second line per size gives the process's CPU time
// (all its threads, JIT compilation and garbage collection included).
import { availableParallelism, loadavg } from 'node:os';
import { SparseLU, SparseMatrix } from '../../server/dist/sim/algebra/index.js';

const REPEATS = 10;

/**
 * Section k: 100 Ω from the previous section's node to node a_k, a diode's
 * 10 Ω series resistance from a_k to its junction node j_k, and the junction
 * (linearised: a conductance and nothing else) to ground. A 5 V source drives
 * the first node. Unknowns: 2·sections + 1 node voltages and one branch current.
 */
function ladder(sections) {
  const nodes = 2 * sections + 1;
  const matrix = new SparseMatrix(nodes + 1);
  const stamps = []; // [slot, sign, element]
  const conductances = [];
  const conductance = (a, b, value) => {
    const element = conductances.push(value) - 1;
    // Nodes are 1-based here; 0 is ground and has no row.
    if (a) stamps.push([matrix.slot(a - 1, a - 1), 1, element]);
    if (b) stamps.push([matrix.slot(b - 1, b - 1), 1, element]);
    if (a && b) stamps.push([matrix.slot(a - 1, b - 1), -1, element], [matrix.slot(b - 1, a - 1), -1, element]);
    return element;
  };
  const branch = nodes;
  const sourceSlots = [matrix.slot(0, branch), matrix.slot(branch, 0)];
  const junctions = [];
  for (let k = 1; k <= sections; k++) {
    const previous = k === 1 ? 1 : 2 * k - 2;
    conductance(previous, 2 * k, 1 / 100);
    conductance(2 * k, 2 * k + 1, 1 / 10);
    junctions.push(conductance(2 * k + 1, 0, 1e-12));
  }
  matrix.finalize();
  const rhs = new Float64Array(nodes + 1);
  rhs[branch] = 5;
  const stamp = () => {
    matrix.clear();
    for (const [slot, sign, element] of stamps) matrix.values[slot] += sign * conductances[element];
    for (const slot of sourceSlots) matrix.values[slot] = 1;
  };
  return { matrix, rhs, stamp, conductances, junctions };
}

/** Wall-clock and CPU milliseconds of one call. */
function timed(work) {
  const cpuBefore = process.cpuUsage();
  const wallBefore = performance.now();
  const result = work();
  const wall = performance.now() - wallBefore;
  const cpu = process.cpuUsage(cpuBefore);
  return { result, wall, cpu: (cpu.user + cpu.system) / 1000 };
}

function measure(sections) {
  const circuit = ladder(sections);
  circuit.stamp();
  const lu = new SparseLU(circuit.matrix);
  const first = timed(() => lu.factor());
  if (!first.result.ok) throw new Error(`ladder of ${sections} sections reported singular at column ${first.result.singularColumn}`);

  const refactorTime = { wall: 0, cpu: 0 };
  const solveTime = { wall: 0, cpu: 0 };
  const solution = new Float64Array(circuit.rhs.length);
  for (let repeat = 1; repeat <= REPEATS; repeat++) {
    // New junction conductances each time, over many decades, as Newton's iterates bring.
    circuit.junctions.forEach((element, k) => (circuit.conductances[element] = 10 ** (-12 + ((repeat + k) % 13))));
    circuit.stamp();
    const refactor = timed(() => lu.factor());
    if (!refactor.result.ok) throw new Error(`refactor reported singular at column ${refactor.result.singularColumn}`);
    const solve = timed(() => lu.solve(circuit.rhs, solution));
    for (const [total, one] of [[refactorTime, refactor], [solveTime, solve]]) {
      total.wall += one.wall / REPEATS;
      total.cpu += one.cpu / REPEATS;
    }
  }
  // Sanity: the residual must be tiny, or the times mean nothing.
  const product = new Float64Array(solution.length);
  circuit.matrix.multiply(solution, product);
  let residual = 0;
  for (let i = 0; i < product.length; i++) residual = Math.max(residual, Math.abs(product[i] - circuit.rhs[i]));
  if (!(residual < 1e-9)) throw new Error(`residual ${residual} too large`);
  if (lu.statistics.orderings !== 1) throw new Error(`the ordering was chosen ${lu.statistics.orderings} times, not once`);
  return { factorTime: first, refactorTime, solveTime, fill: lu.statistics.factorEntries - circuit.matrix.entryCount };
}

const sizes = process.argv.slice(2).map(Number).filter((n) => Number.isInteger(n) && n > 0);
console.log(`sparse: load average ${loadavg()[0].toFixed(1)} on ${availableParallelism()} cores; refactor and solve: mean of ${REPEATS}`);
for (const sections of sizes.length ? sizes : [2000, 20000]) {
  const { factorTime, refactorTime, solveTime, fill } = measure(sections);
  const line = (kind) => `factor ${factorTime[kind].toFixed(2)} ms, refactor ${refactorTime[kind].toFixed(2)} ms, solve ${solveTime[kind].toFixed(2)} ms`;
  console.log(`sparse-${sections}: ${line('wall')}`);
  console.log(`sparse-${sections}-cpu: ${line('cpu')} (fill-in: ${fill} entries)`);
}
