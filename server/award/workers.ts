import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import Piscina from 'piscina';
import { setting } from '../config';

/**
 * The worker-thread pool for solver runs. Solvers are synchronous WebAssembly: run in the main
 * thread they would freeze the server for the whole solve, so every solve goes to a worker, and
 * cancellation terminates the worker (the only way to stop a synchronous solve).
 */
const pools = new Map<string, Piscina>();

/** Finds a worker file: beside this module (source), else the source folder from a build in dist/. */
export function workerFile(name: string): string {
  const beside = join(__dirname, 'workers', name);
  if (existsSync(beside)) return beside;
  // tsc does not copy .mjs files into dist: walk up to the project root and use the source copy.
  let dir = __dirname;
  while (dirname(dir) !== dir) {
    const candidate = join(dir, 'server', 'award', 'workers', name);
    if (existsSync(candidate)) return candidate;
    dir = dirname(dir);
  }
  throw new Error(`Award solver worker ${name} not found near ${__dirname}.`);
}

/**
 * The pool for one worker file. glpk.js has its own pool because its worker lowers its threads'
 * scheduling priority (workers/glpk-worker.mjs), and such a thread must never run HiGHS later.
 */
export function solverPool(file = 'highs-worker.mjs'): Piscina {
  let pool = pools.get(file);
  if (!pool) {
    pool = new Piscina({
      // Two runs of one solver at most per solve (HiGHS A and B); more threads than that only
      // compete for the same cores.
      maxThreads: setting('AWARD_SOLVER_THREADS'),
      minThreads: 0,
      idleTimeout: 10_000,
      // Node 20.19+ lets require() load an ES module, and piscina tries require() first; that path
      // once aborted a whole test run (an assertion in Node's require(esm) facade). Without it,
      // require() refuses the .mjs worker and piscina falls back to import(), the plain way.
      execArgv: [...process.execArgv, '--no-experimental-require-module'],
    });
    pools.set(file, pool);
  }
  return pool;
}

/** Stops the pools' threads (tests and the CLI call this so the process can exit at once). */
export async function closeSolverPool(): Promise<void> {
  const all = [...pools.values()];
  pools.clear();
  await Promise.all(all.map((p) => p.close({ force: true })));
}
