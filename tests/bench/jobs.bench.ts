/**
 * Jobs load benchmark (prints figures, asserts nothing):
 *   1. 50 clients on the read API (GET jobs and revisions of a project) for 30 s while a mesh job
 *      runs in the same server: p50 / p95 / p99 latency and errors (target p95 < 100 ms, no errors);
 *   2. throughput of 1 against 2 job workers on the same queue of 8 mesh jobs.
 *
 * Database: DATABASE_URL when set (it is migrated; the rows it makes stay, under a project named
 * "Load bench"), otherwise a private cluster `.data/pg-jobs-bench` on a free port, as the load bench does:
 *   npm run bench -- jobs
 * Load comes from autocannon (npm); latencies are collected per response so the percentiles are
 * exact for the run. In part 1 the server (with its one job worker) runs in a child process of its own
 * (tests/bench/load-server.ts), so autocannon's client work does not share the event loop it measures;
 * a queue of mesh jobs of distinct designs keeps the worker busy for the whole 30 s.
 * TETRAWELL_BENCH_QUEUED sets how many mesh jobs are queued (default 40; 0 measures the same reads with no job running,
 * against lists that are then empty: not the figure, a reference).
 */
import { randomBytes } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import os from 'node:os';
import autocannon from 'autocannon';
import bcrypt from 'bcryptjs';
import { start } from '../../server/index';
import { createKnex } from '../../server/db/config';
import { migrateLatest } from '../../server/db/migrate';
import { silentLogger } from '../../server/config';
import { startJobWorker } from '../../server/jobs/worker';
import { startCluster, type Cluster } from '../../server/ops/postgres.mjs';
import { prepareDatabase } from '../../server/ops/setup.mjs';
import { freePort } from '../../server/ops/sys.mjs';
import { benchServerProcess, cpuMs, eventLoopDelay, loadAverage, transactions } from './server-process';

const PAIR = JSON.parse(readFileSync(fileURLToPath(new URL('../fixtures/designs/pair-coarse.json', import.meta.url)), 'utf8')) as { name: string };
const lots = { windowMs: 60_000, limit: 1_000_000 };

const PLAQUETTE = JSON.parse(readFileSync(fileURLToPath(new URL('../fixtures/designs/plaquette.json', import.meta.url)), 'utf8')) as { name: string };


/**
 * CPU time (ms) of each process of a local PostgreSQL cluster (the postmaster in `dataDir`/postmaster.pid and its
 * children: backends, background writers), by pid, from /proc/<pid>/stat fields 14 and 15 (proc(5)).
 */
function postgresCpu(dataDir: string): Map<number, number> {
  const postmaster = Number(readFileSync(`${dataDir}/postmaster.pid`, 'utf8').split('\n')[0]);
  const out = new Map<number, number>();
  for (const d of readdirSync('/proc')) {
    if (!/^[0-9]+$/.test(d)) continue;
    try {
      const stat = readFileSync(`/proc/${d}/stat`, 'utf8');
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      if (Number(d) === postmaster || Number(f[1]) === postmaster) out.set(Number(d), (Number(f[11]) + Number(f[12])) * 10);
    } catch {
      // the process ended meanwhile
    }
  }
  return out;
}

/**
 * CPU (ms) the cluster's processes used between two `postgresCpu` readings: a process started meanwhile (the pools
 * open connections as the load begins) counts whole; one that ended meanwhile is lost (/proc keeps nothing of it)
 */
function postgresCpuSpent(before: Map<number, number>, after: Map<number, number>): number {
  let ms = 0;
  for (const [pid, t] of after) ms += t - (before.get(pid) ?? 0);
  return ms;
}

function percentile(sorted: number[], p: number): number {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}

