import { describe, expect, it } from 'vitest';
import { SparseLU, SparseMatrix } from '../../server/src/sim/algebra/index.js';

describe('SparseLU', () => {
  it('solves a 2×2 system with a zero diagonal', () => {
    // [0 1; 1 0]·x = [2; 3] has x = [3; 2] (worked by hand).
    const m = new SparseMatrix(2);
    const a = m.slot(0, 1), b = m.slot(1, 0);
    m.finalize();
    m.values[a] = 1; m.values[b] = 1;
    const lu = new SparseLU(m);
    expect(lu.factor()).toEqual({ ok: true });
    const x = new Float64Array(2);
    lu.solve(Float64Array.of(2, 3), x);
    expect(Array.from(x)).toEqual([3, 2]);
  });
});
