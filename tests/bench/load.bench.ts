/**
 * Load benchmark (issue 8): `npm run bench -- load`. Prints figures, asserts nothing.
 *
 * 1. A signed-in read, GET /api/projects (5 projects), from 20 concurrent clients for 10 s with autocannon:
 *    requests per second and latency p50 / p99. Target: p99 under 100 ms on the 2-core machine.
 * 2. GET /api/health latency, polled every 20 ms from a separate process, while rounds of 4 concurrent
 *    100,000-site design PUTs (~17 MB each) run. Target: health under 100 ms throughout.
 *
 * Database: TETRAWELL_BENCH_DATABASE_URL when set (a throwaway database: rows are added), otherwise a private
 * cluster `.data/pg-bench` on a free port, made and started with the same server/ops helpers as the test cluster,
 * with a fresh database, stopped at the end. The server runs in a child process (tests/bench/load-server.ts).
 * All traffic goes to 127.0.0.1; every loop is bounded (a fixed duration or a fixed number of rounds).
 * TETRAWELL_BENCH_LOAD_PARTS=reads (or health) runs one part only. TETRAWELL_BENCH_HEALTH_POLLS=off runs the PUTs
 * without polling health, for the PUTs' own main-thread CPU (the polls are requests too, ~2 ms each when loaded).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { getPriority, setPriority } from 'node:os';
import autocannon from 'autocannon';
import bcrypt from 'bcryptjs';
import { startCluster, type Cluster } from '../../server/ops/postgres.mjs';
import { prepareDatabase } from '../../server/ops/setup.mjs';
import { freePort } from '../../server/ops/sys.mjs';
import { benchServerProcess, cpuMs, eventLoopDelay, loadAverage, transactions, type ServerDelays } from './server-process';
import { createKnex } from '../../server/db/config';
import { MAX_SITES } from '../../server/contracts/design';

const READ_SECONDS = 10;
const CONNECTIONS = 20;
/** TETRAWELL_BENCH_PUT_ROUNDS overrides (e.g. 1 for a quick profile) */
const PUT_ROUNDS = Number(process.env.TETRAWELL_BENCH_PUT_ROUNDS ?? 2);
const PUTS_PER_ROUND = 4;
/** silicon lattice constant, nm (CODATA 2018) */
const A = 0.5431020511;

async function database(): Promise<{ url: string; cluster: Cluster | null }> {
  if (process.env.TETRAWELL_BENCH_DATABASE_URL) return { url: process.env.TETRAWELL_BENCH_DATABASE_URL, cluster: null };
  const cluster = await startCluster({ name: 'pg-bench', port: await freePort(), disposable: true });
  const url = cluster.url('tetrawell_bench');
  await prepareDatabase({ databaseUrl: url, adminUrl: cluster.url('postgres'), recreate: true });
  return { url, cluster };
}

function startServer(databaseUrl: string): Promise<{ child: ChildProcess; url: string }> {
  // TETRAWELL_BENCH_NODE_ARGS, e.g. `--cpu-prof --cpu-prof-dir=.data/prof`, goes to the server's node
  return benchServerProcess(databaseUrl, { nodeArgs: (process.env.TETRAWELL_BENCH_NODE_ARGS ?? '').split(' ').filter(Boolean) });
}

/** One browser-like session: the cookie jar is a single cookie, the CSRF token is refetched after sign-in. */
class Session {
  cookie = '';
  csrf = '';
  constructor(readonly url: string) {}
  private keep(r: Response) {
    const c = r.headers.getSetCookie().find((s) => s.startsWith('tetrawell.sid='));
    if (c) this.cookie = c.split(';')[0];
  }
  async refreshCsrf() {
    const r = await fetch(`${this.url}/api/auth/csrf`, { headers: { cookie: this.cookie } });
    this.keep(r);
    this.csrf = ((await r.json()) as { csrfToken: string }).csrfToken;
  }
  async send(method: string, p: string, body?: string): Promise<Response> {
    const r = await fetch(`${this.url}${p}`, {
      method,
      headers: { cookie: this.cookie, 'x-csrf-token': this.csrf, 'content-type': 'application/json' },
      body,
    });
    this.keep(r);
    return r;
  }
}

