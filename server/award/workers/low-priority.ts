// Lowers the scheduling priority of the calling worker thread. The runs that help HiGHS A (glpk.js
// at the start, the neighbourhood search after it) use the core A leaves free; on a machine busy
// with other work they would otherwise take CPU from A itself. At a lower priority a run goes at
// full speed on a free core and yields on a contended one. Linux applies setpriority to the one
// thread whose id is given; elsewhere this does nothing. Such a thread belongs to a pool of its
// own (workers.ts pools by worker file), so no HiGHS A run ever inherits the priority.
import { readlinkSync } from 'node:fs';
import { getPriority, setPriority } from 'node:os';

function threadId(): number | null {
  try {
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    return tid > 0 ? tid : null;
  } catch {
    return null;
  }
}

const tid = threadId();
// The niceness the thread started with: its process's (0, or a worker process's WORKER_NICE).
const base = tid === null ? 0 : getPriority(tid);

/**
 * Sets the thread's niceness to `steps` above the one it started with (at most 19, the lowest
 * priority), so that the order between the runs holds in a process that is itself niced; false
 * when the platform does not allow it. Raising the niceness is always allowed; lowering it again
 * needs the privilege (CAP_SYS_NICE, RLIMIT_NICE).
 */
export function setThreadPriority(steps: number): boolean {
  if (tid === null) return false;
  try {
    setPriority(tid, Math.min(19, base + steps));
    return true;
  } catch {
    // Not allowed: the run goes on at the priority it has.
    return false;
  }
}
