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
import { readdirSync, readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';

/** nice 10: common practice for batch work beside interactive work (nice(1) adds 10 by default) */
export const WORKER_NICE = 10;
/**
 * nice 19, the lowest priority (setpriority(2): -20 … 19), for job threads: a mesh or a solve runs for seconds
 * to minutes and nobody waits on it request by request, while the request thread must answer within 100 ms
 * (issue 10, "Faults and load"). Under CFS a nice-19 thread weighs 15 against 1024 for nice 0, 110 for nice 10
 * (kernel/sched/core.c, sched_prio_to_weight), so beside a busy request thread it gets about 1.5 % of a shared
 * core instead of about 10 %; on an idle core it still runs at full speed.
 */
export const JOB_NICE = 19;

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

/**
 * Lower every thread of this process to `nice`, for a process that only does batch work (the design-body process,
 * server/http/designBody.child.ts). Lowering the calling thread alone leaves V8's platform threads, started with the
 * process, at the parent's priority; they run the garbage collector's parallel and concurrent work for this
 * process's large heaps, which is seconds of CPU per 17 MB design. Threads started later (libuv's pool, worker
 * threads) inherit the nice value of the thread that starts them (setpriority(2), NOTES; pthreads(7)). Lists
 * /proc/self/task (proc(5)); answers how many threads it lowered (0 where there is no /proc or lowering is refused).
 */
export function lowerProcessPriority(nice = WORKER_NICE): number {
  let lowered = 0;
  let tids: string[];
  try {
    tids = readdirSync('/proc/self/task');
  } catch {
    return 0;
  }
  for (const t of tids) {
    const tid = Number(t);
    if (!Number.isInteger(tid) || tid <= 0) continue;
    try {
      setPriority(tid, nice);
      lowered += 1;
    } catch {
      // the thread ended meanwhile, or this process may not lower it: leave it
    }
  }
  return lowered;
}
