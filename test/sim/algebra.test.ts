// The sparse LU against independent references: a textbook dense Gaussian
// elimination written here, systems built around a chosen exact solution,
// hand-worked circuits, and the residual ‖A·x − b‖ computed from the entry list.
import { describe, expect, it } from 'vitest';
import { SparseLU, SparseMatrix } from '../../server/src/sim/algebra/index.js';

type Entry = [row: number, column: number, value: number];

/**
 * Residual tolerance: the normwise backward error ‖A·x − b‖∞ / (‖A‖∞·‖x‖∞ + ‖b‖∞)
 * of a stable LU is a modest multiple of the unit roundoff 1.1e-16 (Wilkinson's
 * backward error analysis); 1e-12 leaves room for growth under threshold pivoting.
 */
const BACKWARD_ERROR_TOLERANCE = 1e-12;
/**
 * Agreement with the dense reference for the diagonally dominant test family, whose
 * condition number is at most (1 + 0.9)/(1 − 0.9) = 19 in the ∞-norm: forward error
 * ≲ condition × backward error, so 1e-10 is loose.
 */
const SOLUTION_TOLERANCE = 1e-10;

/** A small deterministic generator (xorshift32), so that failures reproduce. */
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

function shuffled(n: number, random: () => number): number[] {
  const order = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [order[i], order[j]] = [order[j], order[i]];
  }
  return order;
}

/** Registers the entries (repeated positions add up, as stamps do) and sets their values. */
function buildMatrix(size: number, entries: Entry[]): { matrix: SparseMatrix; slots: number[] } {
  const matrix = new SparseMatrix(size);
  const slots = entries.map(([row, column]) => matrix.slot(row, column));
  matrix.finalize();
  setValues(matrix, slots, entries);
  return { matrix, slots };
}

function setValues(matrix: SparseMatrix, slots: number[], entries: Entry[]): void {
  matrix.clear();
  entries.forEach(([, , value], k) => (matrix.values[slots[k]] += value));
}

function toDense(size: number, entries: Entry[]): number[][] {
  const dense = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (const [row, column, value] of entries) dense[row][column] += value;
  return dense;
}

