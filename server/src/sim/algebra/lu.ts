// Sparse LU factorisation for the circuit matrix.
//
// The first factor() chooses the pivots by Markowitz cost with threshold
// pivoting (markowitz.ts) and keeps the resulting pivot order and the pattern
// of L and U, fill included. Each later factor() reuses that pattern: a
// left-looking elimination, one column of P·A·Q at a time, into the fixed
// pattern, with no search and no allocation. Only when a reused pivot fails
// the threshold test does it choose the pivots afresh with the current values.
import type { SparseMatrix } from './matrix.js';
import { eliminateWithMarkowitz, STOP_CHECK_INTERVAL, type ColumnStructure, type EliminationFactors, type SingularReason } from './markowitz.js';
import { NUMERICAL_ZERO_RELATIVE, PIVOT_ACCEPTANCE_THRESHOLD } from './tolerances.js';
import type { CancellationToken } from '../types.js';

const NO_COLUMN = -1;

/**
 * `reason` says why the column has no pivot: 'structural' (no entry left in it once the other
 * columns took their pivots: singular whatever the values), 'numerical' (its entries cancel to
 * rounding noise), 'not-finite' (it holds a NaN or an infinity); or 'stopped', with column −1,
 * when a limit from FactorOptions ended the factorisation (not a verdict on the matrix).
 */
export type FactorResult = { ok: true } | { ok: false; singularColumn: number; reason?: SingularReason | 'stopped' };

/**
 * Optional limits on one factorisation, for matrices whose fill could make it long.
 * When one is hit, factor() returns { ok: false, singularColumn: -1, reason: 'stopped' }:
 * not a singular matrix, and no column to blame.
 */
export interface FactorOptions {
  /** A performance.now() time after which to give up. */
  deadline?: number;
  cancellation?: CancellationToken;
}

/** Counters for logs, benchmarks and tests. */
export interface FactorStatistics {
  /** How many times the pivots were chosen, or the matrix found singular trying (first factorisation and every re-pivot). */
  orderings: number;
  /** How many times the kept pivot order was reused successfully. */
  refactorizations: number;
  /** Entries in L and U together, diagonal included. */
  factorEntries: number;
}

export class SparseLU {
  private readonly matrix: SparseMatrix;
  private readonly size: number;
  private structure: ColumnStructure | undefined;
  private readonly columnScale: Float64Array;
  private readonly work: Float64Array;

  private hasOrdering = false;
  private factored = false;
  /** Step k pivots on original row rowAtStep[k] and original column columnAtStep[k]. */
  private rowAtStep: Int32Array = new Int32Array(0);
  private columnAtStep: Int32Array = new Int32Array(0);
  /** Column k of P·A·Q: its entries' rows (in step order) and their slots in the matrix's values. */
  private permutedStart: Int32Array = new Int32Array(0);
  private permutedRow: Int32Array = new Int32Array(0);
  private permutedSlot: Int32Array = new Int32Array(0);
  /** L (unit diagonal not stored), by columns, rows in step order. */
  private lowerStart: Int32Array = new Int32Array(0);
  private lowerRow: Int32Array = new Int32Array(0);
  private lowerValue: Float64Array = new Float64Array(0);
  /** U without its diagonal, by columns, rows in ascending step order. */
  private upperStart: Int32Array = new Int32Array(0);
  private upperRow: Int32Array = new Int32Array(0);
  private upperValue: Float64Array = new Float64Array(0);
  private readonly diagonal: Float64Array;

  private readonly counters: FactorStatistics = { orderings: 0, refactorizations: 0, factorEntries: 0 };

  constructor(matrix: SparseMatrix) {
    this.matrix = matrix;
    this.size = matrix.size;
    this.columnScale = new Float64Array(this.size);
    this.work = new Float64Array(this.size);
    this.diagonal = new Float64Array(this.size);
  }

  get statistics(): Readonly<FactorStatistics> {
    return this.counters;
  }

