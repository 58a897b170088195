// The HiGHS runtime (the `highs` package, HiGHS compiled to WebAssembly) as the HiGHS worker and
// the neighbourhood-search worker both load it: one runtime per worker thread, the award model
// passed in as HiGHS's own model data.
import loadHighs from 'highs';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

let highsPromise;
let label;

/** The thread's HiGHS runtime, loaded once. */
export function highsRuntime() {
  highsPromise ??= loadHighs();
  return highsPromise;
}

/** "HiGHS x.y.z via highs a.b.c", for the result's engine field. */
export function engineLabel(highs) {
  if (!label) {
    const require = createRequire(import.meta.url);
    const pkgDir = dirname(dirname(require.resolve('highs')));
    const version = JSON.parse(readFileSync(join(pkgDir, 'package.json'), 'utf8')).version;
    label = `HiGHS ${highs.version.string} via highs ${version}`;
  }
  return label;
}

/** A HiGHS model of the MipModel; integrality only when `isMip`. The caller disposes it. */
export function createHighsModel(highs, model, isMip) {
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
