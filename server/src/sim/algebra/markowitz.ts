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

/** Why a column has no pivot: no entry left at all, entries that are all numerical zeros, or a NaN or infinity (found before elimination). */
export type SingularReason = 'structural' | 'numerical' | 'not-finite';

export type EliminationResult =
  | { ok: true; factors: EliminationFactors }
  | { ok: false; singularColumn: number; reason: SingularReason; stopped?: undefined }
  | { ok: false; stopped: true };

/** Steps between looks at the caller's deadline and cancellation (a look costs far less than the steps). */
export const STOP_CHECK_INTERVAL = 64;

const NONE = -1;

/**
 * The active submatrix as a pool of elements, each linked into its row and its
 * column (doubly, so that removal is O(1)). Locating (i, j) walks the shorter of
 * row i and column j, and a diagonal element is found directly, so a node with
 * thousands of neighbours costs nothing extra each time a neighbour is
 * eliminated. Elements are never moved; memory is linear in nonzeros plus fill.
 */
class ActiveSubmatrix {
  elementRow: Int32Array;
  elementColumn: Int32Array;
  elementValue: Float64Array;
  private nextInRow: Int32Array;
  private previousInRow: Int32Array;
  private nextInColumn: Int32Array;
  private previousInColumn: Int32Array;
  private elementCount = 0;

  readonly rowFirst: Int32Array;
  readonly columnFirst: Int32Array;
  readonly rowLength: Int32Array;
  readonly columnLength: Int32Array;
  /** Element (i, i) while row i and column i are both active, else NONE. */
  private readonly diagonal: Int32Array;
  readonly columnActive: Uint8Array;

  constructor(structure: ColumnStructure, values: Float64Array) {
    const n = structure.size;
    const capacity = Math.ceil(1.5 * structure.row.length) + 16;
    this.elementRow = new Int32Array(capacity);
    this.elementColumn = new Int32Array(capacity);
    this.elementValue = new Float64Array(capacity);
    this.nextInRow = new Int32Array(capacity);
    this.previousInRow = new Int32Array(capacity);
    this.nextInColumn = new Int32Array(capacity);
    this.previousInColumn = new Int32Array(capacity);
    this.rowFirst = new Int32Array(n).fill(NONE);
    this.columnFirst = new Int32Array(n).fill(NONE);
    this.rowLength = new Int32Array(n);
    this.columnLength = new Int32Array(n);
    this.diagonal = new Int32Array(n).fill(NONE);
    this.columnActive = new Uint8Array(n).fill(1);
    for (let j = 0; j < n; j++) {
      for (let e = structure.columnStart[j], end = structure.columnStart[j + 1]; e < end; e++) {
        this.add(structure.row[e], j, values[structure.slot[e]]);
      }
    }
  }

  nextElementInRow(element: number): number {
    return this.nextInRow[element];
  }

  nextElementInColumn(element: number): number {
    return this.nextInColumn[element];
  }

  /** Adds element (row, column), which must not exist yet. */
  add(row: number, column: number, value: number): void {
    if (this.elementCount === this.elementRow.length) this.grow();
    const e = this.elementCount++;
    this.elementRow[e] = row;
    this.elementColumn[e] = column;
    this.elementValue[e] = value;
    this.previousInRow[e] = NONE;
    this.nextInRow[e] = this.rowFirst[row];
    if (this.rowFirst[row] !== NONE) this.previousInRow[this.rowFirst[row]] = e;
    this.rowFirst[row] = e;
    this.rowLength[row]++;
    this.previousInColumn[e] = NONE;
    this.nextInColumn[e] = this.columnFirst[column];
    if (this.columnFirst[column] !== NONE) this.previousInColumn[this.columnFirst[column]] = e;
    this.columnFirst[column] = e;
    this.columnLength[column]++;
    if (row === column) this.diagonal[row] = e;
  }

  removeFromRow(element: number): void {
    const before = this.previousInRow[element];
    const after = this.nextInRow[element];
    const row = this.elementRow[element];
    if (before === NONE) this.rowFirst[row] = after;
    else this.nextInRow[before] = after;
    if (after !== NONE) this.previousInRow[after] = before;
    this.rowLength[row]--;
  }

  removeFromColumn(element: number): void {
    const before = this.previousInColumn[element];
    const after = this.nextInColumn[element];
    const column = this.elementColumn[element];
    if (before === NONE) this.columnFirst[column] = after;
    else this.nextInColumn[before] = after;
    if (after !== NONE) this.previousInColumn[after] = before;
    this.columnLength[column]--;
  }

