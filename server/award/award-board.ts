import type { MipModel } from './model';

/**
 * The calling thread's side of the award board shared with the HiGHS workers (layout and the
 * workers' side in workers/shared-incumbent.mjs): Int32 [lock, version], then Float64
 * [objective, x_0 … x_n-1]. The portfolio publishes awards found outside HiGHS (glpk.js, the
 * greedy award) so a running HiGHS takes them in at its next user-solution checkpoint.
 */
export function newBoard(model: MipModel): SharedArrayBuffer {
  const board = new SharedArrayBuffer(8 + 8 * (model.numCols + 1));
  new Float64Array(board, 8)[0] = Infinity;
  return board;
}

// Same bounded spin as the workers: a worker terminated while holding the lock must not hang us.
const MAX_SPINS = 10_000_000;

function locked<T>(board: SharedArrayBuffer, fn: (nums: Float64Array) => T): T | null {
  const ints = new Int32Array(board, 0, 2);
  for (let spins = 0; Atomics.compareExchange(ints, 0, 0, 1) !== 0;) {
    if (++spins > MAX_SPINS) return null;
  }
  try {
    return fn(new Float64Array(board, 8));
  } finally {
    Atomics.store(ints, 0, 0);
  }
}

/** Publishes x (cost `objective`) when it is cheaper than the board's award. */
export function publishAward(board: SharedArrayBuffer, objective: number, x: ArrayLike<number>): boolean {
  return locked(board, (nums) => {
    if (!(objective < nums[0])) return false;
    nums[0] = objective;
    nums.set(x, 1);
    Atomics.add(new Int32Array(board, 0, 2), 1, 1);
    return true;
  }) ?? false;
}

/** A consistent copy of the board's award, or null when it is empty. */
export function bestAward(board: SharedArrayBuffer, numCols: number): { objective: number; x: Float64Array } | null {
  return locked(board, (nums) => (Number.isFinite(nums[0]) ? { objective: nums[0], x: nums.slice(1, 1 + numCols) } : null));
}
