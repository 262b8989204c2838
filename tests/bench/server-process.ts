/**
 * Starts tests/bench/load-server.ts (the real `start()`) in a child process for the load benches and resolves
 * with its URL once it prints `LISTENING <url>`. A process of its own, so the bench's client work (autocannon,
 * building big bodies) does not share the event loop it measures.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import path from 'node:path';
import { createWriteStream, readFileSync } from 'node:fs';
import os from 'node:os';
import type { Knex } from 'knex';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..');

export function benchServerProcess(databaseUrl: string, opts: { nodeArgs?: string[]; env?: Record<string, string> } = {}): Promise<{ child: ChildProcess; url: string }> {
  const child = spawn(process.execPath, [...(opts.nodeArgs ?? []), '--import', 'tsx', path.join(here, 'load-server.ts')], {
    cwd: root,
    env: { ...process.env, ...opts.env, TETRAWELL_BENCH_DATABASE_URL: databaseUrl, NODE_ENV: 'production' },
    stdio: ['pipe', 'pipe', 'inherit'],
    // a session of its own (setsid), as a server started from its own shell or service manager has: with Linux's
    // autogrouping the scheduler shares the cores between sessions first (sched(7), "The autogroup feature"), so in
    // the bench's session the server's request thread competed as one of the bench clients' threads. It still ends
    // with the bench: on SIGTERM, or when its stdin closes (load-server.ts)
    detached: true,
  });
  // TETRAWELL_BENCH_SERVER_OUT=<file>: keep the server's stdout (e.g. what --trace-gc prints) in that file
  const keep = process.env.TETRAWELL_BENCH_SERVER_OUT;
  if (keep) child.stdout!.pipe(createWriteStream(keep));
  return new Promise((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      const m = /LISTENING (\S+)/.exec(out);
      if (m) resolve({ child, url: m[1] });
    });
    child.once('exit', (code) => reject(new Error(`the bench server exited with ${code}`)));
  });
}

/**
 * CPU time (user + system, ms) a process has used so far, from /proc/<pid>/stat fields 14 and 15 (proc(5)), in
 * clock ticks of 1/100 s on Linux (USER_HZ). The figure the lead compares between runs on a loaded machine:
 * wall-clock latencies move with other people's load, CPU per request much less.
 */
export function cpuMs(pid: number, thread?: 'main'): number {
  // /proc/<pid>/task/<pid>/stat is the main thread alone (its thread id is the process id): the event loop's share
  const stat = readFileSync(thread === 'main' ? `/proc/${pid}/task/${pid}/stat` : `/proc/${pid}/stat`, 'utf8');
  // the command name (field 2) may hold spaces: count fields after its closing parenthesis
  const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return (Number(f[11]) + Number(f[12])) * 10;
}

/**
 * Transactions PostgreSQL has finished in the bench database: every statement outside an explicit transaction is
 * one, so the difference over a run divided by the requests is the database round trips per request. The
 * statistics collector flushes at most once a second (PGSTAT_MIN_INTERVAL), hence the wait.
 */
export async function transactions(knex: Knex): Promise<number> {
  await new Promise((res) => setTimeout(res, 1_500));
  const r = await knex.raw<{ rows: { n: string }[] }>(`SELECT xact_commit + xact_rollback AS n FROM pg_stat_database WHERE datname = current_database()`);
  return Number(r.rows[0]!.n);
}

export const loadAverage = (): string => os.loadavg().map((x) => x.toFixed(2)).join(' / ');

/** Ask the bench server for its event-loop delay since the last ask (load-server.ts answers `ELD {…}` on stdout). */
export interface ServerDelays {
  p50: number;
  p99: number;
  max: number;
  /** the main thread's garbage-collection pauses over the same span (ms) */
  gc?: { minorMax: number; majorMax: number; totalMs: number; count: number };
  /** the main thread's stalls over 15 ms (a 5 ms timer that fired late) and GC pauses over 5 ms: start (epoch ms) and length */
  stalls?: { at: number; ms: number }[];
  pauses?: { at: number; ms: number; kind: string }[];
}

export function eventLoopDelay(child: ChildProcess): Promise<ServerDelays> {
  return new Promise((resolve) => {
    let out = '';
    const onData = (d: Buffer) => {
      out += d.toString();
      const m = /ELD (\{[^\n]*\})/.exec(out);
      if (m) {
        child.stdout!.off('data', onData);
        resolve(JSON.parse(m[1]) as ServerDelays);
      }
    };
    child.stdout!.on('data', onData);
    child.stdin!.write('eld\n');
  });
}
