import type { MipModel } from './model';

/**
 * The award board shared by the calling thread and the solver workers through a
 * SharedArrayBuffer: every run publishes its improving awards and takes in a cheaper one another
 * run found (HiGHS at its next user-solution checkpoint, the neighbourhood search each round).
 * Layout: Int32 [lock, version], then Float64 [objective, x_0 … x_n-1]. A short spin lock guards
 * both reads and writes (copies of a few thousand numbers). One module for every thread.
 */
export function newBoard(model: Pick<MipModel, 'numCols'>): SharedArrayBuffer {
  const board = new SharedArrayBuffer(8 + 8 * (model.numCols + 1));
  new Float64Array(board, 8)[0] = Infinity;
  return board;
}

// Spins are bounded: a run terminated while holding the lock must not hang another, which then
// just skips this exchange.
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

/** Publishes x (cost `objective`) when it is cheaper than the board's award; true if it was. */
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

/** Cost of the board's award (Infinity when none). Unlocked read: a hint only. */
export function boardObjective(board: SharedArrayBuffer): number {
  return new Float64Array(board, 8, 1)[0];
}