/** Textbook Gaussian elimination with row partial pivoting, the reference. */
function denseSolve(matrix: number[][], rhs: number[]): number[] {
  const n = rhs.length;
  const a = matrix.map((row) => row.slice());
  const b = rhs.slice();
  for (let k = 0; k < n; k++) {
    let best = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(a[i][k]) > Math.abs(a[best][k])) best = i;
    [a[k], a[best]] = [a[best], a[k]];
    [b[k], b[best]] = [b[best], b[k]];
    for (let i = k + 1; i < n; i++) {
      const multiplier = a[i][k] / a[k][k];
      if (multiplier === 0) continue;
      for (let j = k; j < n; j++) a[i][j] -= multiplier * a[k][j];
      b[i] -= multiplier * b[k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let k = n - 1; k >= 0; k--) {
    let sum = b[k];
    for (let j = k + 1; j < n; j++) sum -= a[k][j] * x[j];
    x[k] = sum / a[k][k];
  }
  return x;
}

/** A·x from the entry list, independent of SparseMatrix.multiply. */
function product(size: number, entries: Entry[], x: ArrayLike<number>): number[] {
  const y = new Array<number>(size).fill(0);
  for (const [row, column, value] of entries) y[row] += value * x[column];
  return y;
}

function backwardError(size: number, entries: Entry[], x: ArrayLike<number>, b: ArrayLike<number>): number {
  const ax = product(size, entries, x);
  const rowSums = new Array<number>(size).fill(0);
  for (const [row, , value] of entries) rowSums[row] += Math.abs(value);
  const normA = Math.max(0, ...rowSums);
  const normX = Math.max(0, ...Array.from(x, Math.abs));
  const normB = Math.max(0, ...Array.from(b, Math.abs));
  let residual = 0;
  for (let i = 0; i < size; i++) residual = Math.max(residual, Math.abs(ax[i] - b[i]));
  return residual / (normA * normX + normB);
}

function maxRelativeDifference(x: ArrayLike<number>, reference: ArrayLike<number>): number {
  const scale = Math.max(...Array.from(reference, Math.abs));
  let worst = 0;
  for (let i = 0; i < reference.length; i++) worst = Math.max(worst, Math.abs(x[i] - reference[i]) / scale);
  return worst;
}

/**
 * A random sparse matrix that is strictly diagonally dominant after a random
 * column permutation, hence nonsingular (Levy–Desplanques theorem), yet with
 * mostly zero diagonal entries, so that pivots must be taken off the diagonal.
 * Each row: one dominant entry of magnitude in [1, 2] and `offDiagonal` entries
 * of magnitude below 0.9 / offDiagonal.
 */
function dominantSystem(size: number, offDiagonal: number, random: () => number): Entry[] {
  const dominantColumn = shuffled(size, random);
  const entries: Entry[] = [];
  for (let i = 0; i < size; i++) {
    const sign = random() < 0.5 ? -1 : 1;
    entries.push([i, dominantColumn[i], sign * (1 + random())]);
    for (let k = 0; k < offDiagonal; k++) {
      const column = Math.floor(random() * size);
      if (column === dominantColumn[i]) continue;
      entries.push([i, column, ((2 * random() - 1) * 0.9) / offDiagonal]);
    }
  }
  return entries;
}

/** Random sparse pattern and values, not dominant: checked by backward error only. */
function generalSystem(size: number, perRow: number, random: () => number): Entry[] {
  const entries: Entry[] = [];
  const permutation = shuffled(size, random);
  for (let i = 0; i < size; i++) {
    entries.push([i, permutation[i], 2 * random() - 1]);
    for (let k = 0; k < perRow; k++) entries.push([i, Math.floor(random() * size), 2 * random() - 1]);
  }
  return entries;
}

function solveSparse(lu: SparseLU, b: ArrayLike<number>): Float64Array {
  const x = new Float64Array(b.length);
  lu.solve(Float64Array.from(b), x);
  return x;
}

describe('SparseMatrix', () => {
  it('gives one slot per position, sums stamps, multiplies, and clears', () => {
    const matrix = new SparseMatrix(3);
    const a = matrix.slot(0, 0);
    const b = matrix.slot(0, 2);
    expect(matrix.slot(0, 0)).toBe(a);
    const c = matrix.slot(2, 1);
    matrix.finalize();
    expect(matrix.slot(0, 2)).toBe(b); // idempotent after finalize too, for an existing entry
    matrix.values[a] += 2;
    matrix.values[a] += 1;
    matrix.values[b] = -1;
    matrix.values[c] = 4;
    const y = new Float64Array(3);
    matrix.multiply(Float64Array.of(1, 2, 3), y);
    // [3 0 −1; 0 0 0; 0 4 0]·[1 2 3] = [0 0 8] (worked by hand).
    expect(Array.from(y)).toEqual([0, 0, 8]);
    matrix.clear();
    expect(Array.from(matrix.values)).toEqual([0, 0, 0]);
    expect(matrix.values.length).toBe(3);
  });

  it('rejects a programming error clearly: an entry outside the matrix, or a new entry after finalize()', () => {
    const matrix = new SparseMatrix(2);
    expect(() => matrix.slot(2, 0)).toThrow(RangeError);
    matrix.finalize();
    expect(() => matrix.slot(1, 1)).toThrow(/after finalize/);
  });
});

describe('SparseLU on random sparse systems', () => {
  for (const size of [1, 5, 30, 120, 300]) {
    it(`matches the dense reference and a chosen exact solution, ${size} unknowns`, () => {
      const random = randomSource(1000 + size);
      const entries = dominantSystem(size, 3, random);
      const { matrix } = buildMatrix(size, entries);
      const exact = Array.from({ length: size }, () => 2 * random() - 1);
      const b = product(size, entries, exact);
      const lu = new SparseLU(matrix);
      expect(lu.factor()).toEqual({ ok: true });
      const x = solveSparse(lu, b);
      expect(backwardError(size, entries, x, b)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
      // Expected: the solution the right-hand side was built from, and the textbook dense elimination.
      expect(maxRelativeDifference(x, exact)).toBeLessThan(SOLUTION_TOLERANCE);
      expect(maxRelativeDifference(x, denseSolve(toDense(size, entries), b))).toBeLessThan(SOLUTION_TOLERANCE);
    });
  }

  it('has a small backward error on general (non-dominant) random systems', () => {
    for (const [size, seed] of [[10, 1], [40, 2], [200, 3], [2000, 4]] as const) {
      const random = randomSource(seed);
      const entries = generalSystem(size, 3, random);
      const { matrix } = buildMatrix(size, entries);
      const b = Array.from({ length: size }, () => 2 * random() - 1);
      const lu = new SparseLU(matrix);
      // One entry per row on a random permutation keeps the pattern structurally nonsingular;
      // random real values make exact singularity a probability-zero event.
      expect(lu.factor()).toEqual({ ok: true });
      const x = solveSparse(lu, b);
      expect(backwardError(size, entries, x, b)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
      if (size <= 200) {
        const reference = denseSolve(toDense(size, entries), b);
        // Forward error depends on conditioning; compare through the reference's own residual instead.
        expect(backwardError(size, entries, reference, b)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
      }
    }
  });

  it('solves in place when rhs and solution are the same array', () => {
    const random = randomSource(77);
    const entries = dominantSystem(50, 2, random);
    const { matrix } = buildMatrix(50, entries);
    const exact = Array.from({ length: 50 }, (_, i) => i - 25);
    const vector = Float64Array.from(product(50, entries, exact));
    const lu = new SparseLU(matrix);
    expect(lu.factor().ok).toBe(true);
    lu.solve(vector, vector);
    expect(maxRelativeDifference(vector, exact)).toBeLessThan(SOLUTION_TOLERANCE);
  });

  it('handles an empty matrix', () => {
    const matrix = new SparseMatrix(0);
    matrix.finalize();
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: true });
    lu.solve(new Float64Array(0), new Float64Array(0));
  });
});

describe('SparseLU on MNA structures with zero diagonals', () => {
  /**
   * Modified nodal analysis (Ho, Ruehli and Brennan, 1975): node voltages then
   * voltage-source branch currents; a source adds ±1 in its nodes' rows and its
   * branch row, and leaves its branch's diagonal structurally zero.
   */
  class Mna {
    readonly entries: Entry[] = [];
    readonly rhs: number[];
    constructor(readonly nodes: number, readonly sources: number) {
      this.rhs = new Array<number>(nodes + sources).fill(0);
    }
    get size(): number {
      return this.nodes + this.sources;
    }
    /** Nodes are 1-based; 0 is ground. */
    conductance(a: number, b: number, g: number): void {
      if (a) this.entries.push([a - 1, a - 1, g]);
      if (b) this.entries.push([b - 1, b - 1, g]);
      if (a && b) this.entries.push([a - 1, b - 1, -g], [b - 1, a - 1, -g]);
    }
    voltageSource(index: number, plus: number, minus: number, volts: number): void {
      const branch = this.nodes + index;
      if (plus) this.entries.push([plus - 1, branch, 1], [branch, plus - 1, 1]);
      if (minus) this.entries.push([minus - 1, branch, -1], [branch, minus - 1, -1]);
      this.rhs[branch] = volts;
    }
  }

  it('solves a divider fed by a grounded source (worked by hand)', () => {
    // V1 5 V at node 1; 1 kΩ from 1 to 2; 2 kΩ from 2 to ground.
    const circuit = new Mna(2, 1);
    circuit.voltageSource(0, 1, 0, 5);
    circuit.conductance(1, 2, 1e-3);
    circuit.conductance(2, 0, 0.5e-3);
    const { matrix } = buildMatrix(circuit.size, circuit.entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: true });
    const x = solveSparse(lu, circuit.rhs);
    // Ohm's law: v2 = 5·2k/3k; the source current is −5 V / 3 kΩ (SPICE's sign: negative when delivering).
    expect(x[0]).toBeCloseTo(5, 12);
    expect(x[1]).toBeCloseTo(10 / 3, 12);
    expect(x[2]).toBeCloseTo(-5 / 3000, 15);
  });

  it('solves a floating source and a 0 V ammeter in series (worked by hand)', () => {
    // V1 10 V from node 1 to ground; V2 2 V from node 2 (+) to node 1 (−), so v2 = 12 V;
    // 0 V ammeter from node 2 to node 3; 4 kΩ from node 3 to ground: 3 mA through the chain.
    const circuit = new Mna(3, 3);
    circuit.voltageSource(0, 1, 0, 10);
    circuit.voltageSource(1, 2, 1, 2);
    circuit.voltageSource(2, 2, 3, 0);
    circuit.conductance(3, 0, 0.25e-3);
    const { matrix } = buildMatrix(circuit.size, circuit.entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: true });
    const x = solveSparse(lu, circuit.rhs);
    expect(x[0]).toBeCloseTo(10, 12);
    expect(x[1]).toBeCloseTo(12, 12);
    expect(x[2]).toBeCloseTo(12, 12);
    // Ohm's law: 12 V / 4 kΩ = 3 mA flows out of each source's + terminal into the circuit.
    expect(x[3]).toBeCloseTo(-3e-3, 15);
    expect(x[4]).toBeCloseTo(-3e-3, 15);
    expect(x[5]).toBeCloseTo(3e-3, 15);
  });

  /** A resistor–diode ladder, the diodes linearised at a given conductance (a Newton iterate). */
  function ladder(sections: number, diodeConductance: (section: number) => number): Mna {
    // Node 1: the source. Section k: 100 Ω from the previous section's node (2k − 2, or 1) to
    // node 2k, a diode's 10 Ω series resistance from 2k to its junction node 2k + 1, the junction to ground.
    const circuit = new Mna(2 * sections + 1, 1);
    circuit.voltageSource(0, 1, 0, 5);
    for (let k = 1; k <= sections; k++) {
      circuit.conductance(k === 1 ? 1 : 2 * k - 2, 2 * k, 1 / 100);
      circuit.conductance(2 * k, 2 * k + 1, 1 / 10);
      circuit.conductance(2 * k + 1, 0, diodeConductance(k));
    }
    return circuit;
  }

  it('solves a resistor–diode ladder like the dense reference', () => {
    const circuit = ladder(60, (k) => 10 ** (-12 + (k % 12)));
    const { matrix } = buildMatrix(circuit.size, circuit.entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: true });
    const x = solveSparse(lu, circuit.rhs);
    expect(backwardError(circuit.size, circuit.entries, x, circuit.rhs)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
    expect(maxRelativeDifference(x, denseSolve(toDense(circuit.size, circuit.entries), circuit.rhs))).toBeLessThan(1e-9);
    // Fill-reducing order: the ladder's graph is a tree, and a tree can be eliminated leaves first
    // with no fill at all (Parter, SIAM Review 3(2), 1961); allow a little slack over the matrix's own entries.
    expect(lu.statistics.factorEntries).toBeLessThan(1.2 * matrix.entryCount);
  });

  it('solves a resistor mesh (fill-in) and a star around one busy node like the dense reference', () => {
    // A 12 × 12 mesh of 1 kΩ with a few 1 MΩ leaks to ground, fed at a corner: eliminating it creates fill.
    const side = 12;
    const mesh = new Mna(side * side, 1);
    const node = (x: number, y: number) => 1 + x * side + y;
    for (let x = 0; x < side; x++) {
      for (let y = 0; y < side; y++) {
        if (x + 1 < side) mesh.conductance(node(x, y), node(x + 1, y), 1e-3);
        if (y + 1 < side) mesh.conductance(node(x, y), node(x, y + 1), 1e-3);
        if ((3 * x + y) % 7 === 0) mesh.conductance(node(x, y), 0, 1e-6);
      }
    }
    mesh.voltageSource(0, node(0, 0), 0, 3.3);
    // One hub node with 300 leaves, each leaf to ground, the hub fed through 1 Ω by a 5 V source.
    const leaves = 300;
    const star = new Mna(leaves + 2, 1);
    star.voltageSource(0, 1, 0, 5);
    star.conductance(1, 2, 1);
    for (let k = 0; k < leaves; k++) {
      star.conductance(2, 3 + k, 1 / (100 + k));
      star.conductance(3 + k, 0, 1e-3 * (1 + (k % 5)));
    }
    for (const circuit of [mesh, star]) {
      const { matrix } = buildMatrix(circuit.size, circuit.entries);
      const lu = new SparseLU(matrix);
      expect(lu.factor()).toEqual({ ok: true });
      const x = solveSparse(lu, circuit.rhs);
      expect(backwardError(circuit.size, circuit.entries, x, circuit.rhs)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
      expect(maxRelativeDifference(x, denseSolve(toDense(circuit.size, circuit.entries), circuit.rhs))).toBeLessThan(1e-9);
    }
  });

  it('factors the full-size 20,000-section ladder (40,002 unknowns) with no fill and a tiny residual', () => {
    const circuit = ladder(20_000, (k) => 10 ** (-12 + (k % 13)));
    const { matrix, slots } = buildMatrix(circuit.size, circuit.entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: true });
    // No fill: the ladder's graph is a tree (Parter, 1961).
    expect(lu.statistics.factorEntries).toBe(matrix.entryCount);
    for (const conductance of [1e-9, 1e-2]) {
      const next = ladder(20_000, () => conductance);
      setValues(matrix, slots, next.entries);
      expect(lu.factor()).toEqual({ ok: true });
      const x = solveSparse(lu, next.rhs);
      expect(backwardError(next.size, next.entries, x, next.rhs)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
      // Ohm's law: the supply node sits at the source's 5 V.
      expect(x[0]).toBeCloseTo(5, 12);
    }
    expect(lu.statistics.orderings).toBe(1);
  });

  it('refactors a ladder across Newton-like value changes with the same ordering, still exact', () => {
    const sections = 40;
    const first = ladder(sections, () => 1e-12);
    const { matrix, slots } = buildMatrix(first.size, first.entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: true });
    for (let iteration = 1; iteration <= 12; iteration++) {
      // Junction conductances sweep over eleven decades, as they do while Newton converges.
      const circuit = ladder(sections, (k) => 10 ** (-12 + ((iteration + k) % 12)));
      setValues(matrix, slots, circuit.entries);
      expect(lu.factor()).toEqual({ ok: true });
      const x = solveSparse(lu, circuit.rhs);
      expect(backwardError(circuit.size, circuit.entries, x, circuit.rhs)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
      expect(maxRelativeDifference(x, denseSolve(toDense(circuit.size, circuit.entries), circuit.rhs))).toBeLessThan(1e-9);
    }
    expect(lu.statistics.orderings).toBe(1);
    expect(lu.statistics.refactorizations).toBe(12);
  });

  it('refactors random systems after their values change, reusing the ordering', () => {
    const random = randomSource(4242);
    const size = 80;
    const entries = dominantSystem(size, 3, random);
    const { matrix, slots } = buildMatrix(size, entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor().ok).toBe(true);
    for (let round = 0; round < 5; round++) {
      // Scale every entry by a factor in [0.8, 1.2]: still dominant, the same pivots stay acceptable.
      const changed: Entry[] = entries.map(([row, column, value]) => [row, column, value * (0.8 + 0.4 * random())]);
      setValues(matrix, slots, changed);
      expect(lu.factor().ok).toBe(true);
      const exact = Array.from({ length: size }, () => 2 * random() - 1);
      const x = solveSparse(lu, product(size, changed, exact));
      expect(maxRelativeDifference(x, exact)).toBeLessThan(SOLUTION_TOLERANCE);
    }
    expect(lu.statistics.orderings).toBe(1);
  });

  it('re-pivots when a reused pivot becomes tiny, and still solves', () => {
    // Row 0 and column 0 have two entries each, every other row and column three or four, so the
    // cheapest first pivot by Markowitz cost (rowCount − 1)·(columnCount − 1) is (0,0), cost 1, and
    // no other entry costs less than 3. Then (0,0) shrinks to 1e-9 beside (1,0) = 1, far below the
    // 1e-3 acceptance threshold, so the kept order must be abandoned.
    const start: Entry[] = [
      [0, 0, 2], [0, 1, 1],
      [1, 0, 1], [1, 1, 4], [1, 2, 1], [1, 3, 1],
      [2, 1, 1], [2, 2, 4], [2, 3, 1],
      [3, 1, 1], [3, 2, 1], [3, 3, 4],
    ];
    const { matrix, slots } = buildMatrix(4, start);
    const lu = new SparseLU(matrix);
    expect(lu.factor().ok).toBe(true);
    const tiny: Entry[] = start.map(([row, column, value]) => [row, column, row === 0 && column === 0 ? 1e-9 : value]);
    setValues(matrix, slots, tiny);
    expect(lu.factor().ok).toBe(true);
    expect(lu.statistics.orderings).toBe(2);
    const exact = [1, -2, 3, 0.5];
    const x = solveSparse(lu, product(4, tiny, exact));
    expect(maxRelativeDifference(x, exact)).toBeLessThan(SOLUTION_TOLERANCE);
    // Setting it exactly to zero, a structural entry with no value, must re-pivot too.
    const zero: Entry[] = start.map(([row, column, value]) => [row, column, row === 0 && column === 0 ? 0 : value]);
    setValues(matrix, slots, zero);
    expect(lu.factor().ok).toBe(true);
    const y = solveSparse(lu, product(4, zero, exact));
    expect(maxRelativeDifference(y, exact)).toBeLessThan(SOLUTION_TOLERANCE);
  });
});

describe('SparseLU limits', () => {
  it('stops at a passed deadline or a cancellation, says so, and factors normally afterwards', () => {
    const random = randomSource(8);
    const entries = dominantSystem(600, 3, random);
    const { matrix } = buildMatrix(600, entries);
    const lu = new SparseLU(matrix);
    const stopped = { ok: false, singularColumn: -1, reason: 'stopped' };
    expect(lu.factor({ deadline: performance.now() - 1 })).toEqual(stopped);
    expect(lu.factor({ cancellation: { isCancellationRequested: true } })).toEqual(stopped);
    expect(lu.factor({ deadline: performance.now() + 60_000 })).toEqual({ ok: true });
    // Now the refactorisation path: stopped too, then fine again, still on the first ordering.
    expect(lu.factor({ cancellation: { isCancellationRequested: true } })).toEqual(stopped);
    expect(Array.from(solveSparse(lu, new Array(600).fill(1))).every(Number.isNaN)).toBe(true);
    expect(lu.factor()).toEqual({ ok: true });
    expect(lu.statistics.orderings).toBe(1);
    const exact = Array.from({ length: 600 }, (_, i) => Math.sin(i));
    // Expected: the solution the right-hand side was built from.
    expect(maxRelativeDifference(solveSparse(lu, product(600, entries, exact)), exact)).toBeLessThan(SOLUTION_TOLERANCE);
  });
});

describe('SparseLU on singular matrices', () => {
  it('reports a structurally empty column without throwing', () => {
    // Column 2 has no entry at all.
    const { matrix } = buildMatrix(3, [[0, 0, 1], [1, 1, 1], [2, 0, 1], [2, 1, 1]]);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: false, singularColumn: 2, reason: 'structural' });
    const x = new Float64Array(3);
    lu.solve(Float64Array.of(1, 1, 1), x);
    expect(Array.from(x).every(Number.isNaN)).toBe(true);
  });

  it('reports a structurally rank-deficient pair of columns', () => {
    // [1 0 0; 1 0 0; 0 1 1]: columns 1 and 2 live in row 2 alone, so they cannot both have a pivot.
    const { matrix } = buildMatrix(3, [[0, 0, 1], [1, 0, 1], [2, 1, 1], [2, 2, 1]]);
    const result = new SparseLU(matrix).factor();
    expect(result).toMatchObject({ ok: false, reason: 'structural' });
    if (!result.ok) expect([1, 2]).toContain(result.singularColumn);
  });

  it('reports a numerically singular matrix: dependent rows', () => {
    // [1 2 0; 2 4 0; 0 0 1]: row 1 is twice row 0, so columns 0 and 1 are dependent.
    const { matrix } = buildMatrix(3, [[0, 0, 1], [0, 1, 2], [1, 0, 2], [1, 1, 4], [2, 2, 1]]);
    const result = new SparseLU(matrix).factor();
    expect(result).toMatchObject({ ok: false, reason: 'numerical' });
    if (!result.ok) expect([0, 1]).toContain(result.singularColumn);
  });

  it('reports a random matrix with one row a combination of others', () => {
    const random = randomSource(99);
    const size = 12;
    const entries = dominantSystem(size, 3, random).filter(([row]) => row !== size - 1);
    // The last row is 0.3 × row 0 + 0.7 × row 1, in inexact binary fractions.
    for (const [row, column, value] of entries.slice()) {
      if (row === 0) entries.push([size - 1, column, 0.3 * value]);
      if (row === 1) entries.push([size - 1, column, 0.7 * value]);
    }
    const result = new SparseLU(buildMatrix(size, entries).matrix).factor();
    expect(result).toMatchObject({ ok: false, reason: 'numerical' });
    if (!result.ok) expect(result.singularColumn).toBeGreaterThanOrEqual(0);
  });

  it('names a branch column for two voltage sources in parallel', () => {
    // Unknowns: v(a), i(V1), i(V2); 1 kΩ from a to ground; V1 and V2 both from a to ground.
    const entries: Entry[] = [[0, 0, 1e-3], [0, 1, 1], [1, 0, 1], [0, 2, 1], [2, 0, 1]];
    const result = new SparseLU(buildMatrix(3, entries).matrix).factor();
    expect(result).toMatchObject({ ok: false, reason: 'structural' });
    if (!result.ok) expect([1, 2]).toContain(result.singularColumn);
  });

  it('reports an all-zero or non-finite matrix instead of throwing, then recovers', () => {
    const entries: Entry[] = [[0, 0, 0], [0, 1, 0], [1, 0, 0], [1, 1, 0]];
    const { matrix, slots } = buildMatrix(2, entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toMatchObject({ ok: false, reason: 'numerical' });
    setValues(matrix, slots, [[0, 0, Number.NaN], [0, 1, 1], [1, 0, 1], [1, 1, 1]]);
    expect(lu.factor()).toEqual({ ok: false, singularColumn: 0, reason: 'not-finite' });
    // [2 1; 1 1]·[1 2] = [4 3] (worked by hand).
    const good: Entry[] = [[0, 0, 2], [0, 1, 1], [1, 0, 1], [1, 1, 1]];
    setValues(matrix, slots, good);
    expect(lu.factor()).toEqual({ ok: true });
    expect(Array.from(solveSparse(lu, [4, 3]))).toEqual([1, 2]);
  });

  it('reports a matrix that turns singular between refactorisations, then recovers', () => {
    // [2 1; 1 1] factors; [2 1; 4 2] has its second row twice the first (det 0, worked by hand).
    const good: Entry[] = [[0, 0, 2], [0, 1, 1], [1, 0, 1], [1, 1, 1]];
    const { matrix, slots } = buildMatrix(2, good);
    const lu = new SparseLU(matrix);
    expect(lu.factor().ok).toBe(true);
    setValues(matrix, slots, [[0, 0, 2], [0, 1, 1], [1, 0, 4], [1, 1, 2]]);
    const result = lu.factor();
    expect(result).toMatchObject({ ok: false, reason: 'numerical' });
    if (!result.ok) expect([0, 1]).toContain(result.singularColumn);
    setValues(matrix, slots, good);
    expect(lu.factor()).toEqual({ ok: true });
    expect(Array.from(solveSparse(lu, [4, 3]))).toEqual([1, 2]);
  });

  it('reports a NaN or an infinity that appears during refactorisation, at its column', () => {
    const random = randomSource(5);
    const entries = dominantSystem(20, 2, random);
    const { matrix, slots } = buildMatrix(20, entries);
    const lu = new SparseLU(matrix);
    expect(lu.factor().ok).toBe(true);
    for (const bad of [Number.NaN, Infinity, -Infinity]) {
      setValues(matrix, slots, entries);
      const victim = entries.findIndex(([row, column]) => row !== column);
      matrix.values[slots[victim]] = bad;
      expect(lu.factor()).toEqual({ ok: false, singularColumn: entries[victim][1], reason: 'not-finite' });
    }
  });

  it('does not call a well-posed matrix of tiny conductances singular', () => {
    // Two nodes joined by 1 pS, each with 1 pS to ground: [2 −1; −1 2]·1e-12; b = [1e-12, 0] gives v = [2/3, 1/3].
    const g = 1e-12;
    const { matrix } = buildMatrix(2, [[0, 0, 2 * g], [0, 1, -g], [1, 0, -g], [1, 1, 2 * g]]);
    const lu = new SparseLU(matrix);
    expect(lu.factor()).toEqual({ ok: true });
    const x = solveSparse(lu, [g, 0]);
    expect(x[0]).toBeCloseTo(2 / 3, 12); // worked by hand
    expect(x[1]).toBeCloseTo(1 / 3, 12);
  });
});

