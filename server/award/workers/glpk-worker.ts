// Solver worker for glpk.js. glpk.js is an ES module: it is loaded with import() (jest 30 on
// Node 20 cannot import it on the calling thread; in a worker thread, from source through tsx or
// from the build in dist/, a dynamic import is the plain way).
import type { GLPK, LP } from 'glpk.js/node';
import { packageVersion } from '../kernel';
import type { MipModel } from '../model';
import type { EngineOutcome } from '../solve';
import { setThreadPriority } from './low-priority';

export interface GlpkTask { model: MipModel; timeLimitSeconds: number; relativeGap: number }

let glpkPromise: Promise<GLPK> | undefined;

// glpk.js races HiGHS in the Tendara engine; on the large problems HiGHS proves first, a glpk.js
// at normal priority would halve HiGHS's speed on a busy machine (see low-priority.ts).
setThreadPriority(10);

async function loadGlpk(): Promise<GLPK> {
  const mod = await import('glpk.js/node');
  return mod.default();
}

function toGlpkProblem(glpk: GLPK, model: MipModel, relax: boolean): LP {
  const name = (k: number) => `x${k}`;
  const big = Number.MAX_VALUE;
  const subjectTo: LP['subjectTo'] = [];
  for (let r = 0; r < model.rowNames.length; r++) {
    const vars = [];
    for (let k = model.rowStarts[r]; k < model.rowStarts[r + 1]; k++) vars.push({ name: name(model.rowIndex[k]), coef: model.rowValue[k] });
    const lo = model.rowLower[r];
    const hi = model.rowUpper[r];
    let bnds;
    if (Number.isFinite(lo) && Number.isFinite(hi)) bnds = lo === hi ? { type: glpk.GLP_FX, lb: lo, ub: hi } : { type: glpk.GLP_DB, lb: lo, ub: hi };
    else if (Number.isFinite(lo)) bnds = { type: glpk.GLP_LO, lb: lo, ub: big };
    else if (Number.isFinite(hi)) bnds = { type: glpk.GLP_UP, lb: -big, ub: hi };
    else bnds = { type: glpk.GLP_FR, lb: -big, ub: big };
    subjectTo.push({ name: `r${r}`, vars, bnds });
  }
  const vars = [];
  const bounds = [];
  const generals = [];
  for (let c = 0; c < model.numCols; c++) {
    vars.push({ name: name(c), coef: model.colCost[c] });
    const lo = model.colLower[c];
    const hi = model.colUpper[c];
    bounds.push(lo === hi ? { name: name(c), type: glpk.GLP_FX, lb: lo, ub: hi } : { name: name(c), type: glpk.GLP_DB, lb: lo, ub: hi });
    // Integer columns as generals with explicit bounds: glpk's binary kind would reset a
    // required vendor's lower bound of 1 back to 0.
    if (model.integer[c] && !relax) generals.push(name(c));
  }
  return { name: 'award', objective: { direction: glpk.GLP_MIN, name: 'cost', vars }, subjectTo, bounds, generals };
}

/** Solves the LP relaxation (for an honest bound), then the MIP within the time limit. */
export default async function solveWithGlpk({ model, timeLimitSeconds, relativeGap }: GlpkTask): Promise<EngineOutcome> {
  glpkPromise ??= loadGlpk();
  const glpk = await glpkPromise;
  const started = performance.now();
  const elapsed = () => (performance.now() - started) / 1000;
  const engine = `glpk.js ${packageVersion('glpk.js/node')} (GLPK ${glpk.version})`;
  const values = (vars: Record<string, number>) => Float64Array.from({ length: model.numCols }, (_, c) => vars[`x${c}`] ?? 0);

  const lp = glpk.solve(toGlpkProblem(glpk, model, true), { msglev: glpk.GLP_MSG_OFF, tmlim: Math.max(1, timeLimitSeconds) });
  const lpStatus = lp.result.status;
  if (lpStatus === glpk.GLP_NOFEAS || lpStatus === glpk.GLP_INFEAS) {
    return { status: 'infeasible', values: null, objective: null, bound: null, boundSource: null, seconds: elapsed(), engine };
  }
  const lpBound = lpStatus === glpk.GLP_OPT ? lp.result.z : null;
  if (!model.integer.some(Boolean)) {
    return { status: lpStatus === glpk.GLP_OPT ? 'optimal' : 'unknown', values: values(lp.result.vars), objective: lp.result.z, bound: lpBound, boundSource: 'LP optimum (glpk.js simplex)', seconds: elapsed(), engine };
  }
  const remaining = Math.max(0.5, timeLimitSeconds - elapsed());
  const mip = glpk.solve(toGlpkProblem(glpk, model, false), { msglev: glpk.GLP_MSG_OFF, tmlim: remaining, mipgap: relativeGap, presol: true });
  const s = mip.result.status;
  const seconds = elapsed();
  if (s === glpk.GLP_OPT) {
    // With a relative gap allowed, glpk stops early and its own bound is not reported: fall back to the LP bound.
    return relativeGap > 0
      ? { status: 'optimal', values: values(mip.result.vars), objective: mip.result.z, bound: lpBound, boundSource: `LP relaxation (glpk.js stopped within the relative gap ${relativeGap})`, seconds, engine }
      : { status: 'optimal', values: values(mip.result.vars), objective: mip.result.z, bound: mip.result.z, boundSource: 'optimum proven by glpk.js branch and bound', seconds, engine };
  }
  if (s === glpk.GLP_FEAS) {
    return { status: 'feasible', values: values(mip.result.vars), objective: mip.result.z, bound: lpBound, boundSource: 'LP relaxation (glpk.js reports no MIP bound)', seconds, engine };
  }
  if (s === glpk.GLP_NOFEAS) {
    return { status: 'infeasible', values: null, objective: null, bound: null, boundSource: null, seconds, engine };
  }
  return { status: 'unknown', values: null, objective: null, bound: lpBound, boundSource: 'LP relaxation (glpk.js reports no MIP bound)', seconds, engine };
}
