/**
 * Turn-taking points of long computations.
 *
 * The numerical core calls `cooperate()` between small slices of its long loops (every few
 * thousand elements, every solver iteration through `throwIfAborted`). Where nobody installed a
 * hook it is one null check and does nothing. A host that runs the core beside latency-sensitive
 * work installs a hook that may pause the calling thread for a moment: the server's job threads
 * do, so that a mesh or a solve leaves the cores to the request thread while requests are being
 * served (server/workers/requestPressure.ts). The hook never changes a result: the same input gives
 * the same output, only later.
 *
 *   core loop ──► cooperate() ──► hook? ──► (host decides: return at once, or wait a few ms)
 *
 * One hook per thread (module state is per thread in Node workers and in the browser's workers).
 */
let hook: (() => void) | null = null;

/** Install (or with null remove) this thread's hook. */
export function setCooperationHook(fn: (() => void) | null): void {
  hook = fn;
}

/** A point where the computation may give way; cheap when no hook is installed. */
export function cooperate(): void {
  if (hook !== null) hook();
}

/** How many loop iterations pass between turn-taking points in the core's element loops (a power of two, minus one, as a mask). */
export const COOPERATE_MASK = 4095;
