/**
 * Lower the OS scheduling priority of the calling worker thread, so that the thread serving HTTP (and
 * PostgreSQL's backends) get a core first when the machine is short of them. On Linux the nice value belongs to
 * each thread (setpriority(2), NOTES: "the nice value is a per-thread attribute"), and
 * setpriority(PRIO_PROCESS, tid) with a thread id changes that thread alone; /proc/thread-self names the
 * caller's thread id (proc(5)). Elsewhere, or where the process may not lower itself, nothing changes.
 *
 * Used by the worker threads that run long computations beside the request thread: design bodies, design
 * figures and imports (server/http, server/workers) and jobs (server/jobs/task.worker.ts). The work itself is
 * unchanged; it only waits when a request wants the same core.
 */
import { readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';

/** nice 10: common practice for batch work beside interactive work (nice(1) adds 10 by default) */
export const WORKER_NICE = 10;

export function lowerThreadPriority(nice = WORKER_NICE): boolean {
  try {
    // "<pid>/task/<tid>"
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    if (!Number.isInteger(tid) || tid <= 0) return false;
    setPriority(tid, nice);
    return true;
  } catch {
    return false;
  }
}
