// The HiGHS runtime (the `highs` package, HiGHS compiled to WebAssembly) as the HiGHS worker and
// the neighbourhood-search worker both load it: one runtime per worker thread, the award model
// passed in as HiGHS's own model data.
import loadHighs, { type Highs } from 'highs';
import { packageVersion } from '../kernel';
import type { MipModel } from '../model';

let highsPromise: Promise<Highs> | undefined;

/** The thread's HiGHS runtime, loaded once. */
export function highsRuntime(): Promise<Highs> {
  highsPromise ??= loadHighs();
  return highsPromise;
}

/** "HiGHS x.y.z via highs a.b.c", for the result's engine field. */
export function engineLabel(highs: Highs): string {
  return `HiGHS ${highs.version.string} via highs ${packageVersion('highs')}`;
}

/** A HiGHS model of the MipModel; integrality only when `isMip`. The caller disposes it. */
export function createHighsModel(highs: Highs, model: MipModel, isMip: boolean) {
  return highs.createModel({
    numCols: model.numCols,
    numRows: model.rowNames.length,
    colCost: model.colCost,
    colLower: model.colLower,
    colUpper: model.colUpper,
    rowLower: model.rowLower.map((v) => (Number.isFinite(v) ? v : -highs.infinity)),
    rowUpper: model.rowUpper.map((v) => (Number.isFinite(v) ? v : highs.infinity)),
    matrix: { format: 'csr', numRows: model.rowNames.length, numCols: model.numCols, starts: model.rowStarts, indices: model.rowIndex, values: model.rowValue },
    ...(isMip ? { integrality: model.integer.map((b) => (b ? 1 : 0)) } : {}),
  });
}

export type HighsModel = ReturnType<typeof createHighsModel>;
