/**
 * The worker-thread side of long Coulomb solves (run by coulombPool.ts through piscina).
 *
 * A task carries the design, the job options and a MessagePort; progress (geometry/progress.ts) is
 * posted on the port at most every PROGRESS_INTERVAL_MS so a fast solve does not flood the
 * main thread. Cancellation is piscina's: aborting the task's signal terminates this thread
 * (the solve is synchronous CPU work, so terminating is the only prompt way to stop it).
 * Tests of the pool itself run their synthetic jobs in a worker module of their own that
 * delegates the real kinds to runJob (createCoulombPool's `workerFile` option), so nothing
 * test-only lives here.
 */
import type { MessagePort } from 'node:worker_threads';
import type { Design } from '../../geometry/design/types';
import type { CoreProgress as Progress } from '../../geometry/pipeline/index';
import { solveCoulomb, solveSitePotentials, runConvergence, releaseSpmvMemory, type CoulombOptions, type ConvergenceOptions } from '../../geometry/fem/index';
import type { TetMesh } from '../../geometry/mesh/index';

export const PROGRESS_INTERVAL_MS = 50;

export type CoulombJob =
  | { kind: 'coulomb'; design: Design; options?: Omit<CoulombOptions, 'onProgress' | 'signal'> }
  | { kind: 'convergence'; design: Design; options: Omit<ConvergenceOptions, 'onProgress' | 'signal'> }
  | { kind: 'potentials'; design: Design; mesh: TetMesh; order?: 1 | 2 };

export interface WorkerTask {
  job: CoulombJob;
  port?: MessagePort;
}

function throttled(port: MessagePort | undefined): (p: Progress) => void {
  let last = -Infinity;
  let lastKey = '';
  return (p) => {
    if (!port) return;
    const now = performance.now();
    const key = `${p.phase}|${p.level ?? ''}|${p.site ?? ''}`;
    if (key === lastKey && p.fraction < 1 && now - last < PROGRESS_INTERVAL_MS) return;
    last = now;
    lastKey = key;
    port.postMessage(p);
  };
}

export default function runJob(task: WorkerTask): unknown {
  const onProgress = throttled(task.port);
  const job = task.job;
  try {
    switch (job.kind) {
      case 'coulomb':
        return solveCoulomb(job.design, { ...job.options, onProgress });
      case 'convergence':
        return runConvergence(job.design, { ...job.options, onProgress });
      case 'potentials': {
        const r = solveSitePotentials(job.design, job.mesh, job.order ?? job.design.refinement.order, { onProgress });
        return r;
      }
    }
  } finally {
    task.port?.close();
    // the thread lives on between jobs: hand back the WebAssembly memory a big matrix grew
    releaseSpmvMemory();
  }
}
