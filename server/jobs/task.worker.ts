/**
 * Piscina worker-thread body of a job: parse the design, run the pipeline, pack the files.
 * Progress goes back through the MessagePort the caller passes. Cancelling a job aborts the piscina task, which ends this thread.
 * The thread lives on between jobs: after each one it hands back the WebAssembly memory a big
 * matrix grew (releaseSpmvMemory: above SPMV_KEEP_BYTES the kernel's arena is dropped).
 */
import { workerData, type MessagePort } from 'node:worker_threads';
import type { JobKind, JobOptions } from '@contracts/api';
import type { Design } from '../../geometry/design/types';
import { migrateDesign } from '@contracts/design';
import { releaseSpmvMemory } from '../../geometry/fem/index';
import { JobRefusal, runPipeline } from './pipeline';
import { packFile, type PackedFile } from './storage';
import { JOB_NICE, lowerThreadPriority } from '../workers/lowPriority';
import { pressureHook } from '../workers/requestPressure';
import { setCooperationHook } from '../../geometry/cooperate';

/** The pool's workerData (threads.ts). */
export interface TaskWorkerData {
  /** the request thread's gauge, when this worker runs inside the app process */
  pressure: SharedArrayBuffer | null;
}

// requests and the database come first on a busy machine: the lowest priority (server/workers/lowPriority.ts),
// and inside the app process the computation also gives way while requests are being served (requestPressure.ts)
lowerThreadPriority(JOB_NICE);
const pressure = (workerData as TaskWorkerData | null)?.pressure ?? null;
if (pressure) setCooperationHook(pressureHook(pressure));

export interface TaskInput {
  kind: JobKind;
  documentJson: string;
  options: JobOptions;
  /** bytes of the original file per stored piece */
  chunkBytes?: number;
  port?: MessagePort;
}

export type TaskOutput =
  | { ok: true; summary: Record<string, unknown>; computeSeconds: number; packSeconds: number; files: PackedFile[] }
  | { ok: false; refusal: string };

export default function runTask(input: TaskInput): TaskOutput {
  // stored versions keep the format they were saved in; the pipeline reads the current one
  const m = migrateDesign(JSON.parse(input.documentJson));
  if (!m.ok) return { ok: false, refusal: `The stored design cannot be read: ${m.issues.map((i) => i.message).join('; ')}` };
  const design = m.doc as unknown as Design;
  let last = 0;
  try {
    const out = runPipeline(input.kind, design, input.options, {
      onProgress: (p) => {
        const now = Date.now();
        // at most ten messages a second: the database row is updated from them
        if (now - last < 100) return;
        last = now;
        input.port?.postMessage(p);
      },
    });
    input.port?.postMessage({ phase: 'pack', fraction: 0.96 });
    const t0 = performance.now();
    const files = out.files.map((f) => packFile(f.name, f.bytes, input.chunkBytes));
    const packSeconds = (performance.now() - t0) / 1000;
    input.port?.close();
    const result: TaskOutput = { ok: true, summary: out.summary, computeSeconds: out.computeSeconds, packSeconds, files };
    // the pieces are compressed (a few MB at most for the meshes a job may build): copied, not transferred
    return result;
  } catch (e) {
    input.port?.close();
    if (e instanceof JobRefusal) return { ok: false, refusal: e.message };
    throw e;
  } finally {
    releaseSpmvMemory();
  }
}
