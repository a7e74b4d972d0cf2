// Gaussian elimination that chooses its pivots as it goes: at each step the
// entry of the active submatrix with the least Markowitz cost
// (rowCount − 1)·(columnCount − 1) among those passing the threshold test.
// Pivots may lie off the diagonal, which MNA needs: a voltage source's branch
// row and column have a structural zero on the diagonal. This runs on the
// first factorisation and whenever a reused pivot fails; the result is the
// pivot sequence and the factors, which the static refactorisation then reuses.
import { MARKOWITZ_SEARCH_LIMIT, NUMERICAL_ZERO_RELATIVE, PIVOT_SELECTION_THRESHOLD } from './tolerances.js';

/** A matrix stored by columns; `slot` indexes the matrix's values. */
export interface ColumnStructure {
  size: number;
  /** Column j's entries are [columnStart[j], columnStart[j + 1]). */
  columnStart: Int32Array;
  row: Int32Array;
  slot: Int32Array;
}

/** The factors as the elimination produced them, in original row and column numbers. */
export interface EliminationFactors {
  /** Original row and column of the pivot chosen at each step, and its value. */
  pivotRow: Int32Array;
  pivotColumn: Int32Array;
  pivotValue: Float64Array;
  /** Step k's column below the pivot: [lowerStart[k], lowerStart[k + 1]), original rows, values divided by the pivot. */
  lowerStart: Int32Array;
  lowerRow: Int32Array;
  lowerValue: Float64Array;
  /** Step k's row right of the pivot: [upperStart[k], upperStart[k + 1]), original columns. */
  upperStart: Int32Array;
  upperColumn: Int32Array;
  upperValue: Float64Array;
}

export type EliminationResult = { ok: true; factors: EliminationFactors } | { ok: false; singularColumn: number };

/** Room added to a line's storage when it is laid out, so that a little fill needs no move. */
const LINE_SLACK = 2;
const NONE = -1;

/**
 * The active submatrix: columns hold rows and values; rows hold only their
 * column pattern. Each kind of line lives in one pooled typed array; a line
 * that outgrows its room moves to the end of its pool, and a full pool is
 * compacted into a larger one, so memory stays linear in the nonzeros.
 */
class ActiveSubmatrix {
  readonly size: number;
  readonly columnStart: Int32Array;
  readonly columnLength: Int32Array;
  readonly columnCapacity: Int32Array;
  columnRows: Int32Array;
  columnValues: Float64Array;
  private columnPoolEnd = 0;

  readonly rowStart: Int32Array;
  readonly rowLength: Int32Array;
  readonly rowCapacity: Int32Array;
  rowColumns: Int32Array;
  private rowPoolEnd = 0;

  readonly columnActive: Uint8Array;
  readonly rowActive: Uint8Array;

  constructor(structure: ColumnStructure, values: Float64Array) {
    const n = structure.size;
    this.size = n;
    const entries = structure.row.length;
    this.columnStart = new Int32Array(n);
    this.columnLength = new Int32Array(n);
    this.columnCapacity = new Int32Array(n);
    this.rowStart = new Int32Array(n);
    this.rowLength = new Int32Array(n);
    this.rowCapacity = new Int32Array(n);
    this.columnActive = new Uint8Array(n).fill(1);
    this.rowActive = new Uint8Array(n).fill(1);

    const poolLength = 2 * (entries + LINE_SLACK * n) + 16;
    this.columnRows = new Int32Array(poolLength);
    this.columnValues = new Float64Array(poolLength);
    this.rowColumns = new Int32Array(poolLength);

    const rowCount = new Int32Array(n);
    for (let e = 0; e < entries; e++) rowCount[structure.row[e]]++;
    let end = 0;
    for (let i = 0; i < n; i++) {
      this.rowStart[i] = end;
      this.rowCapacity[i] = rowCount[i] + LINE_SLACK;
      end += this.rowCapacity[i];
    }
    this.rowPoolEnd = end;
    end = 0;
    for (let j = 0; j < n; j++) {
      const first = structure.columnStart[j];
      const last = structure.columnStart[j + 1];
      this.columnStart[j] = end;
      this.columnCapacity[j] = last - first + LINE_SLACK;
      for (let e = first; e < last; e++) {
        const i = structure.row[e];
        this.columnRows[end + this.columnLength[j]] = i;
        this.columnValues[end + this.columnLength[j]] = values[structure.slot[e]];
        this.columnLength[j]++;
        this.rowColumns[this.rowStart[i] + this.rowLength[i]] = j;
        this.rowLength[i]++;
      }
      end += this.columnCapacity[j];
    }
    this.columnPoolEnd = end;
  }

