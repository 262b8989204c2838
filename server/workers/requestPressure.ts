/**
 * Request pressure: the request thread tells the job threads of the same process when requests are being served,
 * and a job thread then computes in short slices with pauses between them (geometry/cooperate.ts is where the
 * numerical core offers to give way).
 *
 * Why not scheduling priority alone: the job threads already run at nice 19 (lowPriority.ts). Measured with
 * `npm run bench -- jobs` on 2 cores, a busy thread on the other core still raised the request thread's CPU time per
 * request from about 800 µs to 1,000–1,300 µs, even under SCHED_IDLE: cores slow each other down (shared caches and
 * memory bandwidth, or sibling hardware threads of the host), and no priority changes that. Not running at the same
 * time does. The same bench with a memory-bound loop stopped and started 10 ms on / 30 ms off had p95 90 ms against
 * 160 ms when it ran throughout.
 *
 *   request thread ── begin() … end() ──► shared slots [requests in flight, last activity]
 *                                                         │
 *   job thread ── cooperate() ── worked ≥ SLICE_MS and busy? ── Atomics.wait(pause = PAUSE_RATIO × worked, ≤ MAX_PAUSE_MS)
 *
 * While requests flow a job runs about 1 / (1 + PAUSE_RATIO) of the time, a fifth (it never stops); on a quiet
 * server it runs at full speed. A standalone worker (`npm run worker`, the documented way to scale out) has no request thread and never
 * pauses. Server-sent event streams are left out: they stay open for minutes and are not work.
 */
import type { RequestHandler } from 'express';

/** Work a job thread does between two looks at the pressure (ms; common practice: a few scheduler slices). */
export const SLICE_MS = 10;
/**
 * Pause = this × the time worked since the last pause: a job keeps 1 / (1 + PAUSE_RATIO) of the cores' time under load.
 * 4 measured (jobs bench, quiet host): p95 71–79 ms with 7–8 of 40 mesh jobs done in 30 s; 3 gave 87–106 ms.
 */
export const PAUSE_RATIO = 4;
/** Longest single pause (ms): a job whose core gives way rarely does not sleep for seconds after a long stretch. */
export const MAX_PAUSE_MS = 200;
/** The server counts as busy this long after its last request began or ended (ms): requests come in bursts. */
export const QUIET_MS = 20;

// Int32 slots: 0 requests in flight, 1 the slot job threads sleep on (never notified: a timed wait), 2 pauses taken
// by job threads so far, 3 unused. Float64 slot (byte offset 16): Date.now() of the last request start or end.
const IN_FLIGHT = 0;
const SLEEP = 1;
const PAUSES = 2;
const INT_SLOTS = 4;
const LAST_MS_OFFSET = 16;
const BYTES = 24;

export interface RequestPressure {
  /** shared with the job threads (piscina workerData) */
  readonly buffer: SharedArrayBuffer;
  begin(): void;
  end(): void;
}

export function createRequestPressure(): RequestPressure {
  const buffer = new SharedArrayBuffer(BYTES);
  const count = new Int32Array(buffer, 0, INT_SLOTS);
  const last = new Float64Array(buffer, LAST_MS_OFFSET, 1);
  return {
    buffer,
    begin() {
      Atomics.add(count, IN_FLIGHT, 1);
      last[0] = Date.now();
    },
    end() {
      Atomics.sub(count, IN_FLIGHT, 1);
      last[0] = Date.now();
    },
  };
}

/** Counts every request from its start to its end (close), except server-sent event streams. */
export function pressureMiddleware(pressure: RequestPressure): RequestHandler {
  return (req, res, next) => {
    if (req.path.endsWith('/events')) return next();
    pressure.begin();
    res.once('close', () => pressure.end());
    next();
  };
}

/** Pauses the job threads sharing this gauge have taken so far (for tests and benchmarks). */
export function pausesTaken(buffer: SharedArrayBuffer): number {
  return Atomics.load(new Int32Array(buffer, 0, INT_SLOTS), PAUSES);
}

/** Is the request thread serving (or did it just serve) requests? Readable from any thread. */
export function isBusy(buffer: SharedArrayBuffer, now = Date.now()): boolean {
  const count = new Int32Array(buffer, 0, INT_SLOTS);
  const last = new Float64Array(buffer, LAST_MS_OFFSET, 1);
  return Atomics.load(count, IN_FLIGHT) > 0 || now - last[0] < QUIET_MS;
}

/**
 * The hook a job thread installs (setCooperationHook): after SLICE_MS of work, while the request thread is busy,
 * sleep PAUSE_RATIO × the time worked (at most MAX_PAUSE_MS). `sleep` is for tests; threads use Atomics.wait.
 */
export function pressureHook(buffer: SharedArrayBuffer, sleep?: (ms: number) => void): () => void {
  const slots = new Int32Array(buffer, 0, INT_SLOTS);
  const wait = sleep ?? ((ms: number) => void Atomics.wait(slots, SLEEP, 0, ms));
  let resumed = performance.now();
  return () => {
    const t = performance.now();
    const worked = t - resumed;
    if (worked < SLICE_MS) return;
    if (isBusy(buffer)) {
      Atomics.add(slots, PAUSES, 1);
      wait(Math.min(MAX_PAUSE_MS, PAUSE_RATIO * worked));
    }
    resumed = performance.now();
  };
}
