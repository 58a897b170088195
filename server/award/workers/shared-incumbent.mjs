// A best-award board shared by solver workers through a SharedArrayBuffer: each HiGHS run
// publishes its improving awards and picks up a cheaper one found by the other run at its next
// user-solution checkpoint. Layout: Int32 [lock, version], then Float64 [objective, x_0 … x_n-1].
// A short spin lock guards both reads and writes (copies of a few thousand numbers). The board is
// created and filled from the calling thread by award-board.ts.

function views(buffer) {
  return { ints: new Int32Array(buffer, 0, 2), nums: new Float64Array(buffer, 8) };
}

// Spins are bounded: a run terminated while holding the lock must not hang the other run, which
// then just skips this exchange.
const MAX_SPINS = 10_000_000;

function withLock(ints, fn) {
  let spins = 0;
  while (Atomics.compareExchange(ints, 0, 0, 1) !== 0) {
    if (++spins > MAX_SPINS) return null;
  }
  try {
    return fn();
  } finally {
    Atomics.store(ints, 0, 0);
  }
}

/** Objective of the best published award (Infinity when none). Unlocked read: a hint only. */
export function boardObjective(buffer) {
  return views(buffer).nums[0];
}

/** Publishes x when it is cheaper than the board's award; returns true if it was. */
export function publish(buffer, objective, x) {
  const { ints, nums } = views(buffer);
  return withLock(ints, () => {
    if (!(objective < nums[0])) return false;
    nums[0] = objective;
    nums.set(x, 1);
    Atomics.add(ints, 1, 1);
    return true;
  });
}

/** A consistent copy of the board's award, or null when empty. */
export function read(buffer, numCols) {
  const { ints, nums } = views(buffer);
  return withLock(ints, () => (Number.isFinite(nums[0]) ? { objective: nums[0], x: nums.slice(1, 1 + numCols) } : null));
}