function bigDesignBody(name: string, version: number): string {
  const sites: unknown[] = [];
  for (let i = 0; i < MAX_SITES; i++) {
    sites.push({
      id: `site-${i}`,
      species: 'P',
      position: [((i % 100) - 50) * A, ((Math.floor(i / 100) % 100) - 50) * A, Math.floor(i / 10_000) * A],
      electrons: 1,
      orbital: { model: 'hydrogenic-1s', radiusNm: 2.5 },
      cluster: `c${Math.floor(i / 2)}`, // two-donor array sites
    });
  }
  const design = {
    format: 'tetrawell-design',
    version: 2,
    name,
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: A },
    sites,
    domain: { center: [0, 0, 0], halfExtentsNm: [60, 60, 60], boundary: { kind: 'multipole', order: 2 } },
    refinement: { order: 2, targetRelError: 0.01, maxElements: 500_000 },
  };
  return JSON.stringify({ document: design, version });
}

/** one health poll as the poller saw it: start (epoch ms), total ms, and the server's Server-Timing figures (ms) */
interface Poll {
  at: number;
  total: number;
  /** the probe's `select 1` (Server-Timing `db`) */
  db: number;
  /** arrival at the app to the answer (Server-Timing `app`) */
  app: number;
}
interface Stall {
  at: number;
  ms: number;
}
interface PollerResult {
  polls: Poll[];
  /** the poller's own event-loop delay (ms) and its stalls over 15 ms: a late poller makes a poll look slow */
  delay: { p50: number; p99: number; max: number };
  stalls: Stall[];
}

/**
 * Polls /api/health every 20 ms from its own process, in a session of its own (so this process's work on the PUT
 * clients' 17 MB bodies does not delay the polls) until stop() or `maxMs`, whichever comes first. Besides each poll's total time it keeps the
 * server's Server-Timing figures and its own event-loop delay, so a slow poll can be placed: inside the server's code,
 * at the database, or outside both (the server's event loop not yet running the request, the poller late, the cores busy).
 */
function healthPoller(url: string, maxMs: number): { pid: number; stop(): Promise<PollerResult> } {
  const script = `
    const { monitorEventLoopDelay } = require('node:perf_hooks');
    const polls = []; const stalls = []; const end = Date.now() + ${maxMs}; let stop = false;
    const delay = monitorEventLoopDelay({ resolution: 5 }); delay.enable();
    let tick = performance.now();
    setInterval(() => { const now = performance.now(); const late = now - tick - 5; if (late > 15 && stalls.length < 500) stalls.push({ at: performance.timeOrigin + tick, ms: late }); tick = now; }, 5).unref();
    const figure = (h, name) => { const m = new RegExp('(?:^|, *)' + name + ';dur=([0-9.]+)').exec(h ?? ''); return m ? Number(m[1]) : NaN; };
    process.stdin.on('data', () => { stop = true; }); process.stdin.on('end', () => { stop = true; }); process.stdin.resume();
    (async () => {
      while (!stop && Date.now() < end) {
        const t = performance.now();
        const r = await fetch(${JSON.stringify(url)} + '/api/health');
        await r.arrayBuffer();
        const h = r.headers.get('server-timing');
        polls.push({ at: performance.timeOrigin + t, total: performance.now() - t, db: figure(h, 'db'), app: figure(h, 'app') });
        await new Promise((res) => setTimeout(res, 20));
      }
      const ms = (ns) => ns / 1e6;
      process.stdout.write(JSON.stringify({ polls, delay: { p50: ms(delay.percentile(50)), p99: ms(delay.percentile(99)), max: ms(delay.max) }, stalls }));
      process.exit(0);
    })();`;
  // a session of its own (setsid): it stands in for a load balancer on another machine, so with Linux's autogrouping
  // it is not one more thread in the bench's scheduling group (sched(7), "The autogroup feature")
  const child = spawn(process.execPath, ['-e', script], { stdio: ['pipe', 'pipe', 'inherit'], detached: true });
  let out = '';
  child.stdout.on('data', (d: Buffer) => (out += d.toString()));
  const empty: PollerResult = { polls: [], delay: { p50: NaN, p99: NaN, max: NaN }, stalls: [] };
  const done = new Promise<PollerResult>((resolve) => child.once('exit', () => resolve(out ? (JSON.parse(out) as PollerResult) : empty)));
  return {
    pid: child.pid!,
    stop() {
      child.stdin.end('stop\n');
      return done;
    },
  };
}

const overlaps = (p: Poll, s: Stall) => s.at < p.at + p.total && s.at + s.ms > p.at;

