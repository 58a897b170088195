/**
 * A mixed-integer model in plain arrays, independent of any solver. Workers translate it into
 * their engine's own input, so the same model reaches glpk.js and HiGHS.
 */
export interface MipModel {
  numCols: number;
  colNames: string[];
  colCost: number[];
  colLower: number[];
  colUpper: number[];
  /** true for binary/integer columns. */
  integer: boolean[];
  rowNames: string[];
  rowLower: number[];
  rowUpper: number[];
  /** Rows in CSR form: row r's entries are at rowStarts[r] .. rowStarts[r + 1]. */
  rowStarts: number[];
  rowIndex: number[];
  rowValue: number[];
}

/** Where each award decision lives in the model, so the extractor can read the solution back. */
export interface ModelMap {
  /** Column of y_i, or -1 when vendor i cannot be awarded (excluded, or no bid). */
  open: number[];
  /** Per (vendor, region): column of q_ij (split) or z_ij (sole), or -1 where no supply is possible. */
  supply: number[][];
  /** Per region: true when the supply column is the binary z_ij (quantity = d_j · z_ij). */
  soleColumn: boolean[];
}

/** A small builder that keeps columns and rows consistent; used by build-model.ts. */
export class ModelBuilder {
  private readonly m: MipModel = {
    numCols: 0, colNames: [], colCost: [], colLower: [], colUpper: [], integer: [],
    rowNames: [], rowLower: [], rowUpper: [], rowStarts: [0], rowIndex: [], rowValue: [],
  };

  addCol(name: string, cost: number, lower: number, upper: number, integer: boolean): number {
    const m = this.m;
    m.colNames.push(name);
    m.colCost.push(cost);
    m.colLower.push(lower);
    m.colUpper.push(upper);
    m.integer.push(integer);
    return m.numCols++;
  }

  addRow(name: string, cols: number[], values: number[], lower: number, upper: number): void {
    const m = this.m;
    m.rowNames.push(name);
    m.rowLower.push(lower);
    m.rowUpper.push(upper);
    m.rowIndex.push(...cols);
    m.rowValue.push(...values);
    m.rowStarts.push(m.rowIndex.length);
  }

  build(): MipModel {
    return this.m;
  }
}