  /** The element at (row, column) of the active submatrix, or NONE. */
  find(row: number, column: number): number {
    if (row === column) return this.diagonal[row];
    if (this.rowLength[row] <= this.columnLength[column]) {
      for (let e = this.rowFirst[row]; e !== NONE; e = this.nextInRow[e]) if (this.elementColumn[e] === column) return e;
    } else {
      for (let e = this.columnFirst[column]; e !== NONE; e = this.nextInColumn[e]) if (this.elementRow[e] === row) return e;
    }
    return NONE;
  }

  private grow(): void {
    const capacity = 2 * this.elementRow.length;
    const widenInt = (old: Int32Array): Int32Array => {
      const grown = new Int32Array(capacity);
      grown.set(old);
      return grown;
    };
    this.elementRow = widenInt(this.elementRow);
    this.elementColumn = widenInt(this.elementColumn);
    this.nextInRow = widenInt(this.nextInRow);
    this.previousInRow = widenInt(this.previousInRow);
    this.nextInColumn = widenInt(this.nextInColumn);
    this.previousInColumn = widenInt(this.previousInColumn);
    const values = new Float64Array(capacity);
    values.set(this.elementValue);
    this.elementValue = values;
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
  /** A view of the filled part (no copy: allocations of typed arrays prompt garbage collections). */
  trimmed(): Int32Array {
    return this.data.subarray(0, this.length);
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
    return this.data.subarray(0, this.length);
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
  shouldStop: () => boolean = () => false,
): EliminationResult {
  return new MarkowitzElimination(structure, values, columnScale).run(shouldStop);
}

/** One elimination, its state in fields and each part of a step in its own small method. */
class MarkowitzElimination {
  private readonly size: number;
  private readonly active: ActiveSubmatrix;
  private readonly columnScale: Float64Array;
  private readonly columnBuckets: CountBuckets;
  private readonly rowBuckets: CountBuckets;
  /** Largest magnitude left in each active column, recomputed only after the column changes. */
  private readonly columnMaximum: Float64Array;
  private readonly columnMaximumStale: Uint8Array;

  private readonly pivotRow: Int32Array;
  private readonly pivotColumn: Int32Array;
  private readonly pivotValue: Float64Array;
  private readonly lowerStart: Int32Array;
  private readonly upperStart: Int32Array;
  private readonly lowerRow: GrowingInt32;
  private readonly lowerValue: GrowingFloat64;
  private readonly upperColumn: GrowingInt32;
  private readonly upperValue: GrowingFloat64;

  // During a step's update: each pivot-column row's index into lowerRow, or NONE; and, per
  // such row, the stamp of the last column update that found its element (no fill needed).
  private readonly lowerIndexOfRow: Int32Array;
  private readonly updatedAt: Int32Array;
  private updateStamp = 0;

  // The search's best candidate so far, and why the last search found none.
  private bestCost = Infinity;
  private bestRatio = 0;
  private chosenElement = NONE;
  private singularReason: SingularReason = 'numerical';

  constructor(structure: ColumnStructure, values: Float64Array, columnScale: Float64Array) {
    const n = structure.size;
    this.size = n;
    this.active = new ActiveSubmatrix(structure, values);
    this.columnScale = columnScale;
    this.columnBuckets = new CountBuckets(n);
    this.rowBuckets = new CountBuckets(n);
    for (let j = 0; j < n; j++) this.columnBuckets.link(j, this.active.columnLength[j]);
    for (let i = 0; i < n; i++) this.rowBuckets.link(i, this.active.rowLength[i]);
    this.columnMaximum = new Float64Array(n);
    this.columnMaximumStale = new Uint8Array(n).fill(1);
    this.pivotRow = new Int32Array(n);
    this.pivotColumn = new Int32Array(n);
    this.pivotValue = new Float64Array(n);
    this.lowerStart = new Int32Array(n + 1);
    this.upperStart = new Int32Array(n + 1);
    const entries = structure.row.length;
    this.lowerRow = new GrowingInt32(entries);
    this.lowerValue = new GrowingFloat64(entries);
    this.upperColumn = new GrowingInt32(entries);
    this.upperValue = new GrowingFloat64(entries);
    this.lowerIndexOfRow = new Int32Array(n).fill(NONE);
    this.updatedAt = new Int32Array(n);
  }

  run(shouldStop: () => boolean): EliminationResult {
    const n = this.size;
    for (let step = 0; step < n; step++) {
      if (step % STOP_CHECK_INTERVAL === 0 && shouldStop()) return { ok: false, stopped: true };
      const singular = this.choosePivot();
      if (singular !== NONE) return { ok: false, singularColumn: singular, reason: this.singularReason };
      this.eliminate(step);
    }
    this.lowerStart[n] = this.lowerRow.length;
    this.upperStart[n] = this.upperColumn.length;
    return {
      ok: true,
      factors: {
        pivotRow: this.pivotRow,
        pivotColumn: this.pivotColumn,
        pivotValue: this.pivotValue,
        lowerStart: this.lowerStart,
        lowerRow: this.lowerRow.trimmed(),
        lowerValue: this.lowerValue.trimmed(),
        upperStart: this.upperStart,
        upperColumn: this.upperColumn.trimmed(),
        upperValue: this.upperValue.trimmed(),
      },
    };
  }

  private maximumOf(column: number): number {
    if (this.columnMaximumStale[column]) {
      const active = this.active;
      let largest = 0;
      for (let e = active.columnFirst[column]; e !== NONE; e = active.nextElementInColumn(e)) {
        const magnitude = Math.abs(active.elementValue[e]);
        // NaN never compares greater, so a column of NaNs reads as empty: reported, not pivoted on.
        if (magnitude > largest) largest = magnitude;
      }
      this.columnMaximum[column] = largest;
      this.columnMaximumStale[column] = 0;
    }
    return this.columnMaximum[column];
  }

  /** Whether the column has nothing but numerical zeros left. */
  private isNumericallyEmpty(column: number, largest: number): boolean {
    return !(largest > NUMERICAL_ZERO_RELATIVE * this.columnScale[column]);
  }

  /** Weighs one candidate pivot; returns whether it passes the threshold test. */
  private consider(element: number, column: number, largest: number, cost: number): boolean {
    const magnitude = Math.abs(this.active.elementValue[element]);
    if (!(magnitude > NUMERICAL_ZERO_RELATIVE * this.columnScale[column]) || magnitude < PIVOT_SELECTION_THRESHOLD * largest) return false;
    const ratio = magnitude / largest;
    if (cost < this.bestCost || (cost === this.bestCost && ratio > this.bestRatio)) {
      this.bestCost = cost;
      this.bestRatio = ratio;
      this.chosenElement = element;
    }
    return true;
  }

  /**
   * Picks the next pivot into chosenElement, searching columns and rows in order of
   * increasing count and stopping once no unseen candidate can be cheaper, or once
   * MARKOWITZ_SEARCH_LIMIT lines with a candidate have been seen. Returns NONE, or the
   * column found singular (with singularReason).
   */
  private choosePivot(): number {
    const active = this.active;
    const emptyColumn = this.columnBuckets.head[0];
    this.singularReason = 'structural';
    if (emptyColumn !== NONE) return emptyColumn;
    this.singularReason = 'numerical';
    this.bestCost = Infinity;
    this.bestRatio = 0;
    this.chosenElement = NONE;
    let examined = 0;
    for (let count = 1; count <= this.size; count++) {
      // Columns with `count` entries: each candidate costs (rowCount − 1)·(count − 1).
      for (let column = this.columnBuckets.head[count]; column !== NONE; column = this.columnBuckets.following(column)) {
        const largest = this.maximumOf(column);
        if (this.isNumericallyEmpty(column, largest)) return column;
        let usable = false;
        for (let e = active.columnFirst[column]; e !== NONE; e = active.nextElementInColumn(e)) {
          if (this.consider(e, column, largest, (active.rowLength[active.elementRow[e]] - 1) * (count - 1))) usable = true;
        }
        if (usable) examined++;
        if (this.bestCost <= (count - 1) * (count - 1) || (examined >= MARKOWITZ_SEARCH_LIMIT && this.chosenElement !== NONE)) return NONE;
      }
      // Any candidate not yet seen lies in a row of at least `count` and a column of more than `count` entries.
      if (this.bestCost <= count * (count - 1)) return NONE;
      for (let row = this.rowBuckets.head[count]; row !== NONE; row = this.rowBuckets.following(row)) {
        let usable = false;
        for (let e = active.rowFirst[row]; e !== NONE; e = active.nextElementInRow(e)) {
          const column = active.elementColumn[e];
          const largest = this.maximumOf(column);
          if (this.isNumericallyEmpty(column, largest)) return column;
          if (this.consider(e, column, largest, (count - 1) * (active.columnLength[column] - 1))) usable = true;
        }
        if (usable) examined++;
        if (this.bestCost <= count * (count - 1) || (examined >= MARKOWITZ_SEARCH_LIMIT && this.chosenElement !== NONE)) return NONE;
      }
      if (this.bestCost <= count * count) return NONE;
    }
    if (this.chosenElement !== NONE) return NONE;
    // Unreachable for a well-formed active submatrix; name any active column rather than loop.
    for (let column = 0; column < this.size; column++) if (active.columnActive[column]) return column;
    return 0;
  }

  /** Eliminates with the chosen pivot: records L's column and U's row, then updates the Schur complement. */
  private eliminate(step: number): void {
    const active = this.active;
    const p = active.elementRow[this.chosenElement];
    const q = active.elementColumn[this.chosenElement];
    const pivot = active.elementValue[this.chosenElement];
    this.pivotRow[step] = p;
    this.pivotColumn[step] = q;
    this.pivotValue[step] = pivot;

    // The pivot column below the pivot becomes column `step` of L; its elements leave their rows.
    this.lowerStart[step] = this.lowerRow.length;
    this.columnBuckets.unlink(q);
    active.columnActive[q] = 0;
    for (let e = active.columnFirst[q]; e !== NONE; e = active.nextElementInColumn(e)) {
      const row = active.elementRow[e];
      if (row === p) continue;
      this.lowerRow.push(row);
      this.lowerValue.push(active.elementValue[e] / pivot);
      this.rowBuckets.unlink(row);
      active.removeFromRow(e);
    }

    // The pivot row right of the pivot becomes row `step` of U; its elements leave their columns.
    this.upperStart[step] = this.upperColumn.length;
    this.rowBuckets.unlink(p);
    for (let e = active.rowFirst[p]; e !== NONE; e = active.nextElementInRow(e)) {
      const column = active.elementColumn[e];
      if (column === q) continue;
      this.upperColumn.push(column);
      this.upperValue.push(active.elementValue[e]);
      this.columnBuckets.unlink(column);
      active.removeFromColumn(e);
    }

    const lowerFirst = this.lowerStart[step];
    const lowerEnd = this.lowerRow.length;
    const lowerRow = this.lowerRow.data;
    for (let l = lowerFirst; l < lowerEnd; l++) this.lowerIndexOfRow[lowerRow[l]] = l;
    for (let u = this.upperStart[step], end = this.upperColumn.length; u < end; u++) {
      const column = this.upperColumn.data[u];
      this.updateColumn(column, this.upperValue.data[u], lowerFirst, lowerEnd);
      this.columnMaximumStale[column] = 1;
      this.columnBuckets.link(column, active.columnLength[column]);
    }
    for (let l = lowerFirst; l < lowerEnd; l++) {
      const row = lowerRow[l];
      this.lowerIndexOfRow[row] = NONE;
      this.rowBuckets.link(row, active.rowLength[row]);
    }
  }

  /**
   * Schur complement update of one column: a[i][column] −= l[i]·upper for the pivot
   * column's rows i, adding fill where (i, column) was empty. Either one walk down the
   * column picking out those rows (cost ~ its length), or each (i, column) looked up
   * along its shorter line, whichever is cheaper: the walk suits dense fill, the
   * look-ups a long column touched by few rows.
   */
  private updateColumn(column: number, upper: number, lowerFirst: number, lowerEnd: number): void {
    const active = this.active;
    const lowerRow = this.lowerRow.data;
    const lowerValue = this.lowerValue.data;
    const length = active.columnLength[column];
    let lookupCost = 0;
    for (let l = lowerFirst; l < lowerEnd && lookupCost <= length; l++) {
      const row = lowerRow[l];
      lookupCost += row === column ? 1 : Math.min(active.rowLength[row], length);
    }
    if (lookupCost <= length) {
      for (let l = lowerFirst; l < lowerEnd; l++) {
        const row = lowerRow[l];
        const update = lowerValue[l] * upper;
        const element = active.find(row, column);
        if (element !== NONE) active.elementValue[element] -= update;
        else active.add(row, column, -update);
      }
      return;
    }
    const stamp = ++this.updateStamp;
    for (let e = active.columnFirst[column]; e !== NONE; e = active.nextElementInColumn(e)) {
      const l = this.lowerIndexOfRow[active.elementRow[e]];
      if (l === NONE) continue;
      active.elementValue[e] -= lowerValue[l] * upper;
      this.updatedAt[l - lowerFirst] = stamp;
    }
    for (let l = lowerFirst; l < lowerEnd; l++) {
      if (this.updatedAt[l - lowerFirst] !== stamp) active.add(lowerRow[l], column, -lowerValue[l] * upper);
    }
  }
}