  appendToColumn(column: number, row: number, value: number): void {
    if (this.columnLength[column] === this.columnCapacity[column]) this.moveColumnToEnd(column);
    const at = this.columnStart[column] + this.columnLength[column];
    this.columnRows[at] = row;
    this.columnValues[at] = value;
    this.columnLength[column]++;
  }

  appendToRow(row: number, column: number): void {
    if (this.rowLength[row] === this.rowCapacity[row]) this.moveRowToEnd(row);
    this.rowColumns[this.rowStart[row] + this.rowLength[row]] = column;
    this.rowLength[row]++;
  }

  /** Removes (row, column) from the column and returns its value. */
  takeFromColumn(column: number, row: number): number {
    const start = this.columnStart[column];
    const last = start + this.columnLength[column] - 1;
    for (let at = start; at <= last; at++) {
      if (this.columnRows[at] !== row) continue;
      const value = this.columnValues[at];
      this.columnRows[at] = this.columnRows[last];
      this.columnValues[at] = this.columnValues[last];
      this.columnLength[column]--;
      return value;
    }
    return 0;
  }

  removeFromRow(row: number, column: number): void {
    const start = this.rowStart[row];
    const last = start + this.rowLength[row] - 1;
    for (let at = start; at <= last; at++) {
      if (this.rowColumns[at] !== column) continue;
      this.rowColumns[at] = this.rowColumns[last];
      this.rowLength[row]--;
      return;
    }
  }

  valueAt(column: number, row: number): number {
    const start = this.columnStart[column];
    const end = start + this.columnLength[column];
    for (let at = start; at < end; at++) if (this.columnRows[at] === row) return this.columnValues[at];
    return 0;
  }

  private moveColumnToEnd(column: number): void {
    const length = this.columnLength[column];
    const capacity = 2 * length + LINE_SLACK;
    if (this.columnPoolEnd + capacity > this.columnRows.length) this.compactColumns(capacity);
    const from = this.columnStart[column];
    const to = this.columnPoolEnd;
    this.columnRows.copyWithin(to, from, from + length);
    this.columnValues.copyWithin(to, from, from + length);
    this.columnStart[column] = to;
    this.columnCapacity[column] = capacity;
    this.columnPoolEnd = to + capacity;
  }

  private moveRowToEnd(row: number): void {
    const length = this.rowLength[row];
    const capacity = 2 * length + LINE_SLACK;
    if (this.rowPoolEnd + capacity > this.rowColumns.length) this.compactRows(capacity);
    const from = this.rowStart[row];
    const to = this.rowPoolEnd;
    this.rowColumns.copyWithin(to, from, from + length);
    this.rowStart[row] = to;
    this.rowCapacity[row] = capacity;
    this.rowPoolEnd = to + capacity;
  }

  /** Lays the active columns out afresh in a pool with room for `extra` more. */
  private compactColumns(extra: number): void {
    let live = 0;
    for (let j = 0; j < this.size; j++) if (this.columnActive[j]) live += this.columnLength[j] + LINE_SLACK;
    const length = Math.max(this.columnRows.length, 2 * (live + extra) + 16);
    const rows = new Int32Array(length);
    const values = new Float64Array(length);
    let end = 0;
    for (let j = 0; j < this.size; j++) {
      if (!this.columnActive[j]) continue;
      const from = this.columnStart[j];
      const count = this.columnLength[j];
      rows.set(this.columnRows.subarray(from, from + count), end);
      values.set(this.columnValues.subarray(from, from + count), end);
      this.columnStart[j] = end;
      this.columnCapacity[j] = count + LINE_SLACK;
      end += count + LINE_SLACK;
    }
    this.columnRows = rows;
    this.columnValues = values;
    this.columnPoolEnd = end;
  }