export async function run(): Promise<void> {
  // DATABASE_URL, or (unset) a private cluster .data/pg-jobs-bench on a free port with a fresh database, made
  // with the same server/ops helpers as the test cluster and stopped at the end
  let cluster: Cluster | null = null;
  let databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) {
    cluster = await startCluster({ name: 'pg-jobs-bench', port: await freePort(), disposable: true });
    databaseUrl = cluster.url('tetrawell_jobs_bench');
    await prepareDatabase({ databaseUrl, adminUrl: cluster.url('postgres'), recreate: true });
  }
  await migrateLatest(databaseUrl);
  const prefix = `bench-${randomBytes(3).toString('hex')}-`;
  // no per-project limit in the way of a queue of 8
  const jobSettings = { queuePrefix: prefix, maxActivePerProject: 100 };
  const knex = createKnex(databaseUrl, { poolMax: 2 });
  const email = `${prefix}user@example.invalid`;
  const password = 'bench-password-123';
  await knex('users').insert({ email, password_hash: bcrypt.hashSync(password, 4), display_name: 'Bench', email_verified_at: knex.fn.now() });
  // part 1 runs against a server process with one job worker; part 2 against a server in this process without one
  // TETRAWELL_BENCH_NODE_ARGS (e.g. `--cpu-prof --cpu-prof-dir=.data/prof`) goes to the server's node, as in the load bench
  const app = await benchServerProcess(databaseUrl, {
    nodeArgs: (process.env.TETRAWELL_BENCH_NODE_ARGS ?? '').split(' ').filter(Boolean),
    env: { TETRAWELL_BENCH_JOBS: JSON.stringify({ workers: 1, settings: jobSettings, pollIntervalMs: 100 }) },
  });
  let base = app.url;

  let cookie = '';
  let csrf = '';
  const call = async (method: string, path: string, body?: unknown) => {
    const r = await fetch(`${base}${path}`, {
      method,
      headers: { cookie, 'content-type': 'application/json', ...(csrf ? { 'x-csrf-token': csrf } : {}) },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const set = r.headers.getSetCookie().find((c) => c.startsWith('tetrawell.sid='));
    if (set) cookie = set.split(';')[0];
    // eslint-disable-next-line @typescript-eslint/no-explicit-any -- a bench script reads a few known fields
    return { status: r.status, body: (await r.json().catch(() => null)) as Record<string, any> };
  };
  const refreshCsrf = async () => {
    csrf = (await call('GET', '/api/auth/csrf')).body.csrfToken as string;
  };
  const signIn = async () => {
    cookie = '';
    csrf = '';
    await refreshCsrf();
    await call('POST', '/api/auth/sign-in', { email, password });
    await refreshCsrf();
  };
  await signIn();
  const projectId = (await call('POST', '/api/projects', { name: 'Load bench' })).body.id as number;
  const newDesign = async (name: string, doc: { name: string } = PAIR) => (await call('POST', `/api/projects/${projectId}/designs`, { name, document: { ...doc, name } })).body.design.id as number;
  const waitAll = async (ids: number[]) => {
    for (;;) {
      const { jobs } = (await call('GET', `/api/projects/${projectId}/jobs`)).body as { jobs: { id: number; state: string }[] };
      const mine = jobs.filter((j) => ids.includes(j.id));
      if (mine.every((j) => j.state !== 'queued' && j.state !== 'running')) return mine;
      await new Promise((r) => setTimeout(r, 200));
    }
  };

  // 1. read load while mesh jobs run: a queue of distinct designs (no reuse), so one is running all the time
  const QUEUED = Number(process.env.TETRAWELL_BENCH_QUEUED ?? 40);
  const busy: number[] = [];
  for (let k = 0; k < QUEUED; k++) {
    const d = await newDesign(`Load bench plaquette ${k}`, PLAQUETTE);
    busy.push((await call('POST', `/api/projects/${projectId}/designs/${d}/jobs`, { kind: 'mesh', options: { order: 2 } })).body.job.id as number);
  }
  for (;;) {
    const { jobs } = (await call('GET', `/api/projects/${projectId}/jobs`)).body as { jobs: { id: number; state: string }[] };
    if (QUEUED === 0 || jobs.some((j) => busy.includes(j.id) && j.state !== 'queued')) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  const times: number[] = [];
  const opts: autocannon.Options = {
    url: base,
    connections: 50,
    duration: 30,
    headers: { cookie },
    requests: [{ path: `/api/projects/${projectId}/jobs` }, { path: `/api/projects/${projectId}/revisions` }],
  };
  const tx0 = await transactions(knex);
  const serverCpu0 = cpuMs(app.child.pid!);
  const mainCpu0 = cpuMs(app.child.pid!, 'main');
  // PostgreSQL's own CPU, when the cluster is the private one on this machine
  const pgCpu0 = cluster ? postgresCpu(cluster.dataDir) : null;
  await eventLoopDelay(app.child);
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const inst = autocannon(opts, (err, res) => (err ? reject(err) : resolve(res)));
    inst.on('response', (_client: unknown, _status: number, _bytes: number, responseTime: number) => times.push(responseTime));
  });
  const serverCpu = (cpuMs(app.child.pid!) - serverCpu0) / 1000;
  const mainCpu = (cpuMs(app.child.pid!, 'main') - mainCpu0) / 1000;
  const pgCpu = pgCpu0 && cluster ? postgresCpuSpent(pgCpu0, postgresCpu(cluster.dataDir)) / 1000 : null;
  const eld = await eventLoopDelay(app.child);
  // the mesh jobs' own statements (progress rows, revisions) and pg-boss's polling count too
  const tx = (await transactions(knex)) - tx0 - 1;
  times.sort((a, b) => a - b);
  const after = ((await call('GET', `/api/projects/${projectId}/jobs`)).body as { jobs: { id: number; state: string }[] }).jobs.filter((j) => busy.includes(j.id));
  const finished = after.filter((j) => j.state === 'succeeded').length;
  const stillBusy = after.filter((j) => j.state === 'queued' || j.state === 'running').length;
  console.log(
    `read API, 50 clients, 30 s, mesh jobs running throughout (${finished} of ${QUEUED} finished meanwhile, ${stillBusy} still queued or running after): ${result.requests.total} requests, ` +
      `p50 ${percentile(times, 50).toFixed(1)} ms, p95 ${percentile(times, 95).toFixed(1)} ms, p99 ${percentile(times, 99).toFixed(1)} ms, ` +
      `errors ${result.errors}, timeouts ${result.timeouts}, non-2xx ${result.non2xx} (target p95 < 100 ms, no errors); ` +
      `${(result.throughput.total / Math.max(1, result.requests.total) / 1024).toFixed(1)} KB per answer`,
  );
  const perRequest = (seconds: number) => ((seconds * 1e6) / Math.max(1, result.requests.total)).toFixed(0);
  console.log(
    `  server process CPU ${serverCpu.toFixed(1)} s (all its threads, the mesh jobs' included) = ${perRequest(serverCpu)} µs per request; ` +
      `main thread ${mainCpu.toFixed(1)} s = ${perRequest(mainCpu)} µs per request; event-loop delay p50 ${eld.p50.toFixed(1)} ms, ` +
      `p99 ${eld.p99.toFixed(1)} ms, max ${eld.max.toFixed(1)} ms; ${(tx / Math.max(1, result.requests.total)).toFixed(2)} database ` +
      `transactions per request (the jobs' included); load average ${loadAverage()}`,
  );
  if (pgCpu !== null) {
    console.log(
      `  PostgreSQL CPU ${pgCpu.toFixed(1)} s = ${perRequest(pgCpu)} µs per request (its processes alive at the end of the run, the jobs' ` +
        `statements and pg-boss's polling included; 10 ms clock ticks)`,
    );
  }
  for (const id of busy) await call('POST', `/api/projects/${projectId}/jobs/${id}/cancel`);
  await waitAll(busy);
  app.child.kill('SIGTERM');
  await new Promise((r) => app.child.once('exit', r));
  // TETRAWELL_BENCH_JOBS_PARTS=reads runs part 1 only
  if (!(process.env.TETRAWELL_BENCH_JOBS_PARTS ?? 'reads,workers').split(',').includes('workers')) {
    await knex.destroy();
    await cluster?.stop();
    return;
  }

  const server = await start({
    port: 0,
    databaseUrl,
    staticDir: null,
    logger: silentLogger,
    bcryptRounds: 4,
    rateLimits: { signIn: lots, signUp: lots, passwordReset: lots, verifyEmail: lots, resetConfirm: lots, passwordChange: lots },
    jobs: { workers: 0, settings: jobSettings },
  });
  base = server.url;
  await signIn();

  // 2. 1 against 2 workers on a queue of 8 mesh jobs (the app in this process runs none of its own)
  for (const n of [1, 2]) {
    const ids: number[] = [];
    for (let k = 0; k < 8; k++) {
      const d = await newDesign(`Load bench ${n}w ${k}`);
      ids.push((await call('POST', `/api/projects/${projectId}/designs/${d}/jobs`, { kind: 'mesh', options: { order: 1 } })).body.job.id as number);
    }
    const t0 = performance.now();
    const cpu0 = process.cpuUsage();
    const ws = await Promise.all(Array.from({ length: n }, () => startJobWorker({ databaseUrl, concurrency: 1, settings: jobSettings, logger: silentLogger, pollIntervalMs: 100 })));
    const done = await waitAll(ids);
    const seconds = (performance.now() - t0) / 1000;
    const cpu = process.cpuUsage(cpu0);
    const cpuSeconds = (cpu.user + cpu.system) / 1e6;
    console.log(
      `${n} worker(s), 8 queued mesh jobs: ${seconds.toFixed(1)} s (${((8 / seconds) * 60).toFixed(1)} jobs/min), ${done.filter((j) => j.state === 'succeeded').length} succeeded; ` +
        `CPU ${(cpuSeconds / 8).toFixed(2)} s per job, ${(cpuSeconds / seconds).toFixed(2)} cores busy on average (load average ${os.loadavg()[0]!.toFixed(2)})`,
    );
    for (const w of ws) await w.stop();
  }
  console.log(
    `  Reading the 1-against-2 figure: each mesh job is one worker thread on one core, and this machine has ${os.availableParallelism()} ` +
      `core(s). A second worker can at most double the jobs per minute when a second core is free; on 2 cores it shares them with ` +
      `the server's request thread, PostgreSQL and this bench (and with anyone else's load), so it gains little, and loses when ` +
      `the cores are taken (then "cores busy" stays near the 1-worker figure while CPU per job grows: cache and memory-bandwidth ` +
      `contention). Compare CPU per job: about equal means no avoidable contention in our code; the wall time is the machine's.`,
  );
  await server.stop();
  await knex.destroy();
  await cluster?.stop();
}
