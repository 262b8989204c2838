/**
 * Worker module for the pool tests only (createCoulombPool's `workerFile`): the product's jobs
 * go to runJob unchanged; two synthetic kinds exercise the pool itself.
 *   spin   busy CPU work that never finishes on its own, posting progress: only cancellation
 *          (terminating the thread) can end it, so a rejection proves the cancel worked
 *   echo   returns at once with its value
 */
import runJob, { type WorkerTask } from '../../../server/workers/coulomb.worker';
import type { CoulombJob } from '../../../server/workers/coulomb.worker';

export type PoolTestJob = CoulombJob | { kind: 'spin' } | { kind: 'echo'; value: number };

export default function run(task: { job: PoolTestJob; port?: WorkerTask['port'] }): unknown {
  const job = task.job;
  if (job.kind === 'echo') {
    task.port?.close();
    return { value: job.value };
  }
  if (job.kind === 'spin') {
    let k = 0;
    for (let round = 0; ; round++) {
      // busy work, like a solve: the thread cannot take messages while it runs
      for (let i = 0; i < 1e5; i++) k += Math.sqrt(i);
      if (round % 16 === 0) task.port?.postMessage({ phase: 'solve', fraction: k > 0 ? 0.5 : 0 });
    }
  }
  return runJob(task as WorkerTask);
}
