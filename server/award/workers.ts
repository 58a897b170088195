import { existsSync } from 'node:fs';
import { join } from 'node:path';
import Piscina from 'piscina';
import { setting } from '../config';

/**
 * The worker-thread pool for solver runs. Solvers are synchronous WebAssembly: run in the main
 * thread they would freeze the server for the whole solve, so every solve goes to a worker, and
 * cancellation terminates the worker (the only way to stop a synchronous solve).
 */
const pools = new Map<string, Piscina>();

/**
 * Finds a worker (workers/NAME.ts): compiled JavaScript beside this module in a build (dist/),
 * else the TypeScript source, which the worker thread loads through tsx. Either way the worker
 * imports the same typed modules as this thread (kernel.ts, award-board.ts, model.ts).
 */
export function workerFile(name: string): { filename: string; execArgv: string[] } {
  const compiled = join(__dirname, 'workers', `${name}.js`);
  if (existsSync(compiled)) return { filename: compiled, execArgv: [] };
  const source = join(__dirname, 'workers', `${name}.ts`);
  if (existsSync(source)) return { filename: source, execArgv: ['--import', 'tsx'] };
  throw new Error(`Award solver worker ${name} not found in ${join(__dirname, 'workers')}.`);
}

/**
 * The pool for one worker. glpk.js has its own pool because its worker lowers its threads'
 * scheduling priority (workers/glpk-worker.ts), and such a thread must never run HiGHS later.
 */
export function solverPool(file = 'highs-worker'): Piscina {
  let pool = pools.get(file);
  if (!pool) {
    const worker = workerFile(file);
    pool = new Piscina({
      filename: worker.filename,
      // Two runs of one solver at most per solve (HiGHS A and B); more threads than that only
      // compete for the same cores.
      maxThreads: setting('AWARD_SOLVER_THREADS'),
      minThreads: 0,
      idleTimeout: 10_000,
      // Node 20.19+ lets require() load an ES module; that path once aborted a whole test run (an
      // assertion in Node's require(esm) facade). The workers load glpk.js, an ES module, with
      // import() and nothing else of that kind, so require(esm) stays off.
      execArgv: [...process.execArgv, ...worker.execArgv, '--no-experimental-require-module'],
    });
    pools.set(file, pool);
  }
  return pool;
}

const inFlight = new Map<string, number>();
// Pools being closed after a cancel (closeSolverPool waits for them too).
const closing = new Set<Promise<void>>();

/**
 * Runs one task on the pool of worker `file`, stopped when `signal` aborts (piscina terminates the
 * thread running it). A task cancelled before its thread had loaded would leave that thread
 * starting and then idle for the pool's idle timeout; so when a cancelled task leaves its pool
 * with no task at all, the pool is closed: a cancel frees every thread it started.
 */
export async function runOnPool(file: string, payload: unknown, signal: AbortSignal): Promise<unknown> {
  const pool = solverPool(file);
  inFlight.set(file, (inFlight.get(file) ?? 0) + 1);
  try {
    return await pool.run(payload, { signal });
  } finally {
    const left = (inFlight.get(file) ?? 1) - 1;
    inFlight.set(file, left);
    if (signal.aborted && left === 0 && pools.get(file) === pool) {
      pools.delete(file);
      const closed = pool.close({ force: true }).finally(() => closing.delete(closed));
      closing.add(closed);
    }
  }
}

/**
 * How many solver threads the pools hold now (running or idle) and how many tasks wait for a
 * thread (one still starting up): the cancellation test counts them.
 */
export function solverThreads(): { threads: number; queued: number } {
  let threads = 0;
  let queued = 0;
  for (const pool of pools.values()) { threads += pool.threads.length; queued += pool.queueSize; }
  return { threads, queued };
}

/** Stops the pools' threads (tests and the CLI call this so the process can exit at once). */
export async function closeSolverPool(): Promise<void> {
  const all = [...pools.values()];
  pools.clear();
  await Promise.all([...all.map((p) => p.close({ force: true })), ...closing]);
}