/**
 * Where the slow polls (over `slowMs`) lost their time: the server's code (`app`, of which `db` at the database), a
 * stall of the server's event loop or of the poller's during the poll, a GC pause of the server's main thread, or none
 * of these (the request waited outside both event loops: the kernel, the cores busy with other threads or processes).
 */
function placeSlowPolls(polls: Poll[], poller: PollerResult, server: ServerDelays, slowMs: number): void {
  const slow = polls.filter((p) => p.total > slowMs).sort((a, b) => b.total - a.total);
  const serverStalls = server.stalls ?? [];
  const gcPauses = server.pauses ?? [];
  let inApp = 0;
  let serverStalled = 0;
  let pollerStalled = 0;
  let neither = 0;
  for (const p of slow) {
    const s = serverStalls.some((x) => overlaps(p, x));
    const q = poller.stalls.some((x) => overlaps(p, x));
    if (p.app > slowMs / 2) inApp++;
    if (s) serverStalled++;
    if (q) pollerStalled++;
    if (!s && !q && !(p.app > slowMs / 2)) neither++;
  }
  console.log(
    `  polls over ${slowMs} ms: ${slow.length}; with half of it or more inside the server's code ${inApp}, during a server event-loop stall ${serverStalled}, ` +
      `during a poller stall ${pollerStalled}, none of these ${neither} (poller event-loop delay max ${poller.delay.max.toFixed(1)} ms; ` +
      `server stalls over 15 ms ${serverStalls.length}, GC pauses over 5 ms ${gcPauses.length})`,
  );
  for (const p of slow.slice(0, 5)) {
    const s = serverStalls.filter((x) => overlaps(p, x)).map((x) => x.ms.toFixed(0));
    const q = poller.stalls.filter((x) => overlaps(p, x)).map((x) => x.ms.toFixed(0));
    const g = gcPauses.filter((x) => overlaps(p, x)).map((x) => `${x.kind} ${x.ms.toFixed(0)}`);
    console.log(
      `    ${p.total.toFixed(1)} ms: app ${p.app.toFixed(1)} (db ${p.db.toFixed(1)}), outside the app ${(p.total - p.app).toFixed(1)}; ` +
        `server stalls [${s.join(', ')}] ms, GC [${g.join(', ')}] ms, poller stalls [${q.join(', ')}] ms`,
    );
  }
}

/**
 * The main thread's user and system CPU time (ms) so far: fields 14 and 15 of /proc/<pid>/task/<pid>/stat (proc(5)),
 * in clock ticks of 1/100 s. System time is the kernel's share: socket reads and writes, page faults.
 */
function mainThreadCpu(pid: number): { user: number; system: number } {
  const stat = readFileSync(`/proc/${pid}/task/${pid}/stat`, 'utf8');
  const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return { user: Number(f[11]) * 10, system: Number(f[12]) * 10 };
}

/**
 * CPU time (user + system, ms) of each of the server's other threads so far, by thread id, with its nice value
 * (fields 14, 15 and 19 of /proc/<pid>/task/<tid>/stat, proc(5)). Those at the server's own priority are V8's
 * platform threads (garbage collection for the server's own heap; large bodies go to the design-body process, which
 * has threads of its own), libuv's pool and Node's own helpers; lowered ones are worker threads (figures, jobs).
 */
function otherThreadsCpu(pid: number): Map<number, { cpu: number; nice: number }> {
  const out = new Map<number, { cpu: number; nice: number }>();
  for (const tid of readdirSync(`/proc/${pid}/task`).map(Number)) {
    if (tid === pid) continue;
    try {
      const stat = readFileSync(`/proc/${pid}/task/${tid}/stat`, 'utf8');
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      out.set(tid, { cpu: (Number(f[11]) + Number(f[12])) * 10, nice: Number(f[16]) });
    } catch {
      // the thread ended meanwhile
    }
  }
  return out;
}

/**
 * The design-body process of the server `pid` (server/http/designBody.child.ts; started at the first large body):
 * its CPU time (user + system of all its threads, ms; fields 14 and 15 of /proc/<pid>/stat, proc(5)) and each
 * live thread's nice value. Zero and none before it starts.
 */