  /**
   * Numeric factorisation of the matrix's current values. The first call chooses the ordering and
   * symbolic structure; later calls reuse it, and re-pivot only when a reused pivot becomes
   * unacceptably small. Never throws on a singular matrix: reports the column.
   */
  factor(options: FactorOptions = {}): FactorResult {
    const matrix = this.matrix;
    if (!matrix.isFinalized) matrix.finalize();
    this.structure ??= compressByColumn(matrix);
    this.factored = false;
    const nonFinite = this.measureColumns();
    if (nonFinite !== NO_COLUMN) return { ok: false, singularColumn: nonFinite, reason: 'not-finite' };
    const { deadline, cancellation } = options;
    const shouldStop = (): boolean => Boolean(cancellation?.isCancellationRequested) || (deadline !== undefined && performance.now() > deadline);
    if (this.hasOrdering) {
      const reused = this.refactor(shouldStop);
      if (reused === 'stopped') return { ok: false, singularColumn: NO_COLUMN, reason: 'stopped' };
      if (reused === 'done') {
        this.counters.refactorizations++;
        this.factored = true;
        return { ok: true };
      }
    }
    this.hasOrdering = false;
    const result = eliminateWithMarkowitz(this.structure, matrix.values, this.columnScale, shouldStop);
    if (result.ok || !result.stopped) this.counters.orderings++;
    if (!result.ok) {
      if (result.stopped) return { ok: false, singularColumn: NO_COLUMN, reason: 'stopped' };
      return { ok: false, singularColumn: result.singularColumn, reason: result.reason };
    }
    this.keep(result.factors);
    this.hasOrdering = true;
    this.factored = true;
    return { ok: true };
  }

  /**
   * Solves A·x = rhs with the last factorisation. `rhs` and `solution` may be the same array.
   * After a failed factorisation the solution is all NaN, so that it cannot pass for an answer.
   */
  solve(rhs: Float64Array, solution: Float64Array): void {
    const n = this.size;
    if (!this.factored) {
      solution.fill(Number.NaN, 0, n);
      return;
    }
    const work = this.work;
    gather(rhs, this.rowAtStep, work);
    forwardSubstitute(this.lowerStart, this.lowerRow, this.lowerValue, work);
    backSubstitute(this.upperStart, this.upperRow, this.upperValue, this.diagonal, work);
    scatter(work, this.columnAtStep, solution);
  }

  /**
   * The largest original magnitude in each column, the yardstick for numerical zeros.
   * Returns the first column holding a NaN or an infinity, which no pivot order can factor, or NO_COLUMN.
   */
  private measureColumns(): number {
    const scale = this.columnScale;
    scale.fill(0);
    const columns = this.matrix.columnOfSlot;
    const values = this.matrix.values;
    let nonFinite = NO_COLUMN;
    for (let s = 0; s < values.length; s++) {
      const magnitude = Math.abs(values[s]);
      if (!(magnitude < Infinity)) {
        if (nonFinite === NO_COLUMN) nonFinite = columns[s];
      } else if (magnitude > scale[columns[s]]) {
        scale[columns[s]] = magnitude;
      }
    }
    return nonFinite;
  }

  /**
   * Left-looking LU into the kept pattern, column by column. Gives up, leaving the work
   * array clean, as soon as a pivot fails the threshold test or the caller's limit is hit.
   */
  private refactor(shouldStop: () => boolean): 'done' | 'pivot-failed' | 'stopped' {
    for (let k = 0; k < this.size; k++) {
      if (k % STOP_CHECK_INTERVAL === 0 && shouldStop()) return 'stopped';
      if (!this.refactorColumn(k)) return 'pivot-failed';
    }
    return 'done';
  }