describe('SparseLU against exact arithmetic on small integer matrices', () => {
  /** Exact rank by fraction-free Gaussian elimination in integers (Bareiss, Math. Comp. 22, 1968). */
  function exactRank(dense: number[][]): number {
    const n = dense.length;
    const a = dense.map((row) => row.map((value) => BigInt(value)));
    let rank = 0;
    let previous = 1n;
    const usedRow = new Array<boolean>(n).fill(false);
    for (let column = 0; column < n; column++) {
      const pivotRow = a.findIndex((row, i) => !usedRow[i] && row[column] !== 0n);
      if (pivotRow < 0) continue;
      usedRow[pivotRow] = true;
      rank++;
      for (let i = 0; i < n; i++) {
        if (usedRow[i]) continue;
        for (let j = column + 1; j < n; j++) a[i][j] = (a[i][j] * a[pivotRow][column] - a[i][column] * a[pivotRow][j]) / previous;
        a[i][column] = 0n;
      }
      previous = a[pivotRow][column];
    }
    return rank;
  }

  /** Structural rank: a maximum matching of rows to columns through the pattern (augmenting paths, König's theorem). */
  function structuralRank(n: number, pattern: Set<number>): number {
    const matchOfColumn = new Array<number>(n).fill(-1);
    const augment = (row: number, seen: boolean[]): boolean => {
      for (let column = 0; column < n; column++) {
        if (!pattern.has(row * n + column) || seen[column]) continue;
        seen[column] = true;
        if (matchOfColumn[column] < 0 || augment(matchOfColumn[column], seen)) {
          matchOfColumn[column] = row;
          return true;
        }
      }
      return false;
    };
    let rank = 0;
    for (let row = 0; row < n; row++) if (augment(row, new Array<boolean>(n).fill(false))) rank++;
    return rank;
  }

  it('calls a matrix singular exactly when its exact rank is deficient, and says structural only when it is', () => {
    const random = randomSource(2024);
    let singularSeen = 0;
    let structuralSeen = 0;
    for (let trial = 0; trial < 1500; trial++) {
      const n = 1 + Math.floor(random() * 8);
      const entries: Entry[] = [];
      const pattern = new Set<number>();
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          if (random() > 0.45) continue;
          pattern.add(i * n + j);
          // Mostly small nonzero integers; now and then a registered entry holding zero.
          const value = random() < 0.1 ? 0 : (1 + Math.floor(random() * 3)) * (random() < 0.5 ? -1 : 1);
          entries.push([i, j, value]);
        }
      }
      const dense = toDense(n, entries);
      const rank = exactRank(dense);
      const result = new SparseLU(buildMatrix(n, entries).matrix).factor();
      expect(result.ok, `trial ${trial}: exact rank ${rank} of ${n}`).toBe(rank === n);
      if (result.ok) {
        const b = Array.from({ length: n }, (_, i) => i + 1);
        const lu = new SparseLU(buildMatrix(n, entries).matrix);
        lu.factor();
        expect(backwardError(n, entries, solveSparse(lu, b), b)).toBeLessThan(BACKWARD_ERROR_TOLERANCE);
      } else {
        singularSeen++;
        expect(result.singularColumn).toBeGreaterThanOrEqual(0);
        expect(result.singularColumn).toBeLessThan(n);
        if (result.reason === 'structural') {
          structuralSeen++;
          expect(structuralRank(n, pattern), `trial ${trial}`).toBeLessThan(n);
        }
      }
    }
    // The generator must exercise both kinds of failure (a check on the test itself).
    expect(singularSeen).toBeGreaterThan(100);
    expect(structuralSeen).toBeGreaterThan(50);
  });
});

