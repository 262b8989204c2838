/**
 * The worker threads jobs run in (piscina). One pool per job worker, as many threads as the
 * worker runs jobs at once. `run` resolves with the task's output, calls `onProgress` for each
 * progress message, and rejects with an AbortError when `signal` aborts: piscina then ends the
 * thread that was computing, so a cancelled job stops using the CPU at once.
 */
import { MessageChannel } from 'node:worker_threads';
import Piscina from 'piscina';
import type { JobKind, JobOptions, JobProgress } from '@contracts/api';
import type { TaskOutput, TaskWorkerData } from './task.worker';
import { entryFile } from '../workers/entryFile';


export interface JobThreads {
  run(task: { kind: JobKind; documentJson: string; options: JobOptions; chunkBytes?: number }, opts: { onProgress?: (p: JobProgress) => void; signal?: AbortSignal }): Promise<TaskOutput>;
  close(): Promise<void>;
}

/**
 * `pressure`: the request thread's gauge when the worker runs inside the app process (server/workers/requestPressure.ts);
 * the threads then compute in slices while requests are being served. A standalone worker passes none.
 */
export function jobThreads(threads: number, pressure?: SharedArrayBuffer): JobThreads {
  const workerData: TaskWorkerData = { pressure: pressure ?? null };
  const pool = new Piscina({ ...entryFile(import.meta.url, 'task.worker'), workerData, minThreads: 0, maxThreads: Math.max(1, threads), idleTimeout: 60_000 });
  return {
    async run(task, opts) {
      const { port1, port2 } = new MessageChannel();
      port1.on('message', (p: JobProgress) => opts.onProgress?.(p));
      try {
        return (await pool.run({ ...task, port: port2 }, { transferList: [port2], signal: opts.signal })) as TaskOutput;
      } finally {
        port1.close();
      }
    },
    close: () => pool.destroy(),
  };
}