  /** Column k of the left-looking LU; false, with the work array left clean, when its pivot fails the threshold test. */
  private refactorColumn(k: number): boolean {
    const values = this.matrix.values;
    const work = this.work;
    const { permutedStart, permutedRow, permutedSlot, lowerStart, lowerRow, lowerValue, upperStart, upperRow, upperValue } = this;
    for (let e = permutedStart[k], end = permutedStart[k + 1]; e < end; e++) work[permutedRow[e]] = values[permutedSlot[e]];
    // Rows above the pivot, in ascending order: each is final when reached, then updates the rows below it.
    const upperFirst = upperStart[k];
    const upperEnd = upperStart[k + 1];
    for (let e = upperFirst; e < upperEnd; e++) {
      const j = upperRow[e];
      const value = work[j];
      if (value === 0) continue;
      for (let f = lowerStart[j], end = lowerStart[j + 1]; f < end; f++) work[lowerRow[f]] -= lowerValue[f] * value;
    }
    const pivot = work[k];
    const lowerFirst = lowerStart[k];
    const lowerEnd = lowerStart[k + 1];
    let largestBelow = 0;
    for (let e = lowerFirst; e < lowerEnd; e++) {
      const magnitude = Math.abs(work[lowerRow[e]]);
      if (magnitude > largestBelow) largestBelow = magnitude;
    }
    const magnitude = Math.abs(pivot);
    if (!(magnitude > NUMERICAL_ZERO_RELATIVE * this.columnScale[this.columnAtStep[k]]) || magnitude < PIVOT_ACCEPTANCE_THRESHOLD * largestBelow) {
      for (let e = upperFirst; e < upperEnd; e++) work[upperRow[e]] = 0;
      for (let e = lowerFirst; e < lowerEnd; e++) work[lowerRow[e]] = 0;
      work[k] = 0;
      return false;
    }
    for (let e = upperFirst; e < upperEnd; e++) {
      const j = upperRow[e];
      upperValue[e] = work[j];
      work[j] = 0;
    }
    this.diagonal[k] = pivot;
    work[k] = 0;
    for (let e = lowerFirst; e < lowerEnd; e++) {
      const i = lowerRow[e];
      lowerValue[e] = work[i] / pivot;
      work[i] = 0;
    }
    return true;
  }

  /** Turns the elimination's factors into the static, step-ordered structure that refactor() and solve() use. */
  private keep(factors: EliminationFactors): void {
    const n = this.size;
    const stepOfRow = inversePermutation(factors.pivotRow);
    const stepOfColumn = inversePermutation(factors.pivotColumn);
    this.rowAtStep = factors.pivotRow;
    this.columnAtStep = factors.pivotColumn;
    this.diagonal.set(factors.pivotValue);

    const permuted = permuteColumns(this.structure!, factors.pivotColumn, stepOfRow);
    this.permutedStart = permuted.columnStart;
    this.permutedRow = permuted.row;
    this.permutedSlot = permuted.slot;

    // L keeps the elimination's columns; only the row numbers change to steps.
    this.lowerStart = factors.lowerStart;
    this.lowerRow = renumber(factors.lowerRow, stepOfRow);
    this.lowerValue = factors.lowerValue;

    const upper = transposeUpper(factors.upperStart, renumber(factors.upperColumn, stepOfColumn), factors.upperValue);
    this.upperStart = upper.start;
    this.upperRow = upper.row;
    this.upperValue = upper.value;
    this.counters.factorEntries = this.lowerRow.length + this.upperRow.length + n;
  }
}

// Small single-purpose loops, kept apart so that each is compiled on its own.

/** work[k] = source[index[k]]. */
function gather(source: Float64Array, index: Int32Array, work: Float64Array): void {
  for (let k = 0; k < index.length; k++) work[k] = source[index[k]];
}

/** target[index[k]] = work[k]. */
function scatter(work: Float64Array, index: Int32Array, target: Float64Array): void {
  for (let k = 0; k < index.length; k++) target[index[k]] = work[k];
}

/** Solves L·y = work in place; L has a unit diagonal and is stored by columns. */
function forwardSubstitute(start: Int32Array, row: Int32Array, value: Float64Array, work: Float64Array): void {
  const n = start.length - 1;
  for (let k = 0; k < n; k++) {
    const known = work[k];
    if (known === 0) continue;
    for (let e = start[k], end = start[k + 1]; e < end; e++) work[row[e]] -= value[e] * known;
  }
}

