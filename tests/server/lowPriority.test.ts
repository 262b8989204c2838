/**
 * Worker threads that compute beside the request thread lower their own nice value (server/workers/lowPriority.ts),
 * and only their own: on Linux the nice value is per thread (setpriority(2), NOTES), so the request thread keeps
 * its priority. Checked in a real worker thread, reading both values back with os.getPriority.
 */
import { Worker } from 'node:worker_threads';
import { getPriority } from 'node:os';
import { readdirSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { JOB_NICE, WORKER_NICE } from '../../server/workers/lowPriority';
import { jobThreads } from '../../server/jobs/threads';
import { createKnex } from '../../server/db/config';

const PAIR = fileURLToPath(new URL('../fixtures/designs/pair-coarse.json', import.meta.url));
const MODULE = fileURLToPath(new URL('../../server/workers/lowPriority.ts', import.meta.url));

describe('lowerThreadPriority', () => {
  it.runIf(process.platform === 'linux')('lowers the calling worker thread alone', async () => {
    const before = getPriority(process.pid);
    const script = `
      const { parentPort } = require('node:worker_threads');
      const { readlinkSync } = require('node:fs');
      const { getPriority } = require('node:os');
      // tsx's loader registered in this thread, so it can import the TypeScript module
      import('tsx/esm/api').then(({ register }) => { register(); return import(${JSON.stringify(MODULE)}); }).then((m) => {
        const ok = m.lowerThreadPriority();
        const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
        parentPort.postMessage({ ok, tid, nice: getPriority(tid) });
      });`;
    const w = new Worker(script, { eval: true });
    const got = await new Promise<{ ok: boolean; tid: number; nice: number }>((resolve, reject) => {
      w.once('message', resolve);
      w.once('error', reject);
    });
    await w.terminate();
    expect(got.ok).toBe(true);
    expect(got.tid).not.toBe(process.pid);
    // raised to WORKER_NICE, or kept when it already was lower (a process started under nice)
    expect(got.nice).toBe(Math.max(before, WORKER_NICE));
    expect(getPriority(process.pid)).toBe(before);
  });

  it.runIf(process.platform === 'linux')('a job thread runs at the lowest priority, nice 19, and the request thread keeps its own', async () => {
    const before = getPriority(process.pid);
    const threads = jobThreads(1);
    const seen: number[] = [];
    try {
      // a small mesh job (the coarse two-donor fixture); the thread lowers itself when it loads, and lives on
      // after the task (piscina's idle timeout), so every thread's nice value is read back here afterwards
      const out = await threads.run({ kind: 'mesh', documentJson: readFileSync(PAIR, 'utf8'), options: { order: 1 } }, {});
      expect(out.ok).toBe(true);
      for (const tid of readdirSync(`/proc/${process.pid}/task`).map(Number)) {
        if (tid !== process.pid) seen.push(getPriority(tid));
      }
    } finally {
      await threads.close();
    }
    // setpriority(2): 19 is the lowest priority there is
    expect(JOB_NICE).toBe(19);
    expect(seen).toContain(Math.max(before, JOB_NICE));
    expect(getPriority(process.pid)).toBe(before);
  });

  it.runIf(process.platform === 'linux')('a pool with backendNice runs its PostgreSQL backends at that nice value (the design-body process\'s big writes)', async () => {
    // the test cluster runs on this machine, as this user or (as root) as postgres: setpriority(2) may lower it
    const knex = createKnex(process.env.DATABASE_URL!, { poolMax: 1, backendNice: WORKER_NICE });
    const plain = createKnex(process.env.DATABASE_URL!, { poolMax: 1 });
    try {
      const pid = (await knex.raw<{ rows: { pid: number }[] }>('select pg_backend_pid() as pid')).rows[0]!.pid;
      const other = (await plain.raw<{ rows: { pid: number }[] }>('select pg_backend_pid() as pid')).rows[0]!.pid;
      expect(getPriority(pid)).toBe(WORKER_NICE);
      // only that pool's backends: another connection keeps the server's own priority
      expect(getPriority(other)).toBeLessThan(WORKER_NICE);
      // with autogrouping on, each backend (a session leader: PostgreSQL calls setsid() in every child) is a
      // scheduling group alone, where the thread's nice value weighs nothing against other groups: the group's own
      // nice value is lowered too (sched(7), "The autogroup feature"); the other pool's backend keeps nice 0
      if (readFileSync('/proc/sys/kernel/sched_autogroup_enabled', 'utf8').trim() === '1') {
        expect(readFileSync(`/proc/${pid}/autogroup`, 'utf8')).toMatch(new RegExp(`nice ${WORKER_NICE}\\s*$`));
        expect(readFileSync(`/proc/${other}/autogroup`, 'utf8')).toMatch(/nice 0\s*$/);
      }
    } finally {
      await Promise.all([knex.destroy(), plain.destroy()]);
    }
  });
});