function bodyProcessCpu(pid: number): { pid: number | null; cpu: number; nices: number[] } {
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      if (Number(f[1]) !== pid || f[0] === 'Z') continue;
      if (!readFileSync(`/proc/${name}/cmdline`, 'utf8').includes('designBody.child')) continue;
      const nices = [...otherThreadsCpu(Number(name)).values()].map((t) => t.nice);
      const own = readFileSync(`/proc/${name}/task/${name}/stat`, 'utf8');
      nices.unshift(Number(own.slice(own.lastIndexOf(')') + 2).split(' ')[16]));
      return { pid: Number(name), cpu: (Number(f[11]) + Number(f[12])) * 10, nices };
    } catch {
      // a process that ended while being read
    }
  }
  return { pid: null, cpu: 0, nices: [] };
}

/** CPU (ms) the other threads used between two readings, split into those at nice 0 and those lowered (nice > 0) */
function threadSplit(before: Map<number, { cpu: number; nice: number }>, after: Map<number, { cpu: number; nice: number }>): { normal: number; lowered: number } {
  let normal = 0;
  let lowered = 0;
  for (const [tid, a] of after) {
    const d = a.cpu - (before.get(tid)?.cpu ?? 0);
    if (a.nice > 0) lowered += d;
    else normal += d;
  }
  return { normal, lowered };
}

function pct(xs: number[], p: number): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))] : NaN;
}

