import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import Piscina from 'piscina';

/**
 * The worker-thread pool for solver runs. Solvers are synchronous WebAssembly: run in the main
 * thread they would freeze the server for the whole solve, so every solve goes to a worker, and
 * cancellation terminates the worker (the only way to stop a synchronous solve).
 */
let pool: Piscina | undefined;

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

export function solverPool(): Piscina {
  pool ??= new Piscina({
    // Two solvers race per solve; more threads than that only compete for the same cores.
    maxThreads: Math.max(2, Number(process.env.AWARD_SOLVER_THREADS) || 2),
    minThreads: 0,
    idleTimeout: 10_000,
  });
  return pool;
}

/** Stops the pool's threads (tests and the CLI call this so the process can exit at once). */
export async function closeSolverPool(): Promise<void> {
  const p = pool;
  pool = undefined;
  if (p) await p.close({ force: true });
}
