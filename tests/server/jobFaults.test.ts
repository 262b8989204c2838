/**
 * Faults: a worker process killed with SIGKILL in the middle of a job, two workers sharing one
 * queue, and a worker whose project storage is full. Real PostgreSQL, real pg-boss, real worker
 * threads; the killed worker is a separate process started with `server/worker.ts` (what
 * `npm run worker` runs). Queues get a prefix of their own so other test files' workers never
 * take these jobs.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { createHash, randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobResponseSchema, type Job } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { newUser, startTestEnv, testDatabaseUrl, type TestClient, type TestEnv } from './helpers';
import { startJobWorker, type JobWorker } from '../../server/jobs/worker';
import { silentLogger } from '../../server/config';
import { runPipeline } from '../../server/jobs/pipeline';
import { DEFAULT_QUEUE_SETTINGS, queueName, startBoss } from '../../server/jobs/queue';
import { jobsRepo } from '../../server/repositories/jobs';
import type { Design } from '../../geometry/design/types';

const ROOT = path.resolve(import.meta.dirname, '../..');
const PAIR = JSON.parse(await readFile(path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json'), 'utf8')) as DesignDocument;
const PREFIX = 'faults-test-';
// a lost job is retried after 20 s: far above one coarse mesh on a busy machine (common practice: expiry ≫ job time)
const SETTINGS = { expireInSeconds: 20, maintenanceIntervalSeconds: 1, retryDelaySeconds: 1, retryLimit: 2, queuePrefix: PREFIX };

let env: TestEnv;
let owner: TestClient;
let projectId: number;
const workers: JobWorker[] = [];
const children: ChildProcess[] = [];

async function waitFor(jobId: number, done: (j: Job) => boolean, timeoutMs = 180_000): Promise<Job> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const job = jobResponseSchema.parse((await owner.get(`/api/projects/${projectId}/jobs/${jobId}`)).body).job;
    if (done(job)) return job;
    if (Date.now() > until) throw new Error(`job ${jobId} still ${job.state} (${JSON.stringify(job.progress)})`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
const ended = (j: Job) => ['succeeded', 'failed', 'cancelled'].includes(j.state);

async function design(name: string): Promise<number> {
  const r = await owner.post(`/api/projects/${projectId}/designs`, { name, document: { ...PAIR, name } });
  expect(r.status).toBe(201);
  return r.body.design.id as number;
}

async function inProcessWorker(extra: Record<string, unknown> = {}): Promise<JobWorker> {
  const w = await startJobWorker({ databaseUrl: testDatabaseUrl(), concurrency: 1, settings: { ...SETTINGS, ...extra }, logger: silentLogger, pollIntervalMs: 150 });
  workers.push(w);
  return w;
}

async function download(revisionId: number, name: string): Promise<Buffer> {
  const r = await owner.agent
    .get(`/api/projects/${projectId}/revisions/${revisionId}/files/${name}`)
    .buffer(true)
    .parse((res, cb) => {
      const parts: Buffer[] = [];
      res.on('data', (b: Buffer) => parts.push(b));
      res.on('end', () => cb(null, Buffer.concat(parts)));
    });
  expect(r.status).toBe(200);
  return r.body as Buffer;
}

const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

beforeAll(async () => {
  env = await startTestEnv({ jobs: { workers: 0, settings: SETTINGS } });
  owner = (await newUser(env, 'faults-owner')).client;
  projectId = (await owner.post('/api/projects', { name: 'Faults project' })).body.id as number;
}, 60_000);

afterAll(async () => {
  for (const c of children) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
  for (const w of workers) await w.stop(1_000);
  await env?.stop();
});

describe('a worker process killed mid-job', () => {
  it('another worker finishes it; exactly one revision; nothing readable before', async () => {
    const dId = await design('Kill test pair');
    const child = spawn(process.execPath, ['--import', 'tsx', path.join(ROOT, 'server/worker.ts')], {
      cwd: ROOT,
      env: { ...process.env, DATABASE_URL: testDatabaseUrl(), TETRAWELL_WORKERS: '1', TETRAWELL_QUEUE_PREFIX: PREFIX, TETRAWELL_JOB_EXPIRE_SECONDS: '20', TETRAWELL_JOB_RETRIES: '2' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    children.push(child);
    await new Promise<void>((resolve, reject) => {
      const t = setTimeout(() => reject(new Error('the worker process did not start in 60 s')), 60_000);
      child.stdout!.on('data', (b: Buffer) => {
        if (b.toString().includes('job worker running')) {
          clearTimeout(t);
          resolve();
        }
      });
      child.once('exit', (code) => reject(new Error(`the worker process exited (${code})`)));
    });

    const r = await owner.post(`/api/projects/${projectId}/designs/${dId}/jobs`, { kind: 'mesh', options: { order: 1 } });
    expect(r.status).toBe(202);
    const jobId = r.body.job.id as number;
    const running = await waitFor(jobId, (j) => j.state === 'running' || ended(j), 60_000);
    expect(running.state).toBe('running');
    child.kill('SIGKILL');
    await new Promise((res) => child.once('exit', res));

    // nothing of it is readable: no revision row, no pieces
    expect((await owner.get(`/api/projects/${projectId}/revisions?designId=${dId}`)).body.revisions).toEqual([]);
    expect(await env.knex('revisions').where({ job_id: jobId }).count<{ n: string }[]>('id as n')).toEqual([{ n: '0' }]);

    await inProcessWorker();
    const done = await waitFor(jobId, ended);
    expect(done.state).toBe('succeeded');
    expect(await env.knex('revisions').where({ job_id: jobId }).count<{ n: string }[]>('id as n')).toEqual([{ n: '1' }]);
    const row = (await env.knex('jobs').where({ id: jobId }).first('attempts')) as { attempts: number };
    expect(row.attempts).toBeGreaterThanOrEqual(2);
  }, 240_000);
});

describe('a worker stopped during a queue of jobs', () => {
  it('loses none and does none twice: each job succeeds with exactly one revision', async () => {
    for (const w of workers.splice(0)) await w.stop(1_000);
    const first = await inProcessWorker();
    const ids: number[] = [];
    for (let k = 0; k < 3; k++) {
      const dId = await design(`Restart pair ${k}`);
      const r = await owner.post(`/api/projects/${projectId}/designs/${dId}/jobs`, { kind: 'mesh', options: { order: 1 } });
      expect(r.status).toBe(202);
      ids.push(r.body.job.id as number);
    }
    await waitFor(ids[0], (j) => j.state === 'running' || ended(j), 60_000);
    // no grace: the running job's thread is ended, so it must be retried
    await first.stop(0);
    workers.splice(workers.indexOf(first), 1);
    await inProcessWorker();
    const done = await Promise.all(ids.map((id) => waitFor(id, ended)));
    expect(done.map((j) => j.state)).toEqual(['succeeded', 'succeeded', 'succeeded']);
    const counts = await env.knex('revisions').whereIn('job_id', ids).groupBy('job_id').select('job_id').count<{ job_id: number; n: string }[]>('id as n');
    expect(counts.map((c) => Number(c.n))).toEqual([1, 1, 1]);
  }, 300_000);
});

describe('two workers on one queue', () => {
  it('give the same mesh (sha256 of mesh.twmesh and mesh.vtu) as one computation in this process', async () => {
    // the reference: the pipeline run directly, once
    const ref = runPipeline('mesh', PAIR as Design, { order: 1 });
    const refTw = sha256(ref.files.find((f) => f.name === 'mesh.twmesh')!.bytes);
    const refVtu = sha256(ref.files.find((f) => f.name === 'mesh.vtu')!.bytes);

    while (workers.length < 2) await inProcessWorker();
    const ids: number[] = [];
    for (let k = 0; k < 4; k++) {
      // the same sites under different names: different documents, so no revision is reused
      const dId = await design(`Twin pair ${k}`);
      const r = await owner.post(`/api/projects/${projectId}/designs/${dId}/jobs`, { kind: 'mesh', options: { order: 1 } });
      expect(r.status).toBe(202);
      ids.push(r.body.job.id as number);
    }
    const done = await Promise.all(ids.map((id) => waitFor(id, ended)));
    for (const j of done) {
      expect(j.state).toBe('succeeded');
      expect(sha256(await download(j.revisionId!, 'mesh.twmesh'))).toBe(refTw);
      expect(sha256(await download(j.revisionId!, 'mesh.vtu'))).toBe(refVtu);
    }
    expect(new Set(done.map((j) => j.revisionId)).size).toBe(4);
  }, 300_000);
});

describe('storage quota', () => {
  it('a result that would pass the project quota fails the job with the figures in words', async () => {
    for (const w of workers.splice(0)) await w.stop(1_000);
    await inProcessWorker({ storageQuotaBytes: 1_000 });
    const dId = await design('Quota pair');
    const r = await owner.post(`/api/projects/${projectId}/designs/${dId}/jobs`, { kind: 'mesh', options: { order: 1 } });
    expect(r.status).toBe(202);
    const done = await waitFor(r.body.job.id as number, ended);
    expect(done.state).toBe('failed');
    expect(done.error).toMatch(/storage is full: its revisions take [\d.]+ MiB of 0\.0 MiB and this result needs [\d.]+ MiB more/);
    expect(done.revisionId).toBeNull();
  }, 180_000);
});

describe('a job whose pg-boss job used up its retries', () => {
  it('is failed by the worker sweep with the reason in words', async () => {
    if (!workers.length) await inProcessWorker();
    const boss = await startBoss(testDatabaseUrl(), { ...DEFAULT_QUEUE_SETTINGS, queuePrefix: 'orphan-test-' }, silentLogger);
    try {
      const dId = await design('Orphan pair');
      const { sha256 } = (await env.knex('design_versions').where({ design_id: dId, version: 1 }).first('sha256')) as { sha256: string };
      const bossJobId = randomUUID();
      const owned = (await env.knex('projects').where({ id: projectId }).first('created_by')) as { created_by: number };
      const jobId = await jobsRepo(env.knex).insert({
        projectId, designId: dId, designVersion: 1, designSha256: sha256, kind: 'mesh', options: { order: 1 },
        state: 'running', progress: { phase: 'mesh', fraction: 0.3 }, bossJobId, createdBy: owned.created_by,
      });
      // the pg-boss side of a job whose last worker died: sent without retries, taken, failed
      const q = queueName('mesh', 'orphan-test-');
      await boss.send(q, { jobId }, { id: bossJobId, retryLimit: 0 });
      const [taken] = await boss.fetch(q);
      expect(taken.id).toBe(bossJobId);
      await boss.fail(q, bossJobId, { message: 'worker lost' });
      const done = await waitFor(jobId, ended, 30_000);
      expect(done.state).toBe('failed');
      expect(done.error).toMatch(/started 1 time\(s\) and never finished: the worker running it stopped/);
    } finally {
      await boss.stop({ graceful: false, wait: true });
    }
  }, 60_000);
});