  private compactRows(extra: number): void {
    let live = 0;
    for (let i = 0; i < this.size; i++) if (this.rowActive[i]) live += this.rowLength[i] + LINE_SLACK;
    const length = Math.max(this.rowColumns.length, 2 * (live + extra) + 16);
    const columns = new Int32Array(length);
    let end = 0;
    for (let i = 0; i < this.size; i++) {
      if (!this.rowActive[i]) continue;
      const from = this.rowStart[i];
      const count = this.rowLength[i];
      columns.set(this.rowColumns.subarray(from, from + count), end);
      this.rowStart[i] = end;
      this.rowCapacity[i] = count + LINE_SLACK;
      end += count + LINE_SLACK;
    }
    this.rowColumns = columns;
    this.rowPoolEnd = end;
  }
}

/** Lines (rows or columns) grouped by their count of active entries, in doubly linked lists. */
class CountBuckets {
  readonly head: Int32Array;
  private readonly next: Int32Array;
  private readonly previous: Int32Array;
  private readonly bucketOf: Int32Array;

  constructor(size: number) {
    this.head = new Int32Array(size + 1).fill(NONE);
    this.next = new Int32Array(size).fill(NONE);
    this.previous = new Int32Array(size).fill(NONE);
    this.bucketOf = new Int32Array(size).fill(NONE);
  }

  link(line: number, count: number): void {
    const first = this.head[count];
    this.next[line] = first;
    this.previous[line] = NONE;
    if (first !== NONE) this.previous[first] = line;
    this.head[count] = line;
    this.bucketOf[line] = count;
  }

  unlink(line: number): void {
    const count = this.bucketOf[line];
    if (count === NONE) return;
    const before = this.previous[line];
    const after = this.next[line];
    if (before === NONE) this.head[count] = after;
    else this.next[before] = after;
    if (after !== NONE) this.previous[after] = before;
    this.bucketOf[line] = NONE;
  }

  following(line: number): number {
    return this.next[line];
  }
}

