import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import type { MipModel } from './model';

/**
 * The engine's small shared kernel: the cost of a column vector, the rule check every award
 * passes before it is published or kept, the seeded random generator, and the solver packages'
 * labels. The calling thread and the worker threads (workers/*.ts) import this one module.
 */

/** Total cost of column vector x under the model's objective. */
export function costOf(model: MipModel, x: ArrayLike<number>): number {
  let s = 0;
  for (let c = 0; c < model.numCols; c++) s += model.colCost[c] * x[c];
  return s;
}

/**
 * True when x meets every bound and row of the model (tolerance 1e-7, relative to the row) and
 * its integer columns are whole (to 1e-9): the rule check for every award a heuristic builds.
 */
export function satisfiesRows(model: MipModel, x: ArrayLike<number>): boolean {
  for (let c = 0; c < model.numCols; c++) {
    if (x[c] < model.colLower[c] - 1e-9 || x[c] > model.colUpper[c] + 1e-7 * Math.max(1, model.colUpper[c])) return false;
    if (model.integer[c] && Math.abs(x[c] - Math.round(x[c])) > 1e-9) return false;
  }
  for (let r = 0; r < model.rowNames.length; r++) {
    let act = 0;
    let scale = 1;
    for (let k = model.rowStarts[r]; k < model.rowStarts[r + 1]; k++) {
      act += model.rowValue[k] * x[model.rowIndex[k]];
      scale = Math.max(scale, Math.abs(model.rowValue[k]));
    }
    if (act < model.rowLower[r] - 1e-7 * scale || act > model.rowUpper[r] + 1e-7 * scale) return false;
  }
  return true;
}

/** x with integer columns rounded and every column inside its bounds. */
export function cleaned(model: MipModel, x: ArrayLike<number>): Float64Array {
  const y = new Float64Array(model.numCols);
  for (let c = 0; c < model.numCols; c++) {
    const v = model.integer[c] ? Math.round(x[c]) : x[c];
    y[c] = Math.min(model.colUpper[c], Math.max(model.colLower[c], v));
  }
  return y;
}

/** A pseudo-random generator (mulberry32) so that a run can be repeated from its seed: numbers in [0, 1). */
export function randomSource(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const versions = new Map<string, string>();

/**
 * The installed version of a solver package, for the result's engine label. package.json is not
 * in every package's exports map (glpk.js), so it is read beside the resolved entry point.
 */
export function packageVersion(name: 'glpk.js/node' | 'highs'): string {
  let version = versions.get(name);
  if (version === undefined) {
    const pkgDir = dirname(dirname(require.resolve(name)));
    version = (JSON.parse(readFileSync(join(pkgDir, 'package.json'), 'utf8')) as { version: string }).version;
    versions.set(name, version);
  }
  return version;
}
