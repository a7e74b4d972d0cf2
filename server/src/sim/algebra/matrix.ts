// The circuit matrix: a fixed sparsity structure registered entry by entry,
// then a flat array of values that the devices stamp into on every Newton
// iteration without any lookup.

export class SparseMatrix {
  readonly size: number;
  private entryValues = new Float64Array(0);
  private entryRows = new Int32Array(0);
  private entryColumns = new Int32Array(0);

  private readonly slotByPosition = new Map<number, number>();
  private pendingRows: number[] = [];
  private pendingColumns: number[] = [];
  private finalized = false;

  constructor(size: number) {
    if (!Number.isInteger(size) || size < 0) throw new RangeError(`matrix size must be a non-negative integer, got ${size}`);
    this.size = size;
  }

  /**
   * Registers entry (row, column), 0-based, and returns a stable index into `values`; idempotent.
   * New entries get consecutive indices 0, 1, 2, … in the order they are registered (the solver
   * relies on it). Only before finalize(); afterwards only an existing entry's index is returned.
   */
  slot(row: number, column: number): number {
    if (!Number.isInteger(row) || !Number.isInteger(column) || row < 0 || column < 0 || row >= this.size || column >= this.size) {
      throw new RangeError(`matrix entry (${row}, ${column}) is outside a ${this.size}×${this.size} matrix`);
    }
    const position = row * this.size + column;
    const existing = this.slotByPosition.get(position);
    if (existing !== undefined) return existing;
    if (this.finalized) throw new Error(`matrix entry (${row}, ${column}) registered after finalize()`);
    const index = this.pendingRows.length;
    this.slotByPosition.set(position, index);
    this.pendingRows.push(row);
    this.pendingColumns.push(column);
    return index;
  }

  /** Freezes the structure; `values` is then valid. */
  finalize(): void {
    if (this.finalized) return;
    this.finalized = true;
    this.entryRows = Int32Array.from(this.pendingRows);
    this.entryColumns = Int32Array.from(this.pendingColumns);
    this.entryValues = new Float64Array(this.entryRows.length);
    this.pendingRows = [];
    this.pendingColumns = [];
  }

  /** Entry values, one per slot; stamp with `values[slot] += x`. Valid after finalize(). */
  get values(): Float64Array {
    return this.entryValues;
  }

  /** Row of each slot (valid after finalize()). */
  get rowOfSlot(): Int32Array {
    return this.entryRows;
  }

  /** Column of each slot (valid after finalize()). */
  get columnOfSlot(): Int32Array {
    return this.entryColumns;
  }

  get isFinalized(): boolean {
    return this.finalized;
  }

  /** Number of registered entries (structural nonzeros). */
  get entryCount(): number {
    return this.finalized ? this.rowOfSlot.length : this.pendingRows.length;
  }

  /** Zeroes all values, keeping the structure. */
  clear(): void {
    this.values.fill(0);
  }

  /** y = A·x, for residual checks. */
  multiply(x: Float64Array, y: Float64Array): void {
    y.fill(0, 0, this.size);
    const rows = this.rowOfSlot;
    const columns = this.columnOfSlot;
    const values = this.values;
    for (let s = 0; s < values.length; s++) y[rows[s]] += values[s] * x[columns[s]];
  }
}