/** A typed array that grows by doubling. */
class GrowingInt32 {
  data: Int32Array;
  length = 0;
  constructor(capacity: number) {
    this.data = new Int32Array(Math.max(capacity, 16));
  }
  push(value: number): void {
    if (this.length === this.data.length) {
      const grown = new Int32Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    this.data[this.length++] = value;
  }
  trimmed(): Int32Array {
    return this.data.slice(0, this.length);
  }
}

class GrowingFloat64 {
  data: Float64Array;
  length = 0;
  constructor(capacity: number) {
    this.data = new Float64Array(Math.max(capacity, 16));
  }
  push(value: number): void {
    if (this.length === this.data.length) {
      const grown = new Float64Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    this.data[this.length++] = value;
  }
  trimmed(): Float64Array {
    return this.data.slice(0, this.length);
  }
}

/**
 * Factors the matrix, choosing pivots by Markowitz cost with threshold
 * pivoting. `columnScale[j]` is the largest original magnitude in column j,
 * against which numerical zeros are judged. Never throws on a singular matrix:
 * it reports the first column of the active submatrix found with no usable
 * pivot (structurally empty, or all entries numerically zero).
 */
export function eliminateWithMarkowitz(
  structure: ColumnStructure,
  values: Float64Array,
  columnScale: Float64Array,
): EliminationResult {
  const n = structure.size;
  const active = new ActiveSubmatrix(structure, values);
  const columnBuckets = new CountBuckets(n);
  const rowBuckets = new CountBuckets(n);
  for (let j = 0; j < n; j++) columnBuckets.link(j, active.columnLength[j]);
  for (let i = 0; i < n; i++) rowBuckets.link(i, active.rowLength[i]);

  // Largest magnitude left in each active column, recomputed only after the column changes.
  const columnMaximum = new Float64Array(n);
  const columnMaximumStale = new Uint8Array(n).fill(1);
  const maximumOf = (column: number): number => {
    if (columnMaximumStale[column]) {
      let largest = 0;
      const start = active.columnStart[column];
      const end = start + active.columnLength[column];
      for (let at = start; at < end; at++) {
        const magnitude = Math.abs(active.columnValues[at]);
        // NaN never compares greater, so a column of NaNs reads as empty: reported, not pivoted on.
        if (magnitude > largest) largest = magnitude;
      }
      columnMaximum[column] = largest;
      columnMaximumStale[column] = 0;
    }
    return columnMaximum[column];
  };

  const pivotRow = new Int32Array(n);
  const pivotColumn = new Int32Array(n);
  const pivotValue = new Float64Array(n);
  const lowerStart = new Int32Array(n + 1);
  const upperStart = new Int32Array(n + 1);
  const entries = structure.row.length;
  const lowerRow = new GrowingInt32(entries);
  const lowerValue = new GrowingFloat64(entries);
  const upperColumn = new GrowingInt32(entries);
  const upperValue = new GrowingFloat64(entries);
  // Offset of each row within the column being updated, or NONE.
  const offsetInColumn = new Int32Array(n).fill(NONE);

  // The search's choice, set by choosePivot().
  let chosenRow = NONE;
  let chosenColumn = NONE;
  let chosenValue = 0;

  /** Picks the next pivot; returns NONE, or the column found singular. */
  const choosePivot = (): number => {
    const emptyColumn = columnBuckets.head[0];
    if (emptyColumn !== NONE) return emptyColumn;
    let bestCost = Infinity;
    let bestRatio = 0;
    let examined = 0;
    chosenRow = NONE;
    const consider = (row: number, column: number, value: number, largest: number, cost: number): boolean => {
      const magnitude = Math.abs(value);
      if (!(magnitude > NUMERICAL_ZERO_RELATIVE * columnScale[column]) || magnitude < PIVOT_SELECTION_THRESHOLD * largest) return false;
      const ratio = magnitude / largest;
      if (cost < bestCost || (cost === bestCost && ratio > bestRatio)) {
        bestCost = cost;
        bestRatio = ratio;
        chosenRow = row;
        chosenColumn = column;
        chosenValue = value;
      }
      return true;
    };
    for (let count = 1; count <= n; count++) {
      // Columns with `count` entries: every candidate costs (rowCount − 1)·(count − 1).
      for (let column = columnBuckets.head[count]; column !== NONE; column = columnBuckets.following(column)) {
        const largest = maximumOf(column);
        if (!(largest > NUMERICAL_ZERO_RELATIVE * columnScale[column])) return column;
        const start = active.columnStart[column];
        const end = start + count;
        let usable = false;
        for (let at = start; at < end; at++) {
          const row = active.columnRows[at];
          if (consider(row, column, active.columnValues[at], largest, (active.rowLength[row] - 1) * (count - 1))) usable = true;
        }
        if (usable) examined++;
        if (bestCost <= (count - 1) * (count - 1) || (examined >= MARKOWITZ_SEARCH_LIMIT && chosenRow !== NONE)) return NONE;
      }
      // Any candidate not yet seen lies in a row of at least `count` and a column of more than `count` entries.
      if (bestCost <= count * (count - 1)) return NONE;
      for (let row = rowBuckets.head[count]; row !== NONE; row = rowBuckets.following(row)) {
        const start = active.rowStart[row];
        const end = start + count;
        let usable = false;
        for (let at = start; at < end; at++) {
          const column = active.rowColumns[at];
          const largest = maximumOf(column);
          if (!(largest > NUMERICAL_ZERO_RELATIVE * columnScale[column])) return column;
          const cost = (count - 1) * (active.columnLength[column] - 1);
          if (consider(row, column, active.valueAt(column, row), largest, cost)) usable = true;
        }
        if (usable) examined++;
        if (bestCost <= count * (count - 1) || (examined >= MARKOWITZ_SEARCH_LIMIT && chosenRow !== NONE)) return NONE;
      }
      if (bestCost <= count * count) return NONE;
    }
    if (chosenRow !== NONE) return NONE;
    // Unreachable for a well-formed active submatrix; name any active column rather than loop.
    for (let column = 0; column < n; column++) if (active.columnActive[column]) return column;
    return 0;
  };

  for (let step = 0; step < n; step++) {
    const singular = choosePivot();
    if (singular !== NONE) return { ok: false, singularColumn: singular };
    const p = chosenRow;
    const q = chosenColumn;
    const pivot = chosenValue;
    pivotRow[step] = p;
    pivotColumn[step] = q;
    pivotValue[step] = pivot;

    // The pivot column below the pivot becomes column `step` of L.
    lowerStart[step] = lowerRow.length;
    columnBuckets.unlink(q);
    active.columnActive[q] = 0;
    {
      const start = active.columnStart[q];
      const end = start + active.columnLength[q];
      for (let at = start; at < end; at++) {
        const row = active.columnRows[at];
        if (row === p) continue;
        lowerRow.push(row);
        lowerValue.push(active.columnValues[at] / pivot);
      }
    }
    const lowerFirst = lowerStart[step];
    const lowerEnd = lowerRow.length;
    for (let l = lowerFirst; l < lowerEnd; l++) {
      const row = lowerRow.data[l];
      rowBuckets.unlink(row);
      active.removeFromRow(row, q);
    }

    // The pivot row right of the pivot becomes row `step` of U.
    upperStart[step] = upperColumn.length;
    rowBuckets.unlink(p);
    active.rowActive[p] = 0;
    {
      const start = active.rowStart[p];
      const end = start + active.rowLength[p];
      for (let at = start; at < end; at++) {
        const column = active.rowColumns[at];
        if (column === q) continue;
        columnBuckets.unlink(column);
        upperColumn.push(column);
        upperValue.push(active.takeFromColumn(column, p));
      }
    }
    const upperFirst = upperStart[step];
    const upperEnd = upperColumn.length;

    // Schur complement update: a[i][j] −= l[i]·u[j], adding fill where (i, j) was empty.
    for (let u = upperFirst; u < upperEnd; u++) {
      const column = upperColumn.data[u];
      const upper = upperValue.data[u];
      let start = active.columnStart[column];
      const length = active.columnLength[column];
      for (let offset = 0; offset < length; offset++) offsetInColumn[active.columnRows[start + offset]] = offset;
      for (let l = lowerFirst; l < lowerEnd; l++) {
        const row = lowerRow.data[l];
        const update = lowerValue.data[l] * upper;
        const offset = offsetInColumn[row];
        if (offset !== NONE) {
          active.columnValues[active.columnStart[column] + offset] -= update;
        } else {
          active.appendToColumn(column, row, -update);
          active.appendToRow(row, column);
        }
      }
      start = active.columnStart[column];
      const end = start + active.columnLength[column];
      for (let at = start; at < end; at++) offsetInColumn[active.columnRows[at]] = NONE;
      columnMaximumStale[column] = 1;
      columnBuckets.link(column, active.columnLength[column]);
    }
    for (let l = lowerFirst; l < lowerEnd; l++) {
      const row = lowerRow.data[l];
      rowBuckets.link(row, active.rowLength[row]);
    }
  }
  lowerStart[n] = lowerRow.length;
  upperStart[n] = upperColumn.length;
  return {
    ok: true,
    factors: {
      pivotRow,
      pivotColumn,
      pivotValue,
      lowerStart,
      lowerRow: lowerRow.trimmed(),
      lowerValue: lowerValue.trimmed(),
      upperStart,
      upperColumn: upperColumn.trimmed(),
      upperValue: upperValue.trimmed(),
    },
  };
}
