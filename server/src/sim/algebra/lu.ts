// Temporary dense LU with partial pivoting, behind the final API, so that the
// solver can be built against it while the sparse factorisation is written.
import type { SparseMatrix } from './matrix.js';

export type FactorResult = { ok: true } | { ok: false; singularColumn: number };

export class SparseLU {
  private readonly matrix: SparseMatrix;
  private dense = new Float64Array(0);
  private pivotRow = new Int32Array(0);
  private factored = false;

  constructor(matrix: SparseMatrix) {
    this.matrix = matrix;
  }

  factor(): FactorResult {
    const matrix = this.matrix;
    if (!matrix.isFinalized) matrix.finalize();
    const n = matrix.size;
    if (this.dense.length !== n * n) {
      this.dense = new Float64Array(n * n);
      this.pivotRow = new Int32Array(n);
    }
    const a = this.dense;
    a.fill(0);
    for (let s = 0; s < matrix.values.length; s++) a[matrix.rowOfSlot[s] * n + matrix.columnOfSlot[s]] += matrix.values[s];
    this.factored = false;
    for (let k = 0; k < n; k++) {
      let best = k;
      let bestMagnitude = Math.abs(a[k * n + k]);
      for (let i = k + 1; i < n; i++) {
        const magnitude = Math.abs(a[i * n + k]);
        if (magnitude > bestMagnitude) { best = i; bestMagnitude = magnitude; }
      }
      if (!(bestMagnitude > 0)) return { ok: false, singularColumn: k };
      this.pivotRow[k] = best;
      if (best !== k) {
        for (let j = 0; j < n; j++) { const t = a[k * n + j]; a[k * n + j] = a[best * n + j]; a[best * n + j] = t; }
      }
      const pivot = a[k * n + k];
      for (let i = k + 1; i < n; i++) {
        const multiplier = (a[i * n + k] /= pivot);
        if (multiplier === 0) continue;
        for (let j = k + 1; j < n; j++) a[i * n + j] -= multiplier * a[k * n + j];
      }
    }
    this.factored = true;
    return { ok: true };
  }

  solve(rhs: Float64Array, solution: Float64Array): void {
    const n = this.matrix.size;
    if (!this.factored) { solution.fill(Number.NaN, 0, n); return; }
    const a = this.dense;
    const x = solution;
    if (x !== rhs) x.set(rhs.subarray(0, n));
    for (let k = 0; k < n; k++) {
      const p = this.pivotRow[k];
      if (p !== k) { const t = x[k]; x[k] = x[p]; x[p] = t; }
      for (let i = k + 1; i < n; i++) x[i] -= a[i * n + k] * x[k];
    }
    for (let k = n - 1; k >= 0; k--) {
      let sum = x[k];
      for (let j = k + 1; j < n; j++) sum -= a[k * n + j] * x[j];
      x[k] = sum / a[k * n + k];
    }
  }
}