export async function run(): Promise<void> {
  const { url: databaseUrl, cluster } = await database();
  const { child, url } = await startServer(databaseUrl);
  const knex = createKnex(databaseUrl, { poolMax: 2 });
  try {
    const email = `bench-${Date.now()}@lab.test`;
    const password = 'bench-passphrase-1';
    // default bcrypt cost (12), as in production: paid once, at sign-in
    await knex('users').insert({ email, password_hash: await bcrypt.hash(password, 12), display_name: 'Bench', site_role: 'member', email_verified_at: new Date() });
    const s = new Session(url);
    await s.refreshCsrf();
    const signIn = await s.send('POST', '/api/auth/sign-in', JSON.stringify({ email, password }));
    if (signIn.status !== 200) throw new Error(`sign-in: ${signIn.status}`);
    await s.refreshCsrf();
    const projectIds: number[] = [];
    for (let i = 0; i < 5; i++) projectIds.push(((await (await s.send('POST', '/api/projects', JSON.stringify({ name: `Bench project ${i}` }))).json()) as { id: number }).id);

    const parts = (process.env.TETRAWELL_BENCH_LOAD_PARTS ?? 'reads,health').split(',');
    // 1. signed-in reads
    if (parts.includes('reads')) {
    const warm = await autocannon({ url: `${url}/api/projects`, connections: CONNECTIONS, duration: 2, headers: { cookie: s.cookie } });
    void warm;
    const tx0 = await transactions(knex);
    const cpu0 = cpuMs(child.pid!);
    await eventLoopDelay(child);
    const r = await autocannon({ url: `${url}/api/projects`, connections: CONNECTIONS, duration: READ_SECONDS, headers: { cookie: s.cookie } });
    const cpu = cpuMs(child.pid!) - cpu0;
    const eld = await eventLoopDelay(child);
    // the bench's own statement and pg-boss's background work count too: a few dozen against thousands of requests
    const tx = (await transactions(knex)) - tx0 - 1;
    console.log(`GET /api/projects, signed in, ${CONNECTIONS} connections, ${READ_SECONDS} s (load average ${loadAverage()}):`);
    console.log(
      `  ${r.requests.average.toFixed(0)} req/s   latency p50 ${r.latency.p50} ms   p99 ${r.latency.p99} ms   max ${r.latency.max} ms   ` +
        `(${r.requests.total} requests, ${r.non2xx} non-2xx, ${r.errors} errors)`,
    );
    console.log(
      `  server CPU ${(cpu / 1000).toFixed(2)} s = ${((cpu / Math.max(1, r.requests.total)) * 1000).toFixed(0)} µs per request; ` +
        `event-loop delay p50 ${eld.p50.toFixed(1)} ms, p99 ${eld.p99.toFixed(1)} ms, max ${eld.max.toFixed(1)} ms; ` +
        `${(tx / Math.max(1, r.requests.total)).toFixed(2)} database round trips per request`,
    );

    }
    // 2. health while large design PUTs run
    if (parts.includes('health')) {
    const bodyText = bigDesignBody('Bench array (invented example)', 1);
    console.log(`\n/api/health while ${PUT_ROUNDS} rounds of ${PUTS_PER_ROUND} concurrent ${MAX_SITES.toLocaleString('en-US')}-site PUTs run (${(bodyText.length / 1e6).toFixed(1)} MB each):`);
    const versions = new Map<number, number>(projectIds.slice(0, PUTS_PER_ROUND).map((id) => [id, 1]));
    // each project's starting design (every new project has one)
    const designPaths = new Map<number, string>();
    for (const id of versions.keys()) {
      const list = (await (await s.send('GET', `/api/projects/${id}/designs`)).json()) as { designs: { id: number }[] };
      designPaths.set(id, `/api/projects/${id}/designs/${list.designs[0].id}`);
    }
    // the polls cost the main thread too (each one is a request through the whole middleware stack): poll alone for
    // a few seconds first, so the PUTs' own share can be told apart from the polls'
    // (after a warm-up: the first polls compile the middleware stack and cost several times more)
    const warmUp = healthPoller(url, 60_000);
    await new Promise((res) => setTimeout(res, 2_000));
    await warmUp.stop();
    // the main thread's CPU with nothing to answer (timers: the bench server's own event-loop samplers), per second,
    // so the cost per poll below is the polls' own
    const idle0 = cpuMs(child.pid!, 'main');
    const idleT0 = performance.now();
    await new Promise((res) => setTimeout(res, 3_000));
    const idlePerMs = (cpuMs(child.pid!, 'main') - idle0) / (performance.now() - idleT0);
    // (counted from before the poller starts: the server does nothing for it until its first poll arrives)
    const calMain0 = cpuMs(child.pid!, 'main');
    const calT0 = performance.now();
    const calibration = healthPoller(url, 60_000);
    await new Promise((res) => setTimeout(res, 5_000));
    const alone = (await calibration.stop()).polls.map((p) => p.total);
    const idleShare = idlePerMs * (performance.now() - calT0);
    const perPoll = Math.max(0, cpuMs(child.pid!, 'main') - calMain0 - idleShare) / Math.max(1, alone.length);
    console.log(
      `  health alone first: ${alone.length} polls, p50 ${pct(alone, 50).toFixed(1)} ms, max ${Math.max(...alone).toFixed(1)} ms; ` +
        `main thread ${perPoll.toFixed(2)} ms CPU per poll (beside ${(idlePerMs * 1000).toFixed(0)} ms/s when idle, taken off)`,
    );
    // The PUT clients stand in for browsers on other machines; here they share the server's 2 cores, and at the
    // server's priority their work on 4 × 17 MB bodies and answers took cores from the server they measure. This
    // thread (the PUT clients; the poller is its own process, started above at normal priority) drops to nice
    // TETRAWELL_BENCH_CLIENT_NICE (default 10; 0 keeps the server's priority). On Linux the nice value is per thread.
    const clientNice = Number(process.env.TETRAWELL_BENCH_CLIENT_NICE ?? 10);
    const putTimes: number[] = [];
    const statuses: number[] = [];
    const cpu0 = cpuMs(child.pid!);
    const main0 = cpuMs(child.pid!, 'main');
    const split0 = mainThreadCpu(child.pid!);
    const threads0 = otherThreadsCpu(child.pid!);
    const body0 = bodyProcessCpu(child.pid!);
    await eventLoopDelay(child);
    const polling = process.env.TETRAWELL_BENCH_HEALTH_POLLS !== 'off';
    const health = polling ? healthPoller(url, 600_000) : null;
    await new Promise((res) => setTimeout(res, 500));
    if (clientNice > 0) {
      try {
        setPriority(0, clientNice);
      } catch {
        // not allowed here: the clients keep the server's priority (printed below)
      }
    }
    console.log(`  PUT clients at nice ${getPriority(0)}, health poller at nice ${health ? getPriority(health.pid) : '-'}; server and poller each in a session (autogroup) of their own`);
    const t0 = performance.now();
    for (let round = 0; round < PUT_ROUNDS; round++) {
      await Promise.all(
        [...versions.keys()].map(async (id) => {
          const v = versions.get(id)!;
          // (the version is the body's last field: a slice, not a regular expression run over 17 MB)
          const body = v === 1 ? bodyText : `${bodyText.slice(0, -'1}'.length)}${v}}`;
          const t = performance.now();
          const res = await s.send('PUT', designPaths.get(id)!, body);
          // the bytes only: decoding 17 MB into a string here would take CPU from the server on a 2-core machine
          const bytes = new Uint8Array(await res.arrayBuffer());
          putTimes.push(performance.now() - t);
          statuses.push(res.status);
          // the answer's metadata comes before its document: { "design": { id, name, version, … , "document": … } }
          const m = /^\{"design":\{[^{]*?"version":(\d+)/.exec(new TextDecoder().decode(bytes.subarray(0, 1000)));
          if (m) versions.set(id, Number(m[1]));
        }),
      );
    }
    const putWall = performance.now() - t0;
    const polled = (await health?.stop()) ?? null;
    const during = polled?.polls.map((p) => p.total) ?? [];
    const cpu = cpuMs(child.pid!) - cpu0;
    const mainCpu = cpuMs(child.pid!, 'main') - main0;
    const split1 = mainThreadCpu(child.pid!);
    const threads = threadSplit(threads0, otherThreadsCpu(child.pid!));
    const body1 = bodyProcessCpu(child.pid!);
    // a process that left and came back meanwhile would be counted from zero: said below
    const bodyCpu = body1.pid !== null && body1.pid === body0.pid ? body1.cpu - body0.cpu : body1.cpu;
    const eld = await eventLoopDelay(child);
    console.log(`  PUT statuses ${[...new Set(statuses)].join(', ')}; each PUT p50 ${pct(putTimes, 50).toFixed(0)} ms, max ${Math.max(...putTimes).toFixed(0)} ms; all rounds ${putWall.toFixed(0)} ms`);
    if (polling) console.log(`  health: ${during.length} polls, p50 ${pct(during, 50).toFixed(1)} ms, p99 ${pct(during, 99).toFixed(1)} ms, max ${Math.max(...during).toFixed(1)} ms`);
    if (polled) {
      const app = polled.polls.map((p) => p.app);
      const db = polled.polls.map((p) => p.db);
      console.log(
        `    inside the server (Server-Timing): app p50 ${pct(app, 50).toFixed(1)} ms, max ${Math.max(...app).toFixed(1)} ms; its database probe p50 ${pct(db, 50).toFixed(1)} ms, max ${Math.max(...db).toFixed(1)} ms`,
      );
    }
    console.log(
      `  server CPU (all threads, its design-body process included) ${((cpu + bodyCpu) / 1000).toFixed(2)} s = ${((cpu + bodyCpu) / statuses.length).toFixed(0)} ms per PUT, of which the main thread ` +
        `${(mainCpu / statuses.length).toFixed(0)} ms per PUT; main-thread event-loop delay ` +
        `p50 ${eld.p50.toFixed(1)} ms, p99 ${eld.p99.toFixed(1)} ms, max ${eld.max.toFixed(1)} ms (load average ${loadAverage()})`,
    );
    const pollShare = perPoll * during.length;
    console.log(
      `  main thread: user ${((split1.user - split0.user) / statuses.length).toFixed(0)} ms + system ${((split1.system - split0.system) / statuses.length).toFixed(0)} ms per PUT; ` +
        // an estimate only (10 ms ticks, and a loaded machine changes the cost per poll): TETRAWELL_BENCH_HEALTH_POLLS=off measures the PUTs alone
        `the ${during.length} health polls at the cost measured alone account for ~${(pollShare / statuses.length).toFixed(0)} ms of it per PUT`,
    );
    console.log(
      `  other server threads: ${(threads.lowered / statuses.length).toFixed(0)} ms per PUT at a lowered priority, ` +
        `${(threads.normal / statuses.length).toFixed(0)} ms per PUT at the request thread's own (V8's garbage-collection helpers, libuv's pool)`,
    );
    const niceSet = [...new Set(body1.nices)].sort((a, b) => a - b);
    console.log(
      `  design-body process: ${(bodyCpu / statuses.length).toFixed(0)} ms per PUT, ${body1.nices.length} threads at nice ${niceSet.join(', ') || '(not running)'}` +
        (body0.pid !== null && body1.pid !== body0.pid ? ' (it restarted during the run: counted from its restart)' : ''),
    );
    if (polled) placeSlowPolls(polled.polls, polled, eld, 50);
    if (eld.gc)
      console.log(
        `  main-thread garbage collection: ${eld.gc.count} pauses, ${eld.gc.totalMs.toFixed(0)} ms in all; longest minor ${eld.gc.minorMax.toFixed(1)} ms, longest major ${eld.gc.majorMax.toFixed(1)} ms`,
      );
    }
  } finally {
    await knex.destroy();
    child.kill('SIGTERM');
    await new Promise((res) => child.once('exit', res));
    await cluster?.stop();
  }
}
