/**
 * The server process of the load benchmarks (tests/bench/load.bench.ts, jobs.bench.ts): the real `start()` on 127.0.0.1, port 0,
 * against TETRAWELL_BENCH_DATABASE_URL, printing `LISTENING <url>` once it listens and stopping on SIGTERM.
 * A process of its own so the benchmark's client work (building and sending 17 MB bodies, reading answers)
 * does not share the event loop it measures.
 */
import { monitorEventLoopDelay, performance, PerformanceObserver, constants as perf } from 'node:perf_hooks';
import { writeFileSync } from 'node:fs';
import { start } from '../../server/index';
import { silentLogger } from '../../server/config';

const databaseUrl = process.env.TETRAWELL_BENCH_DATABASE_URL;
if (!databaseUrl) throw new Error('TETRAWELL_BENCH_DATABASE_URL is not set');
const relaxed = { windowMs: 60_000, limit: 1_000_000 };
const server = await start({
  port: 0,
  host: '127.0.0.1',
  databaseUrl,
  sessionSecret: 'bench-'.padEnd(40, 'x'),
  staticDir: null,
  logger: { ...silentLogger, error: (...a: unknown[]) => console.error('[server]', ...a) },
  // explicit, so a server from before issue 8 (5 MB default) takes the same large designs
  bodyLimit: '40mb',
  rateLimits: { signIn: relaxed, signInAddress: relaxed, signUp: relaxed, passwordReset: relaxed, verifyEmail: relaxed, resetConfirm: relaxed, passwordChange: relaxed },
  // the jobs bench runs the app's own job worker here: TETRAWELL_BENCH_JOBS is the `jobs` option as JSON
  ...(process.env.TETRAWELL_BENCH_JOBS ? { jobs: JSON.parse(process.env.TETRAWELL_BENCH_JOBS) as object } : {}),
});
console.log(`LISTENING ${server.url}`);
// `eld` on stdin: print the main thread's event-loop delay (ms) since the last `eld`, then start afresh
const delay = monitorEventLoopDelay({ resolution: 5 });
delay.enable();
// the main thread's garbage-collection pauses since the last `eld`: the longest minor (scavenge) and major
// (mark-compact) pause and their total (node:perf_hooks 'gc' entries, detail.kind)
let gc = { minorMax: 0, majorMax: 0, totalMs: 0, count: 0 };
new PerformanceObserver((list) => {
  for (const e of list.getEntries()) {
    const kind = (e as unknown as { detail?: { kind?: number } }).detail?.kind;
    if (kind === perf.NODE_PERFORMANCE_GC_MAJOR) gc.majorMax = Math.max(gc.majorMax, e.duration);
    else if (kind === perf.NODE_PERFORMANCE_GC_MINOR) gc.minorMax = Math.max(gc.minorMax, e.duration);
    gc.totalMs += e.duration;
    gc.count++;
  }
}).observe({ entryTypes: ['gc'] });
// timestamped (epoch ms) stalls of this event loop over 15 ms and GC pauses over 5 ms, so the bench can line them
// up with its slowest health polls (at most SPIKES_KEPT of each since the last `eld`)
const SPIKES_KEPT = 500;
let stalls: { at: number; ms: number }[] = [];
let pauses: { at: number; ms: number; kind: string }[] = [];
const epoch = (t: number) => performance.timeOrigin + t;
let tick = performance.now();
setInterval(() => {
  const now = performance.now();
  const late = now - tick - 5;
  if (late > 15 && stalls.length < SPIKES_KEPT) stalls.push({ at: epoch(tick), ms: late });
  tick = now;
}, 5).unref();
new PerformanceObserver((list) => {
  for (const e of list.getEntries()) {
    if (e.duration <= 5 || pauses.length >= SPIKES_KEPT) continue;
    const kind = (e as unknown as { detail?: { kind?: number } }).detail?.kind;
    pauses.push({ at: epoch(e.startTime), ms: e.duration, kind: kind === perf.NODE_PERFORMANCE_GC_MINOR ? 'minor' : kind === perf.NODE_PERFORMANCE_GC_MAJOR ? 'major' : 'other' });
  }
}).observe({ entryTypes: ['gc'] });
process.stdin.setEncoding('utf8');
process.stdin.on('data', (line: string) => {
  if (!line.includes('eld')) return;
  const ms = (ns: number) => ns / 1e6;
  console.log(`ELD ${JSON.stringify({ p50: ms(delay.percentile(50)), p99: ms(delay.percentile(99)), max: ms(delay.max), gc, stalls, pauses })}`);
  delay.reset();
  stalls = [];
  pauses = [];
  gc = { minorMax: 0, majorMax: 0, totalMs: 0, count: 0 };
});
// TETRAWELL_BENCH_HEAP_SAMPLE=<file>: sample the main thread's allocations (every 32 KiB, those already collected
// included) from here to the end and write them there as a .heapprofile (Chrome DevTools' format);
// TETRAWELL_BENCH_HEAP_SAMPLE_YOUNG=off leaves out what died young: what is left survived a scavenge
const heapSample = process.env.TETRAWELL_BENCH_HEAP_SAMPLE;
const inspector = heapSample ? new (await import('node:inspector')).Session() : null;
if (inspector) {
  inspector.connect();
  inspector.post('HeapProfiler.startSampling', { samplingInterval: 32_768, includeObjectsCollectedByMajorGC: true, includeObjectsCollectedByMinorGC: process.env.TETRAWELL_BENCH_HEAP_SAMPLE_YOUNG !== 'off' } as object);
}
// the bench went away without a SIGTERM (this process runs in a session of its own, server-process.ts)
process.stdin.on('end', () => process.kill(process.pid, 'SIGTERM'));
process.on('SIGTERM', () => {
  const stopped = inspector
    ? new Promise<void>((resolve) =>
        inspector.post('HeapProfiler.stopSampling', (err, r) => {
          if (!err) writeFileSync(heapSample!, JSON.stringify(r.profile));
          resolve();
        }),
      )
    : Promise.resolve();
  void stopped.then(() => server.stop()).then(() => process.exit(0));
});
