/**
 * Long Coulomb solves in worker threads: a small piscina pool with progress and cancellation.
 * It lives on the server side (not in geometry/, which also runs in the browser): the numerical
 * core is plain synchronous functions, and this pool runs whole core calls in Node threads.
 *
 *   const pool = createCoulombPool({ maxThreads: 2 });
 *   const result = await pool.run({ kind: 'coulomb', design }, { onProgress, signal });
 *   await pool.destroy();
 *
 * Progress arrives through a MessageChannel whose far end travels with the task (transferred,
 * not copied). Cancellation: abort `signal`; piscina terminates the worker running the task and
 * the promise rejects with an error named "AbortError".
 *
 * The worker is TypeScript. When this file itself runs as TypeScript (under tsx or vitest) the
 * worker thread is started with `--import tsx` so it can load coulomb.worker.ts; a build that emits
 * JavaScript next to it loads coulomb.worker.js without it.
 */
import { MessageChannel } from 'node:worker_threads';
import Piscina from 'piscina';
import type { CoulombJob } from './coulomb.worker';
import type { CoreProgress as Progress } from '../../geometry/pipeline/index';
import { entryFile } from './entryFile';

export type { CoulombJob } from './coulomb.worker';

export interface CoulombPoolOptions {
  /** worker threads (default 1: each solve is single-threaded and memory-hungry) */
  maxThreads?: number;
  /** ms an idle worker stays alive (default 30 s) */
  idleTimeout?: number;
  /**
   * another worker module (absolute path, .ts or .js) whose default export takes a WorkerTask;
   * default: coulomb.worker.ts/.js beside this file. Tests use it to add synthetic jobs that must
   * not exist in the product.
   */
  workerFile?: string;
}

export interface RunOptions {
  onProgress?: (p: Progress) => void;
  signal?: AbortSignal;
}

export interface CoulombPool<J = CoulombJob> {
  run<T = unknown>(job: J, options?: RunOptions): Promise<T>;
  destroy(): Promise<void>;
  readonly threads: number;
}

function workerFile(custom?: string): { filename: string; execArgv: string[] } {
  if (custom) return { filename: custom, execArgv: custom.endsWith('.ts') ? ['--import', 'tsx'] : [] };
  return entryFile(import.meta.url, 'coulomb.worker');
}

export function createCoulombPool<J = CoulombJob>(options: CoulombPoolOptions = {}): CoulombPool<J> {
  const { filename, execArgv } = workerFile(options.workerFile);
  const pool = new Piscina({
    filename,
    execArgv,
    minThreads: 0,
    maxThreads: Math.max(1, options.maxThreads ?? 1),
    idleTimeout: options.idleTimeout ?? 30_000,
  });
  return {
    get threads() {
      return pool.threads.length;
    },
    async run<T>(job: J, runOptions: RunOptions = {}): Promise<T> {
      const { port1, port2 } = new MessageChannel();
      if (runOptions.onProgress) port1.on('message', (p: Progress) => runOptions.onProgress!(p));
      try {
        return (await pool.run({ job, port: port2 }, { transferList: [port2] as never, signal: runOptions.signal })) as T;
      } finally {
        // let the last progress messages drain before closing our end
        await new Promise((r) => setImmediate(r));
        port1.close();
      }
    },
    destroy: () => pool.destroy(),
  };
}