/** Solves U·x = work in place; U's diagonal apart, the rest stored by columns. */
function backSubstitute(start: Int32Array, row: Int32Array, value: Float64Array, diagonal: Float64Array, work: Float64Array): void {
  for (let k = start.length - 2; k >= 0; k--) {
    const known = work[k] / diagonal[k];
    work[k] = known;
    if (known === 0) continue;
    for (let e = start[k], end = start[k + 1]; e < end; e++) work[row[e]] -= value[e] * known;
  }
}

function inversePermutation(order: Int32Array): Int32Array {
  const inverse = new Int32Array(order.length);
  for (let k = 0; k < order.length; k++) inverse[order[k]] = k;
  return inverse;
}

/** Renumbers in place (the elimination's arrays are ours to reuse) and returns the same array. */
function renumber(indices: Int32Array, newNumber: Int32Array): Int32Array {
  for (let e = 0; e < indices.length; e++) indices[e] = newNumber[indices[e]];
  return indices;
}

/** P·A·Q by columns, rows in step order, each entry pointing back at its slot in the matrix's values. */
function permuteColumns(structure: ColumnStructure, columnAtStep: Int32Array, stepOfRow: Int32Array): ColumnStructure {
  const n = structure.size;
  const { columnStart, row, slot } = structure;
  const permutedStart = new Int32Array(n + 1);
  const permutedRow = new Int32Array(row.length);
  const permutedSlot = new Int32Array(row.length);
  let at = 0;
  for (let k = 0; k < n; k++) {
    permutedStart[k] = at;
    const column = columnAtStep[k];
    for (let e = columnStart[column], end = columnStart[column + 1]; e < end; e++) {
      permutedRow[at] = stepOfRow[row[e]];
      permutedSlot[at] = slot[e];
      at++;
    }
  }
  permutedStart[n] = at;
  return { size: n, columnStart: permutedStart, row: permutedRow, slot: permutedSlot };
}

/**
 * U arrives by rows (row k: [rowStart[k], rowStart[k + 1]), columns already in step numbers);
 * refactor() wants it by columns. Walking the rows in step order leaves each column's rows ascending.
 */
function transposeUpper(rowStart: Int32Array, column: Int32Array, value: Float64Array): { start: Int32Array; row: Int32Array; value: Float64Array } {
  const n = rowStart.length - 1;
  const count = column.length;
  const start = new Int32Array(n + 1);
  for (let e = 0; e < count; e++) start[column[e] + 1]++;
  for (let k = 0; k < n; k++) start[k + 1] += start[k];
  const next = start.slice(0, n);
  const row = new Int32Array(count);
  const transposedValue = new Float64Array(count);
  for (let k = 0; k < n; k++) {
    for (let e = rowStart[k], end = rowStart[k + 1]; e < end; e++) {
      const place = next[column[e]]++;
      row[place] = k;
      transposedValue[place] = value[e];
    }
  }
  return { start, row, value: transposedValue };
}

/** The matrix's slots grouped by column (a counting sort), for the elimination and the permuted scatter. */
function compressByColumn(matrix: SparseMatrix): ColumnStructure {
  const n = matrix.size;
  const rows = matrix.rowOfSlot;
  const columns = matrix.columnOfSlot;
  const entries = rows.length;
  const columnStart = new Int32Array(n + 1);
  for (let s = 0; s < entries; s++) columnStart[columns[s] + 1]++;
  for (let j = 0; j < n; j++) columnStart[j + 1] += columnStart[j];
  const next = columnStart.slice(0, n);
  const row = new Int32Array(entries);
  const slot = new Int32Array(entries);
  for (let s = 0; s < entries; s++) {
    const place = next[columns[s]]++;
    row[place] = rows[s];
    slot[place] = s;
  }
  return { size: n, columnStart, row, slot };
}
